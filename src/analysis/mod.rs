//! The procedure: a plan and a dataset in, [`Results`] out. No I/O happens here.
//!
//! 1. Groups that cannot carry a line (fewer than 3 rows, or no spread in the
//!    covariate) are left out with a warning ([`eligible`]).
//! 2. The three models are fitted from the groups' moments ([`crate::fit`]).
//! 3. The equal-slopes gate and the slope comparisons ([`gate`]).
//! 4. The common-slope comparison: adjusted means and their differences ([`compare`]).
//! 5. The decision, and warnings when a comparison would mislead ([`decision`]).

mod compare;
mod decision;
mod eligible;
mod error;
mod gate;

pub use error::AnalysisError;

use crate::data::{Dataset, GroupData};
use crate::fit::lines::rss_about;
use crate::fit::{CommonSlopeFit, GroupLine, OneLineFit, SeparateFit};
use crate::plan::{AdjustAt, Plan};
use crate::results::{DataAccount, ModelEcho, ModelFit, OneLine, Provenance, Results};
use crate::stats::dist::t_quantile;

/// Runs the whole procedure. `provenance` is recorded as given.
pub fn run(plan: &Plan, data: &Dataset, provenance: Provenance) -> Result<Results, AnalysisError> {
    let mut warnings = Vec::new();
    let eligible = eligible::select(data, &mut warnings)?;
    let moments: Vec<_> = eligible.groups.iter().map(|g| g.moments).collect();
    let lines: Vec<GroupLine> = eligible
        .groups
        .iter()
        .map(|g| {
            GroupLine::fit(&g.moments)
                .expect("eligible groups have covariate spread")
                .with_points(points(g))
        })
        .collect();
    let separate = SeparateFit::new(lines);
    let mut common = CommonSlopeFit::fit(&moments).expect("eligible groups have covariate spread");
    common.rss = eligible
        .groups
        .iter()
        .map(|g| rss_about(points(g), g.moments.mean_x, g.moments.mean_y, common.slope))
        .sum();
    let mut one = OneLineFit::fit(&moments).expect("eligible groups have covariate spread");
    let all = one.line.moments;
    one.line.rss = eligible
        .groups
        .iter()
        .map(|g| rss_about(points(g), all.mean_x, all.mean_y, one.line.slope))
        .sum();
    let levels: Vec<&str> = eligible.groups.iter().map(|g| g.level.as_str()).collect();
    let alpha = plan.tests.alpha;

    let covariate_mean = one.line.moments.mean_x;
    let adjust_at = match plan.model.adjust_at {
        AdjustAt::Mean => covariate_mean,
        AdjustAt::Value(v) => v,
    };

    let groups = gate::group_lines(&levels, &separate, alpha);
    let equal_slopes =
        gate::equal_slopes(&separate, &common, plan.tests.slopes_alpha, &mut warnings);
    let pairwise_slopes = gate::pairwise_slopes(&levels, &separate, plan.tests.comparisons);
    let common_slope = compare::common_slope(&common, alpha);
    let group_effect = compare::group_effect(&common, &one, &mut warnings);
    let adjusted_means = compare::adjusted_means(&levels, &moments, &common, adjust_at, alpha);
    let pairwise_adjusted =
        compare::pairwise_adjusted(&levels, &moments, &common, alpha, plan.tests.comparisons);

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
        },
        data: DataAccount {
            rows_read: data.rows_read,
            rows_used: one.line.moments.n,
            rows_dropped: eligible.dropped,
            groups_excluded: eligible.excluded,
        },
        covariate_mean,
        adjust_at,
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
        one_line: one_line(&one),
        adjusted_means,
        pairwise_adjusted,
        decision: decision::placeholder(),
        warnings: Vec::new(),
    };
    Ok(decision::conclude(plan, results, warnings))
}

/// A group's (x, y) pairs in data order.
fn points(g: &GroupData) -> impl Iterator<Item = (f64, f64)> + '_ {
    g.x.iter().zip(g.y.iter())
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
