//! The decision the gate implies, and the warnings that keep a reader from a
//! misleading comparison.
//!
//! Slopes are taken as homogeneous when the equal-slopes p-value is at least
//! `slopes_alpha`. Then the groups are compared on a common slope (adjusted means)
//! and the report leads with that; otherwise the lines cross somewhere, a single
//! adjusted-mean difference depends on where it is taken, and the report leads with
//! the slopes themselves.

use super::gate::spread_warning;
use crate::number::sig;
use crate::number::{p_equation, trimmed};
use crate::plan::Plan;
use crate::results::{Decision, DecisionModels, Results};

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
    }
}

/// Small groups make the gate weak; 10 rows per group is a rule of thumb for a
/// usable slope test (common practice, no source).
const LOW_POWER_N: u64 = 10;

/// Fills in the decision and the warnings. `limits_model` is the model the limits'
/// crossings were read from, when the plan has limits.
pub(super) fn conclude(
    plan: &Plan,
    mut r: Results,
    mut warnings: Vec<String>,
    limits_model: Option<&str>,
) -> Results {
    let gate = &r.equal_slopes;
    let p_text = match gate.status.as_str() {
        "exact-fit" => {
            "an infinite F (every line passes exactly through its rows: exact fit), p = 0"
                .to_string()
        }
        _ => gate.p_value.map_or("no p-value".to_string(), p_equation),
    };
    let homogeneous = gate.homogeneous;
    let reason = if gate.status == "not-computable" {
        "The equal-slopes test cannot be computed (no residual variation and no slope difference, 0/0); the slopes are identical to rounding, so the groups are compared on a common slope.".to_string()
    } else if homogeneous {
        format!(
            "The equal-slopes test gives {p_text}, at or above slopes_alpha = {}, so the slopes are taken as equal and the groups are compared on a common slope.",
            trimmed(gate.alpha, 4)
        )
    } else {
        format!(
            "The equal-slopes test gives {p_text}, below slopes_alpha = {}, so the slopes are taken to differ and the groups are compared by their slopes.",
            trimmed(gate.alpha, 4)
        )
    };

    let response = plan.model.response_transform.label(&plan.model.response);
    let covariate = plan.model.covariate_transform.label(&plan.model.covariate);
    if homogeneous {
        let smallest = r.groups.iter().map(|g| g.n).min().unwrap_or(0);
        if smallest < LOW_POWER_N {
            warnings.push(format!(
                "The smallest group has only {smallest} rows, so the equal-slopes test has little power: a p-value above slopes_alpha is not evidence that the slopes are equal."
            ));
        }
    } else {
        warnings.push(format!(
            "Slopes differ, so the adjusted means compare the groups at {covariate} = {} only; at other values of {covariate} the differences in {response} change size and may change sign. Read the slope comparisons first.",
            sig(r.adjust_at, 4)
        ));
    }
    check_warnings(plan, &r, homogeneous, &covariate, &mut warnings);
    let levels: Vec<&str> = r.groups.iter().map(|g| g.level.as_str()).collect();
    if let Some(w) = spread_from_results(&r, &levels) {
        warnings.push(w);
    }
    let outside: Vec<String> = r
        .adjusted_means
        .iter()
        .filter(|m| !m.within_range)
        .map(|m| format!("`{}`", m.level))
        .collect();
    if !outside.is_empty() {
        warnings.push(format!(
            "Adjusted means for {} are extrapolations: {covariate} = {} lies outside the covariate values observed in {}.",
            outside.join(", "),
            sig(r.adjust_at, 4),
            if outside.len() == 1 { "that group" } else { "those groups" }
        ));
    }

    let lead = if homogeneous {
        LEAD_COMMON
    } else {
        LEAD_SEPARATE
    };
    let models = models(lead, &r.checks.influence.model, limits_model);
    if !models.agree
        && let (Some(pooling), Some(limits)) = (&r.pooling, limits_model)
        && limits != "not-decided"
    {
        // Said first: every later number is read with its model in mind.
        warnings.insert(0, levels_disagree(&r, pooling.alpha, homogeneous, limits));
    }
    r.decision = Decision {
        homogeneous,
        lead: lead.to_string(),
        reason,
        models,
    };
    r.warnings = warnings;
    r
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

/// What the assumption checks mean for the comparison the decision chose.
fn check_warnings(
    plan: &Plan,
    r: &Results,
    homogeneous: bool,
    covariate: &str,
    warnings: &mut Vec<String>,
) {
    let alpha = plan.tests.alpha;
    let c = &r.checks;
    if let Some(p) = c.normality.p_value.filter(|p| *p < alpha) {
        warnings.push(format!(
            "The residuals depart from a normal distribution (Shapiro–Wilk {}). With many rows per group the F and t tests tolerate this; with few, treat p-values near the level with caution and look at the residuals.",
            p_equation(p)
        ));
    }
    if let Some(p) = c.equal_variance.p_value.filter(|p| *p < alpha) {
        warnings.push(if homogeneous {
            format!(
                "Slopes agree, but the residual spread differs between groups (Brown–Forsythe {}). The common-slope comparison pools one residual variance, so its standard errors are too small for the noisier groups and too large for the quieter ones; treat borderline adjusted-mean differences with caution.",
                p_equation(p)
            )
        } else {
            format!(
                "The residual spread differs between groups (Brown–Forsythe {}). Prefer the unpooled (Welch) slope comparisons; the regions of difference use the pooled variance and are approximate.",
                p_equation(p)
            )
        });
    }
    if let Some(p) = c.covariate_balance.p_value.filter(|p| *p < alpha)
        && homogeneous
    {
        warnings.push(format!(
                "The groups differ in their {covariate} values (one-way F test, {}). Adjusted means then lean on the common slope to bridge the gap between groups; check that the lines are straight across the whole range.",
                p_equation(p)
            ));
    }
    if let Some(overlap) = c.covariate_balance.overlap
        && (r.adjust_at < overlap[0] || r.adjust_at > overlap[1])
    {
        warnings.push(format!(
                "The adjustment point {covariate} = {} lies outside the range every group covers ({} to {}).",
                sig(r.adjust_at, 4),
                sig(overlap[0], 4),
                sig(overlap[1], 4)
            ));
    }
    let flagged = c.influence.flagged_total;
    if flagged > 0 && !plan.checks.sensitivity {
        warnings.push(format!(
            "{flagged} row{} lie{} beyond the influence cut-offs (listed under influential rows). Set `sensitivity = true` under [checks] to see the results without them.",
            if flagged == 1 { "" } else { "s" },
            if flagged == 1 { "s" } else { "" }
        ));
    }
}

fn spread_from_results(r: &Results, levels: &[&str]) -> Option<String> {
    spread_warning(levels, r.groups.iter().map(|g| g.residual_sd))
}
