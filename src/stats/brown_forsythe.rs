//! Brown–Forsythe test for equal spread across groups (Brown & Forsythe 1974):
//! Levene's (1960) one-way analysis of variance applied to the absolute
//! deviations of each value from its own group's median.
//!
//! Used on the separate-slopes residuals grouped by level
//! (`checks.equal_variance`). Medians instead of means make the test robust
//! to skewed residuals, which is why it is preferred to Levene's original.
//!
//! With z_ij = |x_ij − median_i|, group means z̄_i, grand mean z̄, N values
//! in k groups:
//!
//! ```text
//! F = [(N − k) / (k − 1)] · Σ n_i (z̄_i − z̄)² / Σ Σ (z_ij − z̄_i)²,
//! ```
//!
//! referred to the F distribution with (k − 1, N − k) degrees of freedom.

use crate::stats::dist::f_sf;
use std::fmt;

/// Result of the Brown–Forsythe test.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BrownForsythe {
    /// The F statistic (≥ 0).
    pub statistic: f64,
    /// k − 1.
    pub df1: f64,
    /// N − k.
    pub df2: f64,
    /// Upper-tail F probability of the statistic.
    pub p_value: f64,
}

/// Why the test could not be computed.
#[derive(Debug, Clone, PartialEq)]
pub enum BfError {
    /// Fewer than two groups: there is nothing to compare.
    TooFewGroups { groups: usize },
    /// A group (0-based position) has fewer than two values, so it has no
    /// spread to compare.
    GroupTooSmall { group: usize, n: usize },
    /// A value is NaN or infinite (0-based group and position within it).
    NonFinite { group: usize, index: usize },
    /// Every value lies at the same distance from its group's median as the
    /// rest of its group (for instance every group has exactly two values, or
    /// all values are equal), so the within-group variance of the deviations
    /// is zero and F is undefined.
    ZeroWithinVariance,
}

impl fmt::Display for BfError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            BfError::TooFewGroups { groups } => write!(
                f,
                "Brown–Forsythe test needs at least 2 groups, got {groups}"
            ),
            BfError::GroupTooSmall { group, n } => write!(
                f,
                "Brown–Forsythe test needs at least 2 values in every group; group {} has {n}",
                group + 1
            ),
            BfError::NonFinite { group, index } => write!(
                f,
                "Brown–Forsythe test needs finite values; value {} of group {} is NaN or infinite",
                index + 1,
                group + 1
            ),
            BfError::ZeroWithinVariance => write!(
                f,
                "Brown–Forsythe test is undefined: the absolute deviations from each group's \
                 median do not vary within any group (for example, every group has exactly \
                 two values, or all values are equal)"
            ),
        }
    }
}

impl std::error::Error for BfError {}

/// Median of a non-empty slice (mean of the two middle values for even n).
fn median(values: &[f64]) -> f64 {
    let mut v = values.to_vec();
    v.sort_by(f64::total_cmp);
    let n = v.len();
    if n % 2 == 1 {
        v[n / 2]
    } else {
        0.5 * (v[n / 2 - 1] + v[n / 2])
    }
}

/// The Brown–Forsythe test across `groups` (each a slice of values).
///
/// Never returns NaN: degenerate inputs are errors (see [`BfError`]).
pub fn brown_forsythe(groups: &[&[f64]]) -> Result<BrownForsythe, BfError> {
    let k = groups.len();
    if k < 2 {
        return Err(BfError::TooFewGroups { groups: k });
    }
    for (g, values) in groups.iter().enumerate() {
        if values.len() < 2 {
            return Err(BfError::GroupTooSmall {
                group: g,
                n: values.len(),
            });
        }
        if let Some(index) = values.iter().position(|v| !v.is_finite()) {
            return Err(BfError::NonFinite { group: g, index });
        }
    }
    // Absolute deviations from each group's median, and the size of the
    // values they came from (for the rounding floor below).
    let mut scale: f64 = 0.0;
    let deviations: Vec<Vec<f64>> = groups
        .iter()
        .map(|values| {
            let m = median(values);
            values
                .iter()
                .map(|&v| {
                    scale = scale.max(v.abs()).max(m.abs());
                    (v - m).abs()
                })
                .collect()
        })
        .collect();
    let n_total: usize = deviations.iter().map(Vec::len).sum();
    let grand = deviations.iter().flatten().sum::<f64>() / n_total as f64;
    let mut between = 0.0;
    let mut within = 0.0;
    for z in &deviations {
        let mean = z.iter().sum::<f64>() / z.len() as f64;
        between += z.len() as f64 * (mean - grand) * (mean - grand);
        within += z.iter().map(|v| (v - mean) * (v - mean)).sum::<f64>();
    }
    // Each deviation carries a rounding error of a few ulps of the values it
    // came from; a within sum of squares no larger than that is zero in
    // substance (e.g. [0.1, 0.3] gives deviations 0.1 and 0.09999999999999998).
    let ulp = 4.0 * f64::EPSILON * scale;
    if within <= n_total as f64 * ulp * ulp {
        return Err(BfError::ZeroWithinVariance);
    }
    let df1 = (k - 1) as f64;
    let df2 = (n_total - k) as f64;
    let statistic = (between / df1) / (within / df2);
    Ok(BrownForsythe {
        statistic,
        df1,
        df2,
        p_value: f_sf(statistic, df1, df2),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::Value;

    /// Reference values written by tests/reference/generate_stats.py
    /// (scipy 1.17.1, numpy 2.4.6, pinned and checked by the script).
    fn reference() -> Value {
        serde_json::from_str(include_str!("../../tests/reference/stats.json"))
            .expect("stats.json parses")
    }

    #[test]
    fn matches_scipy_levene_median() {
        // Source: scipy.stats.levene(..., center="median") on the groups
        // stored in stats.json (invented seeded groups and iris by species).
        let doc = reference();
        let cases = doc["levene_median"].as_array().expect("levene cases");
        assert!(cases.len() >= 6, "reference file lost its cases");
        let (mut worst_f, mut worst_p) = (0.0f64, 0.0f64);
        for case in cases {
            let name = case["name"].as_str().unwrap();
            let groups: Vec<Vec<f64>> = case["groups"]
                .as_array()
                .unwrap()
                .iter()
                .map(|g| {
                    g.as_array()
                        .unwrap()
                        .iter()
                        .map(|v| v.as_f64().unwrap())
                        .collect()
                })
                .collect();
            let slices: Vec<&[f64]> = groups.iter().map(Vec::as_slice).collect();
            let got = brown_forsythe(&slices).unwrap_or_else(|e| panic!("{name}: {e}"));
            let want_f = case["statistic"].as_f64().unwrap();
            let want_p = case["p_value"].as_f64().unwrap();
            assert_eq!(got.df1, case["df1"].as_f64().unwrap(), "{name}");
            assert_eq!(got.df2, case["df2"].as_f64().unwrap(), "{name}");
            let (df, dp) = ((got.statistic - want_f).abs(), (got.p_value - want_p).abs());
            assert!(
                df <= 1e-6 * want_f.max(1.0),
                "{name}: F {} vs {want_f}",
                got.statistic
            );
            assert!(dp <= 1e-6, "{name}: p {} vs {want_p}", got.p_value);
            if want_p < 1e-2 {
                assert!(dp / want_p <= 1e-6, "{name}: p {} vs {want_p}", got.p_value);
            }
            worst_f = worst_f.max(df / want_f.max(1.0));
            worst_p = worst_p.max(dp);
        }
        eprintln!(
            "Brown–Forsythe vs scipy: worst ΔF (rel) = {worst_f:.2e}, worst |Δp| = {worst_p:.2e}"
        );
    }

    #[test]
    fn f_tail_matches_closed_form_for_two_numerator_df() {
        // For d1 = 2, P(F > f) = (1 + 2f/d2)^(−d2/2) exactly (the F(2, d2)
        // distribution function in closed form; common practice, no source).
        for (f, d2) in [(0.5, 7.0), (3.0, 20.0), (40.0, 50.0), (400.0, 120.0)] {
            let exact = (1.0f64 + 2.0 * f / d2).powf(-d2 / 2.0);
            let got = f_sf(f, 2.0, d2);
            assert!(
                ((got - exact) / exact).abs() < 1e-10,
                "f {f}, d2 {d2}: {got} vs {exact}"
            );
        }
        assert_eq!(f_sf(0.0, 3.0, 10.0), 1.0);
        assert_eq!(f_sf(f64::INFINITY, 3.0, 10.0), 0.0);
    }

    #[test]
    fn invariant_to_shifts_and_common_scale() {
        // The deviations from group medians ignore each group's location, and
        // F is a ratio of variances: a common scale factor cancels.
        let a = [1.2, 3.4, 2.2, 5.1, 4.0];
        let b = [2.0, 2.1, 2.5, 1.9, 2.4, 2.2];
        let c = [0.5, 7.5, 3.0, 6.0];
        let base = brown_forsythe(&[&a, &b, &c]).unwrap();
        let b_shift: Vec<f64> = b.iter().map(|v| v + 1000.0).collect();
        let shifted = brown_forsythe(&[&a, &b_shift, &c]).unwrap();
        assert!((base.statistic - shifted.statistic).abs() < 1e-9 * base.statistic);
        let scale = |x: &[f64]| x.iter().map(|v| 0.01 * v).collect::<Vec<f64>>();
        let (a2, b2, c2) = (scale(&a), scale(&b), scale(&c));
        let scaled = brown_forsythe(&[&a2, &b2, &c2]).unwrap();
        assert!((base.statistic - scaled.statistic).abs() < 1e-9 * base.statistic);
        assert!((base.p_value - scaled.p_value).abs() < 1e-12);
    }

    #[test]
    fn equal_mean_deviations_give_f_zero_and_p_one() {
        // Both groups have deviations {1, 0, 1}: identical spreads.
        let r = brown_forsythe(&[&[1.0, 2.0, 3.0], &[11.0, 12.0, 13.0]]).unwrap();
        assert_eq!(r.statistic, 0.0);
        assert_eq!(r.p_value, 1.0);
    }

    #[test]
    fn degenerate_inputs_are_errors_not_nan() {
        let one: &[f64] = &[1.0, 2.0, 3.0];
        assert_eq!(
            brown_forsythe(&[]),
            Err(BfError::TooFewGroups { groups: 0 })
        );
        assert_eq!(
            brown_forsythe(&[one]),
            Err(BfError::TooFewGroups { groups: 1 })
        );
        assert_eq!(
            brown_forsythe(&[one, &[4.0]]),
            Err(BfError::GroupTooSmall { group: 1, n: 1 })
        );
        assert_eq!(
            brown_forsythe(&[one, &[4.0, f64::NAN, 5.0]]),
            Err(BfError::NonFinite { group: 1, index: 1 })
        );
        // Groups of two: each group's two deviations are equal.
        assert_eq!(
            brown_forsythe(&[&[1.0, 3.0], &[1.0, 5.0]]),
            Err(BfError::ZeroWithinVariance)
        );
        // The same with deviations that differ only by rounding.
        assert_eq!(
            brown_forsythe(&[&[0.1, 0.3], &[0.2, 0.7], &[10.1, 10.3]]),
            Err(BfError::ZeroWithinVariance)
        );
        // All values equal.
        assert_eq!(
            brown_forsythe(&[&[2.0, 2.0, 2.0], &[2.0, 2.0]]),
            Err(BfError::ZeroWithinVariance)
        );
        let msg = BfError::GroupTooSmall { group: 1, n: 1 }.to_string();
        assert!(msg.contains("group 2"), "{msg}");
    }
}
