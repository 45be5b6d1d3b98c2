//! The decision record: what the gate decided, how the group effect, the pooling
//! steps and the limits came out, which sections the report shows in which order,
//! and every failed check. The report's summary, its section choice and `diff` are
//! written from this record alone, so none of them decides anything on its own.
//!
//! Slopes are taken as homogeneous when the equal-slopes p-value is at least
//! `slopes_alpha`. Then the groups are compared on a common slope (adjusted means)
//! and the report leads with that; a p-value at or above the level is not evidence of
//! equal slopes, so the record keeps the range of slope differences the pairwise
//! intervals leave open. Otherwise the lines cross somewhere, a single adjusted-mean
//! difference depends on where it is taken, and the report leads with the slopes
//! themselves; the common-slope tables move to a what-if section or are left out.

use super::findings::{self, Found};
use crate::number::{p_equation, sig, trimmed};
use crate::plan::{ForcedEqual, Plan, Procedure};
use crate::results::{
    Decision, DecisionModels, Finding, GateReading, LimitCrossing, LimitsReading, Results,
};

/// What the comparison leads with when slopes are equal.
pub const LEAD_COMMON: &str = "common-slope";
/// What the comparison leads with when slopes differ.
pub const LEAD_SEPARATE: &str = "separate-slopes";

/// A decision to be filled in by [`conclude`].
pub(super) fn placeholder() -> Decision {
    Decision {
        homogeneous: false,
        lead: String::new(),
        reason: String::new(),
        models: DecisionModels::default(),
        gate: GateReading::default(),
        equivalence: None,
        group_effect: String::new(),
        procedure: String::new(),
        limits: None,
        common_slope_tables: String::new(),
        sections: Vec::new(),
        findings: Vec::new(),
    }
}

/// Fills in the decision and the warnings. `limits_model` is the model the limits'
/// crossings were read from, when the plan has limits.
pub(super) fn conclude(
    plan: &Plan,
    mut r: Results,
    mut warnings: Vec<String>,
    limits_model: Option<&str>,
) -> Results {
    let homogeneous = r.equal_slopes.homogeneous;
    let gate = gate_reading(&r);
    let reason = reason(&r, &gate, plan.tests.alpha);
    let lead = if homogeneous {
        LEAD_COMMON
    } else {
        LEAD_SEPARATE
    };
    let models = models(lead, &r.checks.influence.model, limits_model);

    let mut found: Vec<Found> = Vec::new();
    if let Some(pool) = r.pooling.as_ref().filter(|p| p.stopped_at.is_some()) {
        found.push(Found {
            finding: Finding {
                check: "pooling-stopped".into(),
                level: None,
                p_value: None,
                statement: format!(
                    "lot pooling stopped at its {} step (a test that cannot be computed, 0/0)",
                    pool.stopped_at.as_deref().unwrap_or("first")
                ),
                consequence: "no line was chosen for the limits, so no crossing is estimated"
                    .into(),
            },
            // The statement itself is already first among the warnings.
            warning: String::new(),
        });
    }
    if !models.agree
        && let (Some(pooling), Some(limits)) = (&r.pooling, limits_model)
        && limits != "not-decided"
    {
        found.push(Found {
            finding: Finding {
                check: "levels-disagree".into(),
                level: None,
                p_value: r.equal_slopes.p_value,
                statement: if pooling.rule == "equivalence" {
                    "the equal-slopes gate and equivalence-based lot pooling lead to different models".into()
                } else {
                    "the plan's two levels (slopes_alpha and pooling_alpha) lead to different models".into()
                },
                consequence: "the comparisons and the limits rest on different lines; read each section with its model in mind".into(),
            },
            warning: if pooling.rule == "equivalence" {
                rules_disagree(&r, homogeneous, limits)
            } else {
                levels_disagree(&r, pooling.alpha, homogeneous, limits)
            },
        });
    }
    if let Some(rb) = r.robust.as_ref().filter(|rb| rb.disagree) {
        let classical = r
            .equal_slopes
            .p_value
            .map_or("no p-value".into(), p_equation);
        let robust = rb
            .equal_slopes
            .p_value
            .map_or("no p-value".into(), p_equation);
        let cov = rb.covariance.to_uppercase();
        found.push(Found {
            finding: Finding {
                check: "covariance-disagrees".into(),
                level: None,
                p_value: rb.equal_slopes.p_value,
                statement: format!(
                    "the classical equal-slopes test ({classical}) and the {cov} test ({robust}) decide differently"
                ),
                consequence: format!(
                    "the decision follows the {cov} test, as the plan asks; the difference comes from residual spreads that differ between rows, so read the residual checks"
                ),
            },
            warning: format!(
                "The classical equal-slopes F test gives {classical} and the {cov} Wald test gives {robust}: at slopes_alpha = {} they decide differently. The report follows the {cov} test, as the plan asks (tests.covariance); the classical result is shown beside it.",
                trimmed(r.equal_slopes.alpha, 4)
            ),
        });
    }
    found.extend(findings::checks(plan, &r, homogeneous));
    let limits = limits_model.map(|m| limits_reading(m, &r.limits, &r));
    if let Some(l) = &limits {
        found.extend(limit_findings(l, &r.limits));
    }

    // Warnings keep their old order: a stop of the pooling steps first, then a
    // disagreement of the levels, then what the steps above pushed, then the checks.
    let mut ordered = Vec::new();
    let (first, rest): (Vec<&Found>, Vec<&Found>) = found
        .iter()
        .partition(|f| f.finding.check == "levels-disagree");
    let stop = plan
        .limits
        .is_some()
        .then(|| r.pooling.as_ref().and_then(|p| p.stopped_at.as_ref()))
        .flatten()
        .is_some();
    if stop && !warnings.is_empty() {
        ordered.push(warnings.remove(0));
    }
    ordered.extend(first.iter().map(|f| f.warning.clone()));
    ordered.append(&mut warnings);
    ordered.extend(
        rest.iter()
            .filter(|f| !f.warning.is_empty() && !f.finding.check.starts_with("limit-"))
            .map(|f| f.warning.clone()),
    );

    let common_slope_tables = match (homogeneous, plan.report.forced_equal) {
        (true, _) => "main",
        (false, ForcedEqual::Section) => "forced-equal",
        (false, ForcedEqual::Omit) => "omitted",
    };
    r.decision = Decision {
        homogeneous,
        lead: lead.to_string(),
        reason,
        models,
        group_effect: group_effect_reading(&r),
        gate,
        equivalence: r.equivalence.as_ref().map(|e| e.reading.clone()),
        procedure: match plan.tests.procedure {
            Procedure::EqualSlopesGate => "equal-slopes-gate",
            Procedure::LotPooling => "lot-pooling",
        }
        .into(),
        sections: sections(
            homogeneous,
            common_slope_tables,
            limits.is_some(),
            r.robust.is_some(),
        ),
        limits,
        common_slope_tables: common_slope_tables.into(),
        findings: found.into_iter().map(|f| f.finding).collect(),
    };
    r.warnings = ordered;
    r
}

/// The gate's outcome and the slope differences its pairwise intervals leave open.
fn gate_reading(r: &Results) -> GateReading {
    let es = &r.equal_slopes;
    let equivalence_gate = r
        .equivalence
        .as_ref()
        .is_some_and(|e| e.gate == "equivalence");
    let outcome = match es.status.as_str() {
        "exact-fit" => "exact-fit",
        "not-computable" => "identical",
        _ if equivalence_gate && es.homogeneous => "shown-equivalent",
        _ if equivalence_gate => "not-shown-equivalent",
        _ if es.homogeneous => "not-shown-to-differ",
        _ => "differ",
    };
    let mut within: Option<[f64; 2]> = None;
    let mut widest: Option<(f64, [String; 2])> = None;
    // The intervals of the covariance the gate decided on.
    let pairs: Vec<(&str, &str, Option<[f64; 2]>)> = match &r.robust {
        Some(rb) => rb
            .pairwise_slopes
            .iter()
            .map(|p| (p.a.as_str(), p.b.as_str(), p.ci))
            .collect(),
        None => r
            .pairwise_slopes
            .iter()
            .map(|p| (p.a.as_str(), p.b.as_str(), p.ci))
            .collect(),
    };
    for (a, b, ci) in pairs {
        let Some([lo, hi]) = ci else {
            continue;
        };
        within = Some(match within {
            None => [lo, hi],
            Some([a, b]) => [a.min(lo), b.max(hi)],
        });
        let reach = lo.abs().max(hi.abs());
        if widest.as_ref().is_none_or(|(w, _)| reach > *w) {
            widest = Some((reach, [a.to_string(), b.to_string()]));
        }
    }
    GateReading {
        outcome: outcome.into(),
        slope_differences_within: within,
        widest_pair: widest.map(|(_, pair)| pair),
    }
}

/// Why the report compares the groups as it does, in one paragraph.
fn reason(r: &Results, gate: &GateReading, alpha: f64) -> String {
    let es = &r.equal_slopes;
    let level = trimmed(es.alpha, 4);
    let p_text = match r
        .robust
        .as_ref()
        .filter(|rb| rb.equal_slopes.p_value.is_some())
    {
        Some(rb) => format!(
            "{} with {} covariance",
            rb.equal_slopes
                .p_value
                .map_or("no p-value".to_string(), p_equation),
            rb.covariance.to_uppercase()
        ),
        None => es.p_value.map_or("no p-value".to_string(), p_equation),
    };
    let margin = r
        .equivalence
        .as_ref()
        .map_or(String::new(), |e| sig(e.margin, 4));
    match gate.outcome.as_str() {
        "shown-equivalent" => format!(
            "Every pair of slopes is shown equivalent within the margin of ±{margin} (two one-sided tests at {}), so the groups are compared on a common slope.",
            trimmed(alpha, 4)
        ),
        "not-shown-equivalent" => format!(
            "The plan compares the groups on a common slope only when every pair of slopes is shown equivalent within ±{margin}; not every pair is (two one-sided tests at {}), so the groups are compared by their slopes. The equal-slopes test gives {p_text}.",
            trimmed(alpha, 4)
        ),
        "identical" => "The equal-slopes test cannot be computed (no residual variation and no slope difference, 0/0); the slopes are identical to rounding, so the groups are compared on a common slope.".to_string(),
        "exact-fit" => "The equal-slopes test gives an infinite F (every line passes exactly through its rows: exact fit), p = 0, so the slopes differ and the groups are compared by their slopes.".to_string(),
        "differ" => format!(
            "The equal-slopes test gives {p_text}, below slopes_alpha = {level}, so the slopes differ and the groups are compared by their slopes."
        ),
        _ => {
            let open = match gate.slope_differences_within {
                Some([lo, hi]) => format!(
                    " At {}% the pairwise slope differences the data leave open run from {} to {} (unadjusted intervals); differences beyond that range are ruled out, smaller ones are not.",
                    trimmed(100.0 * (1.0 - alpha), 4),
                    sig(lo, 4),
                    sig(hi, 4)
                ),
                None => String::new(),
            };
            format!(
                "The equal-slopes test gives {p_text}, at or above slopes_alpha = {level}: the data do not show the slopes to differ. That is not evidence that they are equal.{open} The groups are compared on a common slope."
            )
        }
    }
}

/// How the group effect on a common slope came out.
fn group_effect_reading(r: &Results) -> String {
    let ge = &r.group_effect;
    match ge.status.as_str() {
        "exact-fit" => "exact-fit",
        "not-computable" => "not-computable",
        _ if ge.p_value.is_some_and(|p| p < r.model.alpha) => "differ",
        _ => "not-shown-to-differ",
    }
    .into()
}

/// The report's sections in reading order, by key.
fn sections(
    homogeneous: bool,
    common_slope_tables: &str,
    limits: bool,
    robust: bool,
) -> Vec<String> {
    let mut s = vec!["summary", "rows", "lines", "gate", "slope-pairs"];
    if robust {
        s.push("robust");
    }
    s.push(if homogeneous {
        "common-slope"
    } else {
        "regions"
    });
    if limits {
        s.push("limits");
    }
    s.push("checks");
    s.push("next-season");
    if common_slope_tables == "forced-equal" {
        s.push("forced-equal");
    }
    s.extend(["figures", "warnings", "methods", "provenance"]);
    s.into_iter().map(str::to_string).collect()
}

/// What the limits come to under `model`: the line and side that set the outcome.
fn limits_reading(model: &str, lines: &[LimitCrossing], r: &Results) -> LimitsReading {
    let first = lines.first();
    let mut reading = LimitsReading {
        model: model.to_string(),
        outcome: "never".into(),
        bound: first.map_or("mean".into(), |l| l.bound.clone()),
        band: first.map_or("pointwise".into(), |l| l.band.clone()),
        confidence: first.map_or(0.0, |l| l.confidence),
        supported: r.limits_supported.as_ref().and_then(|s| s.supported),
        ..LimitsReading::default()
    };
    if model == "not-decided" {
        reading.outcome = "not-decided".into();
        return reading;
    }
    let set = |reading: &mut LimitsReading, l: &LimitCrossing, at: f64, outcome: &str| {
        reading.outcome = outcome.into();
        reading.level = Some(l.level.clone());
        reading.side = Some(l.side.clone());
        reading.limit = Some(l.limit);
        reading.crossing = Some(at);
        reading.last_observed = Some(l.observed_max);
        reading.beyond = Some((at - l.observed_max).max(0.0));
    };
    // A line already past its limit settles the question before any crossing does.
    let already = lines
        .iter()
        .filter(|l| l.reason.as_deref() == Some("beyond-at-start"))
        .min_by(|a, b| a.observed_min.total_cmp(&b.observed_min));
    if let Some(l) = already {
        set(&mut reading, l, l.observed_min, "already-crossed");
        return reading;
    }
    let earliest = lines
        .iter()
        .filter_map(|l| l.crossing.map(|c| (c, l)))
        .min_by(|a, b| a.0.total_cmp(&b.0));
    if let Some((c, l)) = earliest {
        let outcome = if c <= l.observed_max {
            "crossed-within"
        } else {
            "crossed-beyond"
        };
        set(&mut reading, l, c, outcome);
    }
    reading
}

/// Limits already reached at the start or inside the data are findings of their own.
fn limit_findings(reading: &LimitsReading, lines: &[LimitCrossing]) -> Vec<Found> {
    let mut out = Vec::new();
    for l in lines {
        let (check, statement, consequence) = match (l.reason.as_deref(), l.crossing) {
            (Some("beyond-at-start"), _) => (
                "limit-already-crossed",
                format!(
                    "the bound of `{}` is already past the {} limit {} at its first observation ({})",
                    l.level,
                    l.side,
                    sig(l.limit, 4),
                    sig(l.observed_min, 4)
                ),
                "there is no crossing to estimate for that line, and no period is supported",
            ),
            (_, Some(c)) if c <= l.observed_max => (
                "limit-crossed-within",
                format!(
                    "the bound of `{}` crosses the {} limit {} at {}, inside its observed data (last observation {})",
                    l.level,
                    l.side,
                    sig(l.limit, 4),
                    sig(c, 4),
                    sig(l.observed_max, 4)
                ),
                "the limit is reached within the study, not by extrapolation",
            ),
            _ => continue,
        };
        out.push(Found {
            finding: Finding {
                check: check.into(),
                level: Some(l.level.clone()),
                p_value: None,
                statement,
                consequence: consequence.into(),
            },
            warning: String::new(),
        });
    }
    // Keep the line that sets the outcome first.
    if let Some(level) = &reading.level {
        out.sort_by_key(|f| f.finding.level.as_ref() != Some(level));
    }
    out
}

/// The model of each part of the report. The gate and lot pooling agree when the
/// limits use separate lines exactly when the comparisons use separate slopes.
fn models(lead: &str, influence: &str, limits: Option<&str>) -> DecisionModels {
    let agree = match limits {
        None => true,
        Some("separate") => lead == LEAD_SEPARATE,
        Some("common-slope") | Some("pooled") => lead == LEAD_COMMON,
        Some(_) => false,
    };
    DecisionModels {
        comparisons: lead.to_string(),
        influence: influence.to_string(),
        limits: limits.map(str::to_string),
        agree,
    }
}

/// The statement that the plan's two levels led to different models.
fn levels_disagree(r: &Results, pooling_alpha: f64, homogeneous: bool, limits: &str) -> String {
    let gate = &r.equal_slopes;
    let p = gate.p_value.map_or("no p-value".to_string(), p_equation);
    let limits_text = match limits {
        "separate" => "separate lines",
        "common-slope" => "parallel lines",
        _ => "one pooled line",
    };
    let (gate_side, pool_side, comparisons) = if homogeneous {
        ("at or above", "below", "parallel lines")
    } else {
        ("below", "at or above", "separate lines")
    };
    format!(
        "The plan's two levels lead to different models: the equal-slopes test gives {p}, {gate_side} slopes_alpha = {} but {pool_side} pooling_alpha = {}. The comparisons and the influence measures use {comparisons}; the limits' crossings are read from {limits_text}. Read each section with its model in mind, or set one level for both to have one model throughout.",
        trimmed(gate.alpha, 4),
        trimmed(pooling_alpha, 4)
    )
}

/// The statement that the gate and equivalence-based pooling led to different
/// models.
fn rules_disagree(r: &Results, homogeneous: bool, limits: &str) -> String {
    let limits_text = match limits {
        "separate" => "separate lines",
        "common-slope" => "parallel lines",
        _ => "one pooled line",
    };
    let comparisons = if homogeneous {
        "parallel lines"
    } else {
        "separate lines"
    };
    format!(
        "The equal-slopes gate and equivalence-based lot pooling lead to different models: the gate ({}) gives {comparisons}, which the comparisons and the influence measures use, while pooling by the margins gives {limits_text}, from which the limits' crossings are read. Read each section with its model in mind.",
        r.equal_slopes
            .p_value
            .map_or("no p-value".to_string(), p_equation)
    )
}

/// The rows that matter, by data row and group, and what the refit without them
/// changes: a finding and a warning, placed after the other checks' findings. Rows
/// beyond the lenient cut-offs only (leverage alone included) stay in the table and
/// out of the summary. Called once the refit, if any, is attached.
pub(super) fn influence_finding(r: &mut Results) {
    let inf = &r.checks.influence;
    if inf.matters_total == 0 {
        return;
    }
    let n = inf.matters_total;
    let listed: Vec<String> = inf
        .matters
        .iter()
        .map(|f| format!("{} (`{}`)", f.row, f.level))
        .collect();
    let more = n as usize - listed.len();
    let rows = format!(
        "row{} {}{}",
        if n == 1 { "" } else { "s" },
        listed.join(", "),
        if more > 0 {
            format!(" and {more} more")
        } else {
            String::new()
        }
    );
    let strict = match (
        inf.cutoffs.cooks_distance_matters,
        inf.cutoffs.studentized_bonferroni,
    ) {
        (Some(c), Some(t)) => format!(
            "Cook's distance above {} (the median of F) or |studentized residual| above {} (Bonferroni)",
            sig(c, 3),
            sig(t, 3)
        ),
        _ => "beyond the strict cut-offs".into(),
    };
    let statement = format!(
        "data {rows} {} the fit ({strict})",
        if n == 1 { "drives" } else { "drive" }
    );
    let consequence = match &r.sensitivity {
        None => "the refit without them was turned off (`sensitivity = false` under [checks])"
            .to_string(),
        Some(s) => {
            let mut changed = Vec::new();
            if s.changes.gate {
                changed.push("the equal-slopes decision".to_string());
            }
            if s.changes.group_effect {
                changed.push("the group-effect outcome".to_string());
            }
            for p in &s.changes.pairs {
                changed.push(format!("whether `{}` − `{}` differ", p.a, p.b));
            }
            if let (Some(a), Some(b)) = (s.changes.crossing_before, s.changes.crossing_after)
                && (a - b).abs() > 1e-9 * a.abs().max(1.0)
            {
                changed.push(format!("the crossing ({} to {})", sig(a, 4), sig(b, 4)));
            }
            if changed.is_empty() {
                "refitted without them, no conclusion changes (see the table under influential rows)".to_string()
            } else {
                format!(
                    "refitted without them, {} change{}; examine those rows before relying on either result",
                    changed.join(", "),
                    if changed.len() == 1 { "s" } else { "" }
                )
            }
        }
    };
    r.warnings.push(format!(
        "Data {rows} {} the fit: {strict}. {}.",
        if n == 1 { "drives" } else { "drive" },
        capital(&consequence)
    ));
    r.decision.findings.push(Finding {
        check: "influence".into(),
        level: None,
        p_value: None,
        statement,
        consequence,
    });
}

fn capital(s: &str) -> String {
    let mut c = s.chars();
    c.next()
        .map(|f| f.to_uppercase().chain(c).collect())
        .unwrap_or_default()
}
