//! Student's t and Snedecor's F: tail probabilities and quantiles.
//!
//! Tails come straight from the regularized incomplete beta function (statrs'
//! continued fraction), never as 1 − cdf, so small p-values keep their relative
//! accuracy: for T with ν df, P(|T| > t) = I_{ν/(ν+t²)}(ν/2, 1/2); for F with
//! (d1, d2) df, P(F > f) = I_{d2/(d2+d1 f)}(d2/2, d1/2) (Abramowitz & Stegun 1964,
//! 26.5.27 and 26.6.2). Quantiles invert the same identities with statrs'
//! inverse incomplete beta and are then polished by Newton steps on the tail.

use statrs::function::beta::{beta_reg, inv_beta_reg, ln_beta};

/// I_x(a, b), or NaN when the arguments are outside its domain (statrs panics
/// there). A NaN from a degenerate input then reaches the results' finite check as
/// a clear error instead of ending the process.
pub(crate) fn incomplete_beta(a: f64, b: f64, x: f64) -> f64 {
    if a > 0.0 && b > 0.0 && a.is_finite() && b.is_finite() && (0.0..=1.0).contains(&x) {
        beta_reg(a, b, x)
    } else {
        f64::NAN
    }
}

/// The inverse of I_x(a, b) at p, NaN outside the domain (as above).
fn inverse_incomplete_beta(a: f64, b: f64, p: f64) -> f64 {
    if a > 0.0 && b > 0.0 && a.is_finite() && b.is_finite() && (0.0..=1.0).contains(&p) {
        inv_beta_reg(a, b, p)
    } else {
        f64::NAN
    }
}

/// Two-sided p-value P(|T| > |t|) for Student's t with `df` degrees of freedom.
pub fn t_two_sided(t: f64, df: f64) -> f64 {
    if t.is_nan() {
        return f64::NAN;
    }
    if t.is_infinite() {
        return 0.0;
    }
    let x = df / (df + t * t);
    incomplete_beta(df / 2.0, 0.5, x).clamp(0.0, 1.0)
}

/// Upper tail P(T > t).
pub fn t_sf(t: f64, df: f64) -> f64 {
    let half = 0.5 * t_two_sided(t, df);
    if t >= 0.0 { half } else { 1.0 - half }
}

/// Density of Student's t.
pub fn t_pdf(t: f64, df: f64) -> f64 {
    (-(0.5 * df.ln() + ln_beta(0.5, df / 2.0)) - (df + 1.0) / 2.0 * (t * t / df).ln_1p()).exp()
}

/// Quantile: the t with P(T ≤ t) = p, for 0 < p < 1.
pub fn t_quantile(p: f64, df: f64) -> f64 {
    if p == 0.5 {
        return 0.0;
    }
    // Work with the smaller tail so that p = 1e-10 keeps its digits (1 − p would not).
    if p < 0.5 {
        -t_upper_quantile(p, df)
    } else {
        t_upper_quantile(1.0 - p, df)
    }
}

/// The t > 0 with upper tail P(T > t) = q, for 0 < q < 0.5.
fn t_upper_quantile(q: f64, df: f64) -> f64 {
    // P(|T| > t) = 2q = I_x(ν/2, 1/2) with x = ν/(ν + t²).
    let x = inverse_incomplete_beta(df / 2.0, 0.5, 2.0 * q);
    if x.is_nan() {
        return f64::NAN;
    }
    let mut t = (df * (1.0 - x) / x).sqrt();
    if !t.is_finite() || t <= 0.0 {
        t = 1.0;
    }
    newton_on_log_tail(t, q, |t| t_sf(t, df), |t| t_pdf(t, df), |t| t > 0.0)
}

/// Upper tail P(F > f) for Snedecor's F with (d1, d2) degrees of freedom.
pub fn f_sf(f: f64, d1: f64, d2: f64) -> f64 {
    if f.is_nan() {
        return f64::NAN;
    }
    if f <= 0.0 {
        return 1.0;
    }
    if !f.is_finite() {
        return 0.0;
    }
    incomplete_beta(d2 / 2.0, d1 / 2.0, d2 / (d2 + d1 * f)).clamp(0.0, 1.0)
}

/// Density of Snedecor's F.
pub fn f_pdf(f: f64, d1: f64, d2: f64) -> f64 {
    if f <= 0.0 {
        return 0.0;
    }
    let ln = 0.5 * d1 * (d1 / d2).ln() + (0.5 * d1 - 1.0) * f.ln()
        - 0.5 * (d1 + d2) * (d1 * f / d2).ln_1p()
        - ln_beta(d1 / 2.0, d2 / 2.0);
    ln.exp()
}

/// Lower tail P(F ≤ f), computed directly so small values keep their digits.
pub fn f_cdf(f: f64, d1: f64, d2: f64) -> f64 {
    if f.is_nan() {
        return f64::NAN;
    }
    if f <= 0.0 {
        return 0.0;
    }
    if !f.is_finite() {
        return 1.0;
    }
    incomplete_beta(d1 / 2.0, d2 / 2.0, d1 * f / (d1 * f + d2)).clamp(0.0, 1.0)
}

/// Quantile: the f with P(F ≤ f) = p, for 0 < p < 1.
pub fn f_quantile(p: f64, d1: f64, d2: f64) -> f64 {
    // P(F > f) = 1 − p = I_x(d2/2, d1/2) with x = d2 / (d2 + d1 f).
    let x = inverse_incomplete_beta(d2 / 2.0, d1 / 2.0, 1.0 - p);
    if x.is_nan() {
        return f64::NAN;
    }
    let mut f = d2 * (1.0 - x) / (d1 * x);
    if !f.is_finite() || f <= 0.0 {
        f = 1.0;
    }
    // Newton on whichever tail is smaller: its logarithm is well conditioned there.
    if p < 0.5 {
        newton_on_log_tail(
            f,
            p,
            |f| f_cdf(f, d1, d2),
            |f| -f_pdf(f, d1, d2),
            |f| f > 0.0,
        )
    } else {
        newton_on_log_tail(
            f,
            1.0 - p,
            |f| f_sf(f, d1, d2),
            |f| f_pdf(f, d1, d2),
            |f| f > 0.0,
        )
    }
}

/// Solves tail(x) = q by Newton steps on ln tail(x), which converge quickly on the
/// power-law tails where steps on tail(x) itself overshoot. `pdf` is −d tail/dx
/// (the density for an upper tail, minus the density for a lower one).
fn newton_on_log_tail(
    mut x: f64,
    q: f64,
    tail: impl Fn(f64) -> f64,
    pdf: impl Fn(f64) -> f64,
    valid: impl Fn(f64) -> bool,
) -> f64 {
    let target = q.ln();
    for _ in 0..60 {
        let sf = tail(x);
        let step = (sf.ln() - target) * sf / pdf(x);
        if !step.is_finite() {
            break;
        }
        let mut next = x + step;
        if !valid(next) {
            next = x / 2.0;
        }
        let done = (next - x).abs() <= 4.0 * f64::EPSILON * x.abs();
        x = next;
        if done {
            break;
        }
    }
    x
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn arguments_outside_the_domain_give_nan_not_a_panic() {
        // statrs panics on these; a NaN is caught later as a clear error.
        assert!(t_two_sided(1.0, f64::NAN).is_nan());
        assert!(t_two_sided(f64::NAN, 5.0).is_nan());
        assert!(f_sf(2.0, 1.0, 0.0).is_nan());
        assert!(f_sf(f64::NAN, 1.0, 3.0).is_nan() && f_cdf(f64::NAN, 1.0, 3.0).is_nan());
        assert_eq!(
            (
                t_two_sided(f64::INFINITY, 5.0),
                f_sf(f64::INFINITY, 1.0, 3.0)
            ),
            (0.0, 0.0)
        );
        assert!(f_cdf(2.0, -1.0, 3.0).is_nan());
        assert!(t_quantile(0.975, 0.0).is_nan());
        assert!(f_quantile(0.95, 2.0, f64::INFINITY).is_nan());
        assert!((incomplete_beta(1.0, 1.0, 0.25) - 0.25).abs() < 1e-15); // I_x(1, 1) = x
    }
    use serde_json::Value;

    /// Reference values from scipy.stats (versions and script in tests/reference/).
    fn reference() -> Value {
        serde_json::from_str(include_str!("../../tests/reference/distributions.json")).unwrap()
    }

    fn rel(a: f64, b: f64) -> f64 {
        (a - b).abs() / b.abs()
    }

    /// statrs' incomplete beta takes its prefactor from differences of log-gamma
    /// values, which lose about 1e-9 relative once a df reaches 1e5; below that the
    /// agreement is 1e-10 or better (measured against the scipy values).
    fn tol(df: f64) -> f64 {
        if df >= 1e5 { 1e-8 } else { 1e-10 }
    }

    fn points(key: &str) -> Vec<Value> {
        reference()[key].as_array().unwrap().clone()
    }

    #[test]
    fn t_quantiles_match_scipy() {
        let pts = points("t_ppf");
        assert!(pts.len() >= 12);
        for p in pts {
            let got = t_quantile(p["p"].as_f64().unwrap(), p["df"].as_f64().unwrap());
            let want = p["value"].as_f64().unwrap();
            // scipy.stats.t.ppf, tests/reference/distributions.json
            assert!(
                rel(got, want) < tol(p["df"].as_f64().unwrap()),
                "t ppf {p}: got {got}"
            );
        }
    }

    #[test]
    fn t_tails_match_scipy() {
        let pts = points("t_sf");
        assert!(pts.len() >= 12);
        for p in pts {
            let got = t_sf(p["x"].as_f64().unwrap(), p["df"].as_f64().unwrap());
            let want = p["value"].as_f64().unwrap();
            // scipy.stats.t.sf, tests/reference/distributions.json
            assert!(
                rel(got, want) < tol(p["df"].as_f64().unwrap()),
                "t sf {p}: got {got}"
            );
        }
    }

    #[test]
    fn f_quantiles_match_scipy() {
        let pts = points("f_ppf");
        assert!(pts.len() >= 12);
        for p in pts {
            let (d1, d2) = (p["df1"].as_f64().unwrap(), p["df2"].as_f64().unwrap());
            let got = f_quantile(p["p"].as_f64().unwrap(), d1, d2);
            let want = p["value"].as_f64().unwrap();
            // scipy.stats.f.ppf, tests/reference/distributions.json
            assert!(rel(got, want) < tol(d1.max(d2)), "f ppf {p}: got {got}");
        }
    }

    #[test]
    fn f_tails_match_scipy() {
        let pts = points("f_sf");
        assert!(pts.len() >= 12);
        for p in pts {
            let (d1, d2) = (p["df1"].as_f64().unwrap(), p["df2"].as_f64().unwrap());
            let got = f_sf(p["x"].as_f64().unwrap(), d1, d2);
            let want = p["value"].as_f64().unwrap();
            // scipy.stats.f.sf, tests/reference/distributions.json
            assert!(rel(got, want) < tol(d1.max(d2)), "f sf {p}: got {got}");
        }
    }

    #[test]
    fn published_table_points() {
        // Upper 2.5% points of t and upper 5% points of F, as printed in standard
        // tables (e.g. Fisher & Yates 1963); from memory, to the table's 3 decimals.
        assert!((t_quantile(0.975, 10.0) - 2.228).abs() < 5e-4);
        assert!((t_quantile(0.975, 30.0) - 2.042).abs() < 5e-4);
        assert!((f_quantile(0.95, 2.0, 20.0) - 3.49).abs() < 5e-3);
        assert!((f_quantile(0.95, 3.0, 60.0) - 2.76).abs() < 5e-3);
    }
}
