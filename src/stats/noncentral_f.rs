//! The noncentral F distribution, confidence limits for its noncentrality, and the
//! power and sample size of an F test.
//!
//! With x = d1 f/(d1 f + d2), the noncentral F with noncentrality λ is a Poisson
//! mixture of central ones (Johnson, Kotz & Balakrishnan 1995, ch. 30):
//! P(F ≤ f) = Σ_j e^{−λ/2} (λ/2)^j / j! · I_x(d1/2 + j, d2/2). The sum runs over
//! j within 12 standard deviations plus 60 of the Poisson mode, which leaves out
//! Poisson mass below 1e-30; the beta tails come from the crate's own incomplete beta
//! at the two ends of that range and from the recurrence between neighbours in
//! between (see [`tails`]), the upper tail summed from upper tails so it keeps its
//! digits.
//!
//! Confidence limits for λ invert the distribution in λ (Steiger 2004): the lower
//! limit solves P(F ≤ F_obs; λ) = 1 − a and the upper P(F ≤ F_obs; λ) = a with
//! a = (1 − confidence)/2, each 0 when the equation has no root above zero. The cdf
//! falls as λ grows, so a bracket doubled outward and bisected finds each root.

use super::dist::{beta_tails, f_upper_quantile, ln_beta_prefactor};
use statrs::function::gamma::ln_gamma;

/// (P(F ≤ f), P(F > f)) for the noncentral F.
pub fn tails(f: f64, d1: f64, d2: f64, lambda: f64) -> (f64, f64) {
    let valid = d1 > 0.0 && d2 > 0.0 && lambda >= 0.0 && lambda.is_finite() && !f.is_nan();
    if !valid {
        return (f64::NAN, f64::NAN);
    }
    if f <= 0.0 {
        return (0.0, 1.0);
    }
    if f.is_infinite() {
        return (1.0, 0.0);
    }
    let r = d1 * f / d2;
    let (x, y) = (r / (1.0 + r), 1.0 / (1.0 + r));
    let mu = lambda / 2.0;
    let mode = mu.floor();
    let reach = (12.0 * mu.sqrt() + 60.0).ceil();
    let (lo, hi) = ((mode - reach).max(0.0) as u64, (mode + reach) as u64);
    let (a0, b) = (d1 / 2.0, d2 / 2.0);
    // Two incomplete betas, at the ends of the range, and the rest by the recurrence
    // I_x(a + 1, b) = I_x(a, b) − T(a), T(a) = x^a y^b / (a B(a, b)) (Abramowitz &
    // Stegun 1964, 26.5.16), each tail run in the direction in which it only adds:
    // the upper tails up from `lo`, the lower tails down from `hi`. One continued
    // fraction per end instead of one per term keeps a large noncentrality (a long
    // Poisson range) cheap.
    let n = (hi - lo) as usize + 1;
    let t: Vec<f64> = (0..n.saturating_sub(1))
        .map(|i| {
            let a = a0 + (lo as usize + i) as f64;
            (ln_beta_prefactor(a, b, x, y).exp() / a).min(1.0)
        })
        .collect();
    let mut upper = Vec::with_capacity(n);
    upper.push(beta_tails(a0 + lo as f64, b, x, y).1);
    for i in 0..n - 1 {
        upper.push(upper[i] + t[i]);
    }
    let mut lower = vec![0.0; n];
    lower[n - 1] = beta_tails(a0 + hi as f64, b, x, y).0;
    for i in (0..n - 1).rev() {
        lower[i] = lower[i + 1] + t[i];
    }
    let (mut cdf, mut sf) = (0.0, 0.0);
    for (i, (l, u)) in lower.iter().zip(&upper).enumerate() {
        let j = (lo as usize + i) as f64;
        let w = if mu == 0.0 {
            if j == 0.0 { 1.0 } else { 0.0 }
        } else {
            (-mu + j * mu.ln() - ln_gamma(j + 1.0)).exp()
        };
        cdf += w * l.min(1.0);
        sf += w * u.min(1.0);
    }
    (cdf.clamp(0.0, 1.0), sf.clamp(0.0, 1.0))
}

/// P(F ≤ f) for the noncentral F.
pub fn cdf(f: f64, d1: f64, d2: f64, lambda: f64) -> f64 {
    tails(f, d1, d2, lambda).0
}

/// P(F > f) for the noncentral F.
pub fn sf(f: f64, d1: f64, d2: f64, lambda: f64) -> f64 {
    tails(f, d1, d2, lambda).1
}

/// The λ at which P(F ≤ f; λ) equals `target`, or 0 when even λ = 0 gives less.
fn solve_lambda(f: f64, d1: f64, d2: f64, target: f64) -> f64 {
    let g = |lambda: f64| cdf(f, d1, d2, lambda) - target;
    if !(g(0.0) > 0.0) {
        return 0.0;
    }
    let mut hi = (2.0 * f * d1).max(10.0);
    let mut steps = 0;
    while g(hi) > 0.0 && steps < 60 {
        hi *= 2.0;
        steps += 1;
    }
    let mut lo = 0.0;
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if g(mid) > 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
        if hi - lo <= 1e-13 * hi.max(1e-300) {
            break;
        }
    }
    0.5 * (lo + hi)
}

/// Confidence limits [low, high] for the noncentrality of an observed F (Steiger
/// 2004), at the two-sided `confidence`.
pub fn noncentrality_limits(f: f64, d1: f64, d2: f64, confidence: f64) -> Option<[f64; 2]> {
    if !(f.is_finite() && f >= 0.0 && d1 > 0.0 && d2 > 0.0 && confidence > 0.0 && confidence < 1.0)
    {
        return None;
    }
    let a = (1.0 - confidence) / 2.0;
    Some([solve_lambda(f, d1, d2, 1.0 - a), solve_lambda(f, d1, d2, a)])
}

/// Power of the level-`alpha` F test on (d1, d2) df at noncentrality λ.
pub fn power(d1: f64, d2: f64, lambda: f64, alpha: f64) -> f64 {
    sf(f_upper_quantile(alpha, d1, d2), d1, d2, lambda)
}

/// The design behind a sample size: k groups, n rows each, and one pair of slopes
/// to tell apart by `delta` with residual variance `s2`, the pair's covariate
/// variances per row v1 and v2 (so Sxx = n v).
#[derive(Debug, Clone, Copy)]
pub struct SlopeDesign {
    /// Groups in the model.
    pub k: f64,
    /// The slope difference to detect.
    pub delta: f64,
    /// Residual variance.
    pub s2: f64,
    /// Covariate variance per row of the first group of the pair.
    pub v1: f64,
    /// ... of the second.
    pub v2: f64,
}

impl SlopeDesign {
    /// Power of the equal-slopes F test at `n` rows per group: noncentrality
    /// δ²/(s²(1/(n v1) + 1/(n v2))) on (k − 1, k n − 2k) df.
    pub fn power(&self, n: f64, alpha: f64) -> f64 {
        let lambda =
            self.delta * self.delta / (self.s2 * (1.0 / (n * self.v1) + 1.0 / (n * self.v2)));
        let (d1, d2) = (self.k - 1.0, self.k * n - 2.0 * self.k);
        if !(d2 > 0.0 && lambda.is_finite()) {
            return f64::NAN;
        }
        power(d1, d2, lambda, alpha)
    }

    /// The fewest rows per group (at least 3) giving at least `target` power, or
    /// `None` beyond a billion rows.
    pub fn rows_for(&self, target: f64, alpha: f64) -> Option<u64> {
        let ok = |n: u64| self.power(n as f64, alpha) >= target;
        let mut hi = 4_u64;
        while !ok(hi) {
            hi *= 2;
            if hi > 1_000_000_000 {
                return None;
            }
        }
        let mut lo = 3_u64;
        if ok(lo) {
            return Some(lo);
        }
        // ok(hi), !ok(lo): power rises with n.
        while hi - lo > 1 {
            let mid = lo + (hi - lo) / 2;
            if ok(mid) {
                hi = mid;
            } else {
                lo = mid;
            }
        }
        Some(hi)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::Value;

    fn evidence() -> Value {
        serde_json::from_str(include_str!("../../tests/reference/evidence.json")).unwrap()
    }

    fn rel(a: f64, b: f64) -> f64 {
        (a - b).abs() / b.abs().max(1e-300)
    }

    /// scipy.stats.ncf (and f for λ = 0), tests/reference/generate_evidence.py:
    /// 1e-9 relative on each tail above 1e-290.
    #[test]
    fn tails_match_scipy() {
        for c in evidence()["ncf"].as_array().unwrap() {
            let g = |k: &str| c[k].as_f64().unwrap();
            let (lo, up) = tails(g("f"), g("d1"), g("d2"), g("lambda"));
            for (found, want, what) in [(lo, g("cdf"), "cdf"), (up, g("sf"), "sf")] {
                if want > 1e-290 {
                    assert!(
                        rel(found, want) < 1e-9,
                        "{what} {c}: {found:e} against {want:e}"
                    );
                }
            }
        }
    }

    /// Steiger (2004) limits solved by scipy's brentq in generate_evidence.py; 1e-7
    /// relative (the roots are solved to 1e-13 on both sides).
    #[test]
    fn noncentrality_limits_match_scipy() {
        for c in evidence()["noncentrality_limits"].as_array().unwrap() {
            let g = |k: &str| c[k].as_f64().unwrap();
            let [lo, hi] = noncentrality_limits(g("f"), g("d1"), g("d2"), g("confidence")).unwrap();
            for (found, want) in [(lo, g("lambda_low")), (hi, g("lambda_high"))] {
                if want == 0.0 {
                    assert_eq!(found, 0.0, "{c}");
                } else {
                    assert!(rel(found, want) < 1e-7, "{c}: {found} against {want}");
                }
            }
        }
    }

    /// ncf.sf at the central F's critical value (generate_evidence.py), 1e-9.
    #[test]
    fn power_matches_scipy() {
        for c in evidence()["power"].as_array().unwrap() {
            let g = |k: &str| c[k].as_f64().unwrap();
            let p = power(g("d1"), g("d2"), g("lambda"), g("alpha"));
            assert!(rel(p, g("power")) < 1e-9, "{c}: {p}");
        }
    }

    /// The smallest n of generate_evidence.py's rule, with the power at n and n − 1.
    #[test]
    fn sample_size_matches_the_reference_rule() {
        for c in evidence()["sample_size"].as_array().unwrap() {
            let g = |k: &str| c[k].as_f64().unwrap();
            let d = SlopeDesign {
                k: g("k"),
                delta: g("delta"),
                s2: g("residual_variance"),
                v1: g("v1"),
                v2: g("v2"),
            };
            let n = d.rows_for(g("target"), g("alpha")).unwrap();
            assert_eq!(n, c["n"].as_u64().unwrap(), "{c}");
            assert!(
                rel(d.power(n as f64, g("alpha")), g("power_at_n")) < 1e-9,
                "{c}"
            );
            assert!(
                rel(d.power(n as f64 - 1.0, g("alpha")), g("power_below")) < 1e-9,
                "{c}"
            );
        }
    }
}
