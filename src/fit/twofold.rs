//! Sums carried in twice the working precision (a double-double: a rounded sum and
//! the exact error of its rounding), so that the moments are correct to the last bit
//! in all but pathological data.
//!
//! Each addition is error-free by Knuth's TwoSum, and each product by the fused
//! multiply-add (the error of `a·b` is `fma(a, b, −a·b)`, exactly): the "Sum2" and
//! "Dot2" schemes of Ogita, Rump & Oishi (2005), whose result is as accurate as if
//! computed in twice the precision and then rounded once. The order of the terms is
//! the data's order, so the result is the same on every machine.

/// A sum held as `hi + lo`, with `lo` the rounding error of `hi`.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct TwoFold {
    hi: f64,
    lo: f64,
}

/// `a + b` as (rounded sum, its exact error) (Knuth 1969, TwoSum).
#[inline]
fn two_sum(a: f64, b: f64) -> (f64, f64) {
    let s = a + b;
    let bb = s - a;
    (s, (a - (s - bb)) + (b - bb))
}

impl TwoFold {
    /// Adds `v`, keeping its rounding error.
    #[inline]
    pub fn add(&mut self, v: f64) {
        let (s, e) = two_sum(self.hi, v);
        self.hi = s;
        self.lo += e;
    }

    /// Adds the product `a·b`, keeping the product's and the sum's rounding errors.
    #[inline]
    pub fn add_product(&mut self, a: f64, b: f64) {
        let p = a * b;
        let e = a.mul_add(b, -p);
        self.add(p);
        self.lo += e;
    }

    /// The sum, rounded once.
    #[inline]
    pub fn value(self) -> f64 {
        self.hi + self.lo
    }

    /// The sum as its two parts, for callers that subtract a near neighbour.
    #[inline]
    pub fn parts(self) -> (f64, f64) {
        (self.hi, self.lo)
    }
}

/// `x − m` exactly, as (rounded difference, its error).
#[inline]
pub fn exact_difference(x: f64, m: f64) -> (f64, f64) {
    two_sum(x, -m)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn keeps_what_plain_addition_loses() {
        // 1e16 + 1 rounds to 1e16 in doubles (spacing 2 there); 1e16 + 1 − 1e16 is
        // then 0 by plain addition and 1 here (by hand).
        let mut s = TwoFold::default();
        for v in [1e16, 1.0, -1e16] {
            s.add(v);
        }
        assert_eq!(s.value(), 1.0);
        assert_eq!(1e16 + 1.0 - 1e16, 0.0);
        // (1 + 2⁻³⁰)² = 1 + 2⁻²⁹ + 2⁻⁶⁰: the last term is below a double's spacing
        // at 1 and lost by the rounded product, kept by the fused error (by hand).
        let a = 1.0 + 2f64.powi(-30);
        let mut p = TwoFold::default();
        p.add_product(a, a);
        p.add(-1.0 - 2f64.powi(-29));
        assert_eq!(p.value(), 2f64.powi(-60));
        assert_eq!(exact_difference(1e16, 1.0), (1e16, -1.0));
    }
}
