//! Welch–Satterthwaite degrees of freedom of a difference of two independent
//! estimates (Welch 1947; Satterthwaite 1946).
//!
//! For variances v₁, v₂ of the two estimates with ν₁, ν₂ degrees of freedom, the
//! difference has variance v₁ + v₂ and approximately t-distributed studentization with
//! ν = (v₁ + v₂)² / (v₁²/ν₁ + v₂²/ν₂). Written with the shares w = v/(v₁ + v₂),
//! ν = 1 / (w₁²/ν₁ + w₂²/ν₂), so variances of 1e-200 or 1e200 neither underflow nor
//! overflow when squared. Every place in slopewise that needs this df calls
//! [`welch_df`], so the formula lives once.

/// ν = (v₁ + v₂)² / (v₁²/ν₁ + v₂²/ν₂); `None` when the summed variance is not
/// positive and finite or a df is not positive.
pub fn welch_df(v1: f64, df1: f64, v2: f64, df2: f64) -> Option<f64> {
    let total = v1 + v2;
    if !(total > 0.0) || !total.is_finite() || !(df1 > 0.0) || !(df2 > 0.0) {
        return None;
    }
    let (w1, w2) = (v1 / total, v2 / total);
    let df = 1.0 / (w1 * w1 / df1 + w2 * w2 / df2);
    df.is_finite().then_some(df)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn equal_variances_and_df_give_the_summed_df() {
        // With v₁ = v₂ and ν₁ = ν₂ = ν the formula gives 2ν (algebra of the formula
        // above; Satterthwaite 1946, eq. 2).
        assert!((welch_df(3.0, 7.0, 3.0, 7.0).unwrap() - 14.0).abs() < 1e-12);
    }

    #[test]
    fn one_dominant_variance_gives_its_df() {
        // As v₂/v₁ → 0, ν → ν₁ (limit of the formula).
        let df = welch_df(1.0, 5.0, 1e-12, 50.0).unwrap();
        assert!((df - 5.0).abs() < 1e-9, "{df}");
        // Huge and tiny variances stay finite.
        assert!(welch_df(1e250, 4.0, 1e250, 6.0).unwrap().is_finite());
        assert!(welch_df(1e-250, 4.0, 1e-250, 6.0).unwrap().is_finite());
    }

    #[test]
    fn unusable_inputs_give_none() {
        assert_eq!(welch_df(0.0, 3.0, 0.0, 3.0), None);
        assert_eq!(welch_df(1.0, 0.0, 1.0, 3.0), None);
        assert_eq!(welch_df(f64::INFINITY, 3.0, 1.0, 3.0), None);
    }
}
