//! The sensitivity rerun: the whole procedure again without the rows that matter
//! (see [`super::influence`]: Cook's distance above the median of F(p, n − p), or a
//! studentized residual beyond the Bonferroni bound), so a reader sees whether a
//! handful of rows drive the conclusions, and which ones change.
//!
//! Two things stay fixed so that the comparison shows the rows' effect and nothing
//! else: the covariate value of the adjusted means (the full data's `adjust_at`; the
//! reduced data's covariate mean would move the point itself), and the rows beyond
//! the leverage cut-off alone (design points at the ends of the covariate range,
//! whose removal would only inflate the slope's standard error).

use super::influence::Flagged;
use super::procedure;
use crate::data::Dataset;
use crate::plan::Plan;
use crate::results::{PairChange, Results, Sensitivity, SensitivityChanges};

/// Reruns without `flagged` rows and stores the key results side by side.
pub(super) fn attach(plan: &Plan, data: &Dataset, flagged: &Flagged, results: &mut Results) {
    let rows = &flagged.rerun;
    if rows.is_empty() {
        results.warnings.push(if flagged.leverage_only > 0 {
            format!(
                "The sensitivity rerun was asked for, but no row matters (none has a Cook's distance above the median of F or a studentized residual beyond the Bonferroni bound); the {} row{} beyond the leverage cut-off alone {} kept (leverage marks a row's covariate value, not how it fits), so there is nothing to leave out.",
                flagged.leverage_only,
                if flagged.leverage_only == 1 { "" } else { "s" },
                if flagged.leverage_only == 1 { "is" } else { "are" }
            )
        } else {
            "The sensitivity rerun was asked for, but no row matters (none has a Cook's distance above the median of F or a studentized residual beyond the Bonferroni bound), so there is nothing to leave out."
                .into()
        });
        return;
    }
    let reduced = data.without_rows(rows);
    match procedure(
        plan,
        &reduced,
        results.provenance.clone(),
        Some(results.adjust_at),
    ) {
        Ok((alt, _)) => {
            let changed = alt.decision.homogeneous != results.decision.homogeneous;
            let changes = changes(results, &alt);
            results.sensitivity = Some(Sensitivity {
                rows: rows.iter().map(|r| u64::from(*r)).collect(),
                changes,
                rows_removed: rows.len() as u64,
                rows_used: alt.data.rows_used,
                rows_kept_leverage_only: flagged.leverage_only,
                adjust_at: alt.adjust_at,
                equal_slopes: alt.equal_slopes,
                groups: alt.groups,
                common_slope: alt.common_slope,
                group_effect: alt.group_effect,
                adjusted_means: alt.adjusted_means,
                decision: alt.decision,
                decision_changed: changed,
            });
        }
        Err(e) => results.warnings.push(format!(
            "The sensitivity rerun without the {} influential rows could not be done: {e}.",
            rows.len()
        )),
    }
}

/// Which conclusions the refit changes: the gate's decision, the group effect's, each
/// pair of the comparison the report leads with (significance after adjustment, at
/// alpha), and the limits' crossing.
fn changes(full: &Results, alt: &Results) -> SensitivityChanges {
    let alpha = full.model.alpha;
    let significant = |p: Option<f64>| p.map(|p| p < alpha);
    // (a, b, adjusted p) of the leading comparison's pairs, in each run.
    let leading = |r: &Results| -> Vec<(String, String, Option<f64>)> {
        if full.decision.homogeneous {
            r.pairwise_adjusted
                .iter()
                .map(|p| (p.a.clone(), p.b.clone(), p.p_adjusted))
                .collect()
        } else {
            r.pairwise_slopes
                .iter()
                .map(|p| (p.a.clone(), p.b.clone(), p.p_adjusted))
                .collect()
        }
    };
    let after = leading(alt);
    let pairs = leading(full)
        .into_iter()
        .filter_map(|(a, b, p)| {
            let (_, _, q) = after.iter().find(|(x, y, _)| *x == a && *y == b)?;
            (significant(p) != significant(*q)).then(|| PairChange {
                a,
                b,
                before: significant(p),
                after: significant(*q),
            })
        })
        .collect();
    let crossing = |r: &Results| r.decision.limits.as_ref().and_then(|l| l.crossing);
    SensitivityChanges {
        gate: alt.decision.homogeneous != full.decision.homogeneous,
        group_effect: alt.decision.group_effect != full.decision.group_effect,
        pairs,
        crossing_before: crossing(full),
        crossing_after: crossing(alt),
    }
}
