//! Assumption checks of the separate-lines fit: normality and equal spread of the
//! residuals, and the covariate's balance across groups.
//!
//! - Normality: Shapiro–Wilk W (Shapiro & Wilk 1965) with Royston's (1995)
//!   approximation, on the pooled residuals and within each group that has at least
//!   [`MIN_GROUP_NORMALITY_DF`] residual degrees of freedom. The method is
//!   valid up to 5000 values; above that a fixed-seed random subsample of 5000 is
//!   tested (the same rows on every run) and the report says so.
//! - Equal spread: the Brown–Forsythe test (Brown & Forsythe 1974), the one-way
//!   analysis of variance of |e − median_g(e)| across groups. Medians come from the
//!   streaming quantiles of [`crate::stats::quantile`], so no copy of the residuals
//!   is made.
//! - Covariate balance: the one-way analysis of variance of the covariate across
//!   groups, from the groups' moments, and the range every group covers.

use crate::data::GroupData;
use crate::fit::{Moments, SeparateFit};
use crate::number::sig;
use crate::results::{CovariateBalance, EqualVariance, GroupNormality, Normality};
use crate::stats::dist::f_sf;
use crate::stats::quantile::quantile;
use crate::stats::rng::SplitMix64;
use crate::stats::shapiro_wilk::{normal_scores, shapiro_wilk};

/// Largest sample Royston's approximation covers.
pub const SHAPIRO_MAX_N: usize = 5000;
/// Residual degrees of freedom (n − 2) a group needs before its own normality check
/// is made. A line's residuals satisfy two linear constraints, so with few rows they
/// are mostly the design's shape: with three rows (one df) W is the same for every
/// response, 0.75 at equally spaced covariate values, a guaranteed "departure".
/// Eight df (ten rows) matches the rows per group below which the gate is called
/// weak (common practice, no source).
pub const MIN_GROUP_NORMALITY_DF: f64 = 8.0;
/// Seed of the subsample drawn above [`SHAPIRO_MAX_N`].
const SUBSAMPLE_SEED: u64 = 0x5105_e5a1_d0c5_2026;
/// Quantile-plot points kept in `results.json`.
const QQ_POINTS: usize = 400;

/// The checks that look at residuals, which a moments file cannot give.
pub const NEED_ROWS: [&str; 3] = ["normality", "equal_variance", "influence"];

/// The residual checks of a moments file, which holds no rows: each with no
/// statistic (`Checks::not_run` names them), and the influence summary as the
/// selected model gives it over no rows (its cut-offs, nothing flagged).
pub(super) fn without_rows(
    groups: &[&GroupData],
    influence: (crate::results::Influence, super::influence::Flagged),
) -> (
    (Normality, EqualVariance, Vec<String>),
    (crate::results::Influence, super::influence::Flagged),
) {
    let k = groups.len() as f64;
    let n: f64 = groups.iter().map(|g| g.moments.n as f64).sum();
    let normality = Normality {
        method: "shapiro-wilk".into(),
        statistic: None,
        p_value: None,
        n: 0,
        residuals: 0,
        subsampled: false,
        groups: groups
            .iter()
            .map(|g| GroupNormality {
                level: g.level.clone(),
                statistic: None,
                p_value: None,
                n: 0,
                subsampled: false,
                not_tested: Some("no-rows".into()),
            })
            .collect(),
        qq: Vec::new(),
    };
    let equal_variance = EqualVariance {
        method: "brown-forsythe".into(),
        statistic: None,
        df1: k - 1.0,
        df2: n - k,
        p_value: None,
    };
    ((normality, equal_variance, Vec::new()), influence)
}

/// The separate-lines residual of each row of group `gi`, in data order.
fn residuals<'a>(g: &'a GroupData, line_slope: f64) -> impl Iterator<Item = f64> + 'a {
    let m = g.moments;
    g.points()
        .map(move |(x, y)| (y - m.mean_y) - line_slope * (x - m.mean_x))
}

/// `m` distinct indices below `n`, sorted (Floyd's algorithm; Bentley & Floyd 1987).
fn sample_indices(n: usize, m: usize, seed: u64) -> Vec<usize> {
    let mut rng = SplitMix64::new(seed);
    let mut chosen = std::collections::BTreeSet::new();
    for j in n - m..n {
        let t = rng.below(j as u64 + 1) as usize;
        if !chosen.insert(t) {
            chosen.insert(j);
        }
    }
    chosen.into_iter().collect()
}

/// The values of `stream` (of length `n`) to test: all, or a seeded subsample.
fn tested_values(stream: impl Iterator<Item = f64>, n: usize, seed: u64) -> (Vec<f64>, bool) {
    if n <= SHAPIRO_MAX_N {
        return (stream.collect(), false);
    }
    let keep = sample_indices(n, SHAPIRO_MAX_N, seed);
    let mut next = keep.iter().peekable();
    let mut out = Vec::with_capacity(SHAPIRO_MAX_N);
    for (i, v) in stream.enumerate() {
        if next.peek() == Some(&&i) {
            out.push(v);
            next.next();
        }
    }
    (out, true)
}

/// Shapiro–Wilk on pooled and per-group residuals, and the quantile-plot pairs.
pub(super) fn normality(
    groups: &[&GroupData],
    fit: &SeparateFit,
    warnings: &mut Vec<String>,
) -> Normality {
    let total: usize = groups.iter().map(|g| g.moments.n as usize).sum();
    let pooled = groups
        .iter()
        .zip(&fit.lines)
        .flat_map(|(g, l)| residuals(g, l.slope));
    let (sample, subsampled) = tested_values(pooled, total, SUBSAMPLE_SEED);
    let (statistic, p_value) = match shapiro_wilk(&sample) {
        Ok(sw) => (Some(sw.statistic), Some(sw.p_value)),
        Err(e) => {
            warnings.push(format!(
                "The Shapiro–Wilk test of the pooled residuals could not be computed: {e}."
            ));
            (None, None)
        }
    };
    let mut per_group = Vec::new();
    let mut too_few = Vec::new();
    for (gi, (g, l)) in groups.iter().zip(&fit.lines).enumerate() {
        let n = g.moments.n as usize;
        if (n as f64) - 2.0 < MIN_GROUP_NORMALITY_DF {
            too_few.push(format!("`{}`", g.level));
            per_group.push(GroupNormality {
                level: g.level.clone(),
                statistic: None,
                p_value: None,
                n: 0,
                subsampled: false,
                not_tested: Some("too-few-rows".into()),
            });
            continue;
        }
        let (values, sub) =
            tested_values(residuals(g, l.slope), n, SUBSAMPLE_SEED ^ (gi as u64 + 1));
        let (statistic, p_value) = match shapiro_wilk(&values) {
            Ok(sw) => (Some(sw.statistic), Some(sw.p_value)),
            Err(e) => {
                warnings.push(format!(
                    "The Shapiro–Wilk test within group `{}` could not be computed: {e}.",
                    g.level
                ));
                (None, None)
            }
        };
        per_group.push(GroupNormality {
            level: g.level.clone(),
            statistic,
            p_value,
            n: values.len() as u64,
            subsampled: sub,
            not_tested: None,
        });
    }
    if !too_few.is_empty() {
        warnings.push(format!(
            "Normality within {} is not checked: too few rows to check (a group needs at least {} rows, {} residual degrees of freedom, before its own residuals can inform; with fewer, Shapiro–Wilk's W is set by the design, not the data). The pooled check stands.",
            too_few.join(", "),
            MIN_GROUP_NORMALITY_DF as u64 + 2,
            MIN_GROUP_NORMALITY_DF as u64
        ));
    }
    Normality {
        method: "shapiro-wilk".into(),
        statistic,
        p_value,
        n: sample.len() as u64,
        residuals: total as u64,
        subsampled,
        groups: per_group,
        qq: qq_pairs(sample, fit.sigma2().map(f64::sqrt)),
    }
}

/// Sorted standardized residuals against Blom's (1958) normal scores
/// Φ⁻¹((i − 3/8)/(n + 1/4)), thinned to at most [`QQ_POINTS`] evenly spaced ranks.
fn qq_pairs(mut sample: Vec<f64>, sd: Option<f64>) -> Vec<[f64; 2]> {
    let Some(sd) = sd.filter(|s| *s > 0.0) else {
        return Vec::new();
    };
    let n = sample.len();
    if n == 0 {
        return Vec::new();
    }
    sample.sort_by(f64::total_cmp);
    let scores = normal_scores(n);
    let step = (n as f64 / QQ_POINTS as f64).max(1.0);
    let mut out = Vec::new();
    let mut k = 0.0;
    while (k as usize) < n {
        let i = k as usize;
        out.push([scores[i], sample[i] / sd]);
        k += step;
    }
    if out.len() > 1 && (k - step) as usize != n - 1 {
        out.push([scores[n - 1], sample[n - 1] / sd]);
    }
    out
}

/// Brown–Forsythe: one-way ANOVA F of |e − median_g| across groups.
pub(super) fn equal_variance(
    groups: &[&GroupData],
    fit: &SeparateFit,
    warnings: &mut Vec<String>,
) -> EqualVariance {
    let k = groups.len() as f64;
    let n: f64 = groups.iter().map(|g| g.moments.n as f64).sum();
    let (df1, df2) = (k - 1.0, n - k);
    let mut stats = Vec::new();
    for (g, l) in groups.iter().zip(&fit.lines) {
        let median = quantile(|| residuals(g, l.slope), g.moments.n, 0.5).unwrap_or(0.0);
        // Welford on z = |e − median|: mean and within sum of squares.
        let (mut count, mut mean, mut ss) = (0.0_f64, 0.0_f64, 0.0_f64);
        for e in residuals(g, l.slope) {
            let z = (e - median).abs();
            count += 1.0;
            let d = z - mean;
            mean += d / count;
            ss += d * (z - mean);
        }
        stats.push((count, mean, ss));
    }
    let grand = stats.iter().map(|(c, m, _)| c * m).sum::<f64>() / n;
    let between: f64 = stats
        .iter()
        .map(|(c, m, _)| c * (m - grand) * (m - grand))
        .sum();
    let within: f64 = stats.iter().map(|(_, _, ss)| ss).sum();
    let scale = stats.iter().map(|(_, m, _)| m.abs()).fold(0.0, f64::max);
    let f = if within > f64::EPSILON * scale * scale * n && df2 > 0.0 {
        Some((between / df1) / (within / df2))
    } else {
        warnings.push(
            "The Brown–Forsythe test could not be computed: every residual sits at the same distance from its group's median (for example, all residuals are zero), so there is no spread to compare."
                .into(),
        );
        None
    };
    EqualVariance {
        method: "brown-forsythe".into(),
        statistic: f,
        df1,
        df2,
        p_value: f.map(|f| f_sf(f, df1, df2)),
    }
}

/// One-way ANOVA of the covariate across groups, and the range all groups cover.
pub(super) fn covariate_balance(
    moments: &[Moments],
    warnings: &mut Vec<String>,
) -> CovariateBalance {
    let all = moments
        .iter()
        .fold(Moments::default(), |acc, m| acc.merge(m));
    let k = moments.len() as f64;
    let n = all.n as f64;
    let within: f64 = moments.iter().map(|m| m.sxx).sum();
    let between = (all.sxx - within).max(0.0);
    let (df1, df2) = (k - 1.0, n - k);
    let f = (within > 0.0 && df2 > 0.0).then(|| (between / df1) / (within / df2));
    let low = moments
        .iter()
        .map(|m| m.min_x)
        .fold(f64::NEG_INFINITY, f64::max);
    let high = moments
        .iter()
        .map(|m| m.max_x)
        .fold(f64::INFINITY, f64::min);
    let overlap = (low <= high).then_some([low, high]);
    if overlap.is_none() {
        warnings.push(format!(
            "No covariate range is covered by every group (the highest group minimum, {}, lies above the lowest group maximum, {}): any comparison of all groups at one covariate value extrapolates for some of them.",
            sig(low, 4),
            sig(high, 4)
        ));
    }
    CovariateBalance {
        f,
        df1,
        df2,
        p_value: f.map(|f| f_sf(f, df1, df2)),
        overlap,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn streaming_brown_forsythe_matches_the_slice_version() {
        use crate::data::Column;
        use crate::fit::GroupLine;
        use crate::stats::brown_forsythe::brown_forsythe;
        // Invented groups, large enough for the streaming medians to narrow.
        let make = |level: &str, n: usize, scale: f64| {
            let x: Vec<f64> = (0..n).map(|i| i as f64 * 0.01).collect();
            let y: Vec<f64> = x
                .iter()
                .enumerate()
                .map(|(i, v)| 2.0 * v + scale * (((i * 7919) % 1000) as f64 / 1000.0 - 0.5))
                .collect();
            GroupData {
                level: level.into(),
                moments: Moments::from_columns(&x, &y),
                x: x.iter().copied().collect::<Column<f64>>(),
                y: y.iter().copied().collect::<Column<f64>>(),
                rows: (0..n as u32).collect(),
            }
        };
        let groups = [make("a", 90_000, 1.0), make("b", 70_001, 1.5)];
        let refs: Vec<&GroupData> = groups.iter().collect();
        let fit = SeparateFit::new(
            groups
                .iter()
                .map(|g| GroupLine::fit(&g.moments).unwrap())
                .collect(),
        );
        let streamed = equal_variance(&refs, &fit, &mut Vec::new());
        let res: Vec<Vec<f64>> = groups
            .iter()
            .zip(&fit.lines)
            .map(|(g, l)| residuals(g, l.slope).collect())
            .collect();
        let slices: Vec<&[f64]> = res.iter().map(Vec::as_slice).collect();
        let direct = brown_forsythe(&slices).unwrap();
        let rel = (streamed.statistic.unwrap() - direct.statistic).abs() / direct.statistic;
        assert!(
            rel < 1e-9,
            "{} vs {}",
            streamed.statistic.unwrap(),
            direct.statistic
        );
    }

    #[test]
    fn subsample_is_fixed_distinct_and_sorted() {
        let a = sample_indices(100_000, 5000, 7);
        let b = sample_indices(100_000, 5000, 7);
        assert_eq!(a, b);
        assert_eq!(a.len(), 5000);
        assert!(a.windows(2).all(|w| w[0] < w[1]));
        assert!(*a.last().unwrap() < 100_000);
        assert_ne!(a, sample_indices(100_000, 5000, 8));
    }

    #[test]
    fn qq_pairs_are_thinned_and_end_at_the_extremes() {
        let sample: Vec<f64> = (0..1000).map(|i| i as f64).collect();
        let qq = qq_pairs(sample, Some(1.0));
        assert!(qq.len() <= QQ_POINTS + 1);
        assert_eq!(qq.first().unwrap()[1], 0.0);
        assert_eq!(qq.last().unwrap()[1], 999.0);
        assert!(qq.windows(2).all(|w| w[0][0] < w[1][0]));
    }
}
