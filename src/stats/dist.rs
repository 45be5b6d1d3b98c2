//! Student's t and Snedecor's F: tail probabilities and quantiles.
//!
//! Tails come straight from the regularized incomplete beta function (statrs'
//! continued fraction), never as 1 − cdf, so small p-values keep their relative
//! accuracy: for T with ν df, P(|T| > t) = I_{ν/(ν+t²)}(ν/2, 1/2); for F with
//! (d1, d2) df, P(F > f) = I_{d2/(d2+d1 f)}(d2/2, d1/2) (Abramowitz & Stegun 1964,
//! 26.5.27 and 26.6.2). Quantiles invert the same identities with statrs'
//! inverse incomplete beta and are then polished by Newton steps on the tail.

use statrs::function::beta::{beta_reg, inv_beta_reg, ln_beta};

/// Two-sided p-value P(|T| > |t|) for Student's t with `df` degrees of freedom.
pub fn t_two_sided(t: f64, df: f64) -> f64 {
    if !t.is_finite() {
        return 0.0;
    }
    let x = df / (df + t * t);
    beta_reg(df / 2.0, 0.5, x).clamp(0.0, 1.0)
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
    if p < 0.5 {
        return -t_quantile(1.0 - p, df);
    }
    // Upper tail q = 1 − p; P(|T| > t) = 2q = I_x(ν/2, 1/2) with x = ν/(ν + t²).
    let q = 1.0 - p;
    let x = inv_beta_reg(df / 2.0, 0.5, 2.0 * q);
    let mut t = (df * (1.0 - x) / x).sqrt();
    if !t.is_finite() || t <= 0.0 {
        t = 1.0;
    }
    for _ in 0..8 {
        let step = (t_sf(t, df) - q) / t_pdf(t, df);
        if !step.is_finite() {
            break;
        }
        t += step;
        if step.abs() <= 1e-15 * t.abs() {
            break;
        }
    }
    t
}

/// Upper tail P(F > f) for Snedecor's F with (d1, d2) degrees of freedom.
pub fn f_sf(f: f64, d1: f64, d2: f64) -> f64 {
    if f <= 0.0 {
        return 1.0;
    }
    if !f.is_finite() {
        return 0.0;
    }
    beta_reg(d2 / 2.0, d1 / 2.0, d2 / (d2 + d1 * f)).clamp(0.0, 1.0)
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

/// Quantile: the f with P(F ≤ f) = p, for 0 < p < 1.
pub fn f_quantile(p: f64, d1: f64, d2: f64) -> f64 {
    // P(F > f) = 1 − p = I_x(d2/2, d1/2) with x = d2 / (d2 + d1 f).
    let q = 1.0 - p;
    let x = inv_beta_reg(d2 / 2.0, d1 / 2.0, q);
    let mut f = d2 * (1.0 - x) / (d1 * x);
    if !f.is_finite() || f <= 0.0 {
        f = 1.0;
    }
    for _ in 0..8 {
        let step = (f_sf(f, d1, d2) - q) / f_pdf(f, d1, d2);
        if !step.is_finite() {
            break;
        }
        let next = f + step;
        f = if next > 0.0 { next } else { f / 2.0 };
        if step.abs() <= 1e-15 * f.abs() {
            break;
        }
    }
    f
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::Value;

    /// Reference values from scipy.stats (versions and script in tests/reference/).
    fn reference() -> Value {
        serde_json::from_str(include_str!("../../tests/reference/distributions.json")).unwrap()
    }

    fn rel(a: f64, b: f64) -> f64 {
        (a - b).abs() / b.abs()
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
            assert!(rel(got, want) < 1e-10, "t ppf {p}: got {got}");
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
            assert!(rel(got, want) < 1e-10, "t sf {p}: got {got}");
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
            assert!(rel(got, want) < 1e-10, "f ppf {p}: got {got}");
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
            assert!(rel(got, want) < 1e-10, "f sf {p}: got {got}");
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
