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

use super::pairwise::{adjust_pairs, covariance, fill_many_to_one, pair_indices, tukey_kramer};
use super::{interval, ratio};
use crate::fit::{CommonSlopeFit, Moments, OneLineFit};
use crate::plan::Comparisons;
use crate::results::{AdjustedMean, CommonSlope, GroupEffect, MeanPair, SimultaneousFamily};
use crate::stats::dist::t_two_sided;
use crate::stats::nested_f::{NestedF, nested_f};

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

/// F = ((RSS_one − RSS_common)/(k − 1)) / (RSS_common/(n − k − 1)); an exact fit of
/// the parallel lines with intercepts that differ is p = 0 (see [`nested_f`]).
pub(super) fn group_effect(
    common: &CommonSlopeFit,
    one: &OneLineFit,
    floor: f64,
    warnings: &mut Vec<String>,
) -> GroupEffect {
    let df1 = common.intercepts.len() as f64 - 1.0;
    let extra = (one.line.rss - common.rss).max(0.0);
    let test = nested_f(extra, df1, common.rss, common.df, floor);
    match test {
        NestedF::Value { .. } => {}
        NestedF::ExactFit => warnings.push(
            "The group-effect F statistic is infinite: the parallel lines pass exactly through every row (zero residual variance) while the intercepts differ, so p = 0 (exact fit)."
                .into(),
        ),
        NestedF::NotComputable => warnings.push(
            "The group-effect F test cannot be computed (0/0): the parallel lines pass exactly through every row and the intercepts agree to rounding, or no residual degrees of freedom are left."
                .into(),
        ),
    }
    GroupEffect {
        f: test.f(),
        df1,
        df2: common.df,
        p_value: test.p(),
        rss_one_line: one.line.rss,
        status: test.status().to_string(),
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
                back_transformed: None,
                level: level.to_string(),
                mean,
                se,
                ci: interval(mean, se, fit.df, alpha),
                within_range: (m.min_x..=m.max_x).contains(&x0),
            }
        })
        .collect()
}

/// Every pairwise difference of adjusted means, with adjusted p-values; under
/// many-to-one comparisons every level against the first, simultaneous over the
/// family, whose critical value comes back beside the pairs.
pub(super) fn pairwise_adjusted(
    levels: &[&str],
    moments: &[Moments],
    fit: &CommonSlopeFit,
    alpha: f64,
    method: Comparisons,
) -> (Vec<MeanPair>, Option<SimultaneousFamily>) {
    let s2 = fit.sigma2();
    let indices = pair_indices(moments.len(), method);
    let mut pairs = Vec::new();
    for &(i, j) in &indices {
        let (a, b) = (&moments[i], &moments[j]);
        let dx = a.mean_x - b.mean_x;
        let difference = a.mean_y - b.mean_y - fit.slope * dx;
        let se = s2.map(|s2| {
            (s2 * (1.0 / a.n as f64 + 1.0 / b.n as f64 + dx * dx / fit.sxx_within)).sqrt()
        });
        let t = ratio(difference, se);
        pairs.push(MeanPair {
            ratio: None,
            a: levels[i].to_string(),
            b: levels[j].to_string(),
            difference,
            se,
            ci: interval(difference, se, fit.df, alpha),
            t,
            df: fit.df,
            p_value: t.map(|t| t_two_sided(t, fit.df)),
            p_adjusted: None,
            // Tukey–Kramer speaks of every pair; a many-to-one family has its own.
            p_tukey: t
                .filter(|_| method != Comparisons::AgainstReference)
                .and_then(|t| tukey_kramer(t, moments.len(), fit.df)),
            ci_simultaneous: None,
        });
    }
    if method == Comparisons::AgainstReference {
        // Differences against one reference share its mean and the common slope:
        // Cov(d_i, d_j) = s² (1/n_0 + (x̄_i − x̄_0)(x̄_j − x̄_0)/Σ Sxx) off the
        // diagonal, plus s²/n_i on it (Dunnett 1955 with the covariate's term).
        let reference = &moments[0];
        let cov = s2.map(|s2| {
            covariance(&indices, |i, j| {
                let (di, dj) = (
                    moments[i].mean_x - reference.mean_x,
                    moments[j].mean_x - reference.mean_x,
                );
                let own = if i == j {
                    1.0 / moments[i].n as f64
                } else {
                    0.0
                };
                s2 * (own + 1.0 / reference.n as f64 + di * dj / fit.sxx_within)
            })
        });
        let family = fill_many_to_one(&mut pairs, cov, fit.df, alpha);
        return (pairs, Some(family));
    }
    adjust_pairs(
        &mut pairs,
        method,
        |p| p.p_tukey,
        |p| p.p_value,
        |p, v| p.p_adjusted = v,
    );
    (pairs, None)
}
