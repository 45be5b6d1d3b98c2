//! "Rows in and out": every row read is accounted for.

use super::{Ctx, cell, drop_text};
use crate::report::doc::{Builder, Inline, t, v};

pub(super) fn section(b: &mut Builder, c: &Ctx) {
    let d = &c.r.data;
    b.section(vec![t("Rows in and out")]);
    let mut rows = vec![vec![
        cell(if d.source.as_deref() == Some("moments") {
            "counted in the moments file (after the engine's filters)"
        } else {
            "read from the data file"
        }),
        cell(d.rows_read.to_string()),
    ]];
    for (key, count) in &d.rows_dropped {
        rows.push(vec![
            cell(format!("left out: {}", drop_text(key))),
            cell(count.to_string()),
        ]);
    }
    rows.push(vec![
        cell("used in the fits"),
        cell(d.rows_used.to_string()),
    ]);
    b.table(vec![cell("rows"), cell("count")], 1, rows);
    if !d.groups_excluded.is_empty() {
        let mut runs = vec![t("Groups left out: ")];
        for (i, e) in d.groups_excluded.iter().enumerate() {
            if i > 0 {
                runs.push(t("; "));
            }
            runs.push(v(&e.level));
            runs.push(Inline::Text(format!(" ({})", e.reason)));
        }
        runs.push(t("."));
        b.para(runs);
    }
}
