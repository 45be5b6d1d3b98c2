//! Pairwise differences, shared by the slope comparisons ([`super::gate`]) and the
//! adjusted-mean comparisons ([`super::compare`]): the multiplicity adjustment of a
//! family of pairs, the Tukey–Kramer tail, and the unpooled (Welch) form of a
//! difference of two independent estimates.
//!
//! - Tukey–Kramer (Tukey 1953; Kramer 1956): the upper tail of the studentized range
//!   for k groups and the model's df at q = |t|·√2.
//! - Welch: t = d / √(se_a² + se_b²) with Welch–Satterthwaite df (Welch 1947;
//!   Satterthwaite 1946), computed by [`crate::stats::welch`].

use super::ratio;
use crate::plan::Comparisons;
use crate::results::WelchTest;
use crate::stats::adjust::adjust;
use crate::stats::dist::t_two_sided;
use crate::stats::studentized_range;
use crate::stats::welch::welch_df;

/// Groups up to which Tukey–Kramer p-values are computed. Each costs a double
/// integral (about a millisecond), and k groups have k(k − 1)/2 pairs: beyond 45
/// groups (990 pairs) the run would spend many seconds on them.
pub const MAX_TUKEY_GROUPS: usize = 45;

/// True when Tukey–Kramer p-values are computed for `k` groups.
pub(super) fn tukey_feasible(k: usize) -> bool {
    k <= MAX_TUKEY_GROUPS
}

/// Tukey–Kramer p-value of a pairwise t: the upper tail of the studentized range for
/// `k` groups and `df` at q = |t|·√2.
pub(super) fn tukey_kramer(t: f64, k: usize, df: f64) -> Option<f64> {
    tukey_feasible(k).then(|| studentized_range::sf(t.abs() * std::f64::consts::SQRT_2, k, df))
}

/// Fills each pair's adjusted p-value: Tukey–Kramer from its t when `method` asks for
/// it, else the Holm, Bonferroni or no adjustment of the family of p-values. Pairs
/// whose p-value (or t) is unknown stay unknown and do not enter the family.
pub(super) fn adjust_pairs<T>(
    pairs: &mut [T],
    method: Comparisons,
    tukey: impl Fn(&T) -> Option<f64>,
    get: impl Fn(&T) -> Option<f64>,
    set: impl Fn(&mut T, Option<f64>),
) {
    if method == Comparisons::TukeyKramer {
        for p in pairs.iter_mut() {
            let v = tukey(p);
            set(p, v);
        }
        return;
    }
    let known: Vec<(usize, f64)> = pairs
        .iter()
        .enumerate()
        .filter_map(|(i, item)| get(item).map(|p| (i, p)))
        .collect();
    let adjusted = adjust(&known.iter().map(|(_, p)| *p).collect::<Vec<_>>(), method);
    for ((i, _), p) in known.iter().zip(adjusted) {
        set(&mut pairs[*i], Some(p));
    }
}

/// The unpooled comparison of two independent estimates with standard errors `se_a`,
/// `se_b` on `df_a`, `df_b` degrees of freedom.
pub(crate) fn welch(
    difference: f64,
    se_a: Option<f64>,
    se_b: Option<f64>,
    df_a: f64,
    df_b: f64,
    alpha: f64,
) -> WelchTest {
    let (Some(va), Some(vb)) = (se_a.map(|s| s * s), se_b.map(|s| s * s)) else {
        return WelchTest {
            se: None,
            t: None,
            df: None,
            p_value: None,
            ci: None,
        };
    };
    let se = (va + vb).sqrt();
    let t = ratio(difference, Some(se));
    let df = welch_df(va, df_a, vb, df_b);
    WelchTest {
        se: Some(se),
        t,
        df,
        p_value: match (t, df) {
            (Some(t), Some(df)) => Some(t_two_sided(t, df)),
            _ => None,
        },
        ci: df.and_then(|df| super::interval(difference, Some(se), df, alpha)),
    }
}
