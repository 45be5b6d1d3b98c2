//! "Planning the next season": the rows per group the equal-slopes test needs.

use super::{Ctx, level, num, num3};
use crate::report::cite::Work;
use crate::report::doc::{Builder, Inline, t, v};

pub(super) fn section(b: &mut Builder, c: &Ctx) {
    let r = c.r;
    let Some(p) = &r.next_season else {
        return;
    };
    b.section(vec![t("Planning the next season")]);
    let rows = |n: Option<u64>| n.map_or("more than a billion".to_string(), |n| n.to_string());
    let mut runs = vec![t(format!(
        "With this season's residual variance ({}) and covariate spread, the pair whose slopes are hardest to tell apart are ",
        num(Some(p.residual_variance))
    ))];
    runs.extend([v(&p.pair[0]), t(" and "), v(&p.pair[1]), t(". ")]);
    match p.basis.as_str() {
        "slope-margin" => {
            runs.push(t(format!(
                "To detect a slope difference of the plan's margin, {} ",
                num(Some(p.difference))
            )));
            runs.extend(c.slope_unit());
            runs.push(t(format!(
                ", with the equal-slopes test at {}, takes {} rows per group for power 0.8 and {} for 0.9; this season's {} rows per group gave power {}.",
                level(p.alpha),
                rows(p.rows_for_80),
                rows(p.rows_for_90),
                p.rows_now,
                num3(p.power_now)
            )));
        }
        _ => {
            runs.push(t(format!(
                "With {} rows per group the equal-slopes test at {} detects, with power 0.8, a slope difference of {} ",
                p.rows_now,
                level(p.alpha),
                num(Some(p.difference))
            )));
            runs.extend(c.slope_unit());
            runs.push(t(format!(
                " between them; power 0.9 for that difference takes {} rows per group. Give tests.slope_margin, the smallest difference that matters, to plan for it instead.",
                rows(p.rows_for_90)
            )));
        }
    }
    runs.extend([
        t(" Power from the noncentral F ("),
        Inline::Cite(Work::Cohen1988),
        t("), assuming next season's spread and covariate design are like this one's."),
    ]);
    b.para(runs);
}
