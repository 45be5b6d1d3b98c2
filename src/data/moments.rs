//! A file of per-group moments (`data.moments`): what an engine's grouped aggregate
//! query returns (`slopewise sql` prints it), one row per group with its count,
//! means, centred sums of squares and cross-products and covariate range, all of
//! the transformed values. The three line models, the gate and the comparisons are
//! closed forms in these (see `crate::fit`), so no row need leave the engine; the
//! checks that look at residuals cannot run and the report says so.
//!
//! Each value is checked for what moments of real data must satisfy (n ≥ 3, sums of
//! squares not negative, |Sxy| ≤ √(Sxx·Syy), the mean inside the range), so that a
//! swapped column or a wrong query is refused at its cell rather than fitted.

use std::collections::BTreeMap;

use super::{CellAt, DataError, Dataset, DropReason, GroupData};
use crate::diagnostic::did_you_mean;
use crate::fit::Moments;
use crate::plan::{DataFormat, Plan};

/// The columns of a moments file, in the order `slopewise sql` writes them.
pub const COLUMNS: [&str; 9] = [
    "group", "n", "mean_x", "mean_y", "sxx", "syy", "sxy", "min_x", "max_x",
];

/// Relative slack for relations that hold exactly in real arithmetic but are
/// computed by the engine in floating point (common practice, no source).
const SLACK: f64 = 1e-9;

/// Reads the moments file in `bytes` (CSV, or Parquet when the plan's path ends in
/// `.parquet`).
pub fn load_moments(plan: &Plan, bytes: &[u8]) -> Result<Dataset, DataError> {
    if plan.data.format == DataFormat::Parquet {
        let text = super::parquet::table_text(bytes)?;
        return read(plan, text.as_bytes(), b',');
    }
    read(plan, bytes, plan.data.delimiter)
}

fn read(plan: &Plan, bytes: &[u8], delimiter: u8) -> Result<Dataset, DataError> {
    let mut csv = csv::ReaderBuilder::new()
        .has_headers(true)
        .delimiter(delimiter)
        .from_reader(bytes);
    let header: Vec<String> = csv
        .headers()
        .map_err(|e| DataError::Syntax {
            line: 1,
            message: e.to_string(),
        })?
        .iter()
        .map(|h| h.trim().to_ascii_lowercase())
        .collect();
    if header.iter().all(String::is_empty) {
        return Err(DataError::Empty);
    }
    let missing: Vec<String> = COLUMNS
        .iter()
        .filter(|c| !header.iter().any(|h| h == *c))
        .map(|c| c.to_string())
        .collect();
    let unknown: Vec<String> = header
        .iter()
        .filter(|h| !COLUMNS.contains(&h.as_str()))
        .cloned()
        .collect();
    if !missing.is_empty() || !unknown.is_empty() {
        return Err(DataError::MomentsHeader { missing, unknown });
    }
    let at = |name: &str| header.iter().position(|h| h == name).expect("checked");
    let index: Vec<usize> = COLUMNS.iter().map(|c| at(c)).collect();

    let mut groups: Vec<(GroupData, u64)> = Vec::new();
    let mut dropped = BTreeMap::new();
    let mut rows_read = 0u64;
    for (i, record) in csv.records().enumerate() {
        let row = i as u64 + 1;
        let record = record.map_err(|e| DataError::Syntax {
            line: e.position().map_or(row + 1, |p| p.line()),
            message: e.to_string(),
        })?;
        let line = record.position().map_or(row + 1, |p| p.line());
        let cell_at = |k: usize| CellAt {
            row,
            line,
            column: COLUMNS[k].to_string(),
            column_number: index[k] + 1,
            cell: None,
        };
        let text = |k: usize| record.get(index[k]).unwrap_or("").trim();
        let number = |k: usize| -> Result<f64, DataError> {
            let t = text(k);
            let v: f64 = t.parse().map_err(|_| DataError::NotANumber {
                at: cell_at(k),
                text: t.to_string(),
            })?;
            if !v.is_finite() {
                return Err(DataError::NotFinite {
                    at: cell_at(k),
                    text: t.to_string(),
                });
            }
            Ok(v)
        };
        let bad = |k: usize, why: String| DataError::MomentsValue {
            at: cell_at(k),
            text: text(k).to_string(),
            why,
        };
        let n = number(1)?;
        if n.fract() != 0.0 || n < 0.0 {
            return Err(bad(1, "a count must be a whole number".into()));
        }
        let n = n as u64;
        rows_read += n;
        let label = text(0);
        if label.is_empty() {
            // The engine groups the rows whose label is null together: they are rows
            // with a missing group, as a CSV file's would be.
            *dropped.entry(DropReason::MissingGroup).or_default() += n;
            continue;
        }
        if n < 3 {
            return Err(bad(
                1,
                format!("group `{label}` has {n} rows, and a line needs at least 3"),
            ));
        }
        let m = Moments {
            n,
            mean_x: number(2)?,
            mean_y: number(3)?,
            sxx: number(4)?,
            syy: number(5)?,
            sxy: number(6)?,
            min_x: number(7)?,
            max_x: number(8)?,
        };
        for (k, v) in [(4, m.sxx), (5, m.syy)] {
            if v < 0.0 {
                return Err(bad(k, "a centred sum of squares cannot be negative".into()));
            }
        }
        if m.sxy * m.sxy > m.sxx * m.syy * (1.0 + SLACK) + f64::MIN_POSITIVE {
            return Err(bad(
                6,
                format!(
                    "|sxy| exceeds √(sxx·syy) = {}, which no data can give",
                    (m.sxx * m.syy).sqrt()
                ),
            ));
        }
        if m.min_x > m.max_x {
            return Err(bad(7, format!("min_x is above max_x = {}", m.max_x)));
        }
        let room = SLACK * m.min_x.abs().max(m.max_x.abs()).max(f64::MIN_POSITIVE);
        if m.mean_x < m.min_x - room || m.mean_x > m.max_x + room {
            return Err(bad(
                2,
                format!(
                    "the mean lies outside the range [{}, {}] of min_x and max_x",
                    m.min_x, m.max_x
                ),
            ));
        }
        if (m.max_x > m.min_x) != (m.sxx > 0.0) {
            return Err(bad(
                4,
                format!(
                    "sxx = {} does not agree with the range [{}, {}]: a spread needs sxx > 0, and no spread sxx = 0",
                    m.sxx, m.min_x, m.max_x
                ),
            ));
        }
        if let Some((_, first)) = groups.iter().find(|(g, _)| g.level == label) {
            return Err(bad(
                0,
                format!("group `{label}` has a row already (data row {first})"),
            ));
        }
        let mut g = GroupData::new(label.to_string());
        g.moments = m;
        groups.push((g, row));
    }
    if groups.is_empty() && rows_read == 0 {
        return Err(DataError::NoRows);
    }
    let groups = ordered(plan, groups)?;
    Ok(Dataset {
        columns: COLUMNS.iter().map(|c| c.to_string()).collect(),
        rows_read,
        dropped,
        groups,
        from_moments: true,
    })
}

/// The groups in `model.levels` order (each listed level present, no other), else
/// sorted as text, as the row reader orders them.
fn ordered(plan: &Plan, groups: Vec<(GroupData, u64)>) -> Result<Vec<GroupData>, DataError> {
    let model = &plan.model;
    let Some(levels) = &model.levels else {
        let mut groups: Vec<GroupData> = groups.into_iter().map(|(g, _)| g).collect();
        groups.sort_by(|a, b| a.level.cmp(&b.level));
        return Ok(groups);
    };
    if let Some((g, row)) = groups.iter().find(|(g, _)| !levels.contains(&g.level)) {
        let near = did_you_mean(&g.level, levels.iter().map(String::as_str)).and_then(|l| {
            levels
                .iter()
                .position(|x| x == l)
                .map(|i| (i, l.to_string()))
        });
        return Err(DataError::UnlistedLevel {
            row: *row,
            line: row + 1,
            label: g.level.clone(),
            column: "group".into(),
            near,
        });
    }
    let mut by_level: BTreeMap<String, GroupData> = groups
        .into_iter()
        .map(|(g, _)| (g.level.clone(), g))
        .collect();
    levels
        .iter()
        .enumerate()
        .map(|(i, level)| {
            by_level
                .remove(level)
                .ok_or_else(|| DataError::AbsentLevel {
                    level: level.clone(),
                    index: i,
                    column: "group".into(),
                })
        })
        .collect()
}
