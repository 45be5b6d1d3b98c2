//! "Groups on a common slope": the parallel-lines comparison, adjusted means and
//! their pairwise differences.

use super::{Ctx, cell, ci, int, num, num3, p, pair, peq, vcell};
use crate::report::cite::Work;
use crate::report::doc::{Builder, Inline, aligns, t, v};

/// How the section presents the common-slope results.
#[derive(Clone, Copy, PartialEq)]
pub(super) enum Framing {
    /// The slopes were not shown to differ: the comparison the report leads with.
    Main,
    /// The slopes differ: a what-if, set apart after the main results.
    ForcedEqual,
}

pub(super) fn section(b: &mut Builder, c: &Ctx, framing: Framing) {
    let r = c.r;
    let cs = &r.common_slope;
    let ge = &r.group_effect;
    let at = num(Some(r.adjust_at));
    if framing == Framing::ForcedEqual {
        b.section(vec![t("If the slopes were forced equal")]);
        b.para(vec![
            t("The equal-slopes test found that the slopes differ, so the numbers in this section rest on a model the data do not support: parallel lines with one common slope. They are kept for comparison with seasons whose slopes agreed, and describe the groups at "),
            v(&c.x),
            t(format!(
                " = {at} only; do not read them as the groups' difference. Set "
            )),
            Inline::Code("forced_equal = \"omit\"".into()),
            t(" under [report] to leave them out."),
        ]);
    } else {
        b.section(vec![t("Groups on a common slope")]);
    }
    b.para(vec![t(format!(
        "Common slope {} (SE {}, {} interval {}, {} df). Group effect given the common slope: F = {} on {} and {} df, {}; partial η² = {}.",
        num(Some(cs.slope)),
        num(cs.se),
        c.conf,
        ci(cs.ci),
        int(cs.df),
        num(ge.f),
        int(ge.df1),
        int(ge.df2),
        peq(ge.p_value),
        num3(r.effect_sizes.group_effect_partial_eta2)
    ))]);

    let mut heading = vec![t("Adjusted means at "), v(&c.x), t(format!(" = {at}"))];
    heading.extend(c.measured(r.adjust_at));
    b.subsection(heading);
    // A log response is read back on its measured scale: geometric means.
    let geometric = r
        .adjusted_means
        .iter()
        .any(|m| m.back_transformed.is_some());
    let unit = c
        .y_unit
        .as_ref()
        .map_or(String::new(), |u| format!(" ({u})"));
    let mut header = vec![
        vcell(&c.g),
        vec![t("adjusted mean of "), v(&c.y), t(unit.clone())],
        cell("SE"),
        cell(format!("{} interval", c.conf)),
    ];
    if geometric {
        header.push(vec![t("geometric mean of "), v(&r.model.response)]);
        header.push(cell(format!("{} interval", c.conf)));
    }
    header.push(vec![t("within the group's "), v(&c.x), t(" range")]);
    b.table_aligned(
        header,
        aligns(if geometric { "lrrlrll" } else { "lrrll" }),
        r.adjusted_means
            .iter()
            .map(|m| {
                let mut row = vec![
                    vcell(&m.level),
                    cell(num(Some(m.mean))),
                    cell(num(m.se)),
                    cell(ci(m.ci)),
                ];
                if geometric {
                    let bt = m.back_transformed.as_ref();
                    row.push(cell(num(bt.map(|b| b.value))));
                    row.push(cell(ci(bt.and_then(|b| b.ci))));
                }
                row.push(cell(if m.within_range {
                    "yes"
                } else {
                    "no: extrapolated"
                }));
                row
            })
            .collect(),
    );
    if geometric {
        b.para(vec![
            t("On the measured scale of "),
            v(&r.model.response),
            t(", each adjusted mean reads as a geometric mean and each difference below as a ratio of geometric means (first ÷ second), with the interval's ends transformed alike."),
        ]);
    }

    // The question first, then the answer column by column: whether the pair
    // differs after adjustment, the size and its interval, and the p-values from
    // the most to the least protected.
    b.subsection(vec![t("Which groups differ at the same "), v(&c.x), t("?")]);
    let adjusted_column = match c.adjust {
        "none" => "p, not adjusted".to_string(),
        name => format!("p, {name}"),
    };
    let simultaneous = r.many_to_one.is_some();
    if simultaneous {
        let mut intro = vec![t(format!(
            "Each group's adjusted mean at {at} compared with the reference's by a t test on the parallel-lines model, {} intervals unadjusted beside the simultaneous ones. A group differs when its many-to-one p-value is below {}.",
            c.conf,
            super::level(r.model.alpha),
        ))];
        intro.extend(super::many_to_one_note(c, |m| Some(&m.adjusted)));
        b.para(intro);
    } else {
        b.para(vec![
            t(format!(
                "Each pair's adjusted means at {at} compared by a t test on the parallel-lines model; difference = first − second, {} intervals unadjusted. A pair differs when its p-value after adjustment ({}) is below {}. The Tukey–Kramer p-value uses the studentized range over all {} groups (",
                c.conf,
                c.adjust,
                super::level(r.model.alpha),
                r.groups.len()
            )),
            Inline::Cite(Work::Tukey1953),
            t("; "),
            Inline::Cite(Work::Kramer1956),
            t(")."),
        ]);
    }
    let alpha = r.model.alpha;
    let ratios = r.pairwise_adjusted.iter().any(|d| d.ratio.is_some());
    let mut header = vec![
        cell("pair"),
        cell("differ?"),
        cell(format!("difference{unit}")),
        cell(format!("{} interval", c.conf)),
    ];
    if ratios {
        header.push(cell("ratio"));
        header.push(cell(format!("{} interval", c.conf)));
    }
    // Under many-to-one comparisons the simultaneous interval takes the place of
    // the Tukey–Kramer p, which is a statement about every pair, not this family.
    header.extend([
        cell(adjusted_column),
        cell(if simultaneous {
            format!("simultaneous {} interval", c.conf)
        } else {
            "Tukey–Kramer p".to_string()
        }),
        cell("p before adjustment"),
        cell("t"),
        cell("SE"),
    ]);
    let ends = if simultaneous { "l" } else { "r" };
    let alignment = if ratios {
        format!("llrlrlr{ends}rrr")
    } else {
        format!("llrlr{ends}rrr")
    };
    b.table_aligned(
        header,
        aligns(&alignment),
        r.pairwise_adjusted
            .iter()
            .map(|d| {
                let mut row = vec![
                    pair(&d.a, &d.b),
                    cell(match d.p_adjusted {
                        Some(q) if q < alpha => "yes",
                        Some(_) => "no",
                        None => "n/a",
                    }),
                    cell(num(Some(d.difference))),
                    cell(ci(d.ci)),
                ];
                if ratios {
                    let q = d.ratio.as_ref();
                    row.push(cell(num(q.map(|q| q.value))));
                    row.push(cell(ci(q.and_then(|q| q.ci))));
                }
                row.extend([
                    cell(p(d.p_adjusted)),
                    cell(if simultaneous {
                        ci(d.ci_simultaneous)
                    } else {
                        p(d.p_tukey)
                    }),
                    cell(p(d.p_value)),
                    cell(num(d.t)),
                    cell(num(d.se)),
                ]);
                row
            })
            .collect(),
    );
}
