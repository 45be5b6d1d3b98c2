//! The data: one streaming pass over the CSV into per-group columns (on a large
//! file, one pass over each half at once; see `split`).
//!
//! For every record the loader applies the plan's row filters, then the missing-value
//! tokens, then parses the response and covariate and applies their transforms; every
//! row that does not enter the fits is counted under a [`DropReason`]. Each group keeps
//! its (x, y) columns, the data row numbers and one-pass [`Moments`], so the fits need
//! no second pass. The loader reads through an opener the caller passes
//! ([`load_seekable`]) or from bytes in memory ([`load`]); opening the file is the
//! command layer's job.

mod column;
mod error;
mod lines;
mod moments;
mod parquet;
mod rows;
mod sheet;
mod split;
pub mod sql;

pub use column::Column;
pub use error::{CellAt, DataError, DomainColumn, PlanKey};
pub use moments::{COLUMNS as MOMENT_COLUMNS, load_moments};
pub use parquet::load_parquet;
pub use rows::RowNumbers;
pub use sheet::load_sheet;
pub use split::{PARALLEL_MIN_BYTES, load_seekable};

use lines::Located;

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
    /// Moments of (x, y): two-pass over the columns once they are complete (see
    /// [`Moments::two_pass`]), so they do not depend on how the file was split.
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
    }

    /// Computes the moments from the complete columns (two passes over memory).
    fn finish_moments(&mut self) {
        let moments = Moments::two_pass(|| self.points());
        self.moments = moments;
    }

    /// Appends the rows of the same group from a later part of the file, whose row
    /// numbers start `rows_before` rows on.
    fn append(&mut self, later: GroupData, rows_before: u32) {
        self.x.append(later.x);
        self.y.append(later.y);
        self.rows.append(later.rows, rows_before);
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
    /// True when the groups hold moments only (`data.moments`): their columns are
    /// empty, and the checks that need rows cannot run.
    pub from_moments: bool,
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
                out.finish_moments();
                out
            })
            .collect();
        Dataset {
            columns: self.columns.clone(),
            rows_read: self.rows_read,
            dropped: self.dropped.clone(),
            groups,
            from_moments: self.from_moments,
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

/// Reads a CSV held in memory and sorts its rows into groups, as the plan says.
/// Files are read with [`load_seekable`], which this calls with the bytes.
pub fn load(plan: &Plan, bytes: &[u8]) -> Result<Dataset, DataError> {
    load_seekable(plan, bytes.len() as u64, u64::MAX, || {
        Ok(std::io::Cursor::new(bytes))
    })
}

/// One thread, one pass over `reader`; errors keep the byte offset of their record.
fn one_pass<R: Read>(plan: &Plan, reader: R) -> Result<Dataset, Located> {
    let mut csv = csv_reader(plan, true, reader);
    let columns = read_header(&mut csv)?;
    let sorter = Sorter::new(plan, &columns)?;
    let mut part = sorter.part();
    sorter.read(&mut csv, &mut part)?;
    Ok(sorter.finish(part)?)
}

/// The CSV reader every part uses. Records of any length are read, and the sorter
/// checks each against the header, so a part that starts mid-file checks the same.
fn csv_reader<R: Read>(plan: &Plan, has_headers: bool, reader: R) -> csv::Reader<R> {
    csv::ReaderBuilder::new()
        .has_headers(has_headers)
        .flexible(true)
        .buffer_capacity(1 << 16)
        .delimiter(plan.data.delimiter)
        .from_reader(reader)
}

/// The plan's reading of one record, shared by every part of the file.
struct Sorter<'a> {
    plan: &'a Plan,
    columns: &'a [String],
    layout: Layout,
    missing: Vec<Vec<u8>>,
    listed: Option<HashMap<Vec<u8>, usize>>,
}

/// What one stretch of the file gave: its groups, drop counts and domain errors,
/// with row numbers counted from the stretch's own first record.
struct Part {
    groups: Vec<GroupData>,
    seen_level: Vec<bool>,
    index: HashMap<Vec<u8>, usize>,
    last: Option<(Vec<u8>, usize)>,
    dropped: BTreeMap<DropReason, u64>,
    domain_y: DomainErrors,
    domain_x: DomainErrors,
    rows_read: u64,
}

impl<'a> Sorter<'a> {
    fn new(plan: &'a Plan, columns: &'a [String]) -> Result<Self, DataError> {
        Ok(Sorter {
            plan,
            columns,
            layout: layout(plan, columns)?,
            missing: plan
                .data
                .missing
                .iter()
                .map(|m| m.trim().as_bytes().to_vec())
                .collect(),
            listed: plan.model.levels.as_ref().map(|levels| {
                levels
                    .iter()
                    .enumerate()
                    .map(|(i, l)| (l.as_bytes().to_vec(), i))
                    .collect()
            }),
        })
    }

    /// An empty part: with `model.levels`, one group per level in their order.
    fn part(&self) -> Part {
        let groups: Vec<GroupData> = match &self.plan.model.levels {
            Some(levels) => levels.iter().cloned().map(GroupData::new).collect(),
            None => Vec::new(),
        };
        Part {
            seen_level: vec![false; groups.len()],
            groups,
            index: HashMap::new(),
            last: None,
            dropped: BTreeMap::new(),
            domain_y: DomainErrors::default(),
            domain_x: DomainErrors::default(),
            rows_read: 0,
        }
    }

    fn is_missing(&self, cell: &[u8]) -> bool {
        self.missing.iter().any(|m| same_bytes(m, cell))
    }

    /// Reads every record `csv` has left into `part`. Rows in errors are the
    /// reader's own (the caller shifts a later part's into place), lines the
    /// parser's (the caller counts them afresh, see [`lines`]).
    fn read<R: Read>(&self, csv: &mut csv::Reader<R>, part: &mut Part) -> Result<(), Located> {
        let mut record = csv::ByteRecord::new();
        loop {
            match csv.read_byte_record(&mut record) {
                Ok(true) => {}
                Ok(false) => return Ok(()),
                Err(e) => {
                    let byte = e.position().map(|p| p.byte());
                    let error = csv_error(e, part.rows_read + 1);
                    return Err(Located { error, byte });
                }
            }
            part.rows_read += 1;
            self.take(&record, part).map_err(|error| Located {
                error,
                byte: record.position().map(|p| p.byte()),
            })?;
        }
    }

    /// Sorts one record into its group, or counts why it is left out.
    #[inline]
    fn take(&self, record: &csv::ByteRecord, part: &mut Part) -> Result<(), DataError> {
        let columns = self.columns;
        let layout = &self.layout;
        let model = &self.plan.model;
        let row = part.rows_read;
        let line = record.position().map_or(row + 1, |p| p.line());
        if record.len() < columns.len()
            && let Some((field, text)) = record.iter().enumerate().find(|(_, f)| f.contains(&b'\n'))
        {
            // A short row whose field spans lines: a quote opened and never closed.
            return Err(DataError::UnclosedQuote {
                row,
                line,
                field: field + 1,
                lines: text.iter().filter(|b| **b == b'\n').count()
                    + usize::from(text.last() != Some(&b'\n')),
            });
        }
        if record.len() != columns.len() {
            return Err(DataError::Ragged {
                row,
                line,
                expected: columns.len(),
                found: record.len(),
            });
        }
        let cell_at = |col: usize| CellAt {
            row,
            line,
            column: columns[col].clone(),
            column_number: col + 1,
            cell: None,
        };
        let cell = |col: usize| -> Result<&[u8], DataError> {
            let raw = &record[col];
            std::str::from_utf8(raw)
                .map(|s| s.trim().as_bytes())
                .map_err(|_| DataError::NotUtf8 { at: cell_at(col) })
        };
        // Numeric cells skip the UTF-8 check on the fast path: a number is ASCII,
        // and a cell that fails to parse is checked before it is quoted.
        let raw_cell = |col: usize| record[col].trim_ascii();

        for (col, accepted) in &layout.keep {
            let text = cell(*col)?;
            if !accepted.iter().any(|a| same_bytes(a, text)) {
                *part.dropped.entry(DropReason::FilteredOut).or_default() += 1;
                return Ok(());
            }
        }

        let label = cell(layout.group)?;
        let group_missing = self.is_missing(label);
        let slot = if group_missing {
            None
        } else {
            Some(self.slot(label, row, line, part)?)
        };

        let y_text = raw_cell(layout.response);
        let x_text = raw_cell(layout.covariate);
        let reason = if self.is_missing(y_text) {
            Some(DropReason::MissingResponse)
        } else if self.is_missing(x_text) {
            Some(DropReason::MissingCovariate)
        } else if group_missing {
            Some(DropReason::MissingGroup)
        } else {
            None
        };
        if let Some(reason) = reason {
            *part.dropped.entry(reason).or_default() += 1;
            return Ok(());
        }
        let y_raw = number(y_text, || cell_at(layout.response))?;
        let x_raw = number(x_text, || cell_at(layout.covariate))?;
        let y = part.domain_y.apply(model.response_transform, y_raw, row);
        let x = part.domain_x.apply(model.covariate_transform, x_raw, row);
        if let (Some(x), Some(y), Some(g)) = (x, y, slot) {
            let row32 = u32::try_from(row).map_err(|_| too_many_rows())?;
            part.groups[g].push(row32, x, y);
        }
        Ok(())
    }

    /// The group a label belongs to, created on first sight unless `levels` lists
    /// the groups. Consecutive rows of one group skip the lookup.
    fn slot(&self, label: &[u8], row: u64, line: u64, part: &mut Part) -> Result<usize, DataError> {
        if let Some((l, i)) = &part.last
            && same_bytes(l, label)
        {
            part.seen_level[*i] = true;
            return Ok(*i);
        }
        let known = (part.groups.len() <= LINEAR_LOOKUP)
            .then(|| {
                part.groups
                    .iter()
                    .position(|g| same_bytes(g.level.as_bytes(), label))
            })
            .flatten();
        let i = match (&self.listed, known) {
            (_, Some(i)) => i,
            (Some(map), None) => match map.get(label) {
                Some(i) => *i,
                None => return Err(self.unlisted(label, row, line)),
            },
            (None, None) => match part.index.get(label) {
                Some(i) => *i,
                None => part.add_group(label),
            },
        };
        part.last = Some((label.to_vec(), i));
        part.seen_level[i] = true;
        Ok(i)
    }

    fn unlisted(&self, label: &[u8], row: u64, line: u64) -> DataError {
        let model = &self.plan.model;
        let label = String::from_utf8_lossy(label).into_owned();
        let levels = model.levels.as_deref().unwrap_or_default();
        let near = did_you_mean(&label, levels.iter().map(String::as_str)).and_then(|l| {
            levels
                .iter()
                .position(|x| x == l)
                .map(|i| (i, l.to_string()))
        });
        DataError::UnlistedLevel {
            row,
            line,
            label,
            column: model.group.clone(),
            near,
        }
    }

    /// The dataset from the whole file's part: domain and level checks, group order.
    fn finish(&self, part: Part) -> Result<Dataset, DataError> {
        let model = &self.plan.model;
        let Part {
            mut groups,
            seen_level,
            dropped,
            domain_y,
            domain_x,
            rows_read,
            ..
        } = part;
        if rows_read == 0 {
            return Err(DataError::NoRows);
        }
        domain_errors(
            domain_y.problem(&model.response, model.response_transform),
            domain_x.problem(&model.covariate, model.covariate_transform),
        )?;
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
        for g in &mut groups {
            g.finish_moments();
        }
        Ok(Dataset {
            columns: self.columns.to_vec(),
            rows_read,
            dropped,
            groups,
            from_moments: false,
        })
    }
}

impl Part {
    fn add_group(&mut self, label: &[u8]) -> usize {
        let i = self.groups.len();
        self.groups
            .push(GroupData::new(String::from_utf8_lossy(label).into_owned()));
        self.seen_level.push(false);
        self.index.insert(label.to_vec(), i);
        i
    }

    /// Appends the part that follows this one in the file, whose rows are numbered
    /// from its own start.
    fn append(&mut self, later: Part) -> Result<(), DataError> {
        let shift = self.rows_read;
        let last_row = shift + later.rows_read;
        if last_row > u64::from(u32::MAX) {
            return Err(too_many_rows());
        }
        for (g, seen) in later.groups.into_iter().zip(later.seen_level) {
            let i = match self.index.get(g.level.as_bytes()) {
                Some(i) => *i,
                None => match self.groups.iter().position(|h| h.level == g.level) {
                    Some(i) => i,
                    None => self.add_group(g.level.as_bytes()),
                },
            };
            self.seen_level[i] |= seen;
            self.groups[i].append(g, shift as u32);
        }
        for (reason, n) in later.dropped {
            *self.dropped.entry(reason).or_default() += n;
        }
        self.domain_y.append(later.domain_y, shift);
        self.domain_x.append(later.domain_x, shift);
        self.rows_read = last_row;
        Ok(())
    }
}

fn too_many_rows() -> DataError {
    DataError::TooManyRows {
        max: u64::from(u32::MAX),
    }
}

/// Byte equality written out for short cells: faster here than a call to memcmp.
#[inline]
fn same_bytes(a: &[u8], b: &[u8]) -> bool {
    a.len() == b.len() && a.iter().zip(b).all(|(x, y)| x == y)
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
    // Names seen so far, for the duplicate check in one pass: a 200,000-column
    // header took a minute when each name was compared with every earlier one.
    let mut seen: std::collections::HashMap<String, usize> =
        std::collections::HashMap::with_capacity(header.len());
    for (i, raw) in header.iter().enumerate() {
        let raw = header_cell(i, raw);
        let name = std::str::from_utf8(raw).map_err(|_| DataError::NotUtf8 {
            at: CellAt {
                row: 0,
                line: 1,
                column: String::from_utf8_lossy(raw).into_owned(),
                column_number: i + 1,
                cell: None,
            },
        })?;
        let name = name.trim().to_string();
        if let Some(first) = seen.get(&name) {
            return Err(DataError::DuplicateColumn {
                name,
                first: first + 1,
                second: i + 1,
            });
        }
        seen.insert(name.clone(), i);
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

/// Parses a numeric cell (Eisel–Lemire via fast-float2; the whole cell must be a
/// number).
fn number(text: &[u8], at: impl Fn() -> CellAt) -> Result<f64, DataError> {
    match fast_float2::parse::<f64, _>(text) {
        Ok(v) if v.is_finite() && (v != 0.0 || !nonzero_mantissa(text)) => Ok(v),
        parsed => {
            let Ok(s) = std::str::from_utf8(text) else {
                return Err(DataError::NotUtf8 { at: at() });
            };
            let text = s.to_string();
            Err(if parsed.is_ok_and(|v| v == 0.0) {
                DataError::Underflow { at: at(), text }
            } else if parsed.is_ok() {
                DataError::NotFinite { at: at(), text }
            } else {
                DataError::NotANumber { at: at(), text }
            })
        }
    }
}

/// Whether the digits before any exponent include a non-zero one, so that a parse to
/// zero means the value underflowed (`1e-400`) rather than being written as zero.
fn nonzero_mantissa(text: &[u8]) -> bool {
    text.iter()
        .take_while(|b| !matches!(b, b'e' | b'E'))
        .any(|b| (b'1'..=b'9').contains(b))
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

    /// Adds a later part's errors, its rows shifted by `rows_before`.
    fn append(&mut self, later: DomainErrors, rows_before: u64) {
        self.count += later.count;
        let room = MAX_DOMAIN_ROWS.saturating_sub(self.rows.len());
        self.rows.extend(
            later
                .rows
                .into_iter()
                .take(room)
                .map(|(r, v)| (r + rows_before, v)),
        );
    }

    fn problem(&self, column: &str, transform: Transform) -> Option<DomainColumn> {
        (self.count > 0).then(|| DomainColumn {
            column: column.to_string(),
            transform,
            count: self.count,
            rows: self.rows.clone(),
        })
    }
}

/// One error naming every transformed column with values outside its domain, the
/// column whose first offending row comes earlier first.
fn domain_errors(y: Option<DomainColumn>, x: Option<DomainColumn>) -> Result<(), DataError> {
    let mut found: Vec<DomainColumn> = [y, x].into_iter().flatten().collect();
    // Stable: on a tie (both in one row) the response comes first.
    found.sort_by_key(|c| c.rows.first().map_or(u64::MAX, |r| r.0));
    let mut found = found.into_iter();
    let Some(first) = found.next() else {
        return Ok(());
    };
    Err(DataError::OutsideDomain {
        column: first.column,
        transform: first.transform,
        count: first.count,
        rows: first.rows,
        also: found.collect(),
    })
}

#[cfg(test)]
mod tests;
