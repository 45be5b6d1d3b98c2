//! "When the mean reaches a limit": lot pooling and crossing points.

use super::{Ctx, cell, level, num3, p, vcell};
use crate::number::{sig, trimmed};
use crate::report::cite::Work;
use crate::report::doc::{Builder, Inline, t, v};

pub(super) fn section(b: &mut Builder, c: &Ctx) {
    let r = c.r;
    b.section(vec![t("When the mean reaches a limit")]);
    if let Some(pool) = r.pooling.as_ref().filter(|p| p.rule == "equivalence") {
        equivalence_pooling(b, c, pool);
    } else if let Some(pool) = &r.pooling {
        b.para(vec![
            t("Lines were pooled step by step ("),
            Inline::Cite(Work::IchQ1e2003),
            t(format!("), each test at level {}:", level(pool.alpha))),
        ]);
        let (one, two) = match (pool.decision.as_str(), pool.stopped_at.as_deref()) {
            ("separate", _) => ("yes: separate lines", "not needed"),
            ("common-slope", _) => ("no: one slope", "yes: parallel lines"),
            (_, Some("slopes")) => ("test not computable (0/0): stopped", "not reached"),
            (_, Some(_)) => ("no: one slope", "test not computable (0/0): stopped"),
            _ => ("no: one slope", "no: one pooled line"),
        };
        b.table(
            vec![cell("step"), cell("question"), cell("p"), cell("outcome")],
            2,
            vec![
                vec![
                    cell("1"),
                    cell("do the slopes differ?"),
                    cell(p(pool.slopes_p)),
                    cell(one),
                ],
                vec![
                    cell("2"),
                    cell("given one slope, do the intercepts differ?"),
                    cell(p(pool.intercepts_p)),
                    cell(two),
                ],
            ],
        );
        // The outcome column is text: align it left as the step and question are.
        if let Some(crate::report::doc::Block::Table(tb)) = b.blocks.last_mut() {
            tb.align[3] = crate::report::doc::Align::Left;
        }
    }
    // The section opens with the sentence the summary gives: one reading of the
    // limits, from the decision record.
    if let Some(reading) = &r.decision.limits {
        b.para(super::summary::limits_sentence(c, reading));
    }
    let model = r.limits.first().map_or("", |l| l.model.as_str());
    let two_sided = r.limits.first().is_some_and(|l| l.two_sided);
    let simultaneous = r.limits.first().is_some_and(|l| l.band == "simultaneous");
    let phrase = r.limits.first().map_or(String::new(), |l| {
        super::bound_phrase(&l.bound, &l.band, l.confidence)
    });
    b.para(vec![
        t("Each crossing is the "),
        v(&c.x),
        t(format!(" value where the {phrase} of ")),
        v(&c.y),
        t(format!(
            " meets the limit, read from {}.",
            match model {
                "not-decided" => "no line: the pooling steps stopped before choosing one",
                "pooled" => "the one pooled line",
                "common-slope" => "the parallel lines (one slope, each group's own intercept)",
                _ => "each group's own line and residual variance",
            }
        )),
    ]);
    if simultaneous && let Some(crate::report::doc::Block::Paragraph(runs)) = b.blocks.last_mut() {
        runs.extend([
            t(" The band ("),
            Inline::Cite(Work::WorkingHotelling1929),
            t(") holds for every covariate value of a line at once, both sides together, so a crossing read from it holds wherever along the line it falls; for one limit it is conservative."),
        ]);
    }
    if two_sided
        && !simultaneous
        && let Some(crate::report::doc::Block::Paragraph(runs)) = b.blocks.last_mut()
    {
        runs.extend([
            t(" With both limits, each side uses the one-sided level (1 + confidence)/2, so the two sides together hold at the plan's confidence ("),
            Inline::Cite(Work::IchQ1e2003),
            t(")."),
        ]);
    }
    b.table(
        vec![
            cell("line"),
            cell("limit"),
            vec![t("crossing at "), v(&c.x)],
            vec![t("last observed "), v(&c.x)],
            cell("beyond the data by"),
        ],
        2,
        r.limits
            .iter()
            .map(|l| {
                vec![
                    vcell(&l.level),
                    cell(format!("{} {}", l.side, sig(l.limit, 4))),
                    cell(match (l.crossing, l.reason.as_deref()) {
                        (Some(x), _) => sig(x, 4),
                        (None, Some("beyond-at-start")) => {
                            "none: already past the limit at the first observation".into()
                        }
                        (None, Some("not-decided")) => {
                            "none: no line chosen (pooling stopped)".into()
                        }
                        _ => "none: the bound never meets the limit".into(),
                    }),
                    cell(sig(l.observed_max, 4)),
                    cell(match (l.crossing, l.extrapolated) {
                        (Some(_), true) => format!("{} (extrapolated)", num3(l.beyond)),
                        (Some(_), false) => "crossed within the data".into(),
                        (None, _) => "n/a".into(),
                    }),
                ]
            })
            .collect(),
    );
    for e in &r.limits_earliest {
        if e.already_beyond {
            b.para(vec![
                t(format!("Earliest past the {} limit: ", e.side)),
                v(&e.level),
                t(", already at its first observation ("),
                v(&c.x),
                t(format!(" = {}).", sig(e.crossing, 4))),
            ]);
        } else {
            b.para(vec![
                t(format!("Earliest {}-limit crossing: ", e.side)),
                v(&e.level),
                t(" at "),
                v(&c.x),
                t(format!(" = {}.", sig(e.crossing, 4))),
            ]);
        }
    }
    if let Some(s) = &r.limits_supported {
        let mut runs = vec![t("Supported period: ")];
        match s.supported {
            Some(p) => runs.extend([
                v(&c.x),
                t(format!(
                    " = {}, rounded down to a step of {}",
                    trimmed(p, 4),
                    trimmed(s.round_to, 4)
                )),
            ]),
            None => runs.push(t(match s.reason.as_deref() {
                Some("beyond-at-start") => {
                    "none, a line is past the limit from its first observation"
                }
                Some("never-within") => {
                    "none, no bound meets a limit and the plan gives no extrapolation rule"
                }
                _ => "none, no line was chosen",
            })),
        }
        runs.push(t(". Raw crossing: "));
        match (s.raw_crossing, &s.limiting_level, &s.limiting_side) {
            (Some(x), Some(level), Some(side)) => runs.extend([
                t(format!("{} (", sig(x, 4))),
                v(level),
                t(format!(", {side} limit)")),
            ]),
            (Some(x), _, _) => runs.push(t(sig(x, 4))),
            _ => runs.push(t("none")),
        }
        runs.extend([t("; the data cover "), v(&c.x)]);
        runs.push(t(format!(
            " up to {}; cap: {}, because {}.",
            sig(s.covered, 4),
            match s.cap {
                Some(cap) if s.capped => format!("{}, which sets the period", sig(cap, 4)),
                Some(cap) => sig(cap, 4),
                None => "none".into(),
            },
            s.cap_reason
        )));
        b.para(runs);
    }
    b.para(vec![
        t("These estimates support, and do not replace, the evaluation that the applicable guidance (for stability data, "),
        Inline::Cite(Work::IchQ1e2003),
        t(") and a qualified person require. Whether, and how far, an estimate may be extrapolated beyond the observed data is for that guidance to decide."),
    ]);
}

/// Equivalence-based pooling: the two steps with their margins and outcomes, then
/// the pairs of each step that ran.
fn equivalence_pooling(b: &mut Builder, c: &Ctx, pool: &crate::results::Pooling) {
    let alpha = pool.equivalence_alpha.unwrap_or(c.r.model.alpha);
    let slope_margin = sig(pool.slope_margin.unwrap_or(f64::NAN), 4);
    let line_margin = sig(pool.intercept_margin.unwrap_or(f64::NAN), 4);
    let intro = vec![
        t("Lines were pooled step by step by equivalence ("),
        Inline::Cite(Work::Llabres2000),
        t("; "),
        Inline::Cite(Work::TsongChenChen2003),
        t(format!(
            "): a step pools only when every pair of groups is shown within its margin by two one-sided tests at {} each (",
            level(alpha)
        )),
        Inline::Cite(Work::Schuirmann1987),
        t(format!(
            "), its {}% interval inside ±margin; a pair not shown equivalent keeps the groups apart. The tests of difference (p = {} for the slopes, {} for the intercepts) are given for comparison and decide nothing here.",
            trimmed(100.0 * (1.0 - 2.0 * alpha), 4),
            p(pool.slopes_p),
            p(pool.intercepts_p)
        )),
    ];
    b.para(intro);
    let count = |pairs: &[crate::results::EquivalencePair]| {
        let shown = pairs
            .iter()
            .filter(|q| q.reading == "shown-equivalent")
            .count();
        format!("{shown} of {}", pairs.len())
    };
    let (one, two) = match pool.decision.as_str() {
        "separate" => ("no: separate lines", "not reached"),
        "common-slope" => ("yes: one slope", "no: parallel lines"),
        _ => ("yes: one slope", "yes: one pooled line"),
    };
    let mut slope_q = vec![t(format!("are the slopes within ±{slope_margin} "))];
    slope_q.extend(c.slope_unit());
    slope_q.push(t("?"));
    let line_q = vec![t(format!(
        "given one slope, are the lines within ±{}?",
        super::with_unit(line_margin.clone(), &c.y_unit)
    ))];
    b.table(
        vec![
            cell("step"),
            cell("question"),
            cell("pairs shown equivalent"),
            cell("outcome"),
        ],
        2,
        vec![
            vec![
                cell("1"),
                slope_q,
                cell(count(&pool.slope_pairs)),
                cell(one),
            ],
            vec![
                cell("2"),
                line_q,
                cell(if pool.intercept_pairs.is_empty() {
                    "not reached".to_string()
                } else {
                    count(&pool.intercept_pairs)
                }),
                cell(two),
            ],
        ],
    );
    if let Some(crate::report::doc::Block::Table(tb)) = b.blocks.last_mut() {
        tb.align[3] = crate::report::doc::Align::Left;
    }
    b.para(vec![t("Step 1, slope differences, first − second:")]);
    super::gate::equivalence_table(b, &pool.slope_pairs, &slope_margin, alpha);
    if !pool.intercept_pairs.is_empty() {
        b.para(vec![t(
            "Step 2, distances between the parallel lines (differences of intercepts on the common slope), first − second:",
        )]);
        super::gate::equivalence_table(b, &pool.intercept_pairs, &line_margin, alpha);
    }
}
