// TEMPORARY STUB written by the lead so the crate compiles while the real figures
// module is being written; the figures helper replaces this whole file.
use crate::results::{FigurePoints, Results};

/// A rendered figure.
pub struct Figure {
    /// Path inside the run folder.
    pub file: String,
    /// Short title.
    pub title: String,
    /// Caption.
    pub caption: String,
    /// SVG text.
    pub svg: String,
}

/// Renders the figures.
pub fn render(_r: &Results, _p: &FigurePoints) -> Result<Vec<Figure>, String> {
    Ok(Vec::new())
}
