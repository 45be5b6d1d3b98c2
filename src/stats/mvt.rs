//! The multivariate t rectangle probability behind many-to-one comparisons:
//! P(|T_i| ≤ c for every i) for T = Z/s with Z ~ N(0, R) and s = χ_ν/√ν, and the
//! critical value c at which it is 1 − α (Dunnett 1955).
//!
//! Method: Genz's (1992) separation of variables over the Cholesky factor L of R
//! turns the probability into an integral over the unit cube whose integrand is a
//! product of normal interval probabilities; the scale s enters as one more
//! coordinate through the inverse chi-square distribution (the t form of Genz &
//! Bretz 2002). The integral is taken on a rank-1 Richtmyer lattice (the point j has
//! coordinates frac(j·√p_k) for the first primes p_k), periodised by the baker's
//! transform, under [`SHIFTS`] shifts drawn once from a fixed seed. Nothing is drawn
//! at run time, and every sum runs in one fixed order, so the same R, ν and c give
//! the same bits on every run and machine.
//!
//! The stated error is 3.5 standard errors of the mean over the shifts (a
//! conservative convention of randomised lattice rules, from memory). The lattice
//! size doubles from [`START_POINTS`] until that error is below [`TARGET_ERROR`] or
//! [`MAX_POINTS`] is reached; the sequence of sizes tried is itself fixed, so the
//! result is still deterministic.

use super::dist::{normal_upper_quantile, t_two_sided, t_upper_quantile};
use super::rng::SplitMix64;
use statrs::function::erf::erfc;
use statrs::function::gamma::{gamma_lr, ln_gamma};
use std::cell::RefCell;

/// Independent shifts of the lattice; their spread gives the error estimate.
pub const SHIFTS: usize = 10;
/// Lattice points per shift at the first try.
pub const START_POINTS: usize = 1 << 11;
/// Largest lattice tried, for up to [`FULL_LATTICE_DIMENSION`] statistics; beyond
/// that the cap shrinks in proportion (to no less than [`START_POINTS`]), so the work
/// of one probability stays bounded whatever the number of groups.
pub const MAX_POINTS: usize = 1 << 16;
/// See [`MAX_POINTS`].
pub const FULL_LATTICE_DIMENSION: usize = 4;
/// Error at which the doubling stops: half the 1e-4 to which the reports print
/// simultaneous p-values. Measured against scipy's multivariate t (2e6·m points) for
/// up to five statistics, the actual error is a third of the estimate or less.
pub const TARGET_ERROR: f64 = 5e-5;
/// Seed of the shifts (any fixed value; this one spells nothing).
const SHIFT_SEED: u64 = 0x5EED_D0E1_1955;

/// A probability with its error estimate.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Estimate {
    /// P(|T_i| ≤ c for every i).
    pub value: f64,
    /// 3.5 standard errors over the shifts (0 where the probability is exact).
    pub error: f64,
}

/// Why the rectangle probability cannot be set up.
#[derive(Debug, Clone, PartialEq)]
pub enum MvtError {
    /// The correlation matrix is empty, not square, or has a non-finite entry.
    Shape,
    /// The matrix is not positive semi-definite (a Cholesky pivot below zero).
    NotPositive,
    /// Degrees of freedom not positive.
    Df,
}

/// The two-sided rectangle of a multivariate t with correlation `corr` (unit
/// diagonal) and `df` degrees of freedom, prepared once and evaluated at many c.
pub struct Rectangle {
    /// Lower-triangular Cholesky factor, row-major, rows of length m.
    chol: Vec<Vec<f64>>,
    df: f64,
    /// The shifts, one vector of m coordinates each.
    shifts: Vec<Vec<f64>>,
    /// Richtmyer generators frac(√p_k).
    generators: Vec<f64>,
    /// The scale s = χ_ν/√ν at each lattice point of each shift computed so far.
    scales: RefCell<Vec<Vec<f64>>>,
}

impl Rectangle {
    /// Prepares the factor, shifts and generators.
    pub fn new(corr: &[Vec<f64>], df: f64) -> Result<Self, MvtError> {
        let m = corr.len();
        if m == 0
            || corr
                .iter()
                .any(|r| r.len() != m || r.iter().any(|v| !v.is_finite()))
        {
            return Err(MvtError::Shape);
        }
        if df.is_nan() || df <= 0.0 {
            return Err(MvtError::Df);
        }
        let chol = cholesky(corr).ok_or(MvtError::NotPositive)?;
        let mut rng = SplitMix64::new(SHIFT_SEED);
        let shifts: Vec<Vec<f64>> = (0..SHIFTS)
            .map(|_| (0..m).map(|_| unit(rng.next_u64())).collect())
            .collect();
        let generators = first_primes(m)
            .iter()
            .map(|&p| (p as f64).sqrt().fract())
            .collect();
        Ok(Rectangle {
            chol,
            df,
            scales: RefCell::new(vec![Vec::new(); shifts.len()]),
            shifts,
            generators,
        })
    }

    /// Number of statistics.
    pub fn dimension(&self) -> usize {
        self.chol.len()
    }

    /// The largest lattice tried at this dimension: [`MAX_POINTS`] scaled down by
    /// [`FULL_LATTICE_DIMENSION`]/m to a power of two, at least [`START_POINTS`].
    pub fn max_points(&self) -> usize {
        let mut n = MAX_POINTS;
        while n > START_POINTS && n * self.dimension() > MAX_POINTS * FULL_LATTICE_DIMENSION {
            n /= 2;
        }
        n
    }

    /// P(|T_i| ≤ c for every i), the lattice doubled until the error is below
    /// [`TARGET_ERROR`]. The lattice's first n points are the first half of its 2n,
    /// so each doubling adds the new points to the sums so far, in the same order a
    /// single pass would: the result equals [`Self::probability_with`] at the final
    /// size, bit for bit.
    pub fn probability(&self, c: f64) -> Estimate {
        if let Some(e) = self.trivial(c) {
            return e;
        }
        let mut sums = vec![0.0; self.shifts.len()];
        let mut done = 0;
        let mut n = START_POINTS;
        loop {
            self.add_points(c, done, n, &mut sums);
            done = n;
            let e = estimate(&sums, n);
            if e.error <= TARGET_ERROR || n >= self.max_points() {
                return e;
            }
            n *= 2;
        }
    }

    /// P at a fixed lattice size `points` per shift. One statistic is exact:
    /// 1 − P(|T| > c).
    pub fn probability_with(&self, c: f64, points: usize) -> Estimate {
        if let Some(e) = self.trivial(c) {
            return e;
        }
        let mut sums = vec![0.0; self.shifts.len()];
        self.add_points(c, 0, points, &mut sums);
        estimate(&sums, points)
    }

    /// The cases with no integral: c not positive or infinite, one statistic.
    fn trivial(&self, c: f64) -> Option<Estimate> {
        let exact = |value| Some(Estimate { value, error: 0.0 });
        if c.is_nan() {
            return Some(Estimate {
                value: f64::NAN,
                error: f64::NAN,
            });
        }
        if c <= 0.0 {
            return exact(0.0);
        }
        if c.is_infinite() {
            return exact(1.0);
        }
        if self.dimension() == 1 {
            return exact(1.0 - t_two_sided(c, self.df));
        }
        None
    }

    /// Adds the integrand at lattice points from + 1 ..= to of every shift to that
    /// shift's sum.
    fn add_points(&self, c: f64, from: usize, to: usize, sums: &mut [f64]) {
        let m = self.dimension();
        self.extend_scales(to);
        let scales = self.scales.borrow();
        let mut y = vec![0.0; m];
        let mut w = vec![0.0; m];
        for (k, shift) in self.shifts.iter().enumerate() {
            for j in from + 1..=to {
                for d in 1..m {
                    w[d] = baker((j as f64 * self.generators[d] + shift[d]).fract());
                }
                sums[k] += self.integrand(c, scales[k][j - 1], &w, &mut y);
            }
        }
    }

    /// Makes sure the scale s of lattice points 1..=`to` of every shift is cached.
    /// It depends on the first coordinate and ν only, never on c, so a search over c
    /// inverts the chi-square distribution once per point.
    fn extend_scales(&self, to: usize) {
        let mut scales = self.scales.borrow_mut();
        for (k, shift) in self.shifts.iter().enumerate() {
            let have = scales[k].len();
            for j in have + 1..=to {
                let w0 = baker((j as f64 * self.generators[0] + shift[0]).fract());
                scales[k].push(chi_over_root_df(w0, self.df));
            }
        }
    }

    /// The product of the interval probabilities at one point `w` of the cube:
    /// the scale s (from w₀), and w₁…w_{m−1} the normal coordinates in turn.
    fn integrand(&self, c: f64, s: f64, w: &[f64], y: &mut [f64]) -> f64 {
        let limit = c * s;
        let m = self.dimension();
        let mut product = 1.0;
        for i in 0..m {
            let row = &self.chol[i];
            let shift: f64 = (0..i).map(|j| row[j] * y[j]).sum();
            let pivot = row[i];
            if pivot <= DEGENERATE_PIVOT {
                // The i-th statistic is a combination of the earlier ones: inside or not.
                if (shift).abs() > limit {
                    return 0.0;
                }
                y[i] = 0.0;
                continue;
            }
            let lower = (-limit - shift) / pivot;
            let upper = (limit - shift) / pivot;
            let (pl, pu) = (phi(lower), phi(upper));
            let e = (pu - pl).max(0.0);
            if e == 0.0 {
                return 0.0;
            }
            product *= e;
            if i + 1 < m {
                let u = pl + w[i + 1] * e;
                y[i] = phi_inverse(u);
            }
        }
        product
    }

    /// The c ≥ 0 at which P(|T_i| ≤ c for every i) = 1 − `alpha`, with the error of P
    /// there. Bracketed by the single-comparison and Bonferroni quantiles (the
    /// probability at the first is at most 1 − α, at the second at least) and solved
    /// by bisection refined with the Illinois variant of regula falsi, to 1e-7 in c,
    /// on one fixed lattice size so the function searched does not change under it.
    pub fn critical_value(&self, alpha: f64) -> (f64, f64) {
        let m = self.dimension() as f64;
        let lo0 = t_upper_quantile(alpha / 2.0, self.df);
        if self.dimension() == 1 {
            return (lo0, 0.0);
        }
        let hi0 = t_upper_quantile(alpha / (2.0 * m), self.df);
        let target = 1.0 - alpha;
        let points = {
            let mut n = START_POINTS;
            while n < self.max_points() && self.probability_with(hi0, n).error > TARGET_ERROR {
                n *= 2;
            }
            n
        };
        let f = |c: f64| self.probability_with(c, points).value - target;
        let (mut lo, mut hi) = (lo0, hi0);
        let (mut flo, mut fhi) = (f(lo), f(hi));
        if flo >= 0.0 {
            return (lo, self.probability_with(lo, points).error);
        }
        if fhi <= 0.0 {
            return (hi, self.probability_with(hi, points).error);
        }
        let mut side = 0i8;
        for _ in 0..MAX_ROOT_STEPS {
            if hi - lo <= 1e-7 {
                break;
            }
            let mut c = (lo * fhi - hi * flo) / (fhi - flo);
            if !(c > lo && c < hi) {
                c = 0.5 * (lo + hi);
            }
            let fc = f(c);
            if fc == 0.0 {
                lo = c;
                hi = c;
                break;
            }
            if fc < 0.0 {
                lo = c;
                flo = fc;
                if side == -1 {
                    fhi *= 0.5;
                }
                side = -1;
            } else {
                hi = c;
                fhi = fc;
                if side == 1 {
                    flo *= 0.5;
                }
                side = 1;
            }
        }
        let c = 0.5 * (lo + hi);
        (c, self.probability_with(c, points).error)
    }

    /// The simultaneous p-value of a statistic t: 1 − P(|T_i| ≤ |t| for every i),
    /// kept between the single p-value and its Bonferroni multiple (bounds that
    /// always hold, so the integral's error cannot cross them), with the error.
    /// Where the Bonferroni bound is itself within the target error of the single
    /// p-value, or the integral cannot tell the p-value from zero, the Bonferroni
    /// bound is the answer: conservative, and off by less than the stated error
    /// (then the distance between the two bounds).
    pub fn p_value(&self, t: f64) -> (f64, f64) {
        let single = t_two_sided(t, self.df);
        if self.dimension() == 1 {
            return (single, 0.0);
        }
        let bonferroni = (single * self.dimension() as f64).min(1.0);
        if bonferroni - single <= TARGET_ERROR {
            return (bonferroni, bonferroni - single);
        }
        let e = self.probability(t.abs());
        let p = 1.0 - e.value;
        if p <= e.error {
            return (bonferroni, e.error.max(bonferroni - single));
        }
        (p.clamp(single, bonferroni), e.error)
    }
}

/// Baker's transform 1 − |2x − 1|: periodises the integrand, which lifts the lattice
/// rule's order (Hickernell 2002).
fn baker(x: f64) -> f64 {
    1.0 - (2.0 * x - 1.0).abs()
}

/// The mean over the shifts of the per-shift means, and 3.5 standard errors.
fn estimate(sums: &[f64], points: usize) -> Estimate {
    let means: Vec<f64> = sums.iter().map(|s| s / points as f64).collect();
    let k = means.len() as f64;
    let value = means.iter().sum::<f64>() / k;
    let var = means.iter().map(|v| (v - value) * (v - value)).sum::<f64>() / (k - 1.0);
    Estimate {
        value: value.clamp(0.0, 1.0),
        error: 3.5 * (var / k).sqrt(),
    }
}

/// Cap on the root search's steps.
const MAX_ROOT_STEPS: usize = 100;
/// Pivot below which a statistic counts as a combination of the earlier ones.
const DEGENERATE_PIVOT: f64 = 1e-10;

/// Φ(x), from the complementary error function on the side that keeps digits.
fn phi(x: f64) -> f64 {
    if x == f64::INFINITY {
        1.0
    } else if x == f64::NEG_INFINITY {
        0.0
    } else {
        0.5 * erfc(-x / std::f64::consts::SQRT_2)
    }
}

/// Φ⁻¹(u), kept finite at the ends of (0, 1).
fn phi_inverse(u: f64) -> f64 {
    let u = u.clamp(1e-300, 1.0 - 1e-16);
    -normal_upper_quantile(u)
}

/// s = √(χ²_ν⁻¹(w)/ν): Newton steps on ln x for the chi-square quantile, from the
/// Wilson & Hilferty (1931) approximation.
fn chi_over_root_df(w: f64, df: f64) -> f64 {
    if df > 1e7 {
        // The scale is 1 to within 1/√ν ≈ 3e-4 of its spread, and the
        // Wilson–Hilferty cube is exact to far better at this ν.
        let z = -normal_upper_quantile(w.clamp(1e-300, 1.0 - 1e-16));
        let h = 2.0 / (9.0 * df);
        return (1.0 - h + z * h.sqrt()).powi(3).max(0.0).sqrt();
    }
    let w = w.clamp(1e-15, 1.0 - 1e-15);
    let a = 0.5 * df;
    let z = -normal_upper_quantile(w);
    let h = 2.0 / (9.0 * df);
    let mut x = df * (1.0 - h + z * h.sqrt()).powi(3);
    if !(x > 0.0) {
        // Small ν, lower tail: P(χ² ≤ x) ≈ (x/2)^a / Γ(a + 1).
        x = 2.0 * (w * (ln_gamma(a + 1.0)).exp()).powf(1.0 / a);
    }
    let ln_norm = ln_gamma(a) + a * std::f64::consts::LN_2;
    for _ in 0..50 {
        let cdf = gamma_lr(a, 0.5 * x);
        // d cdf / d ln x = x · density.
        let dens_x = ((a) * x.ln() - 0.5 * x - ln_norm).exp();
        if !(dens_x > 0.0) {
            break;
        }
        let step = (cdf - w) / dens_x;
        let step = step.clamp(-2.0, 2.0);
        x *= (-step).exp();
        if step.abs() < 1e-13 {
            break;
        }
    }
    (x / df).sqrt()
}

/// The Cholesky factor of a positive semi-definite matrix; None when a pivot is
/// clearly negative.
fn cholesky(a: &[Vec<f64>]) -> Option<Vec<Vec<f64>>> {
    let m = a.len();
    let mut l = vec![vec![0.0; m]; m];
    for i in 0..m {
        for j in 0..=i {
            let s: f64 = (0..j).map(|k| l[i][k] * l[j][k]).sum();
            if i == j {
                let d = a[i][i] - s;
                if d < -1e-10 * a[i][i].abs().max(1.0) {
                    return None;
                }
                l[i][i] = d.max(0.0).sqrt();
            } else if l[j][j] > DEGENERATE_PIVOT {
                l[i][j] = (a[i][j] - s) / l[j][j];
            }
        }
    }
    Some(l)
}

/// A uniform in [0, 1) from 53 random bits.
fn unit(bits: u64) -> f64 {
    (bits >> 11) as f64 / (1u64 << 53) as f64
}

/// The first `m` primes.
fn first_primes(m: usize) -> Vec<u64> {
    let mut primes = Vec::with_capacity(m);
    let mut n = 2u64;
    while primes.len() < m {
        if primes
            .iter()
            .take_while(|&&p| p * p <= n)
            .all(|&p| !n.is_multiple_of(p))
        {
            primes.push(n);
        }
        n += 1;
    }
    primes
}

/// The correlation matrix of a covariance matrix.
pub fn correlation(cov: &[Vec<f64>]) -> Vec<Vec<f64>> {
    let d: Vec<f64> = (0..cov.len()).map(|i| cov[i][i].sqrt()).collect();
    cov.iter()
        .enumerate()
        .map(|(i, row)| {
            row.iter()
                .enumerate()
                .map(|(j, v)| if i == j { 1.0 } else { v / (d[i] * d[j]) })
                .collect()
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn one_statistic_is_student_t() {
        // P(|T| ≤ c) = 1 − two-sided tail, exactly (definition).
        let r = Rectangle::new(&[vec![1.0]], 10.0).unwrap();
        let e = r.probability(2.0);
        assert_eq!(e.value, 1.0 - t_two_sided(2.0, 10.0));
        assert_eq!(r.critical_value(0.05).0, t_upper_quantile(0.025, 10.0));
    }

    #[test]
    fn independent_statistics_at_large_df_multiply() {
        // With R = I and ν → ∞ the statistics are independent normals:
        // P = (2Φ(c) − 1)^m (definition). ν = 1e8 takes the scale-one branch.
        let corr = vec![
            vec![1.0, 0.0, 0.0],
            vec![0.0, 1.0, 0.0],
            vec![0.0, 0.0, 1.0],
        ];
        let r = Rectangle::new(&corr, 1e8).unwrap();
        let want = (2.0 * phi(2.0) - 1.0).powi(3);
        let e = r.probability(2.0);
        assert!((e.value - want).abs() < 1e-5, "{e:?} vs {want}");
    }

    #[test]
    fn chi_scale_quantile_inverts_the_cdf() {
        for df in [1.0, 3.0, 30.0, 1e4] {
            for w in [1e-6, 0.01, 0.5, 0.99] {
                let s = chi_over_root_df(w, df);
                let back = gamma_lr(0.5 * df, 0.5 * s * s * df);
                assert!(
                    (back - w).abs() < 1e-10 * w.max(1e-3),
                    "df {df} w {w}: {back}"
                );
            }
        }
    }

    #[test]
    fn rejects_a_matrix_that_is_not_positive() {
        let corr = vec![vec![1.0, 2.0], vec![2.0, 1.0]];
        assert_eq!(
            Rectangle::new(&corr, 5.0).err(),
            Some(MvtError::NotPositive)
        );
        assert_eq!(Rectangle::new(&[], 5.0).err(), Some(MvtError::Shape));
    }

    fn evidence() -> serde_json::Value {
        serde_json::from_str(include_str!("../../tests/reference/evidence.json")).unwrap()
    }

    fn matrix(v: &serde_json::Value) -> Vec<Vec<f64>> {
        v.as_array()
            .unwrap()
            .iter()
            .map(|r| {
                r.as_array()
                    .unwrap()
                    .iter()
                    .map(|x| x.as_f64().unwrap())
                    .collect()
            })
            .collect()
    }

    #[test]
    fn rectangle_probabilities_match_scipy_multivariate_t() {
        // scipy.stats.multivariate_t.cdf (Genz & Bretz quasi-Monte Carlo, 2e6·m
        // points), tests/reference/generate_evidence.py; 1e-4 covers its error and ours.
        for case in evidence()["mvt"].as_array().unwrap() {
            let corr = matrix(&case["corr"]);
            let df = case["df"].as_f64().unwrap();
            let c = case["c"].as_f64().unwrap();
            let want = case["probability"].as_f64().unwrap();
            let r = Rectangle::new(&corr, df).unwrap();
            let got = r.probability(c);
            assert!(
                (got.value - want).abs() < 1e-4,
                "m {} df {df} c {c}: {got:?} vs {want}",
                corr.len()
            );
            assert!(got.error < 1e-4, "{got:?}");
        }
    }

    #[test]
    fn many_to_one_p_values_match_scipy_dunnett() {
        // scipy.stats.dunnett (Dunnett 1955), tests/reference/generate_evidence.py:
        // one-way samples, the first the reference. t_i = (ȳ_i − ȳ_0)/(s √(1/n_i +
        // 1/n_0)), ν = N − k, corr_ij = 1/√((1 + n_0/n_i)(1 + n_0/n_j)).
        for case in evidence()["dunnett"].as_array().unwrap() {
            let samples = matrix(&case["samples"]);
            let n: Vec<f64> = samples.iter().map(|s| s.len() as f64).collect();
            let mean: Vec<f64> = samples
                .iter()
                .map(|s| s.iter().sum::<f64>() / s.len() as f64)
                .collect();
            let ss: f64 = samples
                .iter()
                .zip(&mean)
                .map(|(s, m)| s.iter().map(|v| (v - m) * (v - m)).sum::<f64>())
                .sum();
            let df = n.iter().sum::<f64>() - n.len() as f64;
            let sd = (ss / df).sqrt();
            let k = samples.len() - 1;
            let corr: Vec<Vec<f64>> = (1..=k)
                .map(|i| {
                    (1..=k)
                        .map(|j| {
                            if i == j {
                                1.0
                            } else {
                                1.0 / ((1.0 + n[0] / n[i]) * (1.0 + n[0] / n[j])).sqrt()
                            }
                        })
                        .collect()
                })
                .collect();
            let r = Rectangle::new(&corr, df).unwrap();
            let stats = case["statistic"].as_array().unwrap();
            let ps = case["p_values"].as_array().unwrap();
            for i in 1..=k {
                let t = (mean[i] - mean[0]) / (sd * (1.0 / n[i] + 1.0 / n[0]).sqrt());
                let want_t = stats[i - 1].as_f64().unwrap();
                assert!((t - want_t).abs() < 1e-9, "t {t} vs {want_t}");
                let (p, err) = r.p_value(t);
                let want = ps[i - 1].as_f64().unwrap();
                assert!((p - want).abs() < 1e-4, "p {p} ± {err} vs {want}");
            }
        }
    }

    #[test]
    fn the_critical_value_gives_the_level_and_reruns_to_the_bit() {
        let corr = vec![
            vec![1.0, 0.5, 0.5],
            vec![0.5, 1.0, 0.5],
            vec![0.5, 0.5, 1.0],
        ];
        let r = Rectangle::new(&corr, 20.0).unwrap();
        let (c, err) = r.critical_value(0.05);
        let p = r.probability(c);
        assert!((p.value - 0.95).abs() < 1e-4, "{c} {err} {p:?}");
        // Between the single and the Bonferroni quantile (Bonferroni inequality).
        assert!(c > t_upper_quantile(0.025, 20.0) && c < t_upper_quantile(0.05 / 6.0, 20.0));
        let again = Rectangle::new(&corr, 20.0).unwrap().critical_value(0.05);
        assert_eq!(
            (c.to_bits(), err.to_bits()),
            (again.0.to_bits(), again.1.to_bits())
        );
    }
}
