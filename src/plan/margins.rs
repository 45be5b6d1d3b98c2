//! The margins of the equivalence tests and the rules that need them:
//! `tests.slope_margin` with `tests.gate`, and the lot-pooling margins with
//! `tests.pooling_rule`.

use std::ops::Range;

use super::{GateRule, PlanError, PoolingMargins, Procedure, Transform, schema};

/// `tests.slope_margin`: finite and positive, on the measured scale, so both columns
/// must be untransformed (a margin in measured units has no fixed size on a log
/// scale).
pub(super) fn slope_margin(
    t: &schema::RawTests,
    transforms: &(Transform, Transform),
    err: &impl Fn(Range<usize>, String, &str) -> PlanError,
) -> Result<Option<f64>, PlanError> {
    let Some(m) = &t.slope_margin else {
        return Ok(None);
    };
    let v = *m.get_ref();
    if !(v.is_finite() && v > 0.0) {
        return Err(err(
            m.span(),
            format!("tests.slope_margin must be a positive number, found {v}"),
            "give the largest slope difference that does not matter, in response units per covariate unit, such as 0.05",
        ));
    }
    if transforms.0 != Transform::None || transforms.1 != Transform::None {
        return Err(err(
            m.span(),
            "tests.slope_margin is on the measured scale, but the plan transforms the response or the covariate, so a slope has no size in measured units".into(),
            "remove the transform, or remove slope_margin (equivalence on a transformed scale is not offered)",
        ));
    }
    Ok(Some(v))
}

/// `tests.pooling_rule` and its margins: "equivalence" needs lot pooling and both
/// margins, each finite, positive and on the measured scale; a margin without the
/// equivalence rule would be ignored, so it is an error instead.
pub(super) fn pooling_margins(
    t: &schema::RawTests,
    transforms: &(Transform, Transform),
    err: &impl Fn(Range<usize>, String, &str) -> PlanError,
) -> Result<Option<PoolingMargins>, PlanError> {
    let equivalence = t
        .pooling_rule
        .as_ref()
        .filter(|r| *r.get_ref() == GateRule::Equivalence);
    let keys = [
        (
            "pooling_slope_margin",
            &t.pooling_slope_margin,
            "response units per covariate unit, such as 0.05",
        ),
        (
            "pooling_intercept_margin",
            &t.pooling_intercept_margin,
            "response units, such as 1.0",
        ),
    ];
    let Some(rule) = equivalence else {
        for (key, value, _) in keys {
            if let Some(v) = value {
                return Err(err(
                    v.span(),
                    format!("tests.{key} is used only with pooling_rule = \"equivalence\""),
                    "add `pooling_rule = \"equivalence\"` under [tests], or remove the margin",
                ));
            }
        }
        return Ok(None);
    };
    if t.procedure.as_ref().map(|p| *p.get_ref()) != Some(Procedure::LotPooling) {
        return Err(err(
            rule.span(),
            "tests.pooling_rule = \"equivalence\" needs procedure = \"lot-pooling\"".into(),
            "add `procedure = \"lot-pooling\"` under [tests], or remove pooling_rule",
        ));
    }
    let mut margins = [0.0; 2];
    for (slot, (key, value, unit)) in margins.iter_mut().zip(keys) {
        let Some(m) = value else {
            return Err(err(
                rule.span(),
                format!("tests.pooling_rule = \"equivalence\" needs tests.{key}"),
                &format!(
                    "add `{key}` under [tests]: the largest difference between lots that does not matter, in {unit}"
                ),
            ));
        };
        let v = *m.get_ref();
        if !(v.is_finite() && v > 0.0) {
            return Err(err(
                m.span(),
                format!("tests.{key} must be a positive number, found {v}"),
                &format!(
                    "give the largest difference between lots that does not matter, in {unit}"
                ),
            ));
        }
        if transforms.0 != Transform::None || transforms.1 != Transform::None {
            return Err(err(
                m.span(),
                format!(
                    "tests.{key} is on the measured scale, but the plan transforms the response or the covariate, so the margin has no fixed size there"
                ),
                "remove the transform, or use pooling_rule = \"difference\"",
            ));
        }
        *slot = v;
    }
    Ok(Some(PoolingMargins {
        slope: margins[0],
        intercept: margins[1],
    }))
}

/// `tests.gate`: "equivalence" needs a margin.
pub(super) fn gate_rule(
    t: &schema::RawTests,
    err: &impl Fn(Range<usize>, String, &str) -> PlanError,
) -> Result<GateRule, PlanError> {
    match &t.gate {
        None => Ok(GateRule::Difference),
        Some(g) if *g.get_ref() == GateRule::Equivalence && t.slope_margin.is_none() => Err(err(
            g.span(),
            "tests.gate = \"equivalence\" needs tests.slope_margin".into(),
            "add `slope_margin = 0.05` (the largest slope difference that does not matter) under [tests], or use gate = \"difference\"",
        )),
        Some(g) => Ok(*g.get_ref()),
    }
}
