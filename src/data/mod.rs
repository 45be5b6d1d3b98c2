//! The data: one streaming pass over the CSV into per-group columns.
//!
//! For every record the loader applies the plan's row filters, then the missing-value
//! tokens, then parses the response and covariate and applies their transforms; every
//! row that does not enter the fits is counted under a [`DropReason`]. Each group keeps
//! its (x, y) columns, the data row numbers and one-pass [`Moments`], so the fits need
//! no second pass. The loader reads from any [`Read`]; opening the file is the command
//! layer's job.

mod column;
mod error;
mod rows;

pub use column::Column;
pub use error::{CellAt, DataError, PlanKey};
pub use rows::RowNumbers;

use std::collections::{BTreeMap, HashMap};
use std::io::Read;

use crate::diagnostic::did_you_mean;
use crate::fit::Moments;
use crate::plan::{Plan, Transform};

/// Why a row did not enter the fits.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum DropReason {
    /// Failed a `[[data.keep]]` filter (checked first).
    FilteredOut,
    /// The response cell is a missing token.
    MissingResponse,
    /// The covariate cell is a missing token.
    MissingCovariate,
    /// The group cell is a missing token.
    MissingGroup,
}

impl DropReason {
    /// The reason's key in `results.json`.
    pub fn key(self) -> &'static str {
        match self {
            DropReason::FilteredOut => "filtered_out",
            DropReason::MissingResponse => "missing_response",
            DropReason::MissingCovariate => "missing_covariate",
            DropReason::MissingGroup => "missing_group",
        }
    }
}

/// The rows of one group that enter the fits.
#[derive(Debug, Clone, PartialEq)]
pub struct GroupData {
    /// The group label.
    pub level: String,
    /// Transformed covariate values.
    pub x: Column<f64>,
    /// Transformed response values.
    pub y: Column<f64>,
    /// 1-based data row of each value (header excluded).
    pub rows: RowNumbers,
    /// One-pass moments of (x, y).
    pub moments: Moments,
}

impl GroupData {
    fn new(level: String) -> Self {
        GroupData {
            level,
            x: Column::new(),
            y: Column::new(),
            rows: RowNumbers::new(),
            moments: Moments::default(),
        }
    }

    /// The (x, y) pairs in data order. Columns pushed together share chunk
    /// boundaries, so the pairs come from zipped slices, not zipped chunk iterators.
    pub fn points(&self) -> impl Iterator<Item = (f64, f64)> + '_ {
        self.x
            .chunks()
            .zip(self.y.chunks())
            .flat_map(|(x, y)| x.iter().copied().zip(y.iter().copied()))
    }

    /// The (x, y, data row) triples in data order.
    pub fn rows_with_points(&self) -> impl Iterator<Item = (f64, f64, u32)> + '_ {
        self.points()
            .zip(self.rows.iter())
            .map(|((x, y), r)| (x, y, r))
    }

    #[inline]
    fn push(&mut self, row: u32, x: f64, y: f64) {
        self.x.push(x);
        self.y.push(y);
        self.rows.push(row);
        self.moments.push(x, y);
    }
}

/// What the loader read.
#[derive(Debug, Clone, PartialEq)]
pub struct Dataset {
    /// Column names from the header.
    pub columns: Vec<String>,
    /// Data rows in the file (header excluded).
    pub rows_read: u64,
    /// Rows left out, by reason (reasons with no row are absent).
    pub dropped: BTreeMap<DropReason, u64>,
    /// Groups in level order: `model.levels` when given, else labels sorted as text.
    pub groups: Vec<GroupData>,
}

impl Dataset {
    /// The same data without the given data rows (sorted ascending); moments are
    /// recomputed, drop counts kept as they were.
    pub fn without_rows(&self, rows: &[u32]) -> Dataset {
        let groups = self
            .groups
            .iter()
            .map(|g| {
                let mut out = GroupData::new(g.level.clone());
                for (x, y, row) in g.rows_with_points() {
                    if rows.binary_search(&row).is_err() {
                        out.push(row, x, y);
                    }
                }
                out
            })
            .collect();
        Dataset {
            columns: self.columns.clone(),
            rows_read: self.rows_read,
            dropped: self.dropped.clone(),
            groups,
        }
    }
}

const MAX_DOMAIN_ROWS: usize = 5;

/// Where the plan's columns sit in each record.
struct Layout {
    response: usize,
    covariate: usize,
    group: usize,
    keep: Vec<(usize, Vec<Vec<u8>>)>,
}

/// Reads the CSV and sorts its rows into groups, as the plan says.
pub fn load<R: Read>(plan: &Plan, reader: R) -> Result<Dataset, DataError> {
    let mut csv = csv::ReaderBuilder::new()
        .has_headers(true)
        .flexible(false)
        .buffer_capacity(1 << 16)
        .delimiter(plan.data.delimiter)
        .from_reader(reader);
    let columns = read_header(&mut csv)?;
    let layout = layout(plan, &columns)?;
    let missing: Vec<Vec<u8>> = plan
        .data
        .missing
        .iter()
        .map(|m| m.trim().as_bytes().to_vec())
        .collect();
    let is_missing = |cell: &[u8]| missing.iter().any(|m| m.as_slice() == cell);
    let model = &plan.model;

    let listed: Option<HashMap<Vec<u8>, usize>> = model.levels.as_ref().map(|levels| {
        levels
            .iter()
            .enumerate()
            .map(|(i, l)| (l.as_bytes().to_vec(), i))
            .collect()
    });
    let mut groups: Vec<GroupData> = match &model.levels {
        Some(levels) => levels.iter().cloned().map(GroupData::new).collect(),
        None => Vec::new(),
    };
    let mut seen_level = vec![false; groups.len()];
    let mut index: HashMap<Vec<u8>, usize> = HashMap::new();
    let mut last: Option<(Vec<u8>, usize)> = None;
    let mut dropped: BTreeMap<DropReason, u64> = BTreeMap::new();
    let mut domain_y = DomainErrors::default();
    let mut domain_x = DomainErrors::default();
    let mut record = csv::ByteRecord::new();
    let mut rows_read: u64 = 0;

    loop {
        match csv.read_byte_record(&mut record) {
            Ok(true) => {}
            Ok(false) => break,
            Err(e) => return Err(csv_error(e, rows_read + 1)),
        }
        rows_read += 1;
        let row = rows_read;
        let line = record.position().map_or(row + 1, |p| p.line());
        let cell_at = |col: usize| CellAt {
            row,
            line,
            column: columns[col].clone(),
            column_number: col + 1,
        };
        let cell = |col: usize| -> Result<&[u8], DataError> {
            let raw = &record[col];
            std::str::from_utf8(raw)
                .map(|s| s.trim().as_bytes())
                .map_err(|_| DataError::NotUtf8 { at: cell_at(col) })
        };
        // Numeric cells skip the UTF-8 check on the fast path: a number is ASCII,
        // and a cell that fails to parse is checked before it is quoted.
        let raw_cell = |col: usize| trim_ascii(&record[col]);

        let mut passes = true;
        for (col, accepted) in &layout.keep {
            let text = cell(*col)?;
            if !accepted.iter().any(|a| a.as_slice() == text) {
                passes = false;
                break;
            }
        }
        if !passes {
            *dropped.entry(DropReason::FilteredOut).or_default() += 1;
            continue;
        }

        let label = cell(layout.group)?;
        let group_missing = is_missing(label);
        let mut slot = None;
        if !group_missing {
            slot = Some(match &last {
                Some((l, i)) if l.as_slice() == label => *i,
                _ => {
                    let known = (groups.len() <= LINEAR_LOOKUP)
                        .then(|| groups.iter().position(|g| g.level.as_bytes() == label))
                        .flatten();
                    let i = match (&listed, known) {
                        (_, Some(i)) => i,
                        (Some(map), None) => match map.get(label) {
                            Some(i) => *i,
                            None => {
                                let label = String::from_utf8_lossy(label).into_owned();
                                let levels = model.levels.as_deref().unwrap_or_default();
                                let near = did_you_mean(&label, levels.iter().map(String::as_str))
                                    .and_then(|l| {
                                        levels
                                            .iter()
                                            .position(|x| x == l)
                                            .map(|i| (i, l.to_string()))
                                    });
                                return Err(DataError::UnlistedLevel {
                                    row,
                                    line,
                                    label,
                                    column: model.group.clone(),
                                    near,
                                });
                            }
                        },
                        (None, None) => match index.get(label) {
                            Some(i) => *i,
                            None => {
                                let i = groups.len();
                                let text = String::from_utf8_lossy(label).into_owned();
                                groups.push(GroupData::new(text));
                                seen_level.push(false);
                                index.insert(label.to_vec(), i);
                                i
                            }
                        },
                    };
                    last = Some((label.to_vec(), i));
                    i
                }
            });
            seen_level[slot.unwrap_or_default()] = true;
        }

        let y_text = raw_cell(layout.response);
        let x_text = raw_cell(layout.covariate);
        let reason = if is_missing(y_text) {
            Some(DropReason::MissingResponse)
        } else if is_missing(x_text) {
            Some(DropReason::MissingCovariate)
        } else if group_missing {
            Some(DropReason::MissingGroup)
        } else {
            None
        };
        if let Some(reason) = reason {
            *dropped.entry(reason).or_default() += 1;
            continue;
        }
        let y_raw = number(y_text, || cell_at(layout.response))?;
        let x_raw = number(x_text, || cell_at(layout.covariate))?;
        let y = domain_y.apply(model.response_transform, y_raw, row);
        let x = domain_x.apply(model.covariate_transform, x_raw, row);
        if let (Some(x), Some(y), Some(g)) = (x, y, slot) {
            let row32 = u32::try_from(row).map_err(|_| DataError::TooManyRows {
                max: u64::from(u32::MAX),
            })?;
            groups[g].push(row32, x, y);
        }
    }

    if rows_read == 0 {
        return Err(DataError::NoRows);
    }
    domain_y.check(&model.response, model.response_transform)?;
    domain_x.check(&model.covariate, model.covariate_transform)?;
    if let Some(levels) = &model.levels {
        if let Some(i) = seen_level.iter().position(|seen| !seen) {
            return Err(DataError::AbsentLevel {
                level: levels[i].clone(),
                index: i,
                column: model.group.clone(),
            });
        }
    } else {
        groups.sort_by(|a, b| a.level.cmp(&b.level));
    }
    Ok(Dataset {
        columns,
        rows_read,
        dropped,
        groups,
    })
}

/// A header cell without the UTF-8 byte-order mark some programs put before the
/// first one (shared with the plan drafter, so both read a header alike).
pub(crate) fn header_cell(i: usize, raw: &[u8]) -> &[u8] {
    if i == 0 {
        raw.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(raw)
    } else {
        raw
    }
}

fn read_header<R: Read>(csv: &mut csv::Reader<R>) -> Result<Vec<String>, DataError> {
    let header = csv.byte_headers().map_err(|e| csv_error(e, 0))?.clone();
    if header.is_empty() || (header.len() == 1 && header[0].iter().all(u8::is_ascii_whitespace)) {
        return Err(DataError::Empty);
    }
    let mut columns = Vec::with_capacity(header.len());
    for (i, raw) in header.iter().enumerate() {
        let raw = header_cell(i, raw);
        let name = std::str::from_utf8(raw).map_err(|_| DataError::NotUtf8 {
            at: CellAt {
                row: 0,
                line: 1,
                column: String::from_utf8_lossy(raw).into_owned(),
                column_number: i + 1,
            },
        })?;
        let name = name.trim().to_string();
        if let Some(first) = columns.iter().position(|c| *c == name) {
            return Err(DataError::DuplicateColumn {
                name,
                first: first + 1,
                second: i + 1,
            });
        }
        columns.push(name);
    }
    Ok(columns)
}

fn layout(plan: &Plan, columns: &[String]) -> Result<Layout, DataError> {
    let find = |name: &str, key: PlanKey| -> Result<usize, DataError> {
        columns
            .iter()
            .position(|c| c == name)
            .ok_or_else(|| DataError::MissingColumn {
                column: name.to_string(),
                key,
                suggestion: did_you_mean(name, columns.iter().map(String::as_str))
                    .map(str::to_string),
                available: columns.to_vec(),
            })
    };
    let model = &plan.model;
    Ok(Layout {
        response: find(&model.response, PlanKey::Response)?,
        covariate: find(&model.covariate, PlanKey::Covariate)?,
        group: find(&model.group, PlanKey::Group)?,
        keep: plan
            .data
            .keep
            .iter()
            .enumerate()
            .map(|(i, rule)| {
                Ok((
                    find(&rule.column, PlanKey::Keep(i))?,
                    rule.accepted
                        .iter()
                        .map(|a| a.trim().as_bytes().to_vec())
                        .collect(),
                ))
            })
            .collect::<Result<_, DataError>>()?,
    })
}

/// Groups up to this many are found by comparing labels, faster than hashing.
const LINEAR_LOOKUP: usize = 16;

fn trim_ascii(bytes: &[u8]) -> &[u8] {
    bytes.trim_ascii()
}

/// Parses a numeric cell (Eisel–Lemire via fast-float2; the whole cell must be a
/// number).
fn number(text: &[u8], at: impl Fn() -> CellAt) -> Result<f64, DataError> {
    match fast_float2::parse::<f64, _>(text) {
        Ok(v) if v.is_finite() => Ok(v),
        parsed => {
            let Ok(s) = std::str::from_utf8(text) else {
                return Err(DataError::NotUtf8 { at: at() });
            };
            let text = s.to_string();
            Err(if parsed.is_ok() {
                DataError::NotFinite { at: at(), text }
            } else {
                DataError::NotANumber { at: at(), text }
            })
        }
    }
}

fn csv_error(e: csv::Error, row: u64) -> DataError {
    let line = e.position().map_or(row + 1, |p| p.line());
    match e.into_kind() {
        csv::ErrorKind::Io(io) => DataError::Io(io.to_string()),
        csv::ErrorKind::UnequalLengths {
            expected_len,
            len,
            pos,
            ..
        } => DataError::Ragged {
            row: pos.as_ref().map_or(row, |p| p.record()),
            line: pos.as_ref().map_or(line, |p| p.line()),
            expected: expected_len as usize,
            found: len as usize,
        },
        other => DataError::Syntax {
            line,
            message: format!("{other:?}"),
        },
    }
}

/// Values outside a transform's domain: the count and the first few rows.
#[derive(Default)]
struct DomainErrors {
    count: u64,
    rows: Vec<(u64, f64)>,
}

impl DomainErrors {
    #[inline]
    fn apply(&mut self, t: Transform, v: f64, row: u64) -> Option<f64> {
        let out = t.apply(v);
        if out.is_none() {
            self.count += 1;
            if self.rows.len() < MAX_DOMAIN_ROWS {
                self.rows.push((row, v));
            }
        }
        out
    }

    fn check(&self, column: &str, transform: Transform) -> Result<(), DataError> {
        if self.count == 0 {
            return Ok(());
        }
        Err(DataError::OutsideDomain {
            column: column.to_string(),
            transform,
            count: self.count,
            rows: self.rows.clone(),
        })
    }
}

#[cfg(test)]
mod tests;
