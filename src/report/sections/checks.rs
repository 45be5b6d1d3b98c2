//! "Checking the assumptions": normality, equal spread, covariate balance,
//! influential rows, and the rerun without them.

use super::{Ctx, cell, ci, int, lead, num, num3, p, peq, vcell};
use crate::number::sig;
use crate::report::cite::Work;
use crate::report::doc::{Align, Builder, Inline, t, v};

pub(super) fn section(b: &mut Builder, c: &Ctx) {
    let r = c.r;
    let ch = &r.checks;
    b.section(vec![t("Checking the assumptions")]);
    if !ch.not_run.is_empty() {
        // A moments file: the residuals were never seen.
        b.para(lead(
            "Not checked.",
            vec![t(
                "The data were per-group moments (data.moments), without rows, so the residuals' normality and equal spread, and the rows that drive the fit, could not be checked. The tests and intervals assume all three; run the plan on the rows (data.path) to check them before relying on the results.",
            )],
        ));
        covariate_balance(b, c);
        return;
    }
    let n = &ch.normality;
    b.para(lead(
        "Normal residuals.",
        vec![t(format!(
            "Shapiro–Wilk on the residuals of the separate lines: W = {}, {}, on {} residuals{}.",
            num(n.statistic),
            peq(n.p_value),
            n.n,
            if n.subsampled {
                format!(
                    " (a fixed-seed random subsample of the {} residuals: the method covers at most 5000 values)",
                    n.residuals
                )
            } else {
                String::new()
            }
        ))],
    ));
    b.table(
        vec![vcell(&c.g), cell("residuals tested"), cell("W"), cell("p")],
        1,
        n.groups
            .iter()
            .map(|gn| {
                vec![
                    vcell(&gn.level),
                    cell(if gn.not_tested.is_some() {
                        "too few rows to check".to_string()
                    } else {
                        format!(
                            "{}{}",
                            gn.n,
                            if gn.subsampled { " (subsample)" } else { "" }
                        )
                    }),
                    cell(num(gn.statistic)),
                    cell(p(gn.p_value)),
                ]
            })
            .collect(),
    );
    let ev = &ch.equal_variance;
    b.para(lead(
        "Equal spread.",
        vec![t(format!(
            "Brown–Forsythe test across groups: F = {} on {} and {} df, {}.",
            num(ev.statistic),
            int(ev.df1),
            int(ev.df2),
            peq(ev.p_value)
        ))],
    ));
    covariate_balance(b, c);
    influence(b, c);
}

/// The covariate's spread across groups, from the moments alone.
fn covariate_balance(b: &mut Builder, c: &Ctx) {
    let cb = &c.r.checks.covariate_balance;
    let mut balance = vec![
        v(&c.x),
        t(format!(
            " across groups: F = {} on {} and {} df, {}. ",
            num(cb.f),
            int(cb.df1),
            int(cb.df2),
            peq(cb.p_value)
        )),
    ];
    match cb.overlap {
        Some(o) => balance.extend([
            t("Every group covers "),
            v(&c.x),
            t(format!(" from {}.", ci(Some(o)))),
        ]),
        None => balance.extend([t("No range of "), v(&c.x), t(" is covered by every group.")]),
    }
    b.para(lead("Covariate balance.", balance));
}

/// The rows that drive the fit, and the rerun without them.
fn influence(b: &mut Builder, c: &Ctx) {
    let r = c.r;
    let inf = &r.checks.influence;
    b.para(lead(
        "Influential rows.",
        vec![t(format!(
            "Measured on the {} model the decision selected. Cut-offs (common practice): leverage above {} (2p/n), Cook's distance above {} (4/n), |externally studentized residual| above {}. Largest Cook's distance {}, largest leverage {}; {} row{} beyond a cut-off{}.",
            if inf.model == "common-slope" { "parallel-lines" } else { "separate-lines" },
            sig(inf.cutoffs.leverage, 3),
            sig(inf.cutoffs.cooks_distance, 3),
            sig(inf.cutoffs.studentized_residual, 2),
            num3(inf.max_cooks_distance),
            num3(inf.max_leverage),
            inf.flagged_total,
            if inf.flagged_total == 1 { "" } else { "s" },
            if inf.flagged_total > inf.flagged.len() as u64 {
                format!(" (the {} with the largest Cook's distance listed)", inf.flagged.len())
            } else {
                String::new()
            }
        ))],
    ));
    if !inf.flagged.is_empty() {
        b.table_aligned(
            vec![
                cell("data row"),
                vcell(&c.g),
                cell("Cook's distance"),
                cell("leverage"),
                cell("studentized residual"),
                cell("drives the fit?"),
            ],
            vec![
                Align::Right,
                Align::Left,
                Align::Right,
                Align::Right,
                Align::Right,
                Align::Left,
            ],
            inf.flagged
                .iter()
                .map(|f| {
                    vec![
                        cell(f.row.to_string()),
                        vcell(&f.level),
                        cell(num3(f.cooks_distance)),
                        cell(num3(Some(f.leverage))),
                        cell(num3(f.studentized_residual)),
                        cell(if f.matters {
                            "yes"
                        } else if f.why.iter().all(|w| w == "leverage") {
                            "no: leverage only"
                        } else {
                            "no"
                        }),
                    ]
                })
                .collect(),
        );
    }
    if let (Some(cm), Some(tb)) = (
        inf.cutoffs.cooks_distance_matters,
        inf.cutoffs.studentized_bonferroni,
    ) {
        b.para(vec![
            t(format!(
                "A row drives the fit when its Cook's distance exceeds {} (the median of F on p and n − p df; ",
                sig(cm, 3)
            )),
            Inline::Cite(Work::Cook1977),
            t("; "),
            Inline::Cite(Work::CookWeisberg1982),
            t(format!(
                ") or its |externally studentized residual| exceeds {} (the Bonferroni t quantile over all n rows at the plan's level, an outlier test; ",
                sig(tb, 3),
            )),
            Inline::Cite(Work::Weisberg1985),
            t(format!(
                "). {} row{} drive{} the fit{}.",
                inf.matters_total,
                if inf.matters_total == 1 { "" } else { "s" },
                if inf.matters_total == 1 { "s" } else { "" },
                if inf.matters_total > 0 && r.sensitivity.is_some() {
                    "; the refit without them follows"
                } else {
                    ""
                }
            )),
        ]);
    }
    if let Some(s) = &r.sensitivity {
        b.subsection(vec![t("Without the rows that drive the fit")]);
        let kept = s.rows_kept_leverage_only;
        b.para(vec![
            t(format!(
                "The same procedure on {} rows, leaving out the {} rows that drive the fit; {kept} row{} beyond the leverage cut-off alone {} kept (leverage marks where a row sits on ",
                s.rows_used,
                s.rows_removed,
                if kept == 1 { "" } else { "s" },
                if kept == 1 { "is" } else { "are" },
            )),
            v(&c.x),
            t(", not how it fits). Adjusted means are taken at "),
            v(&c.x),
            t(format!(" = {}, as for all rows.", sig(s.adjust_at, 4))),
        ]);
        let yes = |x: bool| cell(if x { "yes" } else { "no" });
        let mut rows = vec![
            vec![
                cell("equal-slopes F"),
                cell(num(r.equal_slopes.f)),
                cell(num(s.equal_slopes.f)),
            ],
            vec![
                cell("equal-slopes p"),
                cell(p(r.equal_slopes.p_value)),
                cell(p(s.equal_slopes.p_value)),
            ],
            vec![
                cell("compared on a common slope"),
                yes(r.decision.homogeneous),
                yes(s.decision.homogeneous),
            ],
            vec![
                cell("common slope"),
                cell(num(Some(r.common_slope.slope))),
                cell(num(Some(s.common_slope.slope))),
            ],
            vec![
                cell("group-effect p"),
                cell(p(r.group_effect.p_value)),
                cell(p(s.group_effect.p_value)),
            ],
        ];
        for l in &r.groups {
            let other = s
                .groups
                .iter()
                .find(|o| o.level == l.level)
                .map(|o| o.slope);
            rows.push(vec![
                vec![t("slope of "), v(&l.level)],
                cell(num(Some(l.slope))),
                cell(if other.is_some() {
                    num(other)
                } else {
                    String::new()
                }),
            ]);
        }
        for m in &r.adjusted_means {
            let other = s
                .adjusted_means
                .iter()
                .find(|o| o.level == m.level)
                .map(|o| o.mean);
            rows.push(vec![
                vec![t("adjusted mean of "), v(&m.level)],
                cell(num(Some(m.mean))),
                cell(if other.is_some() {
                    num(other)
                } else {
                    String::new()
                }),
            ]);
        }
        b.table(
            vec![cell("quantity"), cell("all rows"), cell("without them")],
            1,
            rows,
        );
    }
}
