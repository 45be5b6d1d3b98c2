//! Shapiro–Wilk W test for normality (Shapiro & Wilk 1965), in the form of
//! Royston (1995), "Remark AS R94: A remark on Algorithm AS 181: The W-test
//! for normality", Applied Statistics 44(4), valid for 3 ≤ n ≤ 5000.
//!
//! Used on the residuals of the separate-slopes model (`checks.normality`).
//! Also provides the normal scores for a normal Q–Q plot and a reproducible
//! subsample for residual sets larger than the test's range of validity.
//!
//! Steps, from the published description:
//! 1. Normal scores m_i = Φ⁻¹((i − 3/8)/(n + 1/4)) (Blom 1958).
//! 2. Coefficients a_i = m_i/√(m'm), except the two most extreme pairs (one for
//!    n ≤ 5), which come from Royston's polynomials in u = 1/√n; the middle ones
//!    are rescaled so that Σ a_i² = 1. For n = 3, a = (−√½, 0, √½) exactly.
//! 3. W = (Σ a_i x_(i))² / Σ (x_i − x̄)².
//! 4. p-value: n = 3 exactly, P(W ≤ w) = (6/π)(arcsin √w − arcsin √¾); for
//!    4 ≤ n ≤ 11, −ln(γ − ln(1 − W)) is normal with mean μ(n), sd σ(n); for
//!    n ≥ 12, ln(1 − W) is normal with mean μ(ln n), sd σ(ln n). Small W is
//!    significant, so p is the upper normal tail.
//!
//! 1 − W is computed directly as the residual sum of squares of the sample
//! about a·b (a projection, no subtraction from 1), so that ln(1 − W) keeps its
//! accuracy when W is close to 1, as it is for large n.

use statrs::function::erf::erfc_inv;
use statrs::function::gamma::gamma_ur;
use std::f64::consts::{FRAC_1_SQRT_2, PI, SQRT_2};
use std::fmt;

/// Smallest sample the test is defined for.
pub const MIN_N: usize = 3;
/// Largest sample Royston's approximations were fitted for. Callers with more
/// values should test a seeded random subsample of `MAX_N` values (the caller draws it).
pub const MAX_N: usize = 5000;

/// Result of the Shapiro–Wilk test.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ShapiroWilk {
    /// W, in (0, 1]; values near 1 are consistent with normality.
    pub statistic: f64,
    /// P(W ≤ observed) under normality.
    pub p_value: f64,
    /// Number of values tested.
    pub n: usize,
}

/// Why the test could not be computed.
#[derive(Debug, Clone, PartialEq)]
pub enum SwError {
    /// Fewer than three values.
    TooFew { n: usize },
    /// More than [`MAX_N`] values: Royston's approximation is not valid there.
    /// Subsample first (the caller draws a seeded random subsample).
    TooMany { n: usize },
    /// A value is NaN or infinite (0-based position in the input).
    NonFinite { index: usize },
    /// All values are equal, so W is undefined.
    ZeroRange,
}

impl fmt::Display for SwError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            SwError::TooFew { n } => write!(
                f,
                "Shapiro–Wilk test needs at least {MIN_N} values, got {n}"
            ),
            SwError::TooMany { n } => write!(
                f,
                "Shapiro–Wilk test is valid for at most {MAX_N} values, got {n}; \
                 test a subsample of {MAX_N} instead"
            ),
            SwError::NonFinite { index } => write!(
                f,
                "Shapiro–Wilk test needs finite values; value {} is NaN or infinite",
                index + 1
            ),
            SwError::ZeroRange => write!(
                f,
                "Shapiro–Wilk test is undefined when all values are equal"
            ),
        }
    }
}

impl std::error::Error for SwError {}

/// Standard normal quantile, via statrs' inverse complementary error
/// function (measured against scipy's ndtri: relative error below 1e-15).
fn norm_quantile(p: f64) -> f64 {
    -SQRT_2 * erfc_inv(2.0 * p)
}

/// Upper standard normal tail P(Z > z), via the regularized upper incomplete
/// gamma function, Q(z) = ½Γ(½, z²/2)/Γ(½) for z ≥ 0. (statrs' `erfc` is only
/// good to about 1e-10 relative; `gamma_ur` measured to about 1e-14.)
fn norm_sf(z: f64) -> f64 {
    if z.is_nan() {
        return f64::NAN;
    }
    if z.is_infinite() {
        return if z > 0.0 { 0.0 } else { 1.0 };
    }
    if z == 0.0 {
        return 0.5;
    }
    let half = 0.5 * gamma_ur(0.5, 0.5 * z * z);
    if z > 0.0 { half } else { 1.0 - half }
}

/// Expected-normal-order-statistic approximations for a sample of size n:
/// Φ⁻¹((i − 3/8)/(n + 1/4)), i = 1..n (Blom 1958), in increasing order.
///
/// These are the theoretical quantiles of a normal Q–Q plot: pair them with
/// the sorted sample. The lower half is computed and
/// mirrored, so the scores are exactly antisymmetric.
pub fn normal_scores(n: usize) -> Vec<f64> {
    let mut m = vec![0.0; n];
    let denom = n as f64 + 0.25;
    for i in 0..n / 2 {
        let v = norm_quantile((i as f64 + 1.0 - 0.375) / denom);
        m[i] = v;
        m[n - 1 - i] = -v;
    }
    m
}

/// Evaluates c[0] + c[1]·x + c[2]·x² + ….
fn poly(c: &[f64], x: f64) -> f64 {
    c.iter().rev().fold(0.0, |acc, &ci| acc * x + ci)
}

// Royston (1995) polynomial coefficients, from memory (Royston 1995); the
// tests check the resulting W and p-values against scipy.
/// Correction of the largest coefficient a_n, in u = 1/√n.
const C1: [f64; 6] = [0.0, 0.221157, -0.147981, -2.071190, 4.434685, -2.706056];
/// Correction of a_(n−1), in u = 1/√n (used for n > 5).
const C2: [f64; 6] = [0.0, 0.042981, -0.293762, -1.752461, 5.682633, -3.582633];
/// γ(n) for 4 ≤ n ≤ 11.
const G: [f64; 2] = [-2.273, 0.459];
/// μ(n) and ln σ(n) for 4 ≤ n ≤ 11, polynomials in n.
const C3: [f64; 4] = [0.5440, -0.39978, 0.025054, -6.714e-4];
const C4: [f64; 4] = [1.3822, -0.77857, 0.062767, -0.0020322];
/// μ and ln σ for n ≥ 12, polynomials in ln n.
const C5: [f64; 4] = [-1.5861, -0.31082, -0.083751, 0.0038915];
const C6: [f64; 3] = [-0.4803, -0.082676, 0.0030302];

/// The Shapiro–Wilk coefficients a_1..a_n (antisymmetric, Σ a_i² = 1) for a
/// sample of size n ≥ 3, per Royston (1995).
///
/// # Panics
///
/// If n < 3 (there are no coefficients to give; [`shapiro_wilk`] reports
/// that case as [`SwError::TooFew`] instead).
pub fn coefficients(n: usize) -> Vec<f64> {
    assert!(n >= MIN_N, "Shapiro–Wilk coefficients need n >= 3");
    let mut a = vec![0.0; n];
    if n == 3 {
        a[0] = -FRAC_1_SQRT_2;
        a[2] = FRAC_1_SQRT_2;
        return a;
    }
    let m = normal_scores(n);
    let mm: f64 = m.iter().map(|v| v * v).sum();
    let u = 1.0 / (n as f64).sqrt();
    let an = m[n - 1] / mm.sqrt() + poly(&C1, u);
    // Number of extreme pairs that get the polynomial correction.
    let (corrected, phi) = if n > 5 {
        let an1 = m[n - 2] / mm.sqrt() + poly(&C2, u);
        a[n - 1] = an;
        a[n - 2] = an1;
        let phi = (mm - 2.0 * m[n - 1] * m[n - 1] - 2.0 * m[n - 2] * m[n - 2])
            / (1.0 - 2.0 * an * an - 2.0 * an1 * an1);
        (2, phi)
    } else {
        a[n - 1] = an;
        let phi = (mm - 2.0 * m[n - 1] * m[n - 1]) / (1.0 - 2.0 * an * an);
        (1, phi)
    };
    let scale = 1.0 / phi.sqrt();
    for i in corrected..n - corrected {
        a[i] = m[i] * scale;
    }
    for i in 0..corrected {
        a[i] = -a[n - 1 - i];
    }
    a
}

/// The Shapiro–Wilk test of normality for 3 ≤ n ≤ 5000 finite values.
///
/// Never returns NaN: the degenerate inputs are errors (see [`SwError`]).
pub fn shapiro_wilk(x: &[f64]) -> Result<ShapiroWilk, SwError> {
    let n = x.len();
    if n < MIN_N {
        return Err(SwError::TooFew { n });
    }
    if n > MAX_N {
        return Err(SwError::TooMany { n });
    }
    if let Some(index) = x.iter().position(|v| !v.is_finite()) {
        return Err(SwError::NonFinite { index });
    }
    let mut y = x.to_vec();
    y.sort_by(f64::total_cmp);
    let range = y[n - 1] - y[0];
    if range <= 0.0 {
        return Err(SwError::ZeroRange);
    }
    // Centre on the median and scale by the range before summing, so that
    // large offsets do not cost precision (W is location-scale invariant).
    let centre = y[n / 2];
    for v in y.iter_mut() {
        *v = (*v - centre) / range;
    }
    let mean = y.iter().sum::<f64>() / n as f64;
    let a = coefficients(n);
    let mut b = 0.0;
    let mut ssq = 0.0;
    for (yi, ai) in y.iter().zip(&a) {
        let d = yi - mean;
        b += ai * d;
        ssq += d * d;
    }
    if ssq <= 0.0 {
        return Err(SwError::ZeroRange);
    }
    // Since Σa = 0 and Σa² = 1: Σ(d − b·a)² = Σd² − b², i.e. (1 − W)·Σd².
    let resid: f64 = y
        .iter()
        .zip(&a)
        .map(|(yi, ai)| {
            let e = yi - mean - b * ai;
            e * e
        })
        .sum();
    let one_minus_w = (resid / ssq).clamp(0.0, 1.0);
    let w = (b * b / ssq).min(1.0);
    let p_value = p_value(w, one_minus_w, n);
    Ok(ShapiroWilk {
        statistic: w,
        p_value,
        n,
    })
}

/// Royston's normalising transformations (see the module documentation).
fn p_value(w: f64, one_minus_w: f64, n: usize) -> f64 {
    if n == 3 {
        // Exact: P(W ≤ w) = (6/π)(arcsin √w − π/3), for 3/4 ≤ w ≤ 1.
        let p = 6.0 / PI * (w.sqrt().asin() - PI / 3.0);
        return p.clamp(0.0, 1.0);
    }
    if one_minus_w <= 0.0 {
        // W = 1 exactly: the sample lies on the normal scores.
        return 1.0;
    }
    let y = one_minus_w.ln();
    let nf = n as f64;
    let z = if n <= 11 {
        let gamma = poly(&G, nf);
        if y >= gamma {
            // Outside the transformation's domain; cannot happen for valid
            // samples (1 − W stays below e^γ), kept as "as small as can be".
            return 0.0;
        }
        let t = -(gamma - y).ln();
        let mu = poly(&C3, nf);
        let sigma = poly(&C4, nf).exp();
        (t - mu) / sigma
    } else {
        let ln_n = nf.ln();
        let mu = poly(&C5, ln_n);
        let sigma = poly(&C6, ln_n).exp();
        (y - mu) / sigma
    };
    norm_sf(z).clamp(0.0, 1.0)
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

    fn floats(v: &Value) -> Vec<f64> {
        v.as_array()
            .expect("array")
            .iter()
            .map(|x| x.as_f64().expect("number"))
            .collect()
    }

    #[test]
    fn matches_scipy_shapiro() {
        // Source: scipy.stats.shapiro on the samples stored in stats.json
        // (invented seeded samples of n = 3..5000, skewed, tied and uniform
        // ones, and the iris measurements bundled with scikit-learn).
        // Observed: |ΔW| ≤ 5e-10, |Δp| ≤ 1.6e-7 (at n = 5000, where
        // 1 − W ≈ 2e-4 magnifies ΔW). A float64 re-computation of Royston's
        // formulas with scipy.special.ndtri for the scores reproduces our W,
        // not scipy's, to 1e-15: the 1e-10 gap is scipy's own rounding.
        let doc = reference();
        let cases = doc["shapiro"].as_array().expect("shapiro cases");
        assert!(cases.len() >= 15, "reference file lost its cases");
        let (mut worst_w, mut worst_p) = (0.0f64, 0.0f64);
        for case in cases {
            let name = case["name"].as_str().unwrap();
            let x = floats(&case["x"]);
            let want_w = case["statistic"].as_f64().unwrap();
            let want_p = case["p_value"].as_f64().unwrap();
            let got = shapiro_wilk(&x).unwrap_or_else(|e| panic!("{name}: {e}"));
            assert_eq!(got.n, x.len());
            let (dw, dp) = ((got.statistic - want_w).abs(), (got.p_value - want_p).abs());
            assert!(dw <= 1e-6, "{name}: W {} vs scipy {want_w}", got.statistic);
            assert!(dp <= 1e-6, "{name}: p {} vs scipy {want_p}", got.p_value);
            // Small p-values should also agree in relative terms.
            if want_p < 1e-2 {
                assert!(dp / want_p <= 1e-6, "{name}: p {} vs {want_p}", got.p_value);
            }
            worst_w = worst_w.max(dw);
            worst_p = worst_p.max(dp);
        }
        eprintln!("Shapiro–Wilk vs scipy: worst |ΔW| = {worst_w:.2e}, worst |Δp| = {worst_p:.2e}");
    }

    #[test]
    fn normal_scores_match_scipy_blom_positions() {
        // Source: scipy.stats.norm.ppf((i − 3/8)/(n + 1/4)) in stats.json.
        let doc = reference();
        for case in doc["blom_scores"].as_array().unwrap() {
            let n = case["n"].as_u64().unwrap() as usize;
            let m = normal_scores(n);
            assert_eq!(m.len(), n);
            for (got, want) in m.iter().zip(floats(&case["first"])) {
                assert!((got - want).abs() <= 1e-13, "n {n}: {got} vs {want}");
            }
            let last = case["last"].as_f64().unwrap();
            assert!((m[n - 1] - last).abs() <= 1e-13, "n {n}: last {}", m[n - 1]);
        }
    }

    #[test]
    fn coefficients_are_normalised_and_antisymmetric() {
        // Σ a_i = 0 and Σ a_i² = 1 by construction (Royston 1995).
        for n in [3usize, 4, 5, 6, 7, 11, 12, 50, 999, 5000] {
            let a = coefficients(n);
            let sum: f64 = a.iter().sum();
            let sq: f64 = a.iter().map(|v| v * v).sum();
            assert!(sum.abs() < 1e-12, "n {n}: Σa = {sum}");
            assert!((sq - 1.0).abs() < 1e-12, "n {n}: Σa² = {sq}");
            for i in 0..n {
                assert_eq!(a[i], -a[n - 1 - i], "n {n}, i {i}");
            }
            assert!(a.windows(2).all(|w| w[0] <= w[1]), "n {n}: not increasing");
        }
        // n = 3 is exact: a = (−1/√2, 0, 1/√2).
        let a3 = coefficients(3);
        assert_eq!(a3[2], FRAC_1_SQRT_2);
    }

    #[test]
    fn n3_p_value_is_the_exact_distribution() {
        // For n = 3, W of equally spaced values is 1 and p = 1; the smallest
        // possible W is 3/4 (two values equal), where p = 0 (Shapiro & Wilk
        // 1965, exact distribution for n = 3).
        let r = shapiro_wilk(&[1.0, 2.0, 3.0]).unwrap();
        assert!((r.statistic - 1.0).abs() < 1e-15);
        assert!((r.p_value - 1.0).abs() < 1e-12);
        let r = shapiro_wilk(&[1.0, 1.0, 2.0]).unwrap();
        assert!((r.statistic - 0.75).abs() < 1e-12, "W {}", r.statistic);
        assert!(r.p_value < 1e-6, "p {}", r.p_value);
    }

    #[test]
    fn statistic_is_location_and_scale_invariant() {
        // W depends only on the standardized sample (Shapiro & Wilk 1965).
        let x = [
            2.1, 3.4, 1.9, 5.6, 4.4, 3.3, 2.8, 6.1, 3.9, 4.0, 2.2, 3.7, 5.0,
        ];
        let base = shapiro_wilk(&x).unwrap();
        let moved: Vec<f64> = x.iter().map(|v| 1.0e6 + 250.0 * v).collect();
        let other = shapiro_wilk(&moved).unwrap();
        assert!((base.statistic - other.statistic).abs() < 1e-12);
        assert!((base.p_value - other.p_value).abs() < 1e-10);
        let flipped: Vec<f64> = x.iter().map(|v| -v).collect();
        let other = shapiro_wilk(&flipped).unwrap();
        assert!((base.statistic - other.statistic).abs() < 1e-12);
    }

    #[test]
    fn degenerate_inputs_are_errors_not_nan() {
        assert_eq!(shapiro_wilk(&[1.0, 2.0]), Err(SwError::TooFew { n: 2 }));
        assert_eq!(shapiro_wilk(&[]), Err(SwError::TooFew { n: 0 }));
        let big: Vec<f64> = (0..MAX_N + 1).map(|i| (i as f64).sin()).collect();
        assert_eq!(shapiro_wilk(&big), Err(SwError::TooMany { n: MAX_N + 1 }));
        assert_eq!(
            shapiro_wilk(&[1.0, f64::NAN, 2.0, 3.0]),
            Err(SwError::NonFinite { index: 1 })
        );
        assert_eq!(
            shapiro_wilk(&[1.0, 2.0, f64::INFINITY]),
            Err(SwError::NonFinite { index: 2 })
        );
        assert_eq!(shapiro_wilk(&[4.2; 10]), Err(SwError::ZeroRange));
        // Messages say what is wrong and what to do.
        let msg = SwError::TooMany { n: 7000 }.to_string();
        assert!(msg.contains("7000") && msg.contains("subsample"), "{msg}");
        assert!(
            SwError::NonFinite { index: 1 }
                .to_string()
                .contains("value 2")
        );
    }

    #[test]
    fn results_stay_in_range_for_awkward_samples() {
        // Heavy ties, one outlier, two clusters: W in (0, 1], p in [0, 1].
        let samples: Vec<Vec<f64>> = vec![
            vec![0.0, 0.0, 0.0, 0.0, 1.0],
            vec![1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 100.0],
            (0..40).map(|i| if i < 20 { 0.0 } else { 1.0 }).collect(),
            vec![1e-300, 2e-300, 4e-300, 3e-300],
        ];
        for x in samples {
            let r = shapiro_wilk(&x).unwrap();
            assert!(r.statistic > 0.0 && r.statistic <= 1.0, "{x:?}: {r:?}");
            assert!((0.0..=1.0).contains(&r.p_value), "{x:?}: {r:?}");
        }
    }

    #[test]
    fn normal_tail_matches_closed_values() {
        // Q(0) = 1/2; Q(1.959963984540054) = 0.025 and Q(−z) = 1 − Q(z)
        // (standard normal table; common practice, no source).
        assert_eq!(norm_sf(0.0), 0.5);
        assert!((norm_sf(1.959_963_984_540_054) - 0.025).abs() < 1e-15);
        assert!((norm_sf(-1.959_963_984_540_054) - 0.975).abs() < 1e-15);
        assert_eq!(norm_sf(f64::INFINITY), 0.0);
    }
}
