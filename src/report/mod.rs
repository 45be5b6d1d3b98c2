//! Results to the files a person or a script reads: `report.md` and `results.json`.
//!
//! Rendering is pure: it returns bytes, and the command layer writes them. The
//! Markdown comes from minijinja templates in `templates/`, compiled into the binary
//! so a report never depends on where the tool was installed from.

mod error;
pub mod figures;
mod markdown;
pub mod pdf;

pub use error::ReportError;
pub use markdown::{FigureRef, escape_markdown, markdown};

use crate::results::Results;

/// `results.json`: pretty-printed, keys in contract order, newline at the end.
pub fn json(results: &Results) -> Result<String, ReportError> {
    let mut s =
        serde_json::to_string_pretty(results).map_err(|e| ReportError::Json(e.to_string()))?;
    s.push('\n');
    Ok(s)
}
