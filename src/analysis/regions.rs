//! Where along the covariate two groups differ, when their slopes are not equal.
//!
//! On the separate-lines model, the difference of groups a and b at covariate x is
//! D(x) = ŷ_a(x) − ŷ_b(x), with ŷ_g(x) = ȳ_g + b_g (x − x̄_g) and, since groups are
//! independent and ȳ_g and b_g uncorrelated,
//! Var D(x) = s² Σ_g (1/n_g + (x − x̄_g)²/Sxx_g), s² the pooled residual variance.
//! The Johnson–Neyman bounds (Johnson & Neyman 1936) are the x where
//! D(x)² = c² Var D(x): with c the t quantile at 1 − alpha/2 (pointwise), or
//! c² = 2 F(1 − alpha; 2, df) for the simultaneous region of Potthoff (1964).
//! Written around a centre x₀ (the covariate mean, to keep the coefficients well
//! scaled), with u = x − x₀ the condition is the quadratic A u² + B u + C = 0 with
//! A = Δb² − c² s² Σ 1/Sxx_g, B = 2 (D₀ Δb − c² s² Σ d_g/Sxx_g),
//! C = D₀² − c² s² Σ (1/n_g + d_g²/Sxx_g), where d_g = x₀ − x̄_g and D₀ = D(x₀).

use super::interval;
use crate::fit::{Moments, SeparateFit};
use crate::plan::Regions;
use crate::results::{DifferenceAt, Region};
use crate::stats::dist::{f_quantile, t_quantile, t_two_sided};

/// The pieces of D(x) and Var D(x) for one pair, around `centre`.
struct PairLine {
    d0: f64,
    db: f64,
    v0: f64,
    c0: f64,
    vbb: f64,
    centre: f64,
}

impl PairLine {
    fn new(a: &Moments, sa: f64, b: &Moments, sb: f64, s2: f64, centre: f64) -> PairLine {
        let (da, dbb) = (centre - a.mean_x, centre - b.mean_x);
        PairLine {
            d0: (a.mean_y + sa * da) - (b.mean_y + sb * dbb),
            db: sa - sb,
            v0: s2 * (1.0 / a.n as f64 + da * da / a.sxx + 1.0 / b.n as f64 + dbb * dbb / b.sxx),
            c0: s2 * (da / a.sxx + dbb / b.sxx),
            vbb: s2 * (1.0 / a.sxx + 1.0 / b.sxx),
            centre,
        }
    }

    fn at(&self, x: f64) -> (f64, f64) {
        let u = x - self.centre;
        let d = self.d0 + self.db * u;
        let v = self.v0 + 2.0 * u * self.c0 + u * u * self.vbb;
        (d, v.max(0.0))
    }

    /// Real roots x of D² = c² Var D, sorted.
    fn bounds(&self, c: f64) -> Vec<f64> {
        let c2 = c * c;
        let qa = self.db * self.db - c2 * self.vbb;
        let qb = 2.0 * (self.d0 * self.db - c2 * self.c0);
        let qc = self.d0 * self.d0 - c2 * self.v0;
        let mut roots = Vec::new();
        if qa == 0.0 {
            if qb != 0.0 {
                roots.push(-qc / qb);
            }
        } else {
            let disc = qb * qb - 4.0 * qa * qc;
            if disc >= 0.0 {
                // The stable form avoids cancelling when B² ≫ 4AC.
                let sign = if qb >= 0.0 { 1.0 } else { -1.0 };
                let q = -0.5 * (qb + sign * disc.sqrt());
                if q != 0.0 {
                    roots.push(q / qa);
                    roots.push(qc / q);
                } else {
                    roots.push(0.0);
                }
            }
        }
        let mut xs: Vec<f64> = roots
            .into_iter()
            .map(|u| u + self.centre)
            .filter(|x| x.is_finite())
            .collect();
        xs.sort_by(f64::total_cmp);
        xs.dedup();
        xs
    }

    /// True where |D(x)| > c √Var D(x).
    fn significant_at(&self, x: f64, c: f64) -> bool {
        let (d, v) = self.at(x);
        d * d > c * c * v
    }
}

/// Johnson–Neyman regions for each pair of `pairs` (level indices a, b), clipped to
/// `range`.
pub(super) fn regions(
    levels: &[&str],
    fit: &SeparateFit,
    alpha: f64,
    form: Regions,
    centre: f64,
    range: [f64; 2],
    pairs: &[(usize, usize)],
) -> Vec<Region> {
    let Some(s2) = fit.sigma2() else {
        return Vec::new();
    };
    let c = match form {
        Regions::Pointwise => t_quantile(1.0 - alpha / 2.0, fit.df),
        Regions::Simultaneous => (2.0 * f_quantile(1.0 - alpha, 2.0, fit.df)).sqrt(),
    };
    let mut out = Vec::new();
    for &(i, j) in pairs {
        let (a, b) = (&fit.lines[i], &fit.lines[j]);
        let pair = PairLine::new(&a.moments, a.slope, &b.moments, b.slope, s2, centre);
        let bounds = pair.bounds(c);
        out.push(Region {
            a: levels[i].to_string(),
            b: levels[j].to_string(),
            method: form.method().to_string(),
            critical_t: c,
            significant: clip(&pair, &bounds, c, range),
            bounds,
            observed_range: range,
        });
    }
    out
}

/// The intervals of `range` where the pair differs: split the range at the bounds
/// that fall inside it and test the middle of each piece.
fn clip(pair: &PairLine, bounds: &[f64], c: f64, range: [f64; 2]) -> Vec<[f64; 2]> {
    let [lo, hi] = range;
    let mut cuts = vec![lo];
    cuts.extend(bounds.iter().copied().filter(|b| *b > lo && *b < hi));
    cuts.push(hi);
    let mut out: Vec<[f64; 2]> = Vec::new();
    for w in cuts.windows(2) {
        let mid = 0.5 * (w[0] + w[1]);
        if w[1] > w[0] && pair.significant_at(mid, c) {
            match out.last_mut() {
                Some(last) if last[1] == w[0] => last[1] = w[1],
                _ => out.push([w[0], w[1]]),
            }
        }
    }
    out
}

/// Each pair of `pairs` (level indices a, b): its difference at each of `at`, with its interval at 1 − alpha.
pub(super) fn differences_at(
    levels: &[&str],
    fit: &SeparateFit,
    alpha: f64,
    at: &[f64],
    pairs: &[(usize, usize)],
) -> Vec<DifferenceAt> {
    let s2 = fit.sigma2().unwrap_or(f64::NAN);
    let mut out = Vec::new();
    for &(i, j) in pairs {
        {
            let (a, b) = (&fit.lines[i], &fit.lines[j]);
            for &x in at {
                let pair = PairLine::new(&a.moments, a.slope, &b.moments, b.slope, s2, x);
                let (d, v) = pair.at(x);
                let se = (v.is_finite() && v > 0.0).then(|| v.sqrt());
                let t = se.map(|se| d / se);
                out.push(DifferenceAt {
                    ratio: None,
                    at_measured: x,
                    a: levels[i].to_string(),
                    b: levels[j].to_string(),
                    at: x,
                    difference: d,
                    se,
                    ci: interval(d, se, fit.df, alpha),
                    t,
                    df: fit.df,
                    p_value: t.map(|t| t_two_sided(t, fit.df)),
                });
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn pair() -> PairLine {
        // Invented: lines crossing at x = 5 with a slope difference of 1.
        PairLine {
            d0: 0.0,
            db: 1.0,
            v0: 0.04,
            c0: 0.0,
            vbb: 0.0004,
            centre: 5.0,
        }
    }

    #[test]
    fn bounds_solve_the_boundary_equation() {
        let p = pair();
        let c = 2.0;
        let b = p.bounds(c);
        assert_eq!(b.len(), 2);
        for x in &b {
            let (d, v) = p.at(*x);
            assert!((d * d - c * c * v).abs() < 1e-12, "{x}");
        }
        // Significant outside the bounds, not between them.
        assert!(!p.significant_at(5.0, c));
        assert!(p.significant_at(b[1] + 0.1, c));
        let sig = clip(&p, &b, c, [0.0, 10.0]);
        assert_eq!(sig, vec![[0.0, b[0]], [b[1], 10.0]]);
    }

    #[test]
    fn nothing_significant_when_the_band_always_covers_zero() {
        let p = PairLine {
            db: 0.001,
            ..pair()
        };
        let sig = clip(&p, &p.bounds(2.0), 2.0, [4.0, 6.0]);
        assert!(sig.is_empty());
    }
}
