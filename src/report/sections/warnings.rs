//! "Points to watch": the analysis' warnings.

use super::Ctx;
use crate::report::doc::{Block, Builder, prose, t};

pub(super) fn section(b: &mut Builder, c: &Ctx) {
    b.section(vec![t("Points to watch")]);
    if c.r.warnings.is_empty() {
        b.para(vec![t("None.")]);
    } else {
        b.push(Block::List(c.r.warnings.iter().map(|w| prose(w)).collect()));
    }
}
