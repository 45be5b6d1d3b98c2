//! Pairwise differences, shared by the slope comparisons ([`super::gate`]) and the
//! adjusted-mean comparisons ([`super::compare`]): the multiplicity adjustment of a
//! family of pairs, the Tukey–Kramer tail, and the unpooled (Welch) form of a
//! difference of two independent estimates.
//!
//! - Tukey–Kramer (Tukey 1953; Kramer 1956): the upper tail of the studentized range
//!   for k groups and the model's df at q = |t|·√2.
//! - Welch: t = d / √(se_a² + se_b²) with Welch–Satterthwaite df (Welch 1947;
//!   Satterthwaite 1946), computed by [`crate::stats::welch`].
//! - Many-to-one (Dunnett 1955): each later level against the first, with p-values
//!   and intervals simultaneous over the family from the multivariate t with the
//!   differences' own correlation ([`crate::stats::mvt`]).

use super::ratio;
use crate::plan::Comparisons;
use crate::results::{SimultaneousFamily, WelchTest};
use crate::stats::adjust::adjust;
use crate::stats::dist::t_two_sided;
use crate::stats::mvt::{Rectangle, correlation};
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

/// The pairs compared, as (a, b) level indices: every a < b, or under many-to-one
/// each later level against the first (a the level, b the reference), so that a
/// difference reads "level minus reference".
pub(crate) fn pair_indices(k: usize, method: Comparisons) -> Vec<(usize, usize)> {
    if method == Comparisons::AgainstReference {
        (1..k).map(|i| (i, 0)).collect()
    } else {
        (0..k)
            .flat_map(|i| (i + 1..k).map(move |j| (i, j)))
            .collect()
    }
}

/// How many pairs [`pair_indices`] gives, without listing them.
pub(crate) fn pair_count(k: u64, method: Comparisons) -> u64 {
    if method == Comparisons::AgainstReference {
        k.saturating_sub(1)
    } else {
        k * k.saturating_sub(1) / 2
    }
}

/// Groups up to which many-to-one families come from the multivariate t. Each
/// p-value is an integral over as many dimensions as there are differences; up to
/// nine differences the lattice meets its error target (5e-5) within a few seconds
/// (measured), beyond that its error grows past what the reports print, so the
/// family takes the Bonferroni bound (conservative) and says so.
pub const MAX_MANY_TO_ONE_GROUPS: usize = 10;

/// Simultaneous p-values and the critical value of a many-to-one family: `t` the
/// pairs' statistics, `cov` the covariance matrix of their differences (any
/// positive scale: only its correlation enters), `df` their common df. Every p is
/// None when a statistic or the covariance is unknown, or the correlation cannot be
/// factored.
fn many_to_one(
    t: &[Option<f64>],
    cov: Option<Vec<Vec<f64>>>,
    df: f64,
    alpha: f64,
) -> (Vec<Option<f64>>, SimultaneousFamily) {
    let none = || {
        (
            vec![None; t.len()],
            SimultaneousFamily {
                critical_value: None,
                df,
                error: None,
                method: "multivariate-t".into(),
            },
        )
    };
    if t.len() + 1 > MAX_MANY_TO_ONE_GROUPS {
        // Bonferroni over the m differences: p·m capped at 1, c = t(1 − α/(2m)).
        let m = t.len() as f64;
        let p = t
            .iter()
            .map(|t| t.map(|t| (t_two_sided(t, df) * m).min(1.0)))
            .collect();
        return (
            p,
            SimultaneousFamily {
                critical_value: Some(crate::stats::dist::t_upper_quantile(alpha / (2.0 * m), df)),
                df,
                error: Some(0.0),
                method: "bonferroni".into(),
            },
        );
    }
    let (Some(cov), Some(ts)) = (cov, t.iter().copied().collect::<Option<Vec<f64>>>()) else {
        return none();
    };
    if ts.is_empty() || (0..cov.len()).any(|i| !(cov[i][i] > 0.0 && cov[i][i].is_finite())) {
        return none();
    }
    let Ok(rect) = Rectangle::new(&correlation(&cov), df) else {
        return none();
    };
    let (critical, mut error) = rect.critical_value(alpha);
    let p = ts
        .iter()
        .map(|&t| {
            let (p, e) = rect.p_value(t);
            error = error.max(e);
            Some(p)
        })
        .collect();
    (
        p,
        SimultaneousFamily {
            critical_value: Some(critical),
            df,
            error: Some(error),
            method: "multivariate-t".into(),
        },
    )
}

/// The covariance matrix of the pairs `indices` (level a, reference b), entry
/// (p, q) from `entry(a_p, a_q)`.
pub(super) fn covariance(
    indices: &[(usize, usize)],
    entry: impl Fn(usize, usize) -> f64,
) -> Vec<Vec<f64>> {
    indices
        .iter()
        .map(|&(i, _)| indices.iter().map(|&(j, _)| entry(i, j)).collect())
        .collect()
}

/// A pair that can carry a many-to-one family's p-value and interval.
pub(super) trait SimultaneousPair {
    /// Its t statistic, difference and standard error.
    fn estimate(&self) -> (Option<f64>, f64, Option<f64>);
    /// Records its simultaneous p-value and interval.
    fn set_simultaneous(&mut self, p: Option<f64>, ci: Option<[f64; 2]>);
}

macro_rules! simultaneous_pair {
    ($($t:ty),*) => {$(
        impl SimultaneousPair for $t {
            fn estimate(&self) -> (Option<f64>, f64, Option<f64>) {
                (self.t, self.difference, self.se)
            }
            fn set_simultaneous(&mut self, p: Option<f64>, ci: Option<[f64; 2]>) {
                self.p_adjusted = p;
                self.ci_simultaneous = ci;
            }
        }
    )*};
}
simultaneous_pair!(
    crate::results::MeanPair,
    crate::results::SlopePair,
    crate::results::RobustDifference
);

/// The many-to-one family of `pairs` (see [`many_to_one`]), written into each pair:
/// its simultaneous p-value and its interval d ± c·se.
pub(super) fn fill_many_to_one(
    pairs: &mut [impl SimultaneousPair],
    cov: Option<Vec<Vec<f64>>>,
    df: f64,
    alpha: f64,
) -> SimultaneousFamily {
    let t: Vec<Option<f64>> = pairs.iter().map(|p| p.estimate().0).collect();
    let (p, family) = many_to_one(&t, cov, df, alpha);
    for (pair, p) in pairs.iter_mut().zip(p) {
        let (_, d, se) = pair.estimate();
        let ci = se
            .zip(family.critical_value)
            .map(|(se, c)| [d - c * se, d + c * se]);
        pair.set_simultaneous(p, ci);
    }
    family
}

/// Fills each pair's adjusted p-value: Tukey–Kramer from its t when `method` asks for
/// it, else the Holm, Bonferroni or no adjustment of the family of p-values. Pairs
/// whose p-value (or t) is unknown stay unknown and do not enter the family. Many-to-one
/// families need the differences' covariance, so their callers use [`many_to_one`].
pub(super) fn adjust_pairs<T>(
    pairs: &mut [T],
    method: Comparisons,
    tukey: impl Fn(&T) -> Option<f64>,
    get: impl Fn(&T) -> Option<f64>,
    set: impl Fn(&mut T, Option<f64>),
) {
    if method == Comparisons::AgainstReference {
        return;
    }
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
