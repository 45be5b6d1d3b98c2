//! When two runs measure different things: another response, covariate, group
//! column, transform or declared unit. `diff` refuses such runs unless asked, and
//! then tests no change between them.

use super::{Comparison, plain};
use crate::results::Results;

/// What makes two runs measure different things: response, covariate or group
/// column, a transform, or a declared unit that differs. Each entry names the
/// quantity and both values; empty when the runs are comparable. Changes between
/// such runs are not changes of one quantity, so `diff` refuses them unless asked,
/// and then tests none of them.
pub fn mismatches(ro: &Results, rn: &Results) -> Vec<String> {
    let (mo, mn) = (&ro.model, &rn.model);
    let unit = |u: &Option<String>| u.clone().unwrap_or_else(|| "none declared".into());
    let pairs = [
        ("response", mo.response.clone(), mn.response.clone()),
        ("covariate", mo.covariate.clone(), mn.covariate.clone()),
        ("group column", mo.group.clone(), mn.group.clone()),
        (
            "response transform",
            mo.response_transform.clone(),
            mn.response_transform.clone(),
        ),
        (
            "covariate transform",
            mo.covariate_transform.clone(),
            mn.covariate_transform.clone(),
        ),
        (
            "response unit",
            unit(&mo.response_units),
            unit(&mn.response_units),
        ),
        (
            "covariate unit",
            unit(&mo.covariate_units),
            unit(&mn.covariate_units),
        ),
    ];
    pairs
        .into_iter()
        .filter(|(_, a, b)| a != b)
        .map(|(what, a, b)| format!("the {what} ({} before, {} now)", plain(&a), plain(&b)))
        .collect()
}

impl Comparison {
    /// Marks every change untested, because the runs measure different things
    /// ([`mismatches`]); the notes lead with why.
    pub fn untest_for(&mut self, mismatches: &[String]) {
        if mismatches.is_empty() {
            return;
        }
        for s in &mut self.slopes {
            s.significant = None;
            s.note = Some(format!(
                "The slope of {} is not tested for change: the runs measure different things.",
                plain(&s.level)
            ));
        }
        for m in &mut self.adjusted_means.means {
            m.significant = None;
            m.note = None;
        }
        self.notes.insert(
            0,
            format!(
                "These runs measure different things ({}): no change between them is tested, and the numbers side by side are not changes of one quantity.",
                mismatches.join("; ")
            ),
        );
    }
}
