//! The procedure: a plan and a dataset in, [`Results`] out. No I/O happens here.
//!
//! 1. Groups that cannot carry a line (fewer than 3 rows, or no spread in the
//!    covariate) are left out with a warning ([`eligible`]).
//! 2. The three models are fitted from the groups' moments ([`crate::fit`]).
//! 3. The equal-slopes gate and the slope comparisons ([`gate`]).
//! 4. The common-slope comparison: adjusted means and their differences ([`compare`]).
//!    Both kinds of pairwise differences share [`pairwise`] (adjustment, Tukey–Kramer,
//!    the unpooled Welch form), so neither module imports the other.
//! 5. Assumption checks ([`checks`], [`influence`]) and, when slopes differ, where
//!    along the covariate the groups differ ([`regions`]).
//! 6. The decision, and warnings when a comparison would mislead ([`decision`]).
//! 7. On request, the whole procedure again without the influential rows
//!    ([`sensitivity`]).

mod checks;
mod compare;
mod decision;
mod eligible;
mod equivalence;
mod error;
mod findings;
mod gate;
pub mod influence;
mod limits;
mod pairwise;
mod planning;
mod pooling;
mod regions;
mod robust;
mod scale;
mod sensitivity;
mod study;
pub use study::study;

pub use error::AnalysisError;

use crate::data::{Dataset, GroupData};
use crate::fit::{CommonSlopeFit, GroupLine, OneLineFit, SeparateFit};
use crate::plan::{AdjustAt, Plan};
use crate::results::{
    Checks, DataAccount, EffectSizes, FigurePoints, GroupPoints, ModelEcho, ModelFit, OneLine,
    Provenance, Results,
};
use crate::stats::dist::t_quantile;
use crate::stats::nested_f::rounding_floor;
use crate::stats::quantile::quantiles;

/// Runs the whole procedure. `provenance` is recorded as given.
pub fn run(plan: &Plan, data: &Dataset, provenance: Provenance) -> Result<Results, AnalysisError> {
    let (mut results, flagged) = procedure(plan, data, provenance, None)?;
    let rerun = match plan.checks.sensitivity {
        Some(asked) => asked,
        None => !flagged.rerun.is_empty(),
    };
    if rerun {
        sensitivity::attach(plan, data, &flagged, &mut results);
    }
    // The rows that matter, and what changes without them, reach the summary.
    decision::influence_finding(&mut results);
    // A statistic that cannot be computed is null with a warning; a NaN that got
    // past that is a defect, and no report must carry it (JSON would show null).
    if let Some(path) = crate::results::first_non_finite(&results) {
        return Err(AnalysisError::NonFinite { path });
    }
    Ok(results)
}

/// Influence measures of every used row for the model the decision selects, in
/// group then data order. Builds a vector of all rows: for tests and small data.
pub fn row_influence(
    plan: &Plan,
    data: &Dataset,
) -> Result<Vec<influence::RowInfluence>, AnalysisError> {
    let mut warnings = Vec::new();
    let eligible = eligible::select(data, &mut warnings)?;
    check_magnitudes(plan, &eligible.groups)?;
    let fits = Fits::new(&eligible.groups, data.from_moments);
    let gate = gate::equal_slopes(
        &fits.separate,
        &fits.common,
        plan.tests.slopes_alpha,
        fits.floor,
        &mut warnings,
    );
    let mut rows = Vec::new();
    fits.selected(&eligible.groups, gate.homogeneous)
        .each_row(|r| rows.push(r));
    Ok(rows)
}

/// Points drawn per group at most; lines and bands always use every row.
pub const MAX_DRAWN_PER_GROUP: usize = 1500;

/// The points the figures draw, for the groups in `results` (every k-th row of each
/// group in data order, at most [`MAX_DRAWN_PER_GROUP`]), with fitted values and
/// residuals under the model the decision selected.
pub fn figure_points(data: &Dataset, results: &Results) -> FigurePoints {
    let common = results.decision.homogeneous;
    let groups = results
        .groups
        .iter()
        .enumerate()
        .filter_map(|(i, line)| {
            let g = data.groups.iter().find(|g| g.level == line.level)?;
            let n = g.moments.n as usize;
            let step = n.div_ceil(MAX_DRAWN_PER_GROUP).max(1);
            let (slope, intercept) = if common {
                let m = &results.adjusted_means[i];
                // The parallel line through the group's adjusted mean.
                let b = results.common_slope.slope;
                (b, m.mean - b * results.adjust_at)
            } else {
                (line.slope, line.intercept)
            };
            let points = (0..n)
                .step_by(step)
                .filter_map(|i| Some((g.x.get(i)?, g.y.get(i)?)))
                .map(|(x, y)| {
                    let fitted = intercept + slope * x;
                    [x, y, fitted, y - fitted]
                })
                .collect();
            Some(GroupPoints {
                level: line.level.clone(),
                n: g.moments.n,
                points,
            })
        })
        .collect();
    FigurePoints { groups }
}

/// The three fits, with every RSS recomputed from the residuals.
struct Fits {
    separate: SeparateFit,
    common: CommonSlopeFit,
    one: OneLineFit,
    /// The residual sum of squares rounding alone can leave in any of the three
    /// models; sums at or below it count as zero in the F tests.
    floor: f64,
}

impl Fits {
    fn new(groups: &[&GroupData], from_moments: bool) -> Fits {
        let moments: Vec<_> = groups.iter().map(|g| g.moments).collect();
        let mut lines: Vec<GroupLine> = moments
            .iter()
            .map(|m| GroupLine::fit(m).expect("eligible groups have covariate spread"))
            .collect();
        let mut common =
            CommonSlopeFit::fit(&moments).expect("eligible groups have covariate spread");
        let mut one = OneLineFit::fit(&moments).expect("eligible groups have covariate spread");
        if from_moments {
            // No rows: the fits keep their closed-form residual sums, Syy − b·Sxy.
            // With no rows to take the largest |y| from, the rounding floor takes
            // |ȳ| + √Syy, which bounds it.
            let floor = moments
                .iter()
                .zip(&lines)
                .map(|(m, line)| {
                    let b = line
                        .slope
                        .abs()
                        .max(common.slope.abs())
                        .max(one.line.slope.abs());
                    let max_y = m.mean_y.abs() + m.syy.sqrt();
                    rounding_floor(m.n, max_y + b * m.min_x.abs().max(m.max_x.abs()))
                })
                .sum();
            return Fits {
                separate: SeparateFit::new(lines),
                common,
                one,
                floor,
            };
        }
        let all = one.line.moments;
        // One pass over the rows gives every model's residual sum of squares
        // (see `rss_about` for why they are not taken from the moments).
        // Each residual is taken about means that are themselves rounded, which shifts
        // every residual of a group by the same tiny constant c; with the residuals'
        // sum Σe = n c, Σe² − (Σe)²/n removes that shift exactly (the correction of
        // the corrected two-pass algorithm, Chan, Golub & LeVeque 1983). It matters at
        // large offsets: a response near 1e10 has means rounded to about 1e-6.
        let corrected = |sq: f64, sum: f64, n: f64| (sq - sum * sum / n).max(0.0);
        let (mut rss_common, mut floor) = (0.0, 0.0);
        let (mut single_sq, mut single_sum) = (0.0, 0.0);
        for (g, line) in groups.iter().zip(&mut lines) {
            let m = &g.moments;
            let nf = m.n as f64;
            let (mut own, mut own_sum, mut par, mut par_sum) = (0.0, 0.0, 0.0, 0.0);
            let (mut max_y, max_x) = (0.0_f64, m.min_x.abs().max(m.max_x.abs()));
            for (x, y) in points(g) {
                max_y = max_y.max(y.abs());
                let (dx, dy) = (x - m.mean_x, y - m.mean_y);
                let e = dy - line.slope * dx;
                let c = dy - common.slope * dx;
                let o = (y - all.mean_y) - one.line.slope * (x - all.mean_x);
                own += e * e;
                own_sum += e;
                par += c * c;
                par_sum += c;
                single_sq += o * o;
                single_sum += o;
            }
            line.rss = corrected(own, own_sum, nf);
            rss_common += corrected(par, par_sum, nf);
            let b = line
                .slope
                .abs()
                .max(common.slope.abs())
                .max(one.line.slope.abs());
            floor += rounding_floor(m.n, max_y + b * max_x);
        }
        let rss_one = corrected(single_sq, single_sum, all.n as f64);
        common.rss = rss_common;
        one.line.rss = rss_one;
        Fits {
            separate: SeparateFit::new(lines),
            common,
            one,
            floor,
        }
    }

    /// The model the decision selects, for influence measures.
    fn selected<'a>(&self, groups: &'a [&'a GroupData], homogeneous: bool) -> influence::Model<'a> {
        let k = groups.len() as f64;
        if homogeneous {
            influence::Model {
                groups,
                slopes: vec![self.common.slope; groups.len()],
                sxx: vec![self.common.sxx_within; groups.len()],
                rss: self.common.rss,
                p: k + 1.0,
                name: decision::LEAD_COMMON,
            }
        } else {
            influence::Model {
                groups,
                slopes: self.separate.lines.iter().map(|l| l.slope).collect(),
                sxx: self.separate.lines.iter().map(|l| l.moments.sxx).collect(),
                rss: self.separate.rss,
                p: 2.0 * k,
                name: decision::LEAD_SEPARATE,
            }
        }
    }
}

/// Fewer steps than this between the smallest and largest covariate value, at the
/// spacing of doubles near the largest, earn a precision warning.
const MIN_RESOLVED_STEPS: f64 = 1e6;

/// A covariate whose spread is tiny beside its offset (x = 1e15 + a few tenths) is
/// rounded when it is read: neighbouring doubles near 1e15 are 0.125 apart, so its
/// values, and every slope on them, carry only a few digits. The magnitude guard
/// cannot see this (the values are ordinary in size), so the spread is measured
/// in units of that spacing. Common practice, no source.
fn offset_precision_warning(
    covariate: &str,
    moments: &[crate::fit::moments::Moments],
) -> Option<String> {
    let lo = moments
        .iter()
        .map(|m| m.min_x)
        .fold(f64::INFINITY, f64::min);
    let hi = moments
        .iter()
        .map(|m| m.max_x)
        .fold(f64::NEG_INFINITY, f64::max);
    let top = lo.abs().max(hi.abs());
    if !(top.is_finite() && hi > lo) {
        return None;
    }
    let spacing = top * f64::EPSILON;
    let steps = (hi - lo) / spacing;
    (steps < MIN_RESOLVED_STEPS).then(|| {
        format!(
            "`{covariate}` spans only {} beside values near {}: at that size a number is stored to about {}, so the covariate keeps fewer than {} significant digits of its spread and the slopes may be far off. Subtract a round offset from the column (for example {}) before the analysis.",
            crate::number::sig(hi - lo, 3),
            crate::number::sig(top, 3),
            crate::number::sig(spacing, 2),
            (steps.max(1.0).log10().floor() as i64).max(1),
            crate::number::sig(lo.trunc(), 6)
        )
    })
}

/// The procedure proper; also returns the rows beyond the influence cut-offs.
/// Under many-to-one comparisons the first level is the reference: if it was left
/// out, the next level must not silently take its place.
fn reference_kept(
    plan: &Plan,
    data: &Dataset,
    eligible: &eligible::Eligible,
) -> Result<(), AnalysisError> {
    if plan.tests.comparisons != crate::plan::Comparisons::AgainstReference {
        return Ok(());
    }
    let Some(first) = data.groups.first() else {
        return Ok(());
    };
    match eligible.excluded.iter().find(|e| e.level == first.level) {
        Some(e) => Err(AnalysisError::ReferenceExcluded {
            reference: e.level.clone(),
            why: e.reason.clone(),
        }),
        None => Ok(()),
    }
}

/// `adjust_at` overrides the plan's adjustment point (the sensitivity rerun holds
/// the full data's).
fn procedure(
    plan: &Plan,
    data: &Dataset,
    provenance: Provenance,
    adjust_at: Option<f64>,
) -> Result<(Results, influence::Flagged), AnalysisError> {
    let mut warnings = Vec::new();
    let eligible = eligible::select(data, &mut warnings)?;
    reference_kept(plan, data, &eligible)?;
    check_magnitudes(plan, &eligible.groups)?;
    let moments: Vec<_> = eligible.groups.iter().map(|g| g.moments).collect();
    if let Some(w) = offset_precision_warning(&plan.model.covariate, &moments) {
        warnings.push(w);
    }
    let fits = Fits::new(&eligible.groups, data.from_moments);
    let (separate, common, one) = (&fits.separate, &fits.common, &fits.one);
    let levels: Vec<&str> = eligible.groups.iter().map(|g| g.level.as_str()).collect();
    let alpha = plan.tests.alpha;

    let covariate_mean = one.line.moments.mean_x;
    let adjust_at = adjust_at.unwrap_or(match plan.model.adjust_at {
        AdjustAt::Mean => covariate_mean,
        AdjustAt::Value(v) => v,
    });

    let groups = gate::group_lines(&levels, separate, alpha);
    let mut equal_slopes = gate::equal_slopes(
        separate,
        common,
        plan.tests.slopes_alpha,
        fits.floor,
        &mut warnings,
    );
    // k groups give k(k − 1)/2 pairs: beyond the plan's cap none is listed, so the
    // memory stays bounded by the groups, not their square.
    let k = levels.len() as u64;
    let pairs = pairwise::pair_count(k, plan.tests.comparisons);
    let list_pairs = pairs <= plan.report.max_pairs;
    if !list_pairs {
        warnings.push(format!(
            "{k} groups give {pairs} pairs, more than report.max_pairs = {}: the pairwise lists (slope and adjusted-mean differences, regions, differences at chosen values, equivalence) are left out. The equal-slopes and group-effect tests cover every group; raise report.max_pairs to list the pairs.",
            plan.report.max_pairs
        ));
    }
    let robust_and_families = robust::compute(
        &robust::Settings {
            kind: plan.tests.covariance,
            alpha,
            slopes_alpha: plan.tests.slopes_alpha,
            comparisons: plan.tests.comparisons,
            adjust_at,
            list_pairs,
        },
        &levels,
        &eligible.groups,
        separate,
        common,
        equal_slopes.homogeneous,
    );
    let (robust, robust_families) = match robust_and_families {
        Some((r, families)) => (Some(r), families),
        None => (None, [None, None]),
    };
    // With a robust covariance the gate decides on its Wald test (when it can be
    // computed); the classical F stays in `equal_slopes` for the reader.
    if let Some(rb) = &robust
        && rb.equal_slopes.p_value.is_some()
    {
        equal_slopes.homogeneous = rb.equal_slopes.homogeneous;
    }
    let (pairwise_slopes, slope_family) = if list_pairs {
        gate::pairwise_slopes(&levels, separate, plan.tests.comparisons, alpha)
    } else {
        (Vec::new(), None)
    };
    let equivalence = plan.tests.slope_margin.map(|margin| {
        // The standard errors the gate uses: robust when the plan asks for them.
        let pairs: Vec<equivalence::Difference> = match &robust {
            Some(rb) => rb
                .pairwise_slopes
                .iter()
                .map(|p| equivalence::Difference::new(&p.a, &p.b, p.difference, p.se, p.df))
                .collect(),
            None => pairwise_slopes
                .iter()
                .map(|p| equivalence::Difference::new(&p.a, &p.b, p.difference, p.se, p.df))
                .collect(),
        };
        equivalence::slopes(
            &pairs,
            margin,
            alpha,
            plan.tests.covariance.name(),
            plan.tests.gate,
        )
    });
    // Under the equivalence rule the common-slope branch needs every pair shown
    // equivalent; a test that does not reject is not enough.
    if plan.tests.gate == crate::plan::GateRule::Equivalence
        && let Some(eq) = &equivalence
    {
        equal_slopes.homogeneous = eq.reading == "shown-equivalent";
    }
    let homogeneous = equal_slopes.homogeneous;
    let common_slope = compare::common_slope(common, alpha);
    let group_effect = compare::group_effect(common, one, fits.floor, &mut warnings);
    let adjusted_means = compare::adjusted_means(&levels, &moments, common, adjust_at, alpha);
    let (pairwise_adjusted, adjusted_family) = if list_pairs {
        compare::pairwise_adjusted(&levels, &moments, common, alpha, plan.tests.comparisons)
    } else {
        (Vec::new(), None)
    };
    // Under many-to-one comparisons both families carry their critical values.
    let many_to_one = match (slope_family, adjusted_family) {
        (Some(slopes), Some(adjusted)) => {
            let [robust_slopes, robust_adjusted] = robust_families;
            Some(crate::results::ManyToOne {
                reference: levels[0].to_string(),
                level: 1.0 - alpha,
                slopes,
                adjusted,
                robust_slopes,
                robust_adjusted,
            })
        }
        _ => None,
    };
    if plan.tests.comparisons == crate::plan::Comparisons::AgainstReference
        && levels.len() > pairwise::MAX_MANY_TO_ONE_GROUPS
        && list_pairs
    {
        warnings.push(format!(
            "With {} groups the many-to-one p-values and simultaneous intervals are the Bonferroni bound over the {} differences (conservative): slopewise takes them from the multivariate t for at most {} groups.",
            levels.len(),
            levels.len() - 1,
            pairwise::MAX_MANY_TO_ONE_GROUPS
        ));
    }
    if plan.tests.comparisons != crate::plan::Comparisons::AgainstReference
        && !pairwise::tukey_feasible(levels.len())
    {
        warnings.push(format!(
            "Tukey–Kramer p-values are left out (null): with {} groups there are {} pairs, and slopewise computes them for at most {} groups. Holm or Bonferroni adjustment covers any number of pairs.",
            levels.len(),
            levels.len() * (levels.len() - 1) / 2,
            pairwise::MAX_TUKEY_GROUPS
        ));
    }
    let (equal_slopes_f2, equal_slopes_f2_ci, equal_slopes_partial_eta2_ci) =
        planning::effect_intervals(equal_slopes.f, equal_slopes.df1, equal_slopes.df2, alpha);
    let effect_sizes = EffectSizes {
        equal_slopes_partial_eta2: partial_eta2(common.rss - separate.rss, separate.rss),
        equal_slopes_partial_eta2_ci,
        equal_slopes_f2,
        equal_slopes_f2_ci,
        group_effect_partial_eta2: partial_eta2(one.line.rss - common.rss, common.rss),
    };
    let next_season = planning::next_season(
        &levels,
        separate,
        plan.tests.slopes_alpha,
        plan.tests.slope_margin,
    );

    // The residual checks and the influence measures each take a few passes over
    // every row and share nothing, so they run on two cores. Warnings keep the
    // order a single thread would give them.
    let ((normality, equal_variance, check_warnings), (influence, flagged)) = if data.from_moments {
        checks::without_rows(
            &eligible.groups,
            fits.selected(&eligible.groups, homogeneous)
                .summarize(alpha),
        )
    } else {
        std::thread::scope(|scope| {
            let residual_checks = scope.spawn(|| {
                let mut w = Vec::new();
                let normality = checks::normality(&eligible.groups, separate, &mut w);
                let equal_variance = checks::equal_variance(&eligible.groups, separate, &mut w);
                (normality, equal_variance, w)
            });
            let influence = fits
                .selected(&eligible.groups, homogeneous)
                .summarize(alpha);
            let residual_checks = residual_checks
                .join()
                .unwrap_or_else(|panic| std::panic::resume_unwind(panic));
            (residual_checks, influence)
        })
    };
    warnings.extend(check_warnings);
    let checks = Checks {
        normality,
        equal_variance,
        covariate_balance: checks::covariate_balance(&moments, &mut warnings),
        influence,
        not_run: if data.from_moments {
            checks::NEED_ROWS.iter().map(|c| c.to_string()).collect()
        } else {
            Vec::new()
        },
    };

    let pair_indices = pairwise::pair_indices(levels.len(), plan.tests.comparisons);
    let (regions, differences_at) = if homogeneous || !list_pairs {
        (Vec::new(), Vec::new())
    } else {
        let all = one.line.moments;
        let at = match &plan.tests.compare_at {
            Some(values) => {
                // A difference far outside the data rests on the lines' extension
                // alone; say so rather than report its p-value bare (issue 19).
                for v in values {
                    if *v < all.min_x || *v > all.max_x {
                        warnings.push(format!(
                            "tests.compare_at value {} lies outside the observed covariate range [{}, {}]: the difference there is an extrapolation of the fitted lines",
                            crate::number::trimmed(*v, 6),
                            crate::number::trimmed(all.min_x, 6),
                            crate::number::trimmed(all.max_x, 6)
                        ));
                    }
                }
                values.clone()
            }
            None if data.from_moments => {
                // The quartiles need the rows; the mean is what the moments give.
                warnings.push(format!(
                    "The differences between the lines are given at the covariate's mean ({}) only: the quartiles need the rows, and a moments file has none. List the values under tests.compare_at.",
                    crate::number::trimmed(all.mean_x, 6)
                ));
                vec![all.mean_x]
            }
            None => {
                let x = || {
                    eligible
                        .groups
                        .iter()
                        .flat_map(|g| g.x.chunks())
                        .flat_map(|c| c.iter().copied())
                };
                quantiles(x, all.n, Some((all.min_x, all.max_x)), &[0.25, 0.5, 0.75])
            }
        };
        (
            regions::regions(
                &levels,
                separate,
                alpha,
                plan.tests.regions,
                all.mean_x,
                [all.min_x, all.max_x],
                &pair_indices,
            ),
            regions::differences_at(&levels, separate, alpha, &at, &pair_indices),
        )
    };

    let (pooling, stopped) = match pooling::pooling(
        plan,
        equal_slopes.p_value,
        group_effect.p_value,
        &levels,
        separate,
        common,
    ) {
        Some((p, stopped)) => (Some(p), stopped),
        None => (None, None),
    };
    if let Some(statement) = stopped {
        // Said first: the limits section has no line to read from.
        warnings.insert(0, statement);
    }
    let limit_model = match (&pooling, homogeneous) {
        (Some(p), _) => p.decision.clone(),
        (None, true) => "common-slope".to_string(),
        (None, false) => "separate".to_string(),
    };
    let (limits, limits_earliest) = match &plan.limits {
        Some(spec) => limits::crossings(
            spec,
            &limit_model,
            &levels,
            separate,
            common,
            one,
            &mut warnings,
        ),
        None => (Vec::new(), Vec::new()),
    };
    let limits_supported = plan
        .limits
        .as_ref()
        .map(|spec| limits::supported(spec, &limit_model, &limits));

    let results = Results {
        title: plan.title.clone(),
        provenance,
        model: ModelEcho {
            response: plan.model.response.clone(),
            covariate: plan.model.covariate.clone(),
            group: plan.model.group.clone(),
            response_transform: plan.model.response_transform.name().into(),
            covariate_transform: plan.model.covariate_transform.name().into(),
            adjust_at_rule: match plan.model.adjust_at {
                AdjustAt::Mean => "mean".into(),
                AdjustAt::Value(_) => "value".into(),
            },
            alpha,
            slopes_alpha: plan.tests.slopes_alpha,
            comparisons: plan.tests.comparisons.name().into(),
            compare_at_rule: match plan.tests.compare_at {
                Some(_) => "values".into(),
                None if data.from_moments => "mean".into(),
                None => "quartiles".into(),
            },
            response_units: plan.model.response_units.clone(),
            covariate_units: plan.model.covariate_units.clone(),
            slope_reading: scale::slope_reading(
                plan.model.response_transform,
                plan.model.covariate_transform,
            )
            .into(),
        },
        data: DataAccount {
            rows_read: data.rows_read,
            rows_used: one.line.moments.n,
            rows_dropped: eligible.dropped,
            groups_excluded: eligible.excluded,
            source: data.from_moments.then(|| "moments".to_string()),
        },
        covariate_mean,
        adjust_at,
        adjust_at_measured: plan.model.covariate_transform.inverse(adjust_at),
        groups,
        separate_slopes: ModelFit {
            rss: separate.rss,
            df: separate.df,
            residual_sd: separate.sigma2().map(f64::sqrt),
        },
        equal_slopes,
        pairwise_slopes,
        common_slope,
        group_effect,
        one_line: one_line(one),
        adjusted_means,
        pairwise_adjusted,
        many_to_one,
        regions,
        differences_at,
        effect_sizes,
        checks,
        sensitivity: None,
        limits,
        limits_earliest,
        limits_supported,
        pooling,
        robust,
        bands: bands(plan, &levels, separate, common, alpha),
        next_season,
        equivalence,
        decision: decision::placeholder(),
        warnings: Vec::new(),
    };
    let mut results = results;
    scale::back_transform(plan.model.response_transform, &mut results);
    for d in &mut results.differences_at {
        d.at_measured = plan.model.covariate_transform.inverse(d.at);
    }
    let limits_model = plan.limits.as_ref().map(|_| limit_model.as_str());
    Ok((
        decision::conclude(plan, results, warnings, limits_model),
        flagged,
    ))
}

/// Squares of values beyond 1e150 overflow, and of spreads below 1e-150 underflow;
/// either would turn sums of squares into infinity or zero. Refuse them plainly
/// rather than report numbers that mean nothing.
fn check_magnitudes(plan: &Plan, groups: &[&GroupData]) -> Result<(), AnalysisError> {
    const LIMIT: f64 = 1e150;
    let (mut max_x, mut max_y) = (0.0_f64, 0.0_f64);
    let (mut lo_y, mut hi_y) = (f64::INFINITY, f64::NEG_INFINITY);
    for g in groups {
        max_x = max_x.max(g.moments.min_x.abs()).max(g.moments.max_x.abs());
        if g.y.is_empty() {
            // Moments without rows: no value lies further than √Syy from the mean.
            max_y = max_y.max(g.moments.mean_y.abs() + g.moments.syy.sqrt());
        }
        for y in g.y.iter() {
            max_y = max_y.max(y.abs());
            lo_y = lo_y.min(y);
            hi_y = hi_y.max(y);
        }
    }
    // The smallest group spread: one group's tiny spread is enough for its sum of
    // squares to underflow, whatever the others hold.
    let spread_x = groups
        .iter()
        .map(|g| g.moments.max_x - g.moments.min_x)
        .filter(|s| *s > 0.0)
        .fold(f64::INFINITY, f64::min);
    let response = plan.model.response_transform.label(&plan.model.response);
    let covariate = plan.model.covariate_transform.label(&plan.model.covariate);
    let bad = |column: String, magnitude: f64| Err(AnalysisError::Magnitude { column, magnitude });
    if max_x > LIMIT {
        return bad(covariate, max_x);
    }
    if max_y > LIMIT {
        return bad(response, max_y);
    }
    if spread_x < 1.0 / LIMIT {
        return bad(covariate, spread_x);
    }
    if hi_y > lo_y && hi_y - lo_y < 1.0 / LIMIT {
        return bad(response, hi_y - lo_y);
    }
    Ok(())
}

/// Both critical values of every line's band (Working & Hotelling 1929 for the
/// simultaneous one).
fn bands(
    plan: &Plan,
    levels: &[&str],
    separate: &SeparateFit,
    common: &CommonSlopeFit,
    alpha: f64,
) -> crate::results::Bands {
    let both = |level: &str, df: f64| crate::results::BandCritical {
        level: level.to_string(),
        pointwise: (df > 0.0).then(|| t_quantile(1.0 - alpha / 2.0, df)),
        simultaneous: (df > 0.0).then(|| crate::stats::bands::working_hotelling(alpha, df)),
    };
    crate::results::Bands {
        drawn: match plan.report.bands {
            crate::plan::BandKind::Pointwise => "pointwise",
            crate::plan::BandKind::Simultaneous => "simultaneous",
        }
        .into(),
        groups: levels
            .iter()
            .zip(&separate.lines)
            .map(|(l, line)| both(l, line.df))
            .collect(),
        common: both("", common.df),
    }
}

/// SS_effect / (SS_effect + SS_residual); `None` when both are zero.
fn partial_eta2(effect: f64, residual: f64) -> Option<f64> {
    let effect = effect.max(0.0);
    let total = effect + residual;
    (total > 0.0).then(|| effect / total)
}

/// A group's (x, y) pairs in data order.
fn points(g: &GroupData) -> impl Iterator<Item = (f64, f64)> + '_ {
    g.points()
}

fn one_line(one: &OneLineFit) -> OneLine {
    let l = &one.line;
    OneLine {
        n: l.moments.n,
        slope: l.slope,
        intercept: l.intercept,
        slope_se: l.slope_se(),
        intercept_se: l.intercept_se(),
        residual_sd: l.sigma2().map(f64::sqrt),
        r_squared: l.r_squared(),
    }
}

/// `estimate ± t(1 − alpha/2, df) · se`, or `None` when se or df is unusable.
pub(crate) fn interval(estimate: f64, se: Option<f64>, df: f64, alpha: f64) -> Option<[f64; 2]> {
    let se = se?;
    if !(df > 0.0) || !se.is_finite() {
        return None;
    }
    let half = t_quantile(1.0 - alpha / 2.0, df) * se;
    Some([estimate - half, estimate + half])
}

/// `a / b` when both are finite and b > 0.
pub(crate) fn ratio(a: f64, b: Option<f64>) -> Option<f64> {
    let b = b?;
    (b > 0.0 && a.is_finite()).then(|| a / b)
}

#[cfg(test)]
mod tests;
