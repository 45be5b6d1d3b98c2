//! Fitted lines and their pointwise confidence bands as sampled curves.

#[allow(unused_imports)]
use super::*;

// ---------------------------------------------------------------------------
// Figure 1: the two fits.

/// A group's line and band over its own covariate range: (x, fit, half-width).
pub(super) type Curve = Vec<(f64, f64, Option<f64>)>;

/// Samples along a line, enough for a smooth band edge.
pub(super) const CURVE_STEPS: usize = 48;

pub(super) fn curve(lo: f64, hi: f64, mut f: impl FnMut(f64) -> (f64, Option<f64>)) -> Curve {
    (0..=CURVE_STEPS)
        .map(|i| {
            let x = lo + (hi - lo) * i as f64 / CURVE_STEPS as f64;
            let (y, h) = f(x);
            (x, y, h.filter(|h| h.is_finite()))
        })
        .collect()
}

/// t quantile for a two-sided interval at `1 − alpha`, when the df allow one.
pub(super) fn t_crit(alpha: f64, df: f64) -> Option<f64> {
    (df > 0.0 && alpha > 0.0 && alpha < 1.0)
        .then(|| t_quantile(1.0 - alpha / 2.0, df))
        .filter(|t| t.is_finite())
}

/// Group g's own line at x with the half-width of its pointwise band:
/// se(x)² = s²/n + (x − x̄)²·se_b², which is s²(1/n + (x − x̄)²/Sxx) with
/// Sxx = s²/se_b² (Draper & Smith 1998, §3.1). `t` is the critical value.
pub(super) fn separate_at(g: &GroupLineResult, t: Option<f64>, x: f64) -> (f64, Option<f64>) {
    let fit = g.intercept + g.slope * x;
    let half = match (t, g.residual_sd, g.slope_se) {
        (Some(t), Some(s), Some(se)) => {
            let d = x - g.covariate_mean;
            Some(t * (s * s / g.n as f64 + d * d * se * se).sqrt())
        }
        _ => None,
    };
    (fit, half)
}

/// Group g's own line and band, the band's critical value `t` (Student's t for a
/// pointwise band, the Working–Hotelling value for a simultaneous one).
pub(super) fn separate_curve(g: &GroupLineResult, t: Option<f64>) -> Curve {
    curve(g.covariate_min, g.covariate_max, |x| separate_at(g, t, x))
}

/// The critical value the figures use for group `i`'s own line (`None`: the
/// parallel-lines model), as `results.bands.drawn` says.
pub(super) fn band_critical(r: &Results, i: Option<usize>) -> Option<f64> {
    let b = match i {
        Some(i) => r.bands.groups.get(i)?,
        None => &r.bands.common,
    };
    if r.bands.drawn == "simultaneous" {
        b.simultaneous
    } else {
        b.pointwise
    }
    .filter(|t| t.is_finite())
}

/// Group g's line at x under the common slope b, through its adjusted mean, with
/// its band's half-width: se(x)² = s_c²/n_g + (x − x̄_g)²·se_b², the group mean and
/// the slope being uncorrelated in that model (Snedecor & Cochran 1989, §18.3).
pub(super) fn common_at(
    r: &Results,
    g: &GroupLineResult,
    t: Option<f64>,
    x: f64,
) -> Option<(f64, Option<f64>)> {
    let m = r.adjusted_means.iter().find(|m| m.level == g.level)?;
    let c = &r.common_slope;
    let fit = m.mean + c.slope * (x - r.adjust_at);
    let half = match (t, c.residual_sd, c.se) {
        (Some(t), Some(s), Some(se)) => {
            let d = x - g.covariate_mean;
            Some(t * (s * s / g.n as f64 + d * d * se * se).sqrt())
        }
        _ => None,
    };
    Some((fit, half))
}

pub(super) fn common_curve(r: &Results, g: &GroupLineResult, t: Option<f64>) -> Option<Curve> {
    common_at(r, g, t, g.covariate_mean)?;
    Some(curve(g.covariate_min, g.covariate_max, |x| {
        common_at(r, g, t, x).unwrap_or((f64::NAN, None))
    }))
}
