//! Results to the report's [`Document`]: one file per section, in reading order.
//!
//! Sections decide what is said; the writers in [`super::write`] decide only how it
//! looks in each format. Numbers are formatted here, once, by the rules of
//! [`crate::number`], so every format prints the same digits.

mod checks;
mod common;
mod figures;
mod gate;
mod limits;
mod lines;
mod methods;
mod provenance;
mod regions;
mod rows;
mod slopes;
mod summary;
mod warnings;

use super::FigureRef;
use super::doc::{Builder, Document, Inline, Runs, t, v};
use crate::number::{p_equation, p_value, sig, trimmed};
use crate::results::Results;

/// The whole report, with its references resolved.
pub fn report(r: &Results, figs: &[FigureRef]) -> Document {
    let c = Ctx::new(r);
    let mut b = Builder::default();
    summary::section(&mut b, &c);
    rows::section(&mut b, &c);
    lines::section(&mut b, &c);
    gate::section(&mut b, &c);
    if r.decision.homogeneous {
        common::section(&mut b, &c);
        slopes::subsection(&mut b, &c);
    } else {
        slopes::subsection(&mut b, &c);
        regions::section(&mut b, &c);
        common::section(&mut b, &c);
    }
    if !r.limits.is_empty() {
        limits::section(&mut b, &c);
    }
    checks::section(&mut b, &c);
    figures::section(&mut b, figs);
    warnings::section(&mut b, &c);
    methods::section(&mut b, &c);
    provenance::section(&mut b, &c);
    let pv = &r.provenance;
    let mut doc = Document {
        title: r.title.clone(),
        subtitle: vec![
            t("Regression lines of "),
            v(&c.y),
            t(" on "),
            v(&c.x),
            t(format!(
                ", compared across the {} groups of ",
                r.groups.len()
            )),
            v(&c.g),
            t(format!(
                ". Written by slopewise {} from the plan ",
                pv.tool_version
            )),
            v(&pv.plan_file),
            t(
                ". Approval: not approved unless a record in the approvals folder beside this report says so and ",
            ),
            Inline::Code("slopewise verify".into()),
            t(" finds it holds; approving never edits this report."),
        ],
        footer: format!(
            "slopewise {} · plan {} · plan SHA-256 {} · data SHA-256 {}",
            pv.tool_version,
            super::doc::visible(&pv.plan_file),
            short(&pv.plan_sha256),
            short(&pv.data_sha256)
        ),
        blocks: b.blocks,
    };
    doc.resolve_references();
    doc
}

fn short(hash: &str) -> &str {
    &hash[..hash.len().min(16)]
}

/// What every section needs: the results and the names it writes them with.
pub(crate) struct Ctx<'a> {
    pub r: &'a Results,
    /// The response's label (`log(y)` when transformed).
    pub y: String,
    /// The covariate's label.
    pub x: String,
    /// The group column.
    pub g: String,
    /// "95%" for alpha = 0.05.
    pub conf: String,
    /// The p-value adjustment's name.
    pub adjust: &'static str,
}

impl<'a> Ctx<'a> {
    fn new(r: &'a Results) -> Self {
        Ctx {
            r,
            y: label(&r.model.response, &r.model.response_transform),
            x: label(&r.model.covariate, &r.model.covariate_transform),
            g: r.model.group.clone(),
            conf: confidence(r),
            adjust: adjustment_name(&r.model.comparisons),
        }
    }
}

/// "95%" for alpha = 0.05.
pub fn confidence(r: &Results) -> String {
    format!("{}%", trimmed(100.0 * (1.0 - r.model.alpha), 4))
}

/// The adjustment's name as the report writes it.
pub fn adjustment_name(method: &str) -> &'static str {
    match method {
        "holm" => "Holm",
        "bonferroni" => "Bonferroni",
        "tukey-kramer" => "Tukey–Kramer",
        _ => "none",
    }
}

/// The axis and table label of a column: `log(height_cm)` for a transformed one.
pub fn label(column: &str, transform: &str) -> String {
    if transform == "none" {
        column.to_string()
    } else {
        format!("{transform}({column})")
    }
}

/// The plain words for a drop reason key.
pub fn drop_text(key: &str) -> String {
    match key {
        "filtered_out" => "did not pass the data.keep filters".into(),
        "missing_response" => "response missing".into(),
        "missing_covariate" => "covariate missing".into(),
        "missing_group" => "group missing".into(),
        "group_too_small" => "in a group with fewer than 3 usable rows".into(),
        "no_covariate_spread" => "in a group whose covariate does not vary".into(),
        other => other.replace('_', " "),
    }
}

/// A number to 4 significant digits, or `n/a`.
pub(crate) fn num(x: Option<f64>) -> String {
    x.map_or("n/a".into(), |v| sig(v, 4))
}

/// A number to 3 significant digits, or `n/a`.
pub(crate) fn num3(x: Option<f64>) -> String {
    x.map_or("n/a".into(), |v| sig(v, 3))
}

/// A p-value for a table cell.
pub(crate) fn p(x: Option<f64>) -> String {
    x.map_or("n/a".into(), p_value)
}

/// A p-value for prose: `p = 0.0123`, `p < 0.0001`.
pub(crate) fn peq(x: Option<f64>) -> String {
    x.map_or("p not computable".into(), p_equation)
}

/// An interval: `low to high`.
pub(crate) fn ci(x: Option<[f64; 2]>) -> String {
    x.map_or("n/a".into(), |[a, b]| {
        format!("{} to {}", sig(a, 4), sig(b, 4))
    })
}

/// A count or degrees of freedom.
pub(crate) fn int(x: f64) -> String {
    format!("{}", x.round() as i64)
}

/// A level such as 0.05, trailing zeros dropped.
pub(crate) fn level(x: f64) -> String {
    trimmed(x, 4)
}

/// One cell of our own text.
pub(crate) fn cell(s: impl Into<String>) -> Runs {
    vec![t(s)]
}

/// One cell holding a user's value.
pub(crate) fn vcell(s: impl Into<String>) -> Runs {
    vec![v(s)]
}

/// A pair cell: `a − b`, both labels as values.
pub(crate) fn pair(a: &str, b: &str) -> Runs {
    vec![v(a), t(" − "), v(b)]
}

/// A lead-in in bold, then the runs.
pub(crate) fn lead(label: &str, mut rest: Runs) -> Runs {
    let mut out = vec![Inline::Strong(label.to_string()), t(" ")];
    out.append(&mut rest);
    out
}
