//! The PDF report's sources: the fixed Typst template and its data file, both from
//! the same [`Document`](super::doc::Document) as the Markdown. Compiling is the
//! command layer's job (it runs the external `typst` with [`super::fonts`]).

use super::{FigureRef, ReportError};
use crate::results::Results;

pub use super::write::typst::TEMPLATE;

/// `report-data.json` for the Typst template.
pub fn data(r: &Results, figures: &[FigureRef]) -> Result<String, ReportError> {
    super::write::typst::write(&super::document(r, figures))
}
