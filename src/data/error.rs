//! The data stage's error: what is wrong with the CSV, at which row and column.

use crate::diagnostic::Diagnostic;
use crate::plan::Transform;

/// Which plan key named a column, so the message can point at it.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PlanKey {
    /// `model.response`.
    Response,
    /// `model.covariate`.
    Covariate,
    /// `model.group`.
    Group,
    /// `column` of the i-th `[[data.keep]]` rule.
    Keep(usize),
    /// The i-th entry of `model.levels`.
    Level(usize),
    /// `data.sheet` (or `data.path` when the plan names no sheet).
    Sheet,
}

impl PlanKey {
    /// The key as written in the plan.
    pub fn name(self) -> String {
        match self {
            PlanKey::Response => "model.response".into(),
            PlanKey::Covariate => "model.covariate".into(),
            PlanKey::Group => "model.group".into(),
            PlanKey::Keep(i) => format!("data.keep[{}].column", i + 1),
            PlanKey::Level(i) => format!("model.levels[{}]", i + 1),
            PlanKey::Sheet => "data.sheet".into(),
        }
    }
}

/// A cell's position: 1-based data row (header excluded), file line and column.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct CellAt {
    /// 1-based data row, header excluded.
    pub row: u64,
    /// 1-based line of the file where the record starts.
    pub line: u64,
    /// Column name from the header.
    pub column: String,
    /// 1-based column position.
    pub column_number: usize,
    /// In a spreadsheet, the cell as the spreadsheet names it (`cell C12 of sheet
    /// `assays``), in place of the file line.
    pub cell: Option<String>,
}

impl std::fmt::Display for CellAt {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match &self.cell {
            Some(cell) => write!(
                f,
                "{cell} (data row {}, column `{}`)",
                self.row, self.column
            ),
            None => write!(
                f,
                "data row {} (file line {}), column `{}` (column {})",
                self.row, self.line, self.column, self.column_number
            ),
        }
    }
}

/// Something wrong with the data file or its fit to the plan.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum DataError {
    /// The file could not be read.
    #[error("cannot read the data file: {0}")]
    Io(String),
    /// Zero bytes, or only blank lines.
    #[error("the data file is empty")]
    Empty,
    /// A header and no data rows.
    #[error("the data file has a header row but no data rows")]
    NoRows,
    /// Two header cells with the same name.
    #[error("column name `{name}` appears twice in the header (columns {first} and {second})")]
    DuplicateColumn {
        /// The repeated name.
        name: String,
        /// Its first position (1-based).
        first: usize,
        /// Its second position.
        second: usize,
    },
    /// A plan key names a column that the header does not have.
    #[error("column `{column}` named by {} is not in the data", key.name())]
    MissingColumn {
        /// The column named in the plan.
        column: String,
        /// Which plan key named it.
        key: PlanKey,
        /// A close header name, if any.
        suggestion: Option<String>,
        /// All header names.
        available: Vec<String>,
    },
    /// A record with a different number of fields than the header.
    #[error(
        "data row {row} (file line {line}) has {found} {}, but the header has {expected}",
        if *found == 1 { "field" } else { "fields" }
    )]
    Ragged {
        /// Data row.
        row: u64,
        /// File line.
        line: u64,
        /// Fields in the header.
        expected: usize,
        /// Fields in this row.
        found: usize,
    },
    /// A quoted field that opens and never closes: the reader runs it on over the
    /// following lines, so the row looks short.
    #[error(
        "data row {row} (file line {line}), field {field}: a quoted field opens here and is never closed; it runs on over {lines} lines"
    )]
    UnclosedQuote {
        /// Data row.
        row: u64,
        /// File line where the field opens.
        line: u64,
        /// 1-based field number.
        field: usize,
        /// File lines the field swallowed.
        lines: usize,
    },
    /// Bytes that are not UTF-8 text.
    #[error("{at} is not valid UTF-8 text")]
    NotUtf8 {
        /// Where.
        at: CellAt,
    },
    /// Another CSV syntax problem.
    #[error("the data file could not be parsed near file line {line}: {message}")]
    Syntax {
        /// File line.
        line: u64,
        /// The parser's words.
        message: String,
    },
    /// A numeric column holds text.
    #[error("{at} holds `{text}`, which is not a number")]
    NotANumber {
        /// Where.
        at: CellAt,
        /// The cell text.
        text: String,
    },
    /// A numeric cell reads as infinite or NaN.
    #[error("{at} holds `{text}`, which is not a finite number")]
    NotFinite {
        /// Where.
        at: CellAt,
        /// The cell text.
        text: String,
    },
    /// A numeric cell so small in magnitude that it reads as zero, which would change
    /// the data silently (as `1e400` reading as infinity would).
    #[error("{at} holds `{text}`, which is too small to represent and would read as 0")]
    Underflow {
        /// Where.
        at: CellAt,
        /// The cell text.
        text: String,
    },
    /// Values outside a transform's domain, in one transformed column or in both
    /// (`also`), so that fixing the first does not just reveal the second.
    #[error(
        "{transform} of `{column}` needs {domain}, but {count} used row{s} {have} other values; first: {first}{more}",
        transform = transform.name(),
        domain = transform.domain(),
        s = if *count == 1 { "" } else { "s" },
        have = if *count == 1 { "has" } else { "have" },
        first = list_rows(rows),
        more = also.iter().map(|c| format!("; and {c}")).collect::<String>()
    )]
    OutsideDomain {
        /// The column whose first offending row comes first.
        column: String,
        /// The transform.
        transform: Transform,
        /// How many rows.
        count: u64,
        /// The first few (data row, value).
        rows: Vec<(u64, f64)>,
        /// The other transformed column, when its values leave its domain too.
        also: Vec<DomainColumn>,
    },
    /// A group label that `model.levels` does not list.
    #[error(
        "data row {row} (file line {line}) has group `{label}` in column `{column}`, which model.levels does not list"
    )]
    UnlistedLevel {
        /// Data row.
        row: u64,
        /// File line.
        line: u64,
        /// The label.
        label: String,
        /// The group column.
        column: String,
        /// The listed level closest to the label (its index and text), a likely typo.
        near: Option<(usize, String)>,
    },
    /// A level listed in the plan that no row carries.
    #[error("level `{level}` listed in model.levels does not occur in column `{column}`")]
    AbsentLevel {
        /// The level.
        level: String,
        /// Its position in `levels`.
        index: usize,
        /// The group column.
        column: String,
    },
    /// A spreadsheet that cannot be opened, or a sheet that cannot be read.
    #[error("the data file is a spreadsheet, but {0}")]
    Workbook(String),
    /// The plan names a sheet the workbook does not have.
    #[error("the workbook has no sheet `{sheet}`")]
    SheetMissing {
        /// The sheet the plan names.
        sheet: String,
        /// The workbook's sheets.
        available: Vec<String>,
    },
    /// The sheet holds no cells, or none from the header row down.
    #[error("{}", if sheet.is_empty() { "the workbook has no sheets".to_string() } else { format!("sheet `{sheet}` holds no rows from its header row down") })]
    SheetEmpty {
        /// The sheet (empty when the workbook has none).
        sheet: String,
    },
    /// A formula cell whose value the file does not hold.
    #[error("{cell} holds the formula `{formula}` but no saved value")]
    FormulaWithoutValue {
        /// Where.
        cell: String,
        /// The formula.
        formula: String,
    },
    /// A Parquet file that cannot be read, or a shape slopewise does not read.
    #[error("the data file is a Parquet file, but {0}")]
    Parquet(String),
    /// A Parquet column the plan reads as numbers holds another type.
    #[error("column `{column}` of the Parquet file holds {found}, not numbers")]
    ParquetType {
        /// The column.
        column: String,
        /// Its type, in words.
        found: String,
        /// Which plan key names it.
        key: PlanKey,
    },
    /// Merged cells in the sheet.
    #[error(
        "sheet `{sheet}` has merged cells ({range}): their value sits in one cell and the others would read as missing"
    )]
    MergedCells {
        /// The sheet.
        sheet: String,
        /// The first merged region.
        range: String,
    },
    /// A moments file without the columns slopewise reads, or with others.
    #[error("the moments file {}", moments_header(missing, unknown))]
    MomentsHeader {
        /// Columns it lacks.
        missing: Vec<String>,
        /// Columns it has that are not moments.
        unknown: Vec<String>,
    },
    /// A value in a moments file that moments of real data cannot take.
    #[error("{at} holds `{text}`: {why}")]
    MomentsValue {
        /// Where.
        at: CellAt,
        /// The cell text.
        text: String,
        /// What is impossible about it.
        why: String,
    },
    /// More rows than row numbers can hold.
    #[error("the data file has more than {max} rows, which slopewise does not support")]
    TooManyRows {
        /// The limit.
        max: u64,
    },
}

/// Values outside a transform's domain in one column.
#[derive(Debug, Clone, PartialEq)]
pub struct DomainColumn {
    /// The column.
    pub column: String,
    /// The transform.
    pub transform: Transform,
    /// How many rows.
    pub count: u64,
    /// The first few (data row, value).
    pub rows: Vec<(u64, f64)>,
}

impl std::fmt::Display for DomainColumn {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "{} of `{}` needs {}, but {} used row{} {} other values; first: {}",
            self.transform.name(),
            self.column,
            self.transform.domain(),
            self.count,
            if self.count == 1 { "" } else { "s" },
            if self.count == 1 { "has" } else { "have" },
            list_rows(&self.rows)
        )
    }
}

fn moments_header(missing: &[String], unknown: &[String]) -> String {
    let list = |names: &[String]| {
        names
            .iter()
            .map(|n| format!("`{n}`"))
            .collect::<Vec<_>>()
            .join(", ")
    };
    match (missing.is_empty(), unknown.is_empty()) {
        (false, true) => format!("lacks the column(s) {}", list(missing)),
        (true, false) => format!("has column(s) that are not moments: {}", list(unknown)),
        _ => format!(
            "lacks the column(s) {} and has others: {}",
            list(missing),
            list(unknown)
        ),
    }
}

fn list_rows(rows: &[(u64, f64)]) -> String {
    rows.iter()
        .map(|(r, v)| format!("data row {r} ({v})"))
        .collect::<Vec<_>>()
        .join(", ")
}

impl DataError {
    /// The error as it reads in the spreadsheet: each cell named by its column letter
    /// and row in sheet `sheet`, whose used range starts at 0-based column `col0`
    /// (the text handed to the CSV reader keeps the sheet's row numbers as lines).
    pub(super) fn in_sheet(self, sheet: &str, col0: u32) -> DataError {
        let at = |at: CellAt| CellAt {
            cell: Some(super::sheet::cell_name(
                sheet,
                at.line as u32,
                col0 + at.column_number as u32 - 1,
            )),
            ..at
        };
        match self {
            DataError::NotUtf8 { at: a } => DataError::NotUtf8 { at: at(a) },
            DataError::NotANumber { at: a, text } => DataError::NotANumber { at: at(a), text },
            DataError::NotFinite { at: a, text } => DataError::NotFinite { at: at(a), text },
            DataError::Underflow { at: a, text } => DataError::Underflow { at: at(a), text },
            DataError::Empty | DataError::NoRows => DataError::SheetEmpty {
                sheet: sheet.to_string(),
            },
            other => other,
        }
    }

    /// The error as it reads for the whole file, when it was found in a part of it
    /// that starts after `rows` data rows (lines are counted afresh, see `lines`).
    pub(super) fn shifted(self, rows: u64) -> DataError {
        let at = |at: CellAt| CellAt {
            row: at.row + rows,
            ..at
        };
        match self {
            DataError::Ragged {
                row,
                line,
                expected,
                found,
            } => DataError::Ragged {
                row: row + rows,
                line,
                expected,
                found,
            },
            DataError::UnclosedQuote {
                row,
                line,
                field,
                lines,
            } => DataError::UnclosedQuote {
                row: row + rows,
                line,
                field,
                lines,
            },
            DataError::NotUtf8 { at: a } => DataError::NotUtf8 { at: at(a) },
            DataError::NotANumber { at: a, text } => DataError::NotANumber { at: at(a), text },
            DataError::NotFinite { at: a, text } => DataError::NotFinite { at: at(a), text },
            DataError::Underflow { at: a, text } => DataError::Underflow { at: at(a), text },
            DataError::UnlistedLevel {
                row,
                line,
                label,
                column,
                near,
            } => DataError::UnlistedLevel {
                row: row + rows,
                line,
                label,
                column,
                near,
            },
            other => other,
        }
    }

    /// The error with its file line replaced (for errors that name one).
    pub(super) fn with_line(mut self, new: u64) -> DataError {
        match &mut self {
            DataError::Ragged { line, .. }
            | DataError::UnclosedQuote { line, .. }
            | DataError::Syntax { line, .. }
            | DataError::UnlistedLevel { line, .. } => *line = new,
            DataError::NotUtf8 { at }
            | DataError::NotANumber { at, .. }
            | DataError::NotFinite { at, .. }
            | DataError::Underflow { at, .. } => at.line = new,
            _ => {}
        }
        self
    }

    /// The plan key this error concerns, so the caller can show the plan line.
    pub fn plan_key(&self) -> Option<PlanKey> {
        match self {
            DataError::SheetMissing { .. } => Some(PlanKey::Sheet),
            DataError::ParquetType { key, .. } => Some(*key),
            DataError::SheetEmpty { sheet } if !sheet.is_empty() => Some(PlanKey::Sheet),
            DataError::MissingColumn { key, .. } => Some(*key),
            DataError::AbsentLevel { index, .. } => Some(PlanKey::Level(*index)),
            DataError::UnlistedLevel {
                near: Some((index, _)),
                ..
            } => Some(PlanKey::Level(*index)),
            _ => None,
        }
    }

    /// The error with advice on how to fix it (the caller adds file and plan span).
    pub fn diagnostic(&self) -> Diagnostic {
        let d = Diagnostic::new(self.to_string());
        match self {
            DataError::Io(_) => d.help("check the path in data.path; it is relative to the plan file's folder"),
            DataError::Empty | DataError::NoRows => {
                d.help("the file needs a header row naming the columns, then one row per observation")
            }
            DataError::DuplicateColumn { .. } => {
                d.help("rename one of the columns so every header name is unique")
            }
            DataError::MissingColumn {
                suggestion,
                available,
                ..
            } => {
                let d = match suggestion {
                    Some(s) => d.help(format!("did you mean `{s}`?")),
                    None => d,
                };
                let d = d.help(format!("columns in the data: {}", available.join(", ")));
                // One column whose name holds another delimiter: the file is split wrongly.
                match available.as_slice() {
                    [only] if only.contains(';') => d.help("the header looks separated by \";\": set `delimiter = \";\"` under [data]"),
                    [only] if only.contains('\t') => d.help("the header looks separated by tabs: set `delimiter = \"tab\"` under [data]"),
                    [only] if only.contains('|') => d.help("the header looks separated by \"|\": set `delimiter = \"|\"` under [data]"),
                    _ => d,
                }
            }
            DataError::Ragged { .. } => d.help(
                "every row needs as many fields as the header; check for a stray or missing delimiter, or quote fields that contain commas",
            ),
            DataError::UnclosedQuote { .. } => d.help(
                "close the quote at the end of the field (a quote inside a quoted field is written twice: \"\"), or remove it",
            ),
            DataError::NotUtf8 { .. } => d.help("save the file as UTF-8 text"),
            DataError::Syntax { .. } => d.help("check the quoting on that line"),
            DataError::NotANumber { text, .. } => {
                let decimal_comma = text.contains(',')
                    && !text.contains('.')
                    && text.replacen(',', ".", 1).parse::<f64>().is_ok();
                if decimal_comma {
                    d.help("this looks like a decimal comma; slopewise reads numbers with a decimal point: export the file with `.` as the decimal mark (and, if fields are separated by \";\", set `delimiter = \";\"` under [data])")
                } else {
                    d.help(
                        "fix the cell, or if it marks a missing value add that text to data.missing (for example missing = [\"\", \"NA\", \"-\"])",
                    )
                }
            }
            DataError::Underflow { .. } => {
                d.help("write the value in a unit that keeps it above about 1e-300, or as 0 if it is zero")
            }
            DataError::NotFinite { .. } => {
                d.help("replace it with a finite value, or with a missing-value token from data.missing")
            }
            DataError::OutsideDomain { .. } => d.help(
                "choose another transform in [model.transform], or exclude those rows with [[data.keep]]",
            ),
            DataError::UnlistedLevel { near, label, .. } => {
                let d = match near {
                    Some((_, level)) => d.help(format!(
                        "model.levels lists `{level}`; did you mean `{label}`? Labels must match exactly, case included"
                    )),
                    None => d,
                };
                d.help(
                    "add the label to model.levels, or leave those rows out with a [[data.keep]] filter on the group column",
                )
            }
            DataError::AbsentLevel { .. } => d.help("remove it from model.levels or check its spelling against the data"),
            DataError::TooManyRows { .. } => d.help("split the file"),
            DataError::Workbook(_) => d.help(
                "data.path ending in .xlsx or .ods must name a workbook saved by a spreadsheet program; a CSV file needs a .csv (or other) ending",
            ),
            DataError::SheetMissing { available, .. } => d.help(format!(
                "sheets in the workbook: {}; set data.sheet to one of them",
                available.join(", ")
            )),
            DataError::SheetEmpty { .. } => d.help(
                "check data.sheet and data.header_row: the header row names the columns and the data rows follow it",
            ),
            DataError::FormulaWithoutValue { .. } => d.help(
                "open the workbook in a spreadsheet program and save it again, so every formula's value is stored, or export the sheet as CSV",
            ),
            DataError::Parquet(_) => d.help(
                "data.path ending in .parquet must name a Parquet file with one flat table; a CSV file needs a .csv (or other) ending",
            ),
            DataError::ParquetType { .. } => d.help(
                "the response and the covariate must be stored as integers, floats or decimals; write the column with a numeric type, or name another column in the plan",
            ),
            DataError::MomentsHeader { .. } => d.help(format!(
                "a moments file has the columns {}, as the query of `slopewise sql PLAN` names them",
                super::MOMENT_COLUMNS.join(", ")
            )),
            DataError::MomentsValue { .. } => d.help(
                "the moments file is the result of the query `slopewise sql PLAN` prints; check that it ran on the plan's columns, or fix the value",
            ),
            DataError::MergedCells { .. } => {
                d.help("unmerge the cells and fill in every row's value, or export the sheet as CSV")
            }
        }
    }
}
