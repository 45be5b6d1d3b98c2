//! Influence of each row on the model the decision selected.
//!
//! Both models are least squares with a closed-form hat matrix diagonal: for parallel
//! lines h_i = 1/n_g + (x_i − x̄_g)² / Σ Sxx, for separate lines
//! h_i = 1/n_g + (x_i − x̄_g)² / Sxx_g (the projection on the group indicators plus the
//! projection on the centred covariate). From the residual e_i, with p parameters and
//! s² = RSS/(n − p) (Belsley, Kuh & Welsch 1980; Cook 1977):
//! - externally studentized residual t_i = e_i / (s_(i) √(1 − h_i)), where
//!   s_(i)² = (RSS − e_i²/(1 − h_i)) / (n − p − 1);
//! - Cook's distance D_i = e_i² h_i / (p s² (1 − h_i)²).
//!
//! Rows are visited one at a time; nothing of size n is built.
//!
//! Two sets of cut-offs serve two purposes. The lenient ones (leverage 2p/n, Cook's
//! distance 4/n, |t| 3) list rows worth a look in the table. A row *matters* only when
//! it passes a stricter test: Cook's distance above the median of F(p, n − p) (Cook
//! 1977; Cook & Weisberg 1982: the row moves the estimates to the edge of a 50 %
//! confidence region), or an externally studentized residual beyond the Bonferroni
//! t quantile t(1 − alpha/(2n); n − p − 1), the outlier test with every row tried
//! (Weisberg 1985). Only rows that matter are named in the summary and left out of
//! the refit; high leverage alone never makes a row matter.

use crate::data::GroupData;
use crate::results::{FlaggedRow, Influence, InfluenceCutoffs};
use crate::stats::dist::{f_quantile, t_upper_quantile};

/// Rows listed in the report at most; the rest are counted.
pub const MAX_LISTED: usize = 50;

/// |externally studentized residual| beyond which a row is flagged (common practice,
/// no source).
pub const STUDENTIZED_CUTOFF: f64 = 3.0;

/// The selected model in the form the measures need.
pub(crate) struct Model<'a> {
    /// The groups' data, in level order.
    pub groups: &'a [&'a GroupData],
    /// Slope used for each group (the common slope, or the group's own).
    pub slopes: Vec<f64>,
    /// Denominator of the covariate term of the leverage, per group.
    pub sxx: Vec<f64>,
    /// Residual sum of squares of the model.
    pub rss: f64,
    /// Number of parameters.
    pub p: f64,
    /// "common-slope" or "separate-slopes".
    pub name: &'static str,
}

/// The rows beyond a cut-off, as the sensitivity rerun sees them.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Flagged {
    /// Rows that matter (see the module docs), ascending: the ones the rerun leaves
    /// out.
    pub rerun: Vec<u32>,
    /// Rows beyond the leverage cut-off alone. High leverage is where a row sits on
    /// the covariate, not how it fits: design points at the ends of the range have it
    /// by construction and carry the slope, so the rerun keeps them.
    pub leverage_only: u64,
}

/// Influence measures of one row.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RowInfluence {
    /// 1-based data row.
    pub row: u32,
    /// Index of its group.
    pub group: usize,
    /// Residual e_i.
    pub residual: f64,
    /// Leverage h_i.
    pub leverage: f64,
    /// Externally studentized residual; `None` when h_i = 1 or no df is left.
    pub studentized_residual: Option<f64>,
    /// Cook's distance; `None` when h_i = 1 or s = 0.
    pub cooks_distance: Option<f64>,
}

impl Model<'_> {
    fn n(&self) -> f64 {
        self.groups.iter().map(|g| g.moments.n as f64).sum()
    }

    /// Calls `f` with every row's measures, in group then data order.
    pub fn each_row(&self, mut f: impl FnMut(RowInfluence)) {
        let n = self.n();
        let df = n - self.p;
        let s2 = if df > 0.0 { self.rss / df } else { f64::NAN };
        for (gi, g) in self.groups.iter().enumerate() {
            let m = &g.moments;
            let b = self.slopes[gi];
            let inv_n = 1.0 / m.n as f64;
            for (x, y, row) in g.rows_with_points() {
                let d = x - m.mean_x;
                let e = (y - m.mean_y) - b * d;
                let h = (inv_n + d * d / self.sxx[gi]).min(1.0);
                let one_minus = 1.0 - h;
                let usable = one_minus > 1e-12;
                let s2_i = (self.rss - e * e / one_minus) / (df - 1.0);
                let studentized =
                    (usable && df > 1.0 && s2_i > 0.0).then(|| e / (s2_i * one_minus).sqrt());
                let cooks =
                    (usable && s2 > 0.0).then(|| e * e * h / (self.p * s2 * one_minus * one_minus));
                f(RowInfluence {
                    row,
                    group: gi,
                    residual: e,
                    leverage: h,
                    studentized_residual: studentized,
                    cooks_distance: cooks,
                });
            }
        }
    }

    /// The cut-offs: leverage 2p/n (Hoaglin & Welsch 1978), Cook's distance 4/n
    /// (Bollen & Jackman 1990), |t| 3 (common practice, no source); and the two that
    /// make a row matter, at the plan's `alpha` (module docs).
    pub fn cutoffs(&self, alpha: f64) -> InfluenceCutoffs {
        let n = self.n();
        let df = n - self.p;
        InfluenceCutoffs {
            leverage: 2.0 * self.p / n,
            cooks_distance: 4.0 / n,
            studentized_residual: STUDENTIZED_CUTOFF,
            cooks_distance_matters: (df > 0.0).then(|| f_quantile(0.5, self.p, df)),
            studentized_bonferroni: (df > 1.0)
                .then(|| t_upper_quantile(alpha / (2.0 * n), df - 1.0)),
        }
    }

    /// The summary for the report, and the rows the sensitivity rerun leaves out.
    pub fn summarize(&self, alpha: f64) -> (Influence, Flagged) {
        let cut = self.cutoffs(alpha);
        let mut max_cooks: Option<f64> = None;
        let mut max_leverage: Option<f64> = None;
        let mut flagged_rows = Vec::new();
        let (mut flagged_total, mut leverage_only) = (0_u64, 0_u64);
        let mut listed: Vec<RowInfluence> = Vec::new();
        let mut mattering: Vec<RowInfluence> = Vec::new();
        let mut matters_total = 0_u64;
        self.each_row(|r| {
            max_leverage = Some(max_leverage.map_or(r.leverage, |m| m.max(r.leverage)));
            if let Some(c) = r.cooks_distance {
                max_cooks = Some(max_cooks.map_or(c, |m| m.max(c)));
            }
            let by_fit = r.cooks_distance.is_some_and(|c| c > cut.cooks_distance)
                || r.studentized_residual
                    .is_some_and(|t| t.abs() > cut.studentized_residual);
            let by_leverage = r.leverage > cut.leverage;
            if by_fit || by_leverage {
                if !by_fit {
                    leverage_only += 1;
                }
                flagged_total += 1;
                listed.push(r);
                if listed.len() >= 4 * MAX_LISTED {
                    keep_top(&mut listed);
                }
            }
            if !why(&r, &cut, true).is_empty() {
                matters_total += 1;
                flagged_rows.push(r.row);
                if mattering.len() < MAX_LISTED {
                    mattering.push(r);
                }
            }
        });
        keep_top(&mut listed);
        flagged_rows.sort_unstable();
        mattering.sort_by_key(|r| r.row);
        let row = |r: &RowInfluence| FlaggedRow {
            row: u64::from(r.row),
            level: self.groups[r.group].level.clone(),
            cooks_distance: r.cooks_distance,
            leverage: r.leverage,
            studentized_residual: r.studentized_residual,
            matters: !why(r, &cut, true).is_empty(),
            why: why(r, &cut, false),
        };
        let influence = Influence {
            model: self.name.to_string(),
            max_cooks_distance: max_cooks,
            max_leverage,
            cutoffs: cut.clone(),
            flagged_total,
            flagged: listed.iter().map(row).collect(),
            matters_total,
            matters: mattering.iter().map(row).collect(),
        };
        (
            influence,
            Flagged {
                rerun: flagged_rows,
                leverage_only,
            },
        )
    }
}

/// Why a row is flagged, strictest first: "cooks-distance" and
/// "studentized-residual" (it matters), "leverage", "cooks-distance-4/n" and
/// "studentized-residual-3" (worth a look). With `strict`, only the reasons that
/// make it matter.
fn why(r: &RowInfluence, cut: &InfluenceCutoffs, strict: bool) -> Vec<String> {
    let mut out = Vec::new();
    let cooks_matters = matches!(
        (r.cooks_distance, cut.cooks_distance_matters),
        (Some(c), Some(m)) if c > m
    );
    let t_matters = matches!(
        (r.studentized_residual, cut.studentized_bonferroni),
        (Some(t), Some(m)) if t.abs() > m
    );
    if cooks_matters {
        out.push("cooks-distance".to_string());
    }
    if t_matters {
        out.push("studentized-residual".to_string());
    }
    if strict {
        return out;
    }
    if r.leverage > cut.leverage {
        out.push("leverage".into());
    }
    if !cooks_matters && r.cooks_distance.is_some_and(|c| c > cut.cooks_distance) {
        out.push("cooks-distance-4/n".into());
    }
    if !t_matters
        && r.studentized_residual
            .is_some_and(|t| t.abs() > cut.studentized_residual)
    {
        out.push("studentized-residual-3".into());
    }
    out
}

/// Keeps the `MAX_LISTED` rows with the largest Cook's distance (ties: earlier row).
fn keep_top(rows: &mut Vec<RowInfluence>) {
    rows.sort_by(|a, b| {
        let ca = a.cooks_distance.unwrap_or(f64::INFINITY);
        let cb = b.cooks_distance.unwrap_or(f64::INFINITY);
        cb.total_cmp(&ca).then(a.row.cmp(&b.row))
    });
    rows.truncate(MAX_LISTED);
}
