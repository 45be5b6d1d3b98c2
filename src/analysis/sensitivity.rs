//! The sensitivity rerun: the whole procedure again without the rows beyond the
//! influence cut-offs, so a reader sees whether a handful of rows drive the decision.

use super::procedure;
use crate::data::Dataset;
use crate::plan::Plan;
use crate::results::{Results, Sensitivity};

/// Reruns without `flagged` rows and stores the key results side by side.
pub(super) fn attach(plan: &Plan, data: &Dataset, flagged: &[u32], results: &mut Results) {
    if flagged.is_empty() {
        results.warnings.push(
            "The sensitivity rerun was asked for, but no row lies beyond the influence cut-offs, so there is nothing to leave out."
                .into(),
        );
        return;
    }
    let reduced = data.without_rows(flagged);
    match procedure(plan, &reduced, results.provenance.clone()) {
        Ok((alt, _)) => {
            let changed = alt.decision.homogeneous != results.decision.homogeneous;
            if changed {
                results.warnings.push(format!(
                    "Leaving out the {} influential rows changes the equal-slopes decision: the conclusion rests on those rows; examine them before relying on either result.",
                    flagged.len()
                ));
            }
            results.sensitivity = Some(Sensitivity {
                rows_removed: flagged.len() as u64,
                rows_used: alt.data.rows_used,
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
            flagged.len()
        )),
    }
}
