//! Least squares from the design matrix by Householder QR (nalgebra): the
//! independent cross-check of the closed forms in [`super::lines`], and the path for
//! anything beyond one covariate. It builds an n×p matrix, so it is used on small
//! data (tests) only.

use nalgebra::{DMatrix, DVector};

/// A least-squares fit: coefficients, residual sum of squares and (XᵀX)⁻¹.
#[derive(Debug, Clone)]
pub struct QrFit {
    /// Coefficients in design-column order.
    pub beta: Vec<f64>,
    /// Residual sum of squares.
    pub rss: f64,
    /// Residual degrees of freedom n − p.
    pub df: f64,
    /// (XᵀX)⁻¹, the unscaled covariance of the coefficients.
    pub xtx_inv: DMatrix<f64>,
}

impl QrFit {
    /// Standard error of coefficient `j`: √(s² [(XᵀX)⁻¹]_jj).
    pub fn se(&self, j: usize) -> f64 {
        (self.rss / self.df * self.xtx_inv[(j, j)]).sqrt()
    }
}

/// Fits y = Xβ by QR. Panics if X is rank deficient (test helper).
pub fn lstsq(x: DMatrix<f64>, y: DVector<f64>) -> QrFit {
    let (n, p) = x.shape();
    let qr = x.clone().qr();
    let r = qr.r();
    let qty = qr.q().transpose() * &y;
    let beta = r
        .solve_upper_triangular(&qty.rows(0, p).into_owned())
        .expect("design matrix is rank deficient");
    let resid = &y - &x * &beta;
    let r_inv = r
        .solve_upper_triangular(&DMatrix::identity(p, p))
        .expect("design matrix is rank deficient");
    QrFit {
        beta: beta.iter().copied().collect(),
        rss: resid.norm_squared(),
        df: (n - p) as f64,
        xtx_inv: &r_inv * r_inv.transpose(),
    }
}

/// Separate lines: columns are k group indicators, then k indicator×x columns.
pub fn fit_separate(rows: &[(usize, f64, f64)], k: usize) -> QrFit {
    let x = DMatrix::from_fn(rows.len(), 2 * k, |i, j| {
        let (g, xv, _) = rows[i];
        match j {
            j if j < k => f64::from(u8::from(g == j)),
            j => f64::from(u8::from(g == j - k)) * xv,
        }
    });
    lstsq(
        x,
        DVector::from_iterator(rows.len(), rows.iter().map(|r| r.2)),
    )
}

/// Parallel lines: k group indicators, then x.
pub fn fit_common(rows: &[(usize, f64, f64)], k: usize) -> QrFit {
    let x = DMatrix::from_fn(rows.len(), k + 1, |i, j| {
        let (g, xv, _) = rows[i];
        if j < k {
            f64::from(u8::from(g == j))
        } else {
            xv
        }
    });
    lstsq(
        x,
        DVector::from_iterator(rows.len(), rows.iter().map(|r| r.2)),
    )
}

/// One line: intercept and x.
pub fn fit_one(rows: &[(usize, f64, f64)]) -> QrFit {
    let x = DMatrix::from_fn(rows.len(), 2, |i, j| if j == 0 { 1.0 } else { rows[i].1 });
    lstsq(
        x,
        DVector::from_iterator(rows.len(), rows.iter().map(|r| r.2)),
    )
}
