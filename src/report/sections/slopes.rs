//! "Slope differences, pair by pair": pooled and unpooled (Welch) comparisons.

use super::{Ctx, cell, ci, int, num, num3, p, pair};
use crate::report::doc::{Builder, aligns, t};

pub(super) fn subsection(b: &mut Builder, c: &Ctx) {
    let r = c.r;
    b.subsection(vec![t("Slope differences, pair by pair")]);
    b.para(vec![t(format!(
        "Difference = first − second, with its {} interval (pooled, unadjusted): slope differences outside it are ruled out at that level, those inside are not. Pooled: residual variance of the separate-lines model ({} df). Unpooled: each group's own variance, Welch–Satterthwaite df. p-values adjusted: {}.",
        c.conf,
        int(r.separate_slopes.df),
        c.adjust
    ))]);
    let interval = format!("{} interval", c.conf);
    let difference = match (&c.y_unit, &c.x_unit) {
        (Some(yu), Some(xu)) => format!("difference ({yu} per {xu})"),
        _ => "difference".to_string(),
    };
    b.table_aligned(
        [
            "pair",
            difference.as_str(),
            interval.as_str(),
            "SE",
            "t",
            "p",
            "adjusted p",
            "unpooled SE",
            "unpooled df",
            "unpooled p",
        ]
        .map(cell)
        .to_vec(),
        aligns("lrlrrrrrrr"),
        r.pairwise_slopes
            .iter()
            .map(|s| {
                vec![
                    pair(&s.a, &s.b),
                    cell(num(Some(s.difference))),
                    cell(ci(s.ci)),
                    cell(num(s.se)),
                    cell(num(s.t)),
                    cell(p(s.p_value)),
                    cell(p(s.p_adjusted)),
                    cell(num(s.welch.se)),
                    cell(num3(s.welch.df)),
                    cell(p(s.welch.p_value)),
                ]
            })
            .collect(),
    );
}
