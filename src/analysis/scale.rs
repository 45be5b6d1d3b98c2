//! Reading log-scale estimates on the measured scale.
//!
//! With a log response, a group's mean on the log scale is the log of its geometric
//! mean, and a difference of two is the log of their ratio; an interval transforms
//! with its ends, since exp is monotone (common practice, no source). A slope on the
//! log–log scale is an elasticity: the percentage change of the response per
//! percentage change of the covariate, approximately, for small changes. Square
//! roots have no such reading, so nothing is back-transformed for them.

use crate::plan::Transform;
use crate::results::{BackTransformed, Results};

/// How a slope reads on the measured scale (see `ModelEcho::slope_reading`).
pub(super) fn slope_reading(response: Transform, covariate: Transform) -> &'static str {
    match (response.is_log(), covariate.is_log()) {
        (true, true) => "elasticity",
        (true, false) if covariate == Transform::None => "ratio-per-unit",
        (false, true) if response == Transform::None => "per-log-unit",
        (false, false) if response == Transform::None && covariate == Transform::None => "per-unit",
        _ => "transformed",
    }
}

/// Fills the back-transformed means, ratios and differences for a log response.
pub(super) fn back_transform(response: Transform, r: &mut Results) {
    if !response.is_log() {
        return;
    }
    let back = |value: f64, ci: Option<[f64; 2]>| -> Option<BackTransformed> {
        let value = response.exp(value).filter(|v| v.is_finite())?;
        let ci = ci.and_then(|[a, b]| {
            let (a, b) = (response.exp(a)?, response.exp(b)?);
            (a.is_finite() && b.is_finite()).then_some([a, b])
        });
        Some(BackTransformed { value, ci })
    };
    for m in &mut r.adjusted_means {
        m.back_transformed = back(m.mean, m.ci);
    }
    for d in &mut r.pairwise_adjusted {
        d.ratio = back(d.difference, d.ci);
    }
    for d in &mut r.differences_at {
        d.ratio = back(d.difference, d.ci);
    }
}
