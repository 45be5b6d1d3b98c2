//! "Do the slopes agree?": the equal-slopes gate and its decision.

use super::{Ctx, int, num, num3, peq};
use crate::report::doc::{Builder, prose, t};

pub(super) fn section(b: &mut Builder, c: &Ctx) {
    let r = c.r;
    let es = &r.equal_slopes;
    b.section(vec![t("Do the slopes agree?")]);
    b.para(vec![t(format!(
        "Separate lines against parallel lines: {} on {} and {} df, {}; partial η² = {} (share of the slope-difference sum of squares in it plus the residual).",
        if es.status == "exact-fit" {
            "F infinite (exact fit)".to_string()
        } else {
            format!("F = {}", num(es.f))
        },
        int(es.df1),
        int(es.df2),
        if es.status == "exact-fit" {
            "p = 0".to_string()
        } else {
            peq(es.p_value)
        },
        num3(r.effect_sizes.equal_slopes_partial_eta2)
    ))]);
    b.para(prose(&r.decision.reason));
}
