//! Every failed check, per group too, with what it means for the results.
//!
//! One list feeds both the summary (each finding's short statement and consequence)
//! and the report's points to watch (the longer warning), so no check can reach one
//! and miss the other, and none depends on which branch the decision took: a check
//! that fails is said on every branch, in the words that branch needs.

use super::gate::spread_warning;
use crate::number::{p_equation, sig};
use crate::plan::Plan;
use crate::results::{Finding, Results};

/// Small groups make the gate weak; 10 rows per group is a rule of thumb for a
/// usable slope test (common practice, no source).
pub(super) const LOW_POWER_N: u64 = 10;

/// A finding and the warning that explains it at length.
pub(super) struct Found {
    pub finding: Finding,
    pub warning: String,
}

fn found(
    check: &str,
    level: Option<&str>,
    p_value: Option<f64>,
    statement: String,
    consequence: &str,
    warning: String,
) -> Found {
    Found {
        finding: Finding {
            check: check.to_string(),
            level: level.map(str::to_string),
            p_value,
            statement,
            consequence: consequence.to_string(),
        },
        warning,
    }
}

/// The findings of the checks, in the order the summary gives them: the ones that
/// bear on the comparison first, then the residual checks, then single rows.
pub(super) fn checks(plan: &Plan, r: &Results, homogeneous: bool) -> Vec<Found> {
    let alpha = plan.tests.alpha;
    let response = plan.model.response_transform.label(&plan.model.response);
    let covariate = plan.model.covariate_transform.label(&plan.model.covariate);
    let c = &r.checks;
    let mut out = Vec::new();
    if !c.not_run.is_empty() {
        out.push(found(
            "not-checked",
            None,
            None,
            "the data were per-group moments, so the residuals could not be checked".to_string(),
            "normality, equal spread and the rows that drive the fit are assumed, not checked; run the plan on the rows to check them",
            "The data were per-group moments (data.moments) without rows: the residuals' normality and equal spread and the rows that drive the fit were not checked. Every test and interval assumes them.".to_string(),
        ));
    }

    if homogeneous {
        let smallest = r.groups.iter().min_by_key(|g| g.n);
        if let Some(g) = smallest.filter(|g| g.n < LOW_POWER_N) {
            out.push(found(
                "low-power",
                Some(&g.level),
                None,
                format!("the smallest group, `{}`, has only {} rows", g.level, g.n),
                "the equal-slopes test has little power, so its p-value above the level says little about whether the slopes agree",
                format!(
                    "The smallest group has only {} rows, so the equal-slopes test has little power: a p-value above slopes_alpha is not evidence that the slopes are equal.",
                    g.n
                ),
            ));
        }
    } else {
        out.push(found(
            "unequal-slopes-means",
            None,
            r.equal_slopes.p_value,
            "the slopes differ".to_string(),
            "a difference in adjusted means holds at one covariate value only, so the common-slope results are set apart as a what-if",
            format!(
                "Slopes differ, so the adjusted means compare the groups at {covariate} = {} only; at other values of {covariate} the differences in {response} change size and may change sign. Read the slope comparisons first.",
                sig(r.adjust_at, 4)
            ),
        ));
    }

    if let Some(p) = c.covariate_balance.p_value.filter(|p| *p < alpha) {
        let (consequence, warning) = if homogeneous {
            (
                "adjusted means lean on the common slope to bridge the gap between the groups' covariate values",
                format!(
                    "The groups differ in their {covariate} values (one-way F test, {}). Adjusted means then lean on the common slope to bridge the gap between groups; check that the lines are straight across the whole range.",
                    p_equation(p)
                ),
            )
        } else {
            (
                "each pair's lines are compared best over the covariate range the two share; beyond it a difference rests on a line's extension",
                format!(
                    "The groups differ in their {covariate} values (one-way F test, {}). Each pair's difference is best supported over the {covariate} range the two groups share; regions and differences outside it extend one group's line beyond its data.",
                    p_equation(p)
                ),
            )
        };
        out.push(found(
            "covariate-balance",
            None,
            Some(p),
            format!("the groups differ in their {covariate} values"),
            consequence,
            warning,
        ));
    }
    if let Some(overlap) = c.covariate_balance.overlap
        && (r.adjust_at < overlap[0] || r.adjust_at > overlap[1])
    {
        out.push(found(
            "adjust-outside-overlap",
            None,
            None,
            format!(
                "the adjustment point {covariate} = {} lies outside the range every group covers",
                sig(r.adjust_at, 4)
            ),
            "some adjusted means are extrapolations",
            format!(
                "The adjustment point {covariate} = {} lies outside the range every group covers ({} to {}).",
                sig(r.adjust_at, 4),
                sig(overlap[0], 4),
                sig(overlap[1], 4)
            ),
        ));
    }
    let outside: Vec<String> = r
        .adjusted_means
        .iter()
        .filter(|m| !m.within_range)
        .map(|m| format!("`{}`", m.level))
        .collect();
    if !outside.is_empty() {
        out.push(found(
            "extrapolated-means",
            None,
            None,
            format!("the adjusted means of {} are extrapolations", outside.join(", ")),
            "those means rest on the common slope beyond the group's own data",
            format!(
                "Adjusted means for {} are extrapolations: {covariate} = {} lies outside the covariate values observed in {}.",
                outside.join(", "),
                sig(r.adjust_at, 4),
                if outside.len() == 1 { "that group" } else { "those groups" }
            ),
        ));
    }

    if let Some(p) = c.normality.p_value.filter(|p| *p < alpha) {
        out.push(found(
            "normality",
            None,
            Some(p),
            format!(
                "the residuals depart from a normal distribution (Shapiro–Wilk {})",
                p_equation(p)
            ),
            "with many rows per group the F and t tests tolerate this; with few, p-values near the level are unsure",
            format!(
                "The residuals depart from a normal distribution (Shapiro–Wilk {}). With many rows per group the F and t tests tolerate this; with few, treat p-values near the level with caution and look at the residuals.",
                p_equation(p)
            ),
        ));
    }
    for g in &c.normality.groups {
        let (Some(w), Some(p)) = (g.statistic, g.p_value) else {
            continue;
        };
        if p >= alpha {
            continue;
        }
        out.push(found(
            "normality-group",
            Some(&g.level),
            Some(p),
            format!(
                "the residuals of `{}` depart from a normal distribution (Shapiro–Wilk W = {}, {})",
                g.level,
                sig(w, 3),
                p_equation(p)
            ),
            "that group's own slope interval and its comparisons rest on an assumption its residuals do not meet; look at them for outliers or curvature",
            format!(
                "Within `{}` the residuals depart from a normal distribution (Shapiro–Wilk W = {}, {}, on {} residuals). Its own slope interval and the comparisons that involve it assume normal errors; look at that group's residuals for an outlier or curvature before relying on them.",
                g.level,
                sig(w, 3),
                p_equation(p),
                g.n
            ),
        ));
    }
    if let Some(p) = c.equal_variance.p_value.filter(|p| *p < alpha) {
        let (consequence, warning) = if homogeneous {
            (
                "the common-slope comparison pools one residual variance, so its standard errors are off for the noisiest and the quietest groups",
                format!(
                    "The residual spread differs between groups (Brown–Forsythe {}). The common-slope comparison pools one residual variance, so its standard errors are too small for the noisier groups and too large for the quieter ones; treat borderline adjusted-mean differences with caution.",
                    p_equation(p)
                ),
            )
        } else {
            (
                "prefer the unpooled (Welch) slope comparisons; the regions use the pooled variance and are approximate",
                format!(
                    "The residual spread differs between groups (Brown–Forsythe {}). Prefer the unpooled (Welch) slope comparisons; the regions of difference use the pooled variance and are approximate.",
                    p_equation(p)
                ),
            )
        };
        out.push(found(
            "equal-variance",
            None,
            Some(p),
            format!(
                "the residual spread differs between groups (Brown–Forsythe {})",
                p_equation(p)
            ),
            consequence,
            warning,
        ));
    }
    let levels: Vec<&str> = r.groups.iter().map(|g| g.level.as_str()).collect();
    if c.equal_variance.p_value.is_none_or(|p| p >= alpha)
        && let Some(w) = spread_warning(&levels, r.groups.iter().map(|g| g.residual_sd))
    {
        out.push(found(
            "spread-ratio",
            None,
            None,
            "one group's residual SD is more than twice another's".to_string(),
            "the pooled slope comparisons assume equal spread; prefer their unpooled (Welch) form",
            w,
        ));
    }

    out
}
