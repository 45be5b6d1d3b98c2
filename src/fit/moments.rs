//! Centred moments of (x, y) pairs.
//!
//! The sums of both passes are carried in twice the working precision with exact
//! deviations and products ([`crate::fit::twofold`]; Ogita, Rump & Oishi 2005), so
//! the moments are the exact ones of the doubles read, rounded once (checked against
//! Python's exact fractions to 1 ulp in tests/exact_moments.rs).
//!
//! The data stage computes each group's moments with the corrected two-pass
//! algorithm ([`Moments::two_pass`]; Chan, Golub & LeVeque 1983, eq. 1.7): the means
//! from a first pass, then the centred sums about them, with the first-order
//! correction for the means' own rounding. Every product is then of deviations that
//! are exact in floating point, so the sums keep their digits whatever the offset: a
//! covariate near 1e8 with a spread of 5 and a response near 1e10 keep the slope to
//! about 1e-15, where the one-pass update of Welford (1962) keeps about 1e-6.
//! The one-pass update ([`Moments::push`]) and the pairwise merge of Chan, Golub &
//! LeVeque (1983) remain for callers that see each pair once; both avoid the
//! cancellation of the textbook Σx² − (Σx)²/n form.

use super::twofold::{TwoFold, exact_difference};

/// Count, means, centred sums of squares and cross products, and the x range.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Moments {
    /// Number of pairs.
    pub n: u64,
    /// Mean of x.
    pub mean_x: f64,
    /// Mean of y.
    pub mean_y: f64,
    /// Σ (x − x̄)².
    pub sxx: f64,
    /// Σ (y − ȳ)².
    pub syy: f64,
    /// Σ (x − x̄)(y − ȳ).
    pub sxy: f64,
    /// Smallest x.
    pub min_x: f64,
    /// Largest x.
    pub max_x: f64,
}

impl Default for Moments {
    fn default() -> Self {
        Moments {
            n: 0,
            mean_x: 0.0,
            mean_y: 0.0,
            sxx: 0.0,
            syy: 0.0,
            sxy: 0.0,
            min_x: f64::INFINITY,
            max_x: f64::NEG_INFINITY,
        }
    }
}

impl Moments {
    /// Adds one pair (Welford 1962).
    #[inline]
    pub fn push(&mut self, x: f64, y: f64) {
        self.n += 1;
        let n = self.n as f64;
        let dx = x - self.mean_x;
        let dy = y - self.mean_y;
        self.mean_x += dx / n;
        self.mean_y += dy / n;
        self.sxx += dx * (x - self.mean_x);
        self.syy += dy * (y - self.mean_y);
        self.sxy += dx * (y - self.mean_y);
        self.min_x = self.min_x.min(x);
        self.max_x = self.max_x.max(x);
    }

    /// Moments of the union of two sets (Chan, Golub & LeVeque 1983).
    pub fn merge(&self, other: &Moments) -> Moments {
        if self.n == 0 {
            return *other;
        }
        if other.n == 0 {
            return *self;
        }
        let na = self.n as f64;
        let nb = other.n as f64;
        let n = na + nb;
        let dx = other.mean_x - self.mean_x;
        let dy = other.mean_y - self.mean_y;
        let w = na * nb / n;
        Moments {
            n: self.n + other.n,
            mean_x: self.mean_x + dx * nb / n,
            mean_y: self.mean_y + dy * nb / n,
            sxx: self.sxx + other.sxx + dx * dx * w,
            syy: self.syy + other.syy + dy * dy * w,
            sxy: self.sxy + other.sxy + dx * dy * w,
            min_x: self.min_x.min(other.min_x),
            max_x: self.max_x.max(other.max_x),
        }
    }

    /// Moments of the pairs in `x` and `y`, two-pass (see [`Moments::two_pass`]).
    pub fn from_columns(x: &[f64], y: &[f64]) -> Moments {
        let n = x.len().min(y.len());
        Moments::two_pass(|| x[..n].iter().copied().zip(y[..n].iter().copied()))
    }

    /// Moments of the pairs `points()` yields, by the corrected two-pass algorithm
    /// (Chan, Golub & LeVeque 1983, eq. 1.7): means m from a first pass; then, with
    /// d = x − m and e = y − m_y, Sxx = Σd² − (Σd)²/n, Sxy = Σde − (Σd)(Σe)/n and the
    /// means corrected by Σd/n and Σe/n. `points` is called twice and must yield the
    /// same pairs both times.
    pub fn two_pass<I: Iterator<Item = (f64, f64)>>(points: impl Fn() -> I) -> Moments {
        let mut m = Moments::default();
        let (mut sum_x, mut sum_y) = (TwoFold::default(), TwoFold::default());
        for (x, y) in points() {
            m.n += 1;
            sum_x.add(x);
            sum_y.add(y);
            m.min_x = m.min_x.min(x);
            m.max_x = m.max_x.max(x);
        }
        if m.n == 0 {
            return Moments::default();
        }
        let nf = m.n as f64;
        let (mx, my) = (sum_x.value() / nf, sum_y.value() / nf);
        // Every deviation is taken exactly (d = dh + dl) and every product with its
        // error, in twice the working precision (see `twofold`), so the sums are the
        // exact ones rounded once, whatever the offsets and magnitudes.
        let mut sd = TwoFold::default();
        let mut se = TwoFold::default();
        let mut sdd = TwoFold::default();
        let mut see = TwoFold::default();
        let mut sde = TwoFold::default();
        for (x, y) in points() {
            let (dh, dl) = exact_difference(x, mx);
            let (eh, el) = exact_difference(y, my);
            sd.add(dh);
            sd.add(dl);
            se.add(eh);
            se.add(el);
            sdd.add_product(dh, dh);
            sdd.add(2.0 * dh * dl + dl * dl);
            see.add_product(eh, eh);
            see.add(2.0 * eh * el + el * el);
            sde.add_product(dh, eh);
            sde.add(dh * el + dl * eh + dl * el);
        }
        let (sd, se) = (sd.value(), se.value());
        m.mean_x = mx + sd / nf;
        m.mean_y = my + se / nf;
        let corrected = |s: TwoFold, c: f64| {
            let (hi, lo) = s.parts();
            hi + (lo - c)
        };
        m.sxx = corrected(sdd, sd * sd / nf).max(0.0);
        m.syy = corrected(see, se * se / nf).max(0.0);
        m.sxy = corrected(sde, sd * se / nf);
        m
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn close(a: f64, b: f64) -> bool {
        // Means near 1e6 with spread near 5: the one-pass update keeps about 11
        // digits of the centred sums (two passes keep all), where Σx² − (Σx)²/n would
        // keep about 3.
        (a - b).abs() <= 1e-10 * a.abs().max(b.abs()).max(1e-300)
    }

    #[test]
    fn two_pass_keeps_every_digit_at_a_large_offset() {
        // Invented: x = 1e8 + i/4, y = 1e10 + 3 (x − 1e8) + a small pattern. The centred
        // values are exact in floating point, so the sums are those of the pattern:
        // Sxx = Σ (i/4 − 4.875)² over i < 40 is 333.125 exactly (by hand: Σ (i − 19.5)²
        // = 5330, divided by 16), and the slope 3 plus the pattern's own, small slope.
        let x: Vec<f64> = (0..40).map(|i| 1e8 + i as f64 * 0.25).collect();
        let y: Vec<f64> = (0..40)
            .map(|i| 1e10 + 3.0 * (i as f64 * 0.25) + [0.5, -0.5][i % 2])
            .collect();
        let m = Moments::from_columns(&x, &y);
        assert_eq!(m.sxx, 333.125);
        assert_eq!(m.mean_x, 1e8 + 4.875);
        // Pattern +0.5/−0.5 alternating: Σ (x − x̄) p = −0.125 · 20 · 0.5 · 2 = −2.5,
        // so Sxy = 3 · 333.125 − 2.5 (by hand).
        assert_eq!(m.sxy, 3.0 * 333.125 - 2.5);
    }

    #[test]
    fn one_pass_matches_two_pass_and_merge() {
        // Invented values with a large offset, where naive sums cancel.
        let x: Vec<f64> = (0..50).map(|i| 1e6 + (i as f64) * 0.37).collect();
        let y: Vec<f64> = x
            .iter()
            .enumerate()
            .map(|(i, v)| 2.0 * v + ((i * 7) % 5) as f64)
            .collect();
        let mut one = Moments::default();
        for (a, b) in x.iter().zip(&y) {
            one.push(*a, *b);
        }
        let two = Moments::from_columns(&x, &y);
        let mut left = Moments::default();
        let mut right = Moments::default();
        for i in 0..50 {
            if i < 17 {
                left.push(x[i], y[i])
            } else {
                right.push(x[i], y[i])
            }
        }
        let merged = left.merge(&right);
        for m in [one, merged] {
            assert_eq!(m.n, two.n);
            assert!(close(m.mean_x, two.mean_x));
            assert!(close(m.sxx, two.sxx), "{} {}", m.sxx, two.sxx);
            assert!(close(m.sxy, two.sxy));
            assert!(close(m.syy, two.syy));
            assert_eq!(m.min_x, 1e6);
        }
    }
}
