//! "Each group's own line": the separate fits.

use super::{Ctx, cell, ci, num, vcell};
use crate::report::doc::{Builder, aligns, t};

pub(super) fn section(b: &mut Builder, c: &Ctx) {
    let r = c.r;
    b.section(vec![t("Each group's own line")]);
    let mut units = vec![t(format!(
        "Fitted separately to each group's rows; intervals at {} (t with n − 2 df). Slopes in ",
        c.conf
    ))];
    units.extend(c.slope_unit());
    match &c.y_unit {
        Some(u) => units.push(t(format!("; intercepts and residual SDs in {u}."))),
        None => units.push(t(".")),
    }
    b.para(units);
    b.table_aligned(
        vec![
            vcell(&c.g),
            cell("n"),
            cell("slope"),
            cell("slope interval"),
            cell("intercept"),
            cell("R²"),
            cell("residual SD"),
        ],
        aligns("lrrlrrr"),
        r.groups
            .iter()
            .map(|l| {
                vec![
                    vcell(&l.level),
                    cell(l.n.to_string()),
                    cell(num(Some(l.slope))),
                    cell(ci(l.slope_ci)),
                    cell(num(Some(l.intercept))),
                    cell(num(l.r_squared)),
                    cell(num(l.residual_sd)),
                ]
            })
            .collect(),
    );
    b.para(vec![t(format!(
        "One line through all rows: slope {}, intercept {}, R² {}.",
        num(Some(r.one_line.slope)),
        num(Some(r.one_line.intercept)),
        num(r.one_line.r_squared)
    ))]);
}
