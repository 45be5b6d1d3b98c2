//! The extra-sum-of-squares F test of two nested least-squares models (the general
//! linear test; Fisher 1932, see Kutner et al. 2005, §2.8), with its two corners
//! decided rather than left blank.
//!
//! F = (extra / df₁) / (RSS / df₂), extra = RSS_reduced − RSS_full. When the full
//! model leaves no residual variation (RSS at rounding level) the ratio is infinite
//! if the reduced model misses something (extra above rounding level): the data then
//! reject the reduced model as strongly as data can, so p = 0 ("exact fit"). When
//! both are at rounding level the ratio is 0/0: no test exists, and the caller must
//! say so and not fall through to a decision as though it had one.

/// How the test came out.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum NestedF {
    /// An ordinary finite F with its upper-tail p-value.
    Value {
        /// The F statistic.
        f: f64,
        /// P(F(df₁, df₂) ≥ f).
        p: f64,
    },
    /// Zero residual variation with a nonzero extra sum of squares: F = ∞, p = 0.
    ExactFit,
    /// Zero residual variation and no extra sum of squares (0/0), or no residual df.
    NotComputable,
}

impl NestedF {
    /// The F statistic when finite.
    pub fn f(&self) -> Option<f64> {
        match self {
            NestedF::Value { f, .. } => Some(*f),
            _ => None,
        }
    }

    /// The p-value: the upper tail, 0 for an exact fit, `None` when not computable.
    pub fn p(&self) -> Option<f64> {
        match self {
            NestedF::Value { p, .. } => Some(*p),
            NestedF::ExactFit => Some(0.0),
            NestedF::NotComputable => None,
        }
    }

    /// "computed", "exact-fit" or "not-computable", as results.json records it.
    pub fn status(&self) -> &'static str {
        match self {
            NestedF::Value { .. } => "computed",
            NestedF::ExactFit => "exact-fit",
            NestedF::NotComputable => "not-computable",
        }
    }
}

/// The nested F test. `floor` is the sum of squares that rounding alone can produce
/// in the residuals (see [`rounding_floor`]); sums at or below it count as zero.
pub fn nested_f(extra: f64, df1: f64, rss: f64, df2: f64, floor: f64) -> NestedF {
    if !(df1 > 0.0) || !(df2 > 0.0) || !extra.is_finite() || !rss.is_finite() {
        return NestedF::NotComputable;
    }
    let extra = extra.max(0.0);
    if rss <= floor {
        return if extra > floor {
            NestedF::ExactFit
        } else {
            NestedF::NotComputable
        };
    }
    let f = (extra / df1) / (rss / df2);
    NestedF::Value {
        f,
        p: super::dist::f_sf(f, df1, df2),
    }
}

/// The residual sum of squares rounding can leave on rows that lie exactly on their
/// lines: each residual (y − ȳ) − b (x − x̄) carries an error of a few units in the
/// last place of the larger of |y| and |b x|, so n rows hold about n (c ε M)² with
/// M that magnitude. c = 16 leaves room for the means and the slope's own rounding
/// (a bound of this standard form, cf. Higham 2002, §3.1; the constant is ours).
pub fn rounding_floor(n: u64, magnitude: f64) -> f64 {
    let e = 16.0 * f64::EPSILON * magnitude;
    n as f64 * e * e
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn corners_are_decided() {
        assert_eq!(nested_f(1.0, 2.0, 0.0, 3.0, 1e-20), NestedF::ExactFit);
        assert_eq!(
            nested_f(1e-30, 2.0, 0.0, 3.0, 1e-20),
            NestedF::NotComputable
        );
        assert_eq!(nested_f(1.0, 2.0, 1.0, 0.0, 0.0), NestedF::NotComputable);
        assert_eq!(NestedF::ExactFit.p(), Some(0.0));
        assert_eq!(NestedF::ExactFit.f(), None);
        assert_eq!(NestedF::NotComputable.p(), None);
    }

    #[test]
    fn an_ordinary_test_is_the_ratio() {
        // F = (6/2)/(4/8) = 6 on 2 and 8 df (the definition above).
        let t = nested_f(6.0, 2.0, 4.0, 8.0, 0.0);
        assert_eq!(t.f(), Some(6.0));
        // Upper tail of F(2, 8) at 6 is (1 + 6·2/8)^(-4) = 2.5^-4 (closed form of the
        // F(2, ν) tail, (1 + 2f/ν)^(−ν/2)).
        assert!((t.p().unwrap() - 2.5f64.powi(-4)).abs() < 1e-12);
    }
}
