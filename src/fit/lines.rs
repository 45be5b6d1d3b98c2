//! The three least-squares models of the procedure, in closed form from moments.
//!
//! For group g with moments (n_g, x̄_g, ȳ_g, Sxx_g, Syy_g, Sxy_g):
//! - its own line: b_g = Sxy_g / Sxx_g, a_g = ȳ_g − b_g x̄_g,
//!   RSS_g = Syy_g − Sxy_g² / Sxx_g;
//! - parallel lines (one slope, k intercepts): b = Σ Sxy_g / Σ Sxx_g and
//!   RSS = Σ Syy_g − (Σ Sxy_g)² / Σ Sxx_g;
//! - one line for all rows: the simple fit to the merged moments.
//!
//! These are the normal-equation solutions of the analysis of covariance (Snedecor &
//! Cochran 1989, ch. 18) written in centred form; standard errors follow from the
//! usual variance of least-squares estimates (e.g. Draper & Smith 1998, ch. 1).

use super::moments::Moments;

/// Σ (y − ȳ − b (x − x̄))² summed over the points themselves.
///
/// The closed form Syy − b·Sxy cancels badly when the fit is close (NIST's Norris
/// set loses five digits of its 26.6 residual sum that way), so every model's RSS is
/// recomputed from the residuals once the slope is known: one more pass over the
/// columns in memory, never over the file.
pub fn rss_about(
    points: impl IntoIterator<Item = (f64, f64)>,
    mean_x: f64,
    mean_y: f64,
    slope: f64,
) -> f64 {
    points
        .into_iter()
        .map(|(x, y)| {
            let r = (y - mean_y) - slope * (x - mean_x);
            r * r
        })
        .sum()
}

/// A simple regression line fitted to one set of moments.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct GroupLine {
    /// The moments the line was fitted from.
    pub moments: Moments,
    /// Slope b.
    pub slope: f64,
    /// Intercept a (the fitted value at covariate 0).
    pub intercept: f64,
    /// Residual sum of squares.
    pub rss: f64,
    /// Residual degrees of freedom, n − 2.
    pub df: f64,
}

impl GroupLine {
    /// Fits the line; `None` when the covariate has no spread (Sxx = 0) or n < 2.
    pub fn fit(m: &Moments) -> Option<GroupLine> {
        if m.n < 2 || !(m.sxx > 0.0) {
            return None;
        }
        let slope = m.sxy / m.sxx;
        Some(GroupLine {
            moments: *m,
            slope,
            intercept: m.mean_y - slope * m.mean_x,
            rss: (m.syy - slope * m.sxy).max(0.0),
            df: m.n as f64 - 2.0,
        })
    }

    /// The same line with its RSS recomputed from the points (see [`rss_about`]).
    pub fn with_points(mut self, points: impl IntoIterator<Item = (f64, f64)>) -> GroupLine {
        self.rss = rss_about(points, self.moments.mean_x, self.moments.mean_y, self.slope);
        self
    }

    /// Residual variance s² = RSS / (n − 2); `None` when n < 3.
    pub fn sigma2(&self) -> Option<f64> {
        (self.df > 0.0).then(|| self.rss / self.df)
    }

    /// Standard error of the slope, s / √Sxx.
    pub fn slope_se(&self) -> Option<f64> {
        self.sigma2().map(|s2| (s2 / self.moments.sxx).sqrt())
    }

    /// Standard error of the intercept, s √(1/n + x̄²/Sxx).
    pub fn intercept_se(&self) -> Option<f64> {
        let m = &self.moments;
        self.sigma2()
            .map(|s2| (s2 * (1.0 / m.n as f64 + m.mean_x * m.mean_x / m.sxx)).sqrt())
    }

    /// R² = 1 − RSS / Syy; `None` when the response has no spread.
    pub fn r_squared(&self) -> Option<f64> {
        (self.moments.syy > 0.0).then(|| (1.0 - self.rss / self.moments.syy).clamp(0.0, 1.0))
    }
}

/// Separate lines, one per group: the full model of the equal-slopes test.
#[derive(Debug, Clone, PartialEq)]
pub struct SeparateFit {
    /// Each group's line, in level order.
    pub lines: Vec<GroupLine>,
    /// Σ RSS_g.
    pub rss: f64,
    /// n − 2k.
    pub df: f64,
}

impl SeparateFit {
    /// Combines the groups' own lines.
    pub fn new(lines: Vec<GroupLine>) -> SeparateFit {
        let rss = lines.iter().map(|l| l.rss).sum();
        let n: u64 = lines.iter().map(|l| l.moments.n).sum();
        let df = n as f64 - 2.0 * lines.len() as f64;
        SeparateFit { lines, rss, df }
    }

    /// Pooled residual variance RSS / (n − 2k); `None` without residual df.
    pub fn sigma2(&self) -> Option<f64> {
        (self.df > 0.0).then(|| self.rss / self.df)
    }
}

/// Parallel lines: one common slope, an intercept per group.
#[derive(Debug, Clone, PartialEq)]
pub struct CommonSlopeFit {
    /// The common (within-group) slope Σ Sxy_g / Σ Sxx_g.
    pub slope: f64,
    /// Σ Sxx_g, the within-group covariate sum of squares.
    pub sxx_within: f64,
    /// Each group's intercept ȳ_g − b x̄_g, in level order.
    pub intercepts: Vec<f64>,
    /// Residual sum of squares.
    pub rss: f64,
    /// n − k − 1.
    pub df: f64,
}

impl CommonSlopeFit {
    /// Fits parallel lines to the groups' moments; `None` when Σ Sxx_g = 0.
    pub fn fit(groups: &[Moments]) -> Option<CommonSlopeFit> {
        let sxx: f64 = groups.iter().map(|m| m.sxx).sum();
        if !(sxx > 0.0) {
            return None;
        }
        let sxy: f64 = groups.iter().map(|m| m.sxy).sum();
        let syy: f64 = groups.iter().map(|m| m.syy).sum();
        let slope = sxy / sxx;
        let n: u64 = groups.iter().map(|m| m.n).sum();
        Some(CommonSlopeFit {
            slope,
            sxx_within: sxx,
            intercepts: groups.iter().map(|m| m.mean_y - slope * m.mean_x).collect(),
            rss: (syy - slope * sxy).max(0.0),
            df: n as f64 - groups.len() as f64 - 1.0,
        })
    }

    /// Residual variance RSS / (n − k − 1); `None` without residual df.
    pub fn sigma2(&self) -> Option<f64> {
        (self.df > 0.0).then(|| self.rss / self.df)
    }

    /// Standard error of the common slope, s / √Σ Sxx_g.
    pub fn slope_se(&self) -> Option<f64> {
        self.sigma2().map(|s2| (s2 / self.sxx_within).sqrt())
    }
}

/// One line through all rows, ignoring groups.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct OneLineFit {
    /// The line fitted to the merged moments.
    pub line: GroupLine,
}

impl OneLineFit {
    /// Merges the groups' moments and fits one line; `None` without covariate spread.
    pub fn fit(groups: &[Moments]) -> Option<OneLineFit> {
        let all = groups
            .iter()
            .fold(Moments::default(), |acc, m| acc.merge(m));
        GroupLine::fit(&all).map(|line| OneLineFit { line })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::fit::qr;

    /// Invented three-group data; the QR fit of the same design is the reference.
    fn groups() -> Vec<(Vec<f64>, Vec<f64>)> {
        vec![
            (
                vec![1.0, 2.0, 3.0, 4.0, 5.5],
                vec![2.1, 3.9, 6.2, 7.8, 11.0],
            ),
            (vec![2.0, 3.0, 5.0, 6.0], vec![1.0, 1.9, 4.2, 4.8]),
            (
                vec![0.5, 1.5, 2.5, 4.0, 4.5, 6.0],
                vec![3.0, 3.3, 4.1, 4.4, 5.0, 5.2],
            ),
        ]
    }

    fn rel(a: f64, b: f64) -> f64 {
        (a - b).abs() / b.abs().max(1e-300)
    }

    #[test]
    fn closed_forms_match_qr_on_the_design_matrix() {
        let g = groups();
        let moments: Vec<Moments> = g.iter().map(|(x, y)| Moments::from_columns(x, y)).collect();
        let rows: Vec<(usize, f64, f64)> = g
            .iter()
            .enumerate()
            .flat_map(|(i, (x, y))| x.iter().zip(y).map(move |(a, b)| (i, *a, *b)))
            .collect();

        let sep = SeparateFit::new(moments.iter().map(|m| GroupLine::fit(m).unwrap()).collect());
        let qr_sep = qr::fit_separate(&rows, 3);
        assert!(rel(sep.rss, qr_sep.rss) < 1e-12);
        for (i, line) in sep.lines.iter().enumerate() {
            assert!(rel(line.intercept, qr_sep.beta[i]) < 1e-12);
            assert!(rel(line.slope, qr_sep.beta[3 + i]) < 1e-12);
        }

        let common = CommonSlopeFit::fit(&moments).unwrap();
        let qr_common = qr::fit_common(&rows, 3);
        assert!(rel(common.rss, qr_common.rss) < 1e-12);
        assert!(rel(common.slope, qr_common.beta[3]) < 1e-12);
        let se = qr_common.se(3);
        assert!(rel(common.slope_se().unwrap(), se) < 1e-12);

        let one = OneLineFit::fit(&moments).unwrap();
        let qr_one = qr::fit_one(&rows);
        assert!(rel(one.line.rss, qr_one.rss) < 1e-12);
        assert!(rel(one.line.slope, qr_one.beta[1]) < 1e-12);
        assert!(rel(one.line.intercept_se().unwrap(), qr_one.se(0)) < 1e-12);
    }

    #[test]
    fn no_spread_in_the_covariate_gives_no_line() {
        let m = Moments::from_columns(&[2.0, 2.0, 2.0], &[1.0, 2.0, 3.0]);
        assert!(GroupLine::fit(&m).is_none());
    }
}
