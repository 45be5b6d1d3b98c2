//! The equal-slopes gate and the comparisons of slopes.
//!
//! The gate is the extra-sum-of-squares F test of the parallel-lines model against
//! separate lines (the general linear test; Fisher 1932, see Kutner et al. 2005,
//! §2.8 and §8.7): F = ((RSS_common − RSS_separate)/(k − 1)) / (RSS_separate/(n − 2k)).
//! Pairwise slope differences use the separate-slopes model's pooled residual
//! variance, so with two groups t² = F; the unpooled form uses each group's own
//! variance with Welch–Satterthwaite degrees of freedom (Welch 1947; Satterthwaite
//! 1946), for groups whose residual spreads differ.

use super::pairwise::{
    adjust_pairs, covariance, fill_many_to_one, pair_indices, tukey_kramer, welch,
};
use super::{interval, ratio};
use crate::fit::{CommonSlopeFit, SeparateFit};
use crate::number::sig;
use crate::plan::Comparisons;
use crate::results::{EqualSlopes, GroupLineResult, SimultaneousFamily, SlopePair};
use crate::stats::dist::t_two_sided;
use crate::stats::nested_f::{NestedF, nested_f};

/// Each group's own line with intervals at 1 − alpha.
pub(super) fn group_lines(levels: &[&str], fit: &SeparateFit, alpha: f64) -> Vec<GroupLineResult> {
    levels
        .iter()
        .zip(&fit.lines)
        .map(|(level, line)| {
            let m = &line.moments;
            let slope_se = line.slope_se();
            let intercept_se = line.intercept_se();
            GroupLineResult {
                level: level.to_string(),
                n: m.n,
                slope: line.slope,
                slope_se,
                slope_ci: interval(line.slope, slope_se, line.df, alpha),
                intercept: line.intercept,
                intercept_se,
                intercept_ci: interval(line.intercept, intercept_se, line.df, alpha),
                r_squared: line.r_squared(),
                residual_sd: line.sigma2().map(f64::sqrt),
                covariate_mean: m.mean_x,
                response_mean: m.mean_y,
                covariate_min: m.min_x,
                covariate_max: m.max_x,
            }
        })
        .collect()
}

/// The equal-slopes F test; slopes are homogeneous when p ≥ `slopes_alpha`.
///
/// `floor` is the residual sum of squares rounding alone leaves (see
/// [`crate::stats::nested_f::rounding_floor`]). An exact fit with slopes that differ
/// is p = 0, a decision like any other. When the separate lines fit exactly and the
/// slopes agree to rounding (0/0) there is no test: the slopes are then taken as equal
/// because they are identical, and the reason and a warning say so in those words.
pub(super) fn equal_slopes(
    separate: &SeparateFit,
    common: &CommonSlopeFit,
    slopes_alpha: f64,
    floor: f64,
    warnings: &mut Vec<String>,
) -> EqualSlopes {
    let k = separate.lines.len() as f64;
    let df1 = k - 1.0;
    let df2 = separate.df;
    let extra = (common.rss - separate.rss).max(0.0);
    let test = nested_f(extra, df1, separate.rss, df2, floor);
    let homogeneous = match test {
        NestedF::Value { p, .. } => p >= slopes_alpha,
        NestedF::ExactFit => {
            warnings.push(
                "The equal-slopes F statistic is infinite: every group's line passes exactly through its rows (zero residual variance) while the slopes differ, so p = 0 (exact fit) and the slopes are taken to differ."
                    .into(),
            );
            false
        }
        NestedF::NotComputable => {
            warnings.push(if df2 > 0.0 {
                "The equal-slopes F test cannot be computed (0/0): every group's line passes exactly through its rows and the slopes are identical to rounding, so there is neither residual variation nor a slope difference to test. The slopes are taken as equal because they are identical, not because a test said so."
                    .to_string()
            } else {
                "The equal-slopes F test cannot be computed: the separate lines leave no residual degrees of freedom. The slopes are taken as equal by default, not because a test said so."
                    .to_string()
            });
            true
        }
    };
    EqualSlopes {
        f: test.f(),
        df1,
        df2,
        p_value: test.p(),
        alpha: slopes_alpha,
        homogeneous,
        rss_separate: separate.rss,
        rss_common: common.rss,
        status: test.status().to_string(),
    }
}

/// Every pair of slopes, pooled and unpooled, with adjusted p-values; under
/// many-to-one comparisons every level against the first, simultaneous over the
/// family, whose critical value comes back beside the pairs.
pub(super) fn pairwise_slopes(
    levels: &[&str],
    fit: &SeparateFit,
    method: Comparisons,
    alpha: f64,
) -> (Vec<SlopePair>, Option<SimultaneousFamily>) {
    let s2 = fit.sigma2();
    let indices = pair_indices(fit.lines.len(), method);
    let mut pairs = Vec::new();
    for &(i, j) in &indices {
        let (a, b) = (&fit.lines[i], &fit.lines[j]);
        let difference = a.slope - b.slope;
        let se = s2.map(|s2| (s2 * (1.0 / a.moments.sxx + 1.0 / b.moments.sxx)).sqrt());
        let t = ratio(difference, se);
        pairs.push(SlopePair {
            a: levels[i].to_string(),
            b: levels[j].to_string(),
            difference,
            se,
            t,
            df: fit.df,
            p_value: t.map(|t| t_two_sided(t, fit.df)),
            p_adjusted: None,
            ci: interval(difference, se, fit.df, alpha),
            ci_simultaneous: None,
            welch: welch(difference, a.slope_se(), b.slope_se(), a.df, b.df, alpha),
        });
    }
    if method == Comparisons::AgainstReference {
        // Slopes of different groups are independent, so differences against one
        // reference share only its variance: Cov = s²/Sxx_0 off the diagonal,
        // s² (1/Sxx_i + 1/Sxx_0) on it.
        let reference = fit.lines[0].moments.sxx;
        let cov = s2.map(|s2| {
            covariance(&indices, |i, j| {
                let own = if i == j {
                    1.0 / fit.lines[i].moments.sxx
                } else {
                    0.0
                };
                s2 * (own + 1.0 / reference)
            })
        });
        let family = fill_many_to_one(&mut pairs, cov, fit.df, alpha);
        return (pairs, Some(family));
    }
    let k = fit.lines.len();
    adjust_pairs(
        &mut pairs,
        method,
        |p| p.t.and_then(|t| tukey_kramer(t, k, fit.df)),
        |p| p.p_value,
        |p, v| p.p_adjusted = v,
    );
    (pairs, None)
}

/// Warns when residual spreads differ enough that the pooled slope tests mislead.
pub(super) fn spread_warning(
    levels: &[&str],
    sds: impl Iterator<Item = Option<f64>>,
) -> Option<String> {
    let sds: Vec<(usize, f64)> = sds
        .enumerate()
        .filter_map(|(i, sd)| sd.map(|v| (i, v)))
        .collect();
    let (lo_i, lo) = sds.iter().copied().min_by(|a, b| a.1.total_cmp(&b.1))?;
    let (hi_i, hi) = sds.iter().copied().max_by(|a, b| a.1.total_cmp(&b.1))?;
    // A ratio of 2 in SDs (4 in variances) is a common rule of thumb for when pooled
    // variances mislead (common practice, no source).
    (lo > 0.0 && hi / lo > 2.0).then(|| {
        format!(
            "Residual spreads differ between groups (SD {} in `{}` against {} in `{}`): the pooled slope comparisons assume equal spread, so prefer their unpooled (Welch) form.",
            sig(hi, 3),
            levels[hi_i],
            sig(lo, 3),
            levels[lo_i]
        )
    })
}
