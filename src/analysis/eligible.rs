//! Which groups can carry a line of their own.
//!
//! A line needs two distinct covariate values to have a slope and a third row to
//! estimate its spread; a group without them is left out of every model, its rows
//! are counted as dropped, and the report says so.

use std::collections::BTreeMap;

use super::AnalysisError;
use crate::data::{Dataset, GroupData};
use crate::results::ExcludedGroup;

/// The groups that enter the fits, and the accounting for the rest.
pub(super) struct Eligible<'a> {
    pub groups: Vec<&'a GroupData>,
    pub excluded: Vec<ExcludedGroup>,
    pub dropped: BTreeMap<String, u64>,
}

pub(super) fn select<'a>(
    data: &'a Dataset,
    warnings: &mut Vec<String>,
) -> Result<Eligible<'a>, AnalysisError> {
    let mut dropped: BTreeMap<String, u64> = data
        .dropped
        .iter()
        .map(|(reason, n)| (reason.key().to_string(), *n))
        .collect();
    let mut groups = Vec::new();
    let mut excluded = Vec::new();
    for g in &data.groups {
        let m = &g.moments;
        let (key, why) = if m.n < 3 {
            (
                "group_too_small",
                format!(
                    "has {} usable row{}; a line needs at least 3",
                    m.n,
                    if m.n == 1 { "" } else { "s" }
                ),
            )
        } else if !(m.max_x > m.min_x) {
            (
                "no_covariate_spread",
                "has the same covariate value in every row, so it has no slope".to_string(),
            )
        } else {
            groups.push(g);
            continue;
        };
        if m.n > 0 {
            *dropped.entry(key.to_string()).or_default() += m.n;
        }
        warnings.push(format!("Group `{}` was left out: it {why}.", g.level));
        excluded.push(ExcludedGroup {
            level: g.level.clone(),
            n: m.n,
            reason: why,
        });
    }
    if groups.len() < 2 {
        return Err(AnalysisError::TooFewGroups {
            usable: groups.iter().map(|g| g.level.clone()).collect(),
            excluded: excluded
                .iter()
                .map(|e| (e.level.clone(), e.reason.clone()))
                .collect(),
        });
    }
    Ok(Eligible {
        groups,
        excluded,
        dropped,
    })
}
