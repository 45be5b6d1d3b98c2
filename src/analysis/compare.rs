//! The common-slope comparison: the parallel-lines model's slope, its group effect,
//! adjusted means and their pairwise differences.
//!
//! Adjusted means are the model's predictions at one covariate value x₀ (the
//! least-squares means of Searle, Speed & Milliken 1980): ŷ_g = ȳ_g + b (x₀ − x̄_g),
//! with Var = s² (1/n_g + (x₀ − x̄_g)² / Σ Sxx). The difference of two is
//! ȳ_a − ȳ_b − b (x̄_a − x̄_b), with Var = s² (1/n_a + 1/n_b + (x̄_a − x̄_b)² / Σ Sxx),
//! the same at every x₀ because the lines are parallel (Snedecor & Cochran 1989,
//! §18.3). The group effect is the extra-sum-of-squares F of one line against
//! parallel lines.

use super::gate::fill_adjusted;
use super::{interval, ratio};
use crate::fit::{CommonSlopeFit, Moments, OneLineFit};
use crate::plan::Comparisons;
use crate::results::{AdjustedMean, CommonSlope, GroupEffect, MeanPair};
use crate::stats::dist::{f_sf, t_two_sided};
use crate::stats::studentized_range;

/// Tukey–Kramer p-value of a pairwise t (Tukey 1953; Kramer 1956): the upper tail of
/// the studentized range for `k` groups and `df` at q = |t|·√2.
pub(super) fn tukey_kramer(t: f64, k: usize, df: f64) -> Option<f64> {
    tukey_feasible(k).then(|| studentized_range::sf(t.abs() * std::f64::consts::SQRT_2, k, df))
}

/// Groups up to which Tukey–Kramer p-values are computed. Each costs a double
/// integral (about a millisecond), and k groups have k(k − 1)/2 pairs: beyond 45
/// groups (990 pairs) the run would spend many seconds on them.
pub const MAX_TUKEY_GROUPS: usize = 45;

/// True when Tukey–Kramer p-values are computed for `k` groups.
pub(super) fn tukey_feasible(k: usize) -> bool {
    k <= MAX_TUKEY_GROUPS
}

/// The common slope with its interval.
pub(super) fn common_slope(fit: &CommonSlopeFit, alpha: f64) -> CommonSlope {
    let se = fit.slope_se();
    CommonSlope {
        slope: fit.slope,
        se,
        ci: interval(fit.slope, se, fit.df, alpha),
        df: fit.df,
        residual_sd: fit.sigma2().map(f64::sqrt),
    }
}

/// F = ((RSS_one − RSS_common)/(k − 1)) / (RSS_common/(n − k − 1)).
pub(super) fn group_effect(
    common: &CommonSlopeFit,
    one: &OneLineFit,
    warnings: &mut Vec<String>,
) -> GroupEffect {
    let df1 = common.intercepts.len() as f64 - 1.0;
    let extra = (one.line.rss - common.rss).max(0.0);
    let f = ratio(extra / df1, common.sigma2());
    if f.is_none() {
        warnings.push(
            "The group-effect F test could not be computed: the parallel lines fit every row exactly (zero residual variance)."
                .into(),
        );
    }
    GroupEffect {
        f,
        df1,
        df2: common.df,
        p_value: f.map(|f| f_sf(f, df1, common.df)),
        rss_one_line: one.line.rss,
    }
}

/// Each group's mean at `x0` on the common slope.
pub(super) fn adjusted_means(
    levels: &[&str],
    moments: &[Moments],
    fit: &CommonSlopeFit,
    x0: f64,
    alpha: f64,
) -> Vec<AdjustedMean> {
    let s2 = fit.sigma2();
    levels
        .iter()
        .zip(moments)
        .map(|(level, m)| {
            let mean = m.mean_y + fit.slope * (x0 - m.mean_x);
            let d = x0 - m.mean_x;
            let se = s2.map(|s2| (s2 * (1.0 / m.n as f64 + d * d / fit.sxx_within)).sqrt());
            AdjustedMean {
                level: level.to_string(),
                mean,
                se,
                ci: interval(mean, se, fit.df, alpha),
                within_range: (m.min_x..=m.max_x).contains(&x0),
            }
        })
        .collect()
}

/// Every pairwise difference of adjusted means, with adjusted p-values.
pub(super) fn pairwise_adjusted(
    levels: &[&str],
    moments: &[Moments],
    fit: &CommonSlopeFit,
    alpha: f64,
    method: Comparisons,
) -> Vec<MeanPair> {
    let s2 = fit.sigma2();
    let mut pairs = Vec::new();
    for i in 0..moments.len() {
        for j in i + 1..moments.len() {
            let (a, b) = (&moments[i], &moments[j]);
            let dx = a.mean_x - b.mean_x;
            let difference = a.mean_y - b.mean_y - fit.slope * dx;
            let se = s2.map(|s2| {
                (s2 * (1.0 / a.n as f64 + 1.0 / b.n as f64 + dx * dx / fit.sxx_within)).sqrt()
            });
            let t = ratio(difference, se);
            pairs.push(MeanPair {
                a: levels[i].to_string(),
                b: levels[j].to_string(),
                difference,
                se,
                ci: interval(difference, se, fit.df, alpha),
                t,
                df: fit.df,
                p_value: t.map(|t| t_two_sided(t, fit.df)),
                p_adjusted: None,
                p_tukey: t.and_then(|t| tukey_kramer(t, moments.len(), fit.df)),
            });
        }
    }
    if method == Comparisons::TukeyKramer {
        for p in &mut pairs {
            p.p_adjusted = p.p_tukey;
        }
    } else {
        fill_adjusted(&mut pairs, |p| p.p_value, |p, v| p.p_adjusted = v, method);
    }
    pairs
}
