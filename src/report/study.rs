//! The report of a plan with several attributes: one document that opens with the
//! attributes side by side and the period they support together, then each
//! attribute's own report, whole, one level down. Every format is written from
//! this one document, as for a single response.

use super::FigureRef;
use super::doc::{Block, Document, Runs, t, v};
use super::sections::{cell, vcell};
use crate::number::sig;
use crate::results::Study;

/// The document: the attributes' table and answer, then each attribute's report.
/// `figures` holds each attribute's figures, in the study's order.
pub fn document(study: &Study, figures: &[Vec<FigureRef>]) -> Document {
    let first = &study.attributes[0].results;
    let pv = &first.provenance;
    let mut blocks = vec![Block::Heading {
        level: 1,
        text: vec![t("Attributes and the period they support")],
    }];
    blocks.push(Block::Paragraph(answer(study)));
    blocks.push(Block::Table(attributes_table(study)));
    blocks.push(Block::Caution(vec![t(
        "Each attribute is analysed on its own below: its gate, its model for the limits and its checks are its own. The period the study supports is the shortest any attribute supports. These results support, and do not replace, professional judgement; for a shelf life or any other regulated decision, defer to the applicable guideline (such as ICH Q1E) and to a qualified statistician.",
    )]));
    for (a, figs) in study.attributes.iter().zip(figures) {
        blocks.push(Block::Heading {
            level: 1,
            text: vec![t("Attribute "), v(&a.column)],
        });
        let doc = super::document(&a.results, figs);
        let mut skip_references = false;
        for b in doc.blocks {
            match b {
                // One references list for the whole document, at its end.
                Block::Heading { text, .. } if text == vec![t("References")] => {
                    skip_references = true;
                }
                Block::References(_) if skip_references => skip_references = false,
                Block::Heading { level, text } => blocks.push(Block::Heading {
                    level: level + 1,
                    text,
                }),
                other => blocks.push(other),
            }
        }
    }
    blocks.push(Block::Heading {
        level: 1,
        text: vec![t("References")],
    });
    blocks.push(Block::References(Vec::new()));
    let columns: Vec<&str> = study.attributes.iter().map(|a| a.column.as_str()).collect();
    let mut subtitle: Runs = vec![t(format!("{} attributes (", columns.len()))];
    for (i, c) in columns.iter().enumerate() {
        if i > 0 {
            subtitle.push(t(", "));
        }
        subtitle.push(v(*c));
    }
    subtitle.extend([
        t(") on "),
        v(&first.model.covariate),
        t(", each compared across the groups of "),
        v(&first.model.group),
    ]);
    subtitle.extend(super::sections::written_by(pv));
    let mut doc = Document {
        title: study.title.clone(),
        subtitle,
        footer: super::sections::footer(pv),
        blocks,
    };
    doc.resolve_references();
    doc
}

/// The answer in one paragraph: the period and the attribute that sets it, or why
/// there is none, and which attributes never reach a limit.
fn answer(study: &Study) -> Runs {
    let a = &study.answer;
    let model = &study.attributes[0].results.model;
    let mut runs = Vec::new();
    match (&a.limiting, a.supported, a.reason.as_deref()) {
        (Some(column), Some(period), _) => {
            let period = crate::number::trimmed(period, 4);
            match &model.covariate_units {
                Some(u) => runs.push(t(format!("The study supports {period} {u}, set by "))),
                None => runs.extend([
                    t(format!("The study supports {period} (")),
                    v(&model.covariate),
                    t("), set by "),
                ]),
            }
            runs.extend([
                v(column),
                t(", the attribute whose supported period is shortest."),
            ]);
        }
        (Some(column), None, Some("beyond-at-start")) => runs.extend([
            t("The study supports no period: "),
            v(column),
            t(" is already past a limit at its first observation."),
        ]),
        (Some(column), None, _) => runs.extend([
            t("The study supports no period: for "),
            v(column),
            t(" the pooling steps stopped before choosing a line."),
        ]),
        (None, _, Some("no-limits")) => {
            runs.push(t("No attribute has limits, so the study sets no period."))
        }
        _ => runs.push(t(
            "No attribute's bound reaches its limit after the first observation, and no extrapolation rule caps the period, so the data set no period.",
        )),
    }
    let never: Vec<&str> = a
        .rows
        .iter()
        .filter(|r| r.outcome.as_deref() == Some("never"))
        .map(|r| r.column.as_str())
        .collect();
    if !never.is_empty() && a.supported.is_some() {
        runs.push(t(" Never reaching a limit: "));
        for (i, c) in never.iter().enumerate() {
            if i > 0 {
                runs.push(t(", "));
            }
            runs.push(v(*c));
        }
        runs.push(t("."));
    }
    runs
}

fn attributes_table(study: &Study) -> super::doc::Table {
    let header = [
        "attribute",
        "limits",
        "bound",
        "line the limits are read from",
        "earliest crossing",
        "supported period",
        "sets the period",
    ]
    .map(cell)
    .to_vec();
    let rows = study
        .answer
        .rows
        .iter()
        .zip(&study.attributes)
        .map(|(r, a)| {
            let bound = a
                .results
                .decision
                .limits
                .as_ref()
                .map_or("n/a".into(), |l| {
                    super::sections::bound_phrase(&l.bound, &l.band, l.confidence)
                });
            let limits = match (r.lower, r.upper) {
                (Some(lo), Some(hi)) => format!("{} to {}", sig(lo, 4), sig(hi, 4)),
                (Some(lo), None) => format!("at least {}", sig(lo, 4)),
                (None, Some(hi)) => format!("at most {}", sig(hi, 4)),
                (None, None) => "none".into(),
            };
            let crossing = match (r.crossing, r.outcome.as_deref()) {
                (Some(x), _) => {
                    let mut s = sig(x, 4);
                    if let (Some(line), Some(side)) = (&r.line, &r.side) {
                        s = format!("{s} ({line}, {side})");
                    }
                    s
                }
                (None, Some("never")) => "never reaches a limit".into(),
                (None, Some("already-crossed")) => "already past a limit".into(),
                (None, Some("not-decided")) => "no line chosen".into(),
                (None, _) => "n/a".into(),
            };
            vec![
                vcell(&r.column),
                cell(limits),
                cell(bound),
                cell(match r.model.as_deref() {
                    Some("separate") => "each group's own line",
                    Some("common-slope") => "parallel lines",
                    Some("pooled") => "one pooled line",
                    Some(_) => "none chosen",
                    None => "n/a (no limits)",
                }),
                cell(crossing),
                cell(r.supported.map_or("none".into(), |p| sig(p, 4))),
                cell(if r.limiting { "yes" } else { "" }),
            ]
        })
        .collect();
    super::doc::Table {
        header,
        align: super::doc::aligns("lllllrl"),
        rows,
        notes: Vec::new(),
    }
}

/// `results.json` of the study: pretty-printed, newline at the end.
pub fn json(study: &Study) -> Result<String, super::ReportError> {
    let mut s =
        serde_json::to_string_pretty(study).map_err(|e| super::ReportError::Json(e.to_string()))?;
    s.push('\n');
    Ok(s)
}

/// `report.md` of the study.
pub fn markdown(study: &Study, figures: &[Vec<FigureRef>]) -> String {
    super::write::markdown::write(&document(study, figures))
}

/// `report-data.json` of the study, for the Typst template.
pub fn pdf_data(study: &Study, figures: &[Vec<FigureRef>]) -> Result<String, super::ReportError> {
    super::write::typst::write(&document(study, figures))
}
