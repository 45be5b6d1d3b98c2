//! The equal-slopes gate and the comparisons of slopes.
//!
//! The gate is the extra-sum-of-squares F test of the parallel-lines model against
//! separate lines (the general linear test; Fisher 1932, see Kutner et al. 2005,
//! §2.8 and §8.7): F = ((RSS_common − RSS_separate)/(k − 1)) / (RSS_separate/(n − 2k)).
//! Pairwise slope differences use the separate-slopes model's pooled residual
//! variance, so with two groups t² = F; the unpooled form uses each group's own
//! variance with Welch–Satterthwaite degrees of freedom (Welch 1947; Satterthwaite
//! 1946), for groups whose residual spreads differ.

use super::{interval, ratio};
use crate::fit::{CommonSlopeFit, SeparateFit};
use crate::number::sig;
use crate::plan::Comparisons;
use crate::results::{EqualSlopes, GroupLineResult, SlopePair, WelchTest};
use crate::stats::adjust::adjust;
use crate::stats::dist::{f_sf, t_two_sided};

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
pub(super) fn equal_slopes(
    separate: &SeparateFit,
    common: &CommonSlopeFit,
    slopes_alpha: f64,
    warnings: &mut Vec<String>,
) -> EqualSlopes {
    let k = separate.lines.len() as f64;
    let df1 = k - 1.0;
    let df2 = separate.df;
    let extra = (common.rss - separate.rss).max(0.0);
    let f = ratio(extra / df1, separate.sigma2());
    let p_value = f.map(|f| f_sf(f, df1, df2));
    let homogeneous = match p_value {
        Some(p) => p >= slopes_alpha,
        None => {
            warnings.push(
                "The equal-slopes F test could not be computed: every group's line fits its rows exactly (zero residual variance). Slopes are taken as equal only if they are identical."
                    .into(),
            );
            extra <= f64::EPSILON * common.rss.max(f64::MIN_POSITIVE)
        }
    };
    EqualSlopes {
        f,
        df1,
        df2,
        p_value,
        alpha: slopes_alpha,
        homogeneous,
        rss_separate: separate.rss,
        rss_common: common.rss,
    }
}

/// Every pair of slopes, pooled and unpooled, with adjusted p-values.
pub(super) fn pairwise_slopes(
    levels: &[&str],
    fit: &SeparateFit,
    method: Comparisons,
) -> Vec<SlopePair> {
    let s2 = fit.sigma2();
    let mut pairs = Vec::new();
    for i in 0..fit.lines.len() {
        for j in i + 1..fit.lines.len() {
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
                welch: welch(difference, a.slope_se(), b.slope_se(), a.df, b.df),
            });
        }
    }
    if method == Comparisons::TukeyKramer {
        let k = fit.lines.len();
        for p in &mut pairs {
            p.p_adjusted = p.t.and_then(|t| super::compare::tukey_kramer(t, k, fit.df));
        }
    } else {
        fill_adjusted(&mut pairs, |p| p.p_value, |p, v| p.p_adjusted = v, method);
    }
    pairs
}

/// t = d / √(se_a² + se_b²) with Welch–Satterthwaite df
/// (se_a² + se_b²)² / (se_a⁴/df_a + se_b⁴/df_b).
pub(crate) fn welch(
    difference: f64,
    se_a: Option<f64>,
    se_b: Option<f64>,
    df_a: f64,
    df_b: f64,
) -> WelchTest {
    let (Some(va), Some(vb)) = (se_a.map(|s| s * s), se_b.map(|s| s * s)) else {
        return WelchTest {
            se: None,
            t: None,
            df: None,
            p_value: None,
        };
    };
    let v = va + vb;
    let se = v.sqrt();
    let t = ratio(difference, Some(se));
    // Scaled by the larger variance: squaring a variance of 1e225 would overflow.
    let m = va.max(vb);
    let df = (v > 0.0).then(|| {
        let (a, b) = (va / m, vb / m);
        (a + b) * (a + b) / (a * a / df_a + b * b / df_b)
    });
    WelchTest {
        se: Some(se),
        t,
        df,
        p_value: match (t, df) {
            (Some(t), Some(df)) => Some(t_two_sided(t, df)),
            _ => None,
        },
    }
}

/// Adjusts the family of p-values read by `get`, storing them with `set`. Pairs
/// whose p-value is unknown stay unknown and do not enter the family.
pub(super) fn fill_adjusted<T>(
    items: &mut [T],
    get: impl Fn(&T) -> Option<f64>,
    set: impl Fn(&mut T, Option<f64>),
    method: Comparisons,
) {
    let known: Vec<(usize, f64)> = items
        .iter()
        .enumerate()
        .filter_map(|(i, item)| get(item).map(|p| (i, p)))
        .collect();
    let adjusted = adjust(&known.iter().map(|(_, p)| *p).collect::<Vec<_>>(), method);
    for ((i, _), p) in known.iter().zip(adjusted) {
        set(&mut items[*i], Some(p));
    }
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
