//! Simultaneous confidence bands for a whole regression line.
//!
//! A pointwise band holds at each covariate value on its own; the Working–Hotelling
//! band (Working & Hotelling 1929) holds for the whole line at once, with the
//! critical value √(2 F(1 − α; 2, df)) in place of Student's t(1 − α/2; df), two
//! being the parameters of a straight line.

use super::dist::f_upper_quantile;

/// The Working–Hotelling critical value for a line with `df` residual degrees of
/// freedom at level `alpha`; NaN outside the domain.
pub fn working_hotelling(alpha: f64, df: f64) -> f64 {
    if !(alpha > 0.0 && alpha < 1.0 && df > 0.0) {
        return f64::NAN;
    }
    (2.0 * f_upper_quantile(alpha, 2.0, df)).sqrt()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// sqrt(2 · scipy.stats.f.ppf(1 − alpha, 2, df)), tests/reference/generate_evidence.py.
    #[test]
    fn critical_values_match_scipy() {
        let v: serde_json::Value =
            serde_json::from_str(include_str!("../../tests/reference/evidence.json")).unwrap();
        for c in v["working_hotelling"].as_array().unwrap() {
            let (df, alpha) = (c["df"].as_f64().unwrap(), c["alpha"].as_f64().unwrap());
            let want = c["critical"].as_f64().unwrap();
            let found = working_hotelling(alpha, df);
            assert!((found - want).abs() <= 1e-10 * want, "{c}: {found}");
        }
    }
}
