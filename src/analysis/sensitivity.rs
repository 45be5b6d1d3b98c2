//! The sensitivity rerun: the whole procedure again without the rows beyond the
//! Cook's distance or studentized-residual cut-offs, so a reader sees whether a
//! handful of rows drive the decision.
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
use crate::results::{Results, Sensitivity};

/// Reruns without `flagged` rows and stores the key results side by side.
pub(super) fn attach(plan: &Plan, data: &Dataset, flagged: &Flagged, results: &mut Results) {
    let rows = &flagged.rerun;
    if rows.is_empty() {
        results.warnings.push(if flagged.leverage_only > 0 {
            format!(
                "The sensitivity rerun was asked for, but no row lies beyond the Cook's distance or studentized-residual cut-offs; the {} row{} beyond the leverage cut-off alone {} kept (leverage marks a row's covariate value, not how it fits), so there is nothing to leave out.",
                flagged.leverage_only,
                if flagged.leverage_only == 1 { "" } else { "s" },
                if flagged.leverage_only == 1 { "is" } else { "are" }
            )
        } else {
            "The sensitivity rerun was asked for, but no row lies beyond the influence cut-offs, so there is nothing to leave out."
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
            if changed {
                results.warnings.push(format!(
                    "Leaving out the {} influential rows changes the equal-slopes decision: the conclusion rests on those rows; examine them before relying on either result.",
                    rows.len()
                ));
            }
            results.sensitivity = Some(Sensitivity {
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
