//! Several attributes of one study (`[[responses]]`): each is analysed on its own
//! (its plan is a whole single-response plan), and the earliest supported period
//! among them is the plan's answer, the way a shelf life is set by the attribute
//! that fails first (ICH Q1E 2003, quoted from memory).

use crate::results::{Attribute, AttributeReading, Results, Study, StudyAnswer};

/// The study from its attributes' results, in the plan's order.
pub fn study(title: &str, attributes: Vec<(String, Results)>) -> Study {
    let mut rows: Vec<AttributeReading> = attributes
        .iter()
        .map(|(column, r)| {
            let lower = r.limits.iter().find(|l| l.side == "lower").map(|l| l.limit);
            let upper = r.limits.iter().find(|l| l.side == "upper").map(|l| l.limit);
            let s = r.limits_supported.as_ref();
            let reading = r.decision.limits.as_ref();
            AttributeReading {
                column: column.clone(),
                lower,
                upper,
                model: reading.map(|l| l.model.clone()),
                outcome: reading.map(|l| l.outcome.clone()),
                crossing: s.and_then(|s| s.raw_crossing),
                line: s.and_then(|s| s.limiting_level.clone()),
                side: s.and_then(|s| s.limiting_side.clone()),
                supported: s.and_then(|s| s.supported),
                limiting: false,
            }
        })
        .collect();
    let reason_of = |r: &Results| r.limits_supported.as_ref().and_then(|s| s.reason.clone());
    // An attribute already past a limit, or without a chosen line, leaves no period
    // whatever the others support; the first such in plan order is named.
    let blocking = ["beyond-at-start", "not-decided"].iter().find_map(|want| {
        attributes
            .iter()
            .position(|(_, r)| reason_of(r).as_deref() == Some(*want))
            .map(|i| (i, *want))
    });
    let with_limits = attributes.iter().any(|(_, r)| r.limits_supported.is_some());
    let shortest = rows
        .iter()
        .enumerate()
        .filter_map(|(i, row)| row.supported.map(|p| (i, p)))
        // Ties go to the first attribute in the plan's order.
        .fold(None, |best: Option<(usize, f64)>, (i, p)| match best {
            Some((_, b)) if b <= p => best,
            _ => Some((i, p)),
        });
    let (supported, limiting, reason) = match (blocking, shortest) {
        (Some((i, why)), _) => (None, Some(i), Some(why.to_string())),
        (None, Some((i, p))) => (Some(p), Some(i), None),
        (None, None) if with_limits => (None, None, Some("never-within".to_string())),
        (None, None) => (None, None, Some("no-limits".to_string())),
    };
    if let Some(i) = limiting {
        rows[i].limiting = true;
    }
    Study {
        title: title.to_string(),
        answer: StudyAnswer {
            supported,
            limiting: limiting.map(|i| rows[i].column.clone()),
            reason,
            rows,
        },
        attributes: attributes
            .into_iter()
            .map(|(column, results)| Attribute { column, results })
            .collect(),
    }
}
