//! "Where along x the groups differ": Johnson–Neyman regions and differences at
//! chosen covariate values, when the slopes differ.

use super::{Ctx, cell, ci, level, num, p, pair};
use crate::number::sig;
use crate::report::cite::Work;
use crate::report::doc::{Builder, Inline, aligns, t, v};

pub(super) fn section(b: &mut Builder, c: &Ctx) {
    let r = c.r;
    b.section(vec![t("Where along "), v(&c.x), t(" the groups differ")]);
    let simultaneous = r
        .regions
        .first()
        .is_some_and(|g| g.method == "johnson-neyman-simultaneous");
    let range = r
        .regions
        .first()
        .map_or("n/a".into(), |g| ci(Some(g.observed_range)));
    let (how, work) = if simultaneous {
        ("simultaneous over the whole range, ", Work::Potthoff1964)
    } else {
        ("pointwise, ", Work::JohnsonNeyman1936)
    };
    b.para(vec![
        t("With unequal slopes the difference between two groups changes with "),
        v(&c.x),
        t(". For each pair, the "),
        v(&c.x),
        t(format!(
            " values where the difference becomes significant at level {} ({how}",
            level(r.model.alpha)
        )),
        Inline::Cite(work),
        t(format!(
            "), and the stretches of the observed range ({range}) where it is."
        )),
    ]);
    b.table(
        vec![
            cell("pair"),
            cell("bounds"),
            vec![t("groups differ for "), v(&c.x), t(" in")],
        ],
        3,
        r.regions
            .iter()
            .map(|g| {
                let bounds = if g.bounds.is_empty() {
                    "none".to_string()
                } else {
                    g.bounds
                        .iter()
                        .map(|x| sig(*x, 4))
                        .collect::<Vec<_>>()
                        .join(", ")
                };
                let where_ = if g.significant.is_empty() {
                    "nowhere in the observed range".to_string()
                } else {
                    g.significant
                        .iter()
                        .map(|s| ci(Some(*s)))
                        .collect::<Vec<_>>()
                        .join("; ")
                };
                vec![pair(&g.a, &g.b), cell(bounds), cell(where_)]
            })
            .collect(),
    );
    b.subsection(vec![t("Differences at chosen values of "), v(&c.x)]);
    b.para(vec![t(format!(
        "Line of the first group minus line of the second, from the separate-lines model; intervals at {}, unadjusted.",
        c.conf
    ))]);
    b.table_aligned(
        vec![
            cell("pair"),
            vec![v(&c.x)],
            cell("difference"),
            cell("SE"),
            cell(format!("{} interval", c.conf)),
            cell("t"),
            cell("p"),
        ],
        aligns("lrrrlrr"),
        r.differences_at
            .iter()
            .map(|d| {
                vec![
                    pair(&d.a, &d.b),
                    cell(num(Some(d.at))),
                    cell(num(Some(d.difference))),
                    cell(num(d.se)),
                    cell(ci(d.ci)),
                    cell(num(d.t)),
                    cell(p(d.p_value)),
                ]
            })
            .collect(),
    );
}
