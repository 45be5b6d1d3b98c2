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
mod planning;
mod provenance;
mod regions;
mod robust;
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
    // The decision record orders the sections; nothing here chooses on its own.
    for key in &r.decision.sections {
        match key.as_str() {
            "summary" => summary::section(&mut b, &c),
            "rows" => rows::section(&mut b, &c),
            "lines" => lines::section(&mut b, &c),
            "gate" => gate::section(&mut b, &c),
            "slope-pairs" => slopes::subsection(&mut b, &c),
            "robust" => robust::section(&mut b, &c),
            "common-slope" => common::section(&mut b, &c, common::Framing::Main),
            "forced-equal" => common::section(&mut b, &c, common::Framing::ForcedEqual),
            "regions" => regions::section(&mut b, &c),
            "limits" => limits::section(&mut b, &c),
            "checks" => checks::section(&mut b, &c),
            "next-season" => planning::section(&mut b, &c),
            "figures" => figures::section(&mut b, figs),
            "warnings" => warnings::section(&mut b, &c),
            "methods" => methods::section(&mut b, &c),
            "provenance" => provenance::section(&mut b, &c),
            _ => {}
        }
    }
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
        ]
        .into_iter()
        .chain(written_by(pv))
        .collect(),
        footer: footer(pv),
        blocks: b.blocks,
    };
    doc.resolve_references();
    doc
}

/// The subtitle's second sentence: who wrote the report from which plan, and what
/// approval means for it.
pub(crate) fn written_by(pv: &crate::results::Provenance) -> Runs {
    vec![
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
    ]
}

/// The PDF's page footer: version, plan and both hashes.
pub(crate) fn footer(pv: &crate::results::Provenance) -> String {
    format!(
        "slopewise {} · plan {} · plan SHA-256 {} · data SHA-256 {}",
        pv.tool_version,
        super::doc::visible(&pv.plan_file),
        short(&pv.plan_sha256),
        short(&pv.data_sha256)
    )
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
    /// The response's unit as measured, when the plan declares one and the response
    /// is not transformed (a transformed value has no unit of its own).
    pub y_unit: Option<String>,
    /// The covariate's unit, likewise.
    pub x_unit: Option<String>,
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
            y_unit: unit(&r.model.response_units, &r.model.response_transform),
            x_unit: unit(&r.model.covariate_units, &r.model.covariate_transform),
        }
    }

    /// The unit of a slope: `g per cm`, or `y per unit of x` without declared units.
    pub fn slope_unit(&self) -> Runs {
        match (&self.y_unit, &self.x_unit) {
            (Some(yu), Some(xu)) => vec![t(format!("{yu} per {xu}"))],
            (Some(yu), None) => vec![t(format!("{yu} per unit of ")), v(&self.x)],
            _ => vec![v(&self.y), t(" per unit of "), v(&self.x)],
        }
    }

    /// A response value with its unit: `99.61 % of label claim`.
    pub fn y_value(&self, x: f64) -> String {
        with_unit(num(Some(x)), &self.y_unit)
    }

    /// A covariate value with its unit: `24.00 months`.
    pub fn x_value(&self, x: f64) -> String {
        with_unit(num(Some(x)), &self.x_unit)
    }

    /// For a transformed covariate, the measured value of an analysis-scale point:
    /// ` (feed_intake_kg = 243.2 as measured)`; nothing otherwise.
    pub fn measured(&self, value: f64) -> Runs {
        let r = self.r;
        if r.model.covariate_transform == "none" {
            return Vec::new();
        }
        let measured = match r.model.covariate_transform.as_str() {
            "log" => value.exp(),
            "log10" => 10f64.powf(value),
            "sqrt" => value * value,
            _ => return Vec::new(),
        };
        vec![
            t(" ("),
            v(&r.model.covariate),
            t(format!(
                " = {} as measured)",
                with_unit(num(Some(measured)), &r.model.covariate_units)
            )),
        ]
    }

    /// A point on the covariate: `24.00 months` with a declared unit, else
    /// `months = 24.00`, so a column named after its unit is not said twice.
    pub fn x_at(&self, text: String) -> Runs {
        match &self.x_unit {
            Some(u) => vec![t(format!("{text} {u}"))],
            None => vec![v(&self.x), t(format!(" = {text}"))],
        }
    }
}

fn unit(declared: &Option<String>, transform: &str) -> Option<String> {
    declared.clone().filter(|_| transform == "none")
}

pub(crate) fn with_unit(number: String, unit: &Option<String>) -> String {
    match unit {
        Some(u) => format!("{number} {u}"),
        None => number,
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
        "against-reference" => "many-to-one",
        _ => "none",
    }
}

/// Under many-to-one comparisons, what one family's adjusted p-values and
/// simultaneous intervals mean: each group against the reference, together over
/// the family (Dunnett 1955), with the critical value and the error of the
/// multivariate t probabilities. Empty otherwise.
pub(super) fn many_to_one_note(
    c: &Ctx,
    family: impl Fn(&crate::results::ManyToOne) -> Option<&crate::results::SimultaneousFamily>,
) -> Runs {
    let Some(m) = &c.r.many_to_one else {
        return Vec::new();
    };
    let Some(f) = family(m) else {
        return Vec::new();
    };
    let mut runs = vec![
        t(" Every group is compared with the reference, "),
        v(&m.reference),
        t(format!(
            " (the first level): difference = group − reference. The many-to-one p-values and the simultaneous {} intervals hold for all {} differences together (",
            c.conf,
            c.r.groups.len().saturating_sub(1)
        )),
        Inline::Cite(crate::report::cite::Work::Dunnett1955),
        t(")"),
    ];
    match (f.critical_value, f.error) {
        (Some(cv), Some(_)) if f.method == "bonferroni" => runs.push(t(format!(
            ": with this many groups they are the Bonferroni bound, conservative: interval = difference ± {} × SE, the t quantile at {} df and α/(2 × {}).",
            num(Some(cv)),
            int(f.df),
            c.r.groups.len().saturating_sub(1)
        ))),
        (Some(cv), Some(err)) => runs.push(t(format!(
            ": interval = difference ± {} × SE, the critical value of the multivariate t on {} df with the differences' own correlation; its probabilities carry an error of at most {}.",
            num(Some(cv)),
            int(f.df),
            crate::number::sig(err.max(1e-12), 2)
        ))),
        _ => runs.push(t(
            ": they cannot be computed here, because a standard error is unknown.",
        )),
    }
    runs
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

/// The words for the bound the crossings are read from: "one-sided 95% confidence
/// bound of the mean", or for the simultaneous band "95% simultaneous
/// (Working–Hotelling) confidence band of the mean".
pub(crate) fn bound_phrase(bound: &str, band: &str, confidence: f64) -> String {
    let level = crate::number::trimmed(100.0 * confidence, 4);
    match (bound, band) {
        ("prediction", _) => {
            format!("one-sided {level}% prediction bound for a single future result")
        }
        (_, "simultaneous") => {
            format!("{level}% simultaneous (Working–Hotelling) confidence band of the mean")
        }
        _ => format!("one-sided {level}% confidence bound of the mean"),
    }
}
