//! "Figures": each figure with the question it answers and its caption.

use crate::report::FigureRef;
use crate::report::doc::{Block, Builder, Figure, t};

pub(super) fn section(b: &mut Builder, figs: &[FigureRef]) {
    if figs.is_empty() {
        return;
    }
    b.section(vec![t("Figures")]);
    for f in figs {
        b.push(Block::Figure(Figure {
            file: f.file.clone(),
            title: f.title.clone(),
            caption: f.caption.clone(),
            width: f.width,
        }));
    }
}
