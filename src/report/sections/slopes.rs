//! "Slope differences, pair by pair": pooled and unpooled (Welch) comparisons.

use super::{Ctx, cell, ci, int, many_to_one_note, num, num3, p, pair};
use crate::report::doc::{Builder, aligns, t};

pub(super) fn subsection(b: &mut Builder, c: &Ctx) {
    let r = c.r;
    b.subsection(vec![t("Slope differences, pair by pair")]);
    let mut intro = vec![t(format!(
        "Difference = first − second, with its {} interval (pooled, unadjusted): slope differences outside it are ruled out at that level, those inside are not. Pooled: residual variance of the separate-lines model ({} df). Unpooled: each group's own variance, Welch–Satterthwaite df. p-values adjusted: {}.",
        c.conf,
        int(r.separate_slopes.df),
        c.adjust
    ))];
    intro.extend(many_to_one_note(c, |m| Some(&m.slopes)));
    b.para(intro);
    let simultaneous = r.many_to_one.is_some();
    let interval = format!("{} interval", c.conf);
    let together = format!("simultaneous {} interval", c.conf);
    let difference = match (&c.y_unit, &c.x_unit) {
        (Some(yu), Some(xu)) => format!("difference ({yu} per {xu})"),
        _ => "difference".to_string(),
    };
    let mut header = vec![
        cell("pair"),
        cell(difference.as_str()),
        cell(interval.as_str()),
    ];
    if simultaneous {
        header.push(cell(together.as_str()));
    }
    header.extend(
        [
            "SE",
            "t",
            "p",
            "adjusted p",
            "unpooled SE",
            "unpooled df",
            "unpooled p",
        ]
        .map(cell),
    );
    b.table_aligned(
        header,
        aligns(if simultaneous {
            "lrllrrrrrrr"
        } else {
            "lrlrrrrrrr"
        }),
        r.pairwise_slopes
            .iter()
            .map(|s| {
                let mut row = vec![
                    pair(&s.a, &s.b),
                    cell(num(Some(s.difference))),
                    cell(ci(s.ci)),
                ];
                if simultaneous {
                    row.push(cell(ci(s.ci_simultaneous)));
                }
                row.extend([
                    cell(num(s.se)),
                    cell(num(s.t)),
                    cell(p(s.p_value)),
                    cell(p(s.p_adjusted)),
                    cell(num(s.welch.se)),
                    cell(num3(s.welch.df)),
                    cell(p(s.welch.p_value)),
                ]);
                row
            })
            .collect(),
    );
}
