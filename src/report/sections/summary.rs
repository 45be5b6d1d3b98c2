//! "In brief": the plain-language summary.

use super::{Ctx, ci, int, level, num, peq};
use crate::report::doc::{Builder, t, v};
use crate::results::MeanPair;

pub(super) fn section(b: &mut Builder, c: &Ctx) {
    let r = c.r;
    let es = &r.equal_slopes;
    let ge = &r.group_effect;
    b.section(vec![t("In brief")]);
    let test = match es.status.as_str() {
        "exact-fit" => format!(
            "an infinite F on {} and {} df (every line passes exactly through its rows: exact fit), p = 0",
            int(es.df1),
            int(es.df2)
        ),
        "not-computable" => {
            "no statistic (0/0: no residual variation and identical slopes), so the slopes are taken as equal because they are identical".to_string()
        }
        _ => format!(
            "F = {} on {} and {} df, {}",
            num(es.f),
            int(es.df1),
            int(es.df2),
            peq(es.p_value)
        ),
    };
    let gate_level = |side: &str| {
        if es.status == "not-computable" {
            String::new()
        } else {
            format!(", {side} the gate's level of {}", level(es.alpha))
        }
    };
    if r.decision.homogeneous {
        let mut runs = vec![
            t(format!(
                "The groups' lines can be treated as parallel: the equal-slopes test gives {test}{}. On a common slope of {} ",
                gate_level("at or above"),
                num(Some(r.common_slope.slope))
            )),
            v(&c.y),
            t(" per unit of "),
            v(&c.x),
            t(format!(
                " ({} interval {}), the groups' adjusted means at ",
                c.conf,
                ci(r.common_slope.ci)
            )),
            v(&c.x),
            t(format!(" = {} ", num(Some(r.adjust_at)))),
        ];
        let effect = format!(
            "(F = {} on {} and {} df, {})",
            num(ge.f),
            int(ge.df1),
            int(ge.df2),
            peq(ge.p_value)
        );
        if ge.status == "not-computable" {
            runs.push(t("cannot be compared by the group-effect F test (0/0: the parallel lines fit every row exactly and the intercepts agree)."));
        } else if ge.status == "exact-fit" {
            runs.push(t(format!(
                "differ (an infinite F on {} and {} df: the parallel lines fit every row exactly, p = 0).",
                int(ge.df1),
                int(ge.df2)
            )));
        } else if ge.p_value.is_some_and(|p| p < r.model.alpha) {
            runs.push(t(format!("differ {effect}.")));
            let largest: Option<&MeanPair> = r
                .pairwise_adjusted
                .iter()
                .max_by(|a, b| a.difference.abs().total_cmp(&b.difference.abs()));
            if let Some(l) = largest {
                runs.extend([
                    t(" The largest difference is "),
                    v(&l.a),
                    t(" − "),
                    v(&l.b),
                    t(format!(
                        " = {} ({} interval {}, adjusted {}).",
                        num(Some(l.difference)),
                        c.conf,
                        ci(l.ci),
                        peq(l.p_adjusted)
                    )),
                ]);
            }
        } else {
            runs.push(t(format!("do not differ detectably {effect}.")));
        }
        b.para(runs);
    } else {
        let low = r.groups.iter().min_by(|a, b| a.slope.total_cmp(&b.slope));
        let high = r.groups.iter().max_by(|a, b| a.slope.total_cmp(&b.slope));
        let mut runs = vec![t(format!(
            "The groups' lines are not parallel: the equal-slopes test gives {test}{}.",
            gate_level("below")
        ))];
        if let (Some(lo), Some(hi)) = (low, high) {
            runs.extend([
                t(format!(" Slopes run from {} (", num(Some(lo.slope)))),
                v(&lo.level),
                t(format!(") to {} (", num(Some(hi.slope)))),
                v(&hi.level),
                t(") "),
                v(&c.y),
                t(" per unit of "),
                v(&c.x),
                t("."),
            ]);
        }
        runs.extend([
            t(" Because the difference between two groups then depends on "),
            v(&c.x),
            t(", the groups are compared by their slopes; the adjusted means further down hold at "),
            v(&c.x),
            t(format!(" = {} only.", num(Some(r.adjust_at)))),
        ]);
        b.para(runs);
    }
    let mut rows = format!(
        "{} of {} data rows entered the fits.",
        r.data.rows_used, r.data.rows_read
    );
    match r.warnings.len() {
        0 => {}
        1 => rows.push_str(" There is one point to watch, listed below."),
        n => rows.push_str(&format!(" There are {n} points to watch, listed below.")),
    }
    b.para(vec![t(rows)]);
    let ch = &r.checks;
    let alpha = r.model.alpha;
    let normal = match ch.normality.p_value {
        None => "could not be tested for normality".to_string(),
        Some(p) if p < alpha => format!("depart from normality (Shapiro–Wilk {})", peq(Some(p))),
        Some(p) => format!(
            "show no clear departure from normality (Shapiro–Wilk {})",
            peq(Some(p))
        ),
    };
    let spread = match ch.equal_variance.p_value {
        None => "could not be compared".to_string(),
        Some(p) if p < alpha => format!("differ between groups (Brown–Forsythe {})", peq(Some(p))),
        Some(p) => format!(
            "are similar across groups (Brown–Forsythe {})",
            peq(Some(p))
        ),
    };
    let n = ch.influence.flagged_total;
    b.para(vec![t(format!(
        "Checks: residuals {normal}; spreads {spread}; {n} row{} beyond the influence cut-offs.",
        if n == 1 { "" } else { "s" }
    ))]);
}
