//! Results to the files a person or a script reads: `report.md`, the PDF's sources,
//! `results.json` and the figures.
//!
//! One road for every format: the [`sections`] build a [`doc::Document`] from the
//! results, once, and the [`write`] module renders it as Markdown, as the PDF's
//! Typst data and as plain text. Rendering is pure: it returns bytes, and the
//! command layer writes them.

pub mod cite;
pub mod doc;
mod error;
pub mod figures;
pub mod fonts;
pub mod pdf;
pub mod seasons;
pub mod sections;
pub mod study;
pub mod write;

pub use error::ReportError;
pub use sections::{adjustment_name, confidence, drop_text, label};
pub use write::markdown::escape as escape_markdown;

use crate::results::Results;

/// A figure as the reports list it.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct FigureRef {
    /// Path inside the run folder, e.g. `figures/lines.svg`.
    pub file: String,
    /// Short title: the question the figure answers.
    pub title: String,
    /// Caption, including how many points are drawn.
    pub caption: String,
    /// Width in pixels, so the PDF prints every figure's text at one size.
    pub width: u32,
}

/// The report as a document, for any writer.
pub fn document(r: &Results, figures: &[FigureRef]) -> doc::Document {
    sections::report(r, figures)
}

/// Renders `report.md`.
pub fn markdown(r: &Results, figures: &[FigureRef]) -> Result<String, ReportError> {
    Ok(write::markdown::write(&document(r, figures)))
}

/// `results.json`: pretty-printed, keys in contract order, newline at the end.
pub fn json(results: &Results) -> Result<String, ReportError> {
    let mut s =
        serde_json::to_string_pretty(results).map_err(|e| ReportError::Json(e.to_string()))?;
    s.push('\n');
    Ok(s)
}
