//! "In brief": the plain-language summary, written from the decision record alone.
//!
//! Every branch here follows a key of `results.decision` (the gate's outcome, the
//! group effect's, the limits', the findings); no test result is compared with a
//! level in this file, so the summary cannot say what the record does not.

use super::{Ctx, ci, int, level, num, peq, with_unit};
use crate::number::{sig, trimmed};
use crate::report::doc::{Block, Builder, Runs, prose, t, v};
use crate::results::{LimitsReading, MeanPair, Results};

pub(super) fn section(b: &mut Builder, c: &Ctx) {
    let r = c.r;
    let d = &r.decision;
    b.section(vec![t("In brief")]);
    if d.procedure == "lot-pooling"
        && let Some(l) = &d.limits
    {
        b.para(pooling_lead(c, l));
    }
    b.para(gate_paragraph(c));
    if d.procedure != "lot-pooling"
        && let Some(l) = &d.limits
    {
        b.para(limits_sentence(c, l));
    }
    let mut rows = format!(
        "{} of {} data rows entered the fits.",
        r.data.rows_used, r.data.rows_read
    );
    match r.warnings.len() {
        0 => {}
        1 => rows.push_str(" There is one point to watch, listed at the end."),
        n => rows.push_str(&format!(
            " There are {n} points to watch, listed at the end."
        )),
    }
    b.para(vec![t(rows)]);
    findings(b, r);
}

/// The test in words: `F = 0.87 on 3 and 46 df, p = 0.46`.
fn gate_test(r: &Results) -> String {
    let es = &r.equal_slopes;
    if let Some(rb) = r
        .robust
        .as_ref()
        .filter(|rb| rb.equal_slopes.p_value.is_some())
    {
        let w = &rb.equal_slopes;
        return format!(
            "F = {} on {} and {} df with {} covariance, {}",
            num(w.f),
            int(w.df1),
            int(w.df2),
            rb.covariance.to_uppercase(),
            peq(w.p_value)
        );
    }
    match r.decision.gate.outcome.as_str() {
        "exact-fit" => format!(
            "an infinite F on {} and {} df (every line passes exactly through its rows: exact fit), p = 0",
            int(es.df1),
            int(es.df2)
        ),
        "identical" => "no statistic (0/0: no residual variation and identical slopes)".to_string(),
        _ => format!(
            "F = {} on {} and {} df, {}",
            num(es.f),
            int(es.df1),
            int(es.df2),
            peq(es.p_value)
        ),
    }
}

fn gate_paragraph(c: &Ctx) -> Runs {
    let r = c.r;
    let d = &r.decision;
    let es = &r.equal_slopes;
    let test = gate_test(r);
    match d.gate.outcome.as_str() {
        "differ" | "exact-fit" | "not-shown-equivalent" => {
            let mut runs = vec![t(match d.gate.outcome.as_str() {
                "not-shown-equivalent" => format!(
                    "The groups' lines are not shown parallel: the plan asks for every pair of slopes to be shown equivalent within ±{}, and not every pair is (the equal-slopes test gives {test}).",
                    r.equivalence
                        .as_ref()
                        .map_or("n/a".into(), |e| sig(e.margin, 4))
                ),
                "differ" => format!(
                    "The groups' lines are not parallel: the equal-slopes test gives {test}, below the gate's level of {}.",
                    level(es.alpha)
                ),
                _ => format!(
                    "The groups' lines are not parallel: the equal-slopes test gives {test}."
                ),
            })];
            let low = r.groups.iter().min_by(|a, b| a.slope.total_cmp(&b.slope));
            let high = r.groups.iter().max_by(|a, b| a.slope.total_cmp(&b.slope));
            if let (Some(lo), Some(hi)) = (low, high) {
                runs.extend([
                    t(format!(" Slopes run from {} (", num(Some(lo.slope)))),
                    v(&lo.level),
                    t(format!(") to {} (", num(Some(hi.slope)))),
                    v(&hi.level),
                    t(") "),
                ]);
                runs.extend(c.slope_unit());
                runs.push(t("."));
            }
            runs.extend([
                t(" Because the difference between two groups then depends on "),
                v(&c.x),
                t(", the groups are compared by their slopes and by where along "),
                v(&c.x),
                t(" their lines differ."),
            ]);
            runs.push(t(match d.common_slope_tables.as_str() {
                "forced-equal" => {
                    " Results on slopes forced equal are set apart at the end, as a what-if the data do not support."
                }
                _ => " Results on slopes forced equal are left out, as the plan asks.",
            }));
            runs
        }
        "shown-equivalent" => {
            let mut runs = vec![t(format!(
                "The groups' lines can be treated as parallel: every pair of slopes is shown equivalent within ±{} (two one-sided tests at {}; the equal-slopes test gives {test}).",
                r.equivalence
                    .as_ref()
                    .map_or("n/a".into(), |e| sig(e.margin, 4)),
                level(r.model.alpha)
            ))];
            runs.extend(common_slope_runs(c));
            runs
        }
        "identical" => {
            let mut runs = vec![t(format!(
                "The groups' lines are parallel to rounding: the equal-slopes test has {test}, so the slopes are taken as equal because they are identical."
            ))];
            runs.extend(common_slope_runs(c));
            runs
        }
        _ => {
            let mut runs = vec![t(format!(
                "The equal-slopes test does not show the slopes to differ: it gives {test}, at or above the gate's level of {}. That is not evidence that they are equal",
                level(es.alpha)
            ))];
            match d.gate.slope_differences_within {
                Some([lo, hi]) => {
                    runs.push(t(format!(
                        ": at {} the pairwise slope differences the data leave open run from {} to {} ",
                        c.conf,
                        sig(lo, 4),
                        sig(hi, 4)
                    )));
                    runs.extend(c.slope_unit());
                    runs.push(t(
                        " (unadjusted intervals); larger differences are ruled out, smaller ones are not.",
                    ));
                }
                None => runs.push(t(".")),
            }
            if let Some(e) = &r.equivalence {
                runs.push(t(format!(
                    " Against the margin of ±{} (two one-sided tests): {}.",
                    sig(e.margin, 4),
                    equivalence_counts(e)
                )));
            }
            runs.extend(common_slope_runs(c));
            runs
        }
    }
}

/// The common slope and what the adjusted means show.
fn common_slope_runs(c: &Ctx) -> Runs {
    let r = c.r;
    let ge = &r.group_effect;
    let mut runs = vec![t(format!(
        " On a common slope of {} ",
        num(Some(r.common_slope.slope))
    ))];
    runs.extend(c.slope_unit());
    runs.extend(slope_reading(c, r.common_slope.slope));
    runs.extend([t(format!(
        " ({} interval {}), the groups' adjusted means at ",
        c.conf,
        ci(r.common_slope.ci)
    ))]);
    runs.extend(c.x_at(num(Some(r.adjust_at))));
    runs.extend(c.measured(r.adjust_at));
    runs.push(t(" "));
    let effect = format!(
        "(F = {} on {} and {} df, {})",
        num(ge.f),
        int(ge.df1),
        int(ge.df2),
        peq(ge.p_value)
    );
    match r.decision.group_effect.as_str() {
        "not-computable" => runs.push(t("cannot be compared by the group-effect F test (0/0: the parallel lines fit every row exactly and the intercepts agree).")),
        "exact-fit" => runs.push(t(format!(
            "differ (an infinite F on {} and {} df: the parallel lines fit every row exactly, p = 0).",
            int(ge.df1),
            int(ge.df2)
        ))),
        "differ" => {
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
                        " = {} ({} interval {}, adjusted {})",
                        c.y_value(l.difference),
                        c.conf,
                        ci(l.ci),
                        peq(l.p_adjusted)
                    )),
                ]);
                match &l.ratio {
                    Some(q) => runs.extend([
                        t("; on the measured scale of "),
                        v(&r.model.response),
                        t(format!(
                            " the geometric means stand in the ratio {} ({} interval {}).",
                            num(Some(q.value)),
                            c.conf,
                            ci(q.ci)
                        )),
                    ]),
                    None => runs.push(t(".")),
                }
            }
        }
        _ => runs.push(t(format!(
            "are not shown to differ {effect}; that too is not evidence that they are equal."
        ))),
    }
    runs
}

/// The words for the model lot pooling chose.
pub(super) fn pooled_model(model: &str) -> &'static str {
    match model {
        "separate" => "separate lines, one per group",
        "common-slope" => "parallel lines (one slope, each group's own intercept)",
        "pooled" => "one pooled line for all groups",
        _ => "no line",
    }
}

/// Under lot pooling the summary opens with the pooling decision and the crossing.
fn pooling_lead(c: &Ctx, l: &LimitsReading) -> Runs {
    let r = c.r;
    let mut runs = Vec::new();
    if let Some(pool) = &r.pooling {
        let steps = match pool.stopped_at.as_deref() {
            None if pool.rule == "equivalence" => format!(
                "by equivalence (slopes within ±{}{}) chose {}",
                crate::number::sig(pool.slope_margin.unwrap_or(f64::NAN), 4),
                match pool.decision.as_str() {
                    "separate" => ": not every pair shown",
                    "common-slope" => {
                        ", then lines within ±{}: not every pair shown"
                    }
                    _ => ", then lines within ±{}",
                }
                .replace(
                    "{}",
                    &crate::number::sig(pool.intercept_margin.unwrap_or(f64::NAN), 4)
                ),
                pooled_model(&pool.decision)
            ),
            Some(step) => {
                format!("stopped at its {step} step, whose test cannot be computed (0/0)")
            }
            None => format!(
                "at level {} (slopes {}{}) chose {}",
                level(pool.alpha),
                peq(pool.slopes_p),
                if pool.decision == "separate" {
                    String::new()
                } else {
                    format!(", intercepts {}", peq(pool.intercepts_p))
                },
                pooled_model(&pool.decision)
            ),
        };
        runs.push(t(format!("Lot pooling {steps}. ")));
    }
    runs.extend(limits_sentence(c, l));
    runs
}

/// What the limits come to, from the record's limits reading.
pub(super) fn limits_sentence(c: &Ctx, l: &LimitsReading) -> Runs {
    let bound = super::bound_phrase(&l.bound, &l.band, l.confidence);
    let line = |runs: &mut Runs| {
        if let Some(level) = &l.level {
            if level == "pooled" && l.model == "pooled" {
                runs.push(t("of the pooled line"));
            } else {
                runs.extend([t("of "), v(level)]);
            }
        }
    };
    let side = l.side.as_deref().unwrap_or("");
    let limit = l.limit.map_or("n/a".into(), |x| c.y_value(x));
    let mut runs = Vec::new();
    match l.outcome.as_str() {
        "not-decided" => runs.push(t(
            "No line was chosen for the limits, so no crossing is estimated and no period is supported.",
        )),
        "already-crossed" => {
            runs.push(t(format!("The {bound} ")));
            line(&mut runs);
            runs.extend([
                t(format!(
                    " is already past the {side} limit of {limit} at its first observation ("
                )),
            ]);
            runs.extend(c.x_at(num(l.crossing)));
            runs.push(t(
                "): there is no crossing to estimate, and no period is supported.",
            ));
        }
        "crossed-within" | "crossed-beyond" => {
            runs.push(t(format!("The {bound} ")));
            line(&mut runs);
            runs.extend([
                t(format!(" reaches the {side} limit of {limit} first, at ")),
            ]);
            runs.extend(c.x_at(num(l.crossing)));
            let last = c.x_value(l.last_observed.unwrap_or(f64::NAN));
            runs.push(t(if l.outcome == "crossed-within" {
                format!(
                    ", inside the observed data (last observation at {last}): the limit is reached within the study, not by extrapolation."
                )
            } else {
                format!(
                    ", {} beyond the last observation at {last}: an extrapolation.",
                    with_unit(sig(l.beyond.unwrap_or(0.0), 3), &c.x_unit)
                )
            }));
        }
        _ => runs.push(t(format!(
            "No {bound} meets a limit after the first observation."
        ))),
    }
    if l.outcome != "not-decided" && l.outcome != "already-crossed" {
        match l.supported {
            Some(p) => {
                runs.push(t(" Supported period, after any cap and rounded down: "));
                runs.extend(c.x_at(trimmed(p, 4)));
                runs.push(t("."));
            }
            None => runs.push(t(" No period is supported.")),
        }
    }
    runs
}

/// Every failed check with its consequence, or the checks passed in one line.
fn findings(b: &mut Builder, r: &Results) {
    let list = &r.decision.findings;
    if list.is_empty() {
        b.para(vec![t(
            "Checks: none failed (normality of the residuals, equal spread, covariate balance; no row drives the fit).",
        )]);
        return;
    }
    b.para(vec![t(if list.len() == 1 {
        "One check calls for care:"
    } else {
        "These checks call for care:"
    })]);
    b.push(Block::List(
        list.iter()
            .map(|f| {
                let mut runs = prose(&capitalised(&f.statement));
                runs.push(t(": "));
                runs.extend(prose(&f.consequence));
                runs.push(t("."));
                runs
            })
            .collect(),
    ));
}

fn capitalised(s: &str) -> String {
    let mut chars = s.chars();
    match chars.next() {
        Some(first) => first.to_uppercase().chain(chars).collect(),
        None => String::new(),
    }
}

/// "2 pairs shown equivalent, 1 not settled".
fn equivalence_counts(e: &crate::results::Equivalence) -> String {
    let count = |what: &str| e.pairs.iter().filter(|p| p.reading == what).count();
    let parts: Vec<String> = [
        ("shown-equivalent", "shown equivalent"),
        ("shown-different", "shown to differ by more than the margin"),
        ("not-settled", "not settled"),
    ]
    .iter()
    .filter_map(|(key, words)| {
        let n = count(key);
        (n > 0).then(|| format!("{n} pair{} {words}", if n == 1 { "" } else { "s" }))
    })
    .collect();
    parts.join(", ")
}

/// How a slope reads on the measured scale, for transformed columns: an elasticity,
/// or a factor per covariate unit.
fn slope_reading(c: &Ctx, slope: f64) -> Runs {
    let r = c.r;
    match r.model.slope_reading.as_str() {
        "elasticity" => vec![
            t(" (an elasticity: 1 % more "),
            v(&r.model.covariate),
            t(format!(" goes with about {} % more ", num(Some(slope)))),
            v(&r.model.response),
            t(")"),
        ],
        "ratio-per-unit" => {
            let factor = match r.model.response_transform.as_str() {
                "log10" => 10f64.powf(slope),
                _ => slope.exp(),
            };
            vec![
                t(" (each unit of "),
                v(&r.model.covariate),
                t(" multiplies "),
                v(&r.model.response),
                t(format!(" by {})", num(Some(factor)))),
            ]
        }
        "per-log-unit" => {
            let step = match r.model.covariate_transform.as_str() {
                "log10" => 1.01f64.log10(),
                _ => 1.01f64.ln(),
            };
            vec![
                t(" (1 % more "),
                v(&r.model.covariate),
                t(format!(
                    " goes with about {} more ",
                    num(Some(slope * step))
                )),
                v(&r.model.response),
                t(")"),
            ]
        }
        _ => Vec::new(),
    }
}
