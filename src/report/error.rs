//! The report stage's error.

use crate::diagnostic::Diagnostic;

/// A report could not be rendered. These are defects of the tool, not of the input.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ReportError {
    /// The Markdown template failed.
    #[error("the Markdown report could not be rendered: {0}")]
    Template(String),
    /// Serialization failed.
    #[error("results.json could not be written: {0}")]
    Json(String),
}

impl ReportError {
    /// The error with advice.
    pub fn diagnostic(&self) -> Diagnostic {
        Diagnostic::new(self.to_string())
            .help("this is a defect in slopewise; please report it with the plan and data")
    }
}
