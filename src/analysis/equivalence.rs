//! Equivalence of slopes: two one-sided tests of every pair against ±margin.
//!
//! A p-value above the gate's level does not show that slopes agree; an equivalence
//! test can (Schuirmann 1987, two one-sided tests; for regression slopes Dixon &
//! Pechmann 2005). For a pair's difference d with standard error s on df degrees of
//! freedom and a margin m > 0: p_lower = P(T > (d + m)/s) tests d ≤ −m, p_upper =
//! P(T < (d − m)/s) tests d ≥ m, and the pair is shown equivalent when both are below
//! alpha, which is the same as its (1 − 2 alpha) interval lying inside (−m, m). The
//! reading has three outcomes: "shown-equivalent" (interval inside the margins),
//! "shown-different" (interval wholly beyond one margin: the slopes differ by more
//! than the margin) and "not-settled" (the interval straddles a margin). The standard
//! error is the one the gate uses: classical, or the robust one when the plan asks.

use crate::plan::GateRule;
use crate::results::{Equivalence, EquivalencePair};
use crate::stats::dist::{t_quantile, t_sf};

/// One pair's difference, standard error and df, with its labels.
pub(super) struct Difference<'a> {
    pub a: &'a str,
    pub b: &'a str,
    pub difference: f64,
    pub se: Option<f64>,
    pub df: f64,
}

impl<'a> Difference<'a> {
    /// A pair a − b.
    pub fn new(a: &'a str, b: &'a str, difference: f64, se: Option<f64>, df: f64) -> Self {
        Difference {
            a,
            b,
            difference,
            se,
            df,
        }
    }
}

/// The tests of every pair and the overall reading.
pub(super) fn slopes(
    pairs: &[Difference<'_>],
    margin: f64,
    alpha: f64,
    covariance: &str,
    gate: GateRule,
) -> Equivalence {
    let pairs: Vec<EquivalencePair> = pairs.iter().map(|d| pair(d, margin, alpha)).collect();
    let reading = if pairs.iter().any(|p| p.reading == "shown-different") {
        "shown-different"
    } else if !pairs.is_empty() && pairs.iter().all(|p| p.reading == "shown-equivalent") {
        "shown-equivalent"
    } else {
        "not-settled"
    };
    Equivalence {
        margin,
        alpha,
        covariance: covariance.to_string(),
        gate: match gate {
            GateRule::Difference => "difference",
            GateRule::Equivalence => "equivalence",
        }
        .into(),
        reading: reading.into(),
        pairs,
    }
}

/// The two one-sided tests of one difference against ±`m` at `alpha`.
pub(super) fn pair(d: &Difference<'_>, m: f64, alpha: f64) -> EquivalencePair {
    let usable = d.se.filter(|s| *s > 0.0 && s.is_finite() && d.df > 0.0);
    let (ci, p_lower, p_upper) = match usable {
        Some(s) => {
            let half = t_quantile(1.0 - alpha, d.df) * s;
            (
                Some([d.difference - half, d.difference + half]),
                Some(t_sf((d.difference + m) / s, d.df)),
                // P(T < u) = P(T > −u).
                Some(t_sf(-(d.difference - m) / s, d.df)),
            )
        }
        None => (None, None, None),
    };
    let reading = match ci {
        Some([lo, hi]) if lo > -m && hi < m => "shown-equivalent",
        Some([lo, hi]) if lo > m || hi < -m => "shown-different",
        _ => "not-settled",
    };
    EquivalencePair {
        a: d.a.to_string(),
        b: d.b.to_string(),
        difference: d.difference,
        se: d.se,
        df: d.df,
        ci,
        p_lower,
        p_upper,
        p_tost: p_lower.zip(p_upper).map(|(l, u)| l.max(u)),
        reading: reading.into(),
    }
}
