//! Several attributes of one study (`[[responses]]`), each turned into the whole
//! single-response plan it stands for.

use std::ops::Range;
use toml::Spanned;

use super::{Plan, PlanError, from_raw, schema};

/// A plan with `[[responses]]`: each attribute becomes a whole single-response plan,
/// validated exactly as if it had been written out with its column as
/// `model.response`, its transform and unit under `[model]`, and its limits merged
/// into the shared `[limits]`, so every check and every span of the single-response
/// plan applies to it. The plan returned is the first attribute's, with all of them
/// in [`Plan::attributes`].
pub(super) fn several(file: &str, source: &str, raw: schema::RawPlan) -> Result<Plan, PlanError> {
    let err = |span: Range<usize>, message: String, help: &str| {
        PlanError::new(file, source, span, message, help)
    };
    if let Some(m) = &raw.data.get_ref().moments {
        return Err(err(
            m.span(),
            "data.moments holds one response's moments, but the plan lists several under [[responses]]".into(),
            "write one plan per attribute, each with its own moments file, or read the rows with data.path",
        ));
    }
    let model = raw.model.get_ref();
    if let Some(r) = &model.response {
        return Err(err(
            r.span(),
            "model.response is given beside [[responses]]".into(),
            "list every attribute under [[responses]] (column, transform, units, limits), or remove [[responses]] for a single response",
        ));
    }
    if model
        .transform
        .as_ref()
        .is_some_and(|t| t.response.is_some())
        || model.units.as_ref().is_some_and(|u| u.response.is_some())
    {
        return Err(err(
            raw.model.span(),
            "[model] sets the response's transform or unit beside [[responses]]".into(),
            "give each attribute its own `transform` and `units` under [[responses]]",
        ));
    }
    if let Some(v) = raw.limits.as_ref().and_then(|l| {
        let l = l.get_ref();
        l.lower.as_ref().or(l.upper.as_ref())
    }) {
        return Err(err(
            v.span(),
            "[limits] gives a lower or upper limit beside [[responses]]".into(),
            "give each attribute its limits under its own `limits` table; [limits] keeps the shared settings (confidence, bound, band, storage, round_to)",
        ));
    }

    let mut seen: Vec<&str> = Vec::new();
    for r in &raw.responses {
        let column = r.get_ref().column.get_ref().as_str();
        if seen.contains(&column) {
            return Err(err(
                r.get_ref().column.span(),
                format!("[[responses]] lists the column `{column}` twice"),
                "list each attribute once",
            ));
        }
        seen.push(column);
    }
    let mut attributes = Vec::new();
    for r in &raw.responses {
        let r = r.get_ref();
        let mut one = raw.clone();
        one.responses = Vec::new();
        let span = one.model.span();
        let mut m = one.model.get_ref().clone();
        m.response = Some(r.column.clone());
        let mut transform = m.transform.take().unwrap_or(schema::RawTransform {
            response: None,
            covariate: None,
        });
        transform.response = r.transform.clone();
        m.transform = Some(transform);
        let mut units = m.units.take().unwrap_or(schema::RawUnits {
            response: None,
            covariate: None,
        });
        units.response = r.units.clone();
        m.units = Some(units);
        one.model = Spanned::new(span, m);
        one.limits = r.limits.as_ref().map(|own| {
            let mut shared = raw
                .limits
                .as_ref()
                .map(|l| l.get_ref().clone())
                .unwrap_or_default();
            shared.lower = own.get_ref().lower.clone();
            shared.upper = own.get_ref().upper.clone();
            Spanned::new(own.span(), shared)
        });
        attributes.push(from_raw(file, source, &one)?);
    }
    let mut plan = attributes[0].clone();
    plan.attributes = attributes;
    Ok(plan)
}
