//! What kind of file `data.path` names, and the keys that belong to that kind: a
//! spreadsheet's `sheet` and `header_row`, a CSV file's `delimiter`. A key of
//! another kind is an error, so that no key the user wrote is silently ignored.

use std::ops::Range;

use super::{PlanError, schema};

/// The kind of data file, from the path's extension (case ignored).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DataFormat {
    /// Delimited text (any extension but the spreadsheet ones).
    Csv,
    /// An Office Open XML workbook (`.xlsx`).
    Xlsx,
    /// An OpenDocument spreadsheet (`.ods`).
    Ods,
    /// A Parquet file (`.parquet`).
    Parquet,
}

impl DataFormat {
    /// The format of `path`.
    pub fn of(path: &str) -> DataFormat {
        let lower = path.to_ascii_lowercase();
        if lower.ends_with(".xlsx") {
            DataFormat::Xlsx
        } else if lower.ends_with(".ods") {
            DataFormat::Ods
        } else if lower.ends_with(".parquet") {
            DataFormat::Parquet
        } else {
            DataFormat::Csv
        }
    }

    /// True for the spreadsheet formats.
    pub fn is_sheet(self) -> bool {
        matches!(self, DataFormat::Xlsx | DataFormat::Ods)
    }

    /// The kind of file, as messages name it.
    pub fn name(self) -> &'static str {
        match self {
            DataFormat::Csv => "a CSV file",
            DataFormat::Xlsx | DataFormat::Ods => "a spreadsheet",
            DataFormat::Parquet => "a Parquet file",
        }
    }
}

/// The kind of file `path` names, with the spreadsheet's sheet and header row.
pub(super) fn kind_and_keys(
    data: &schema::RawData,
    path: &str,
    err: &impl Fn(Range<usize>, String, &str) -> PlanError,
) -> Result<(DataFormat, Option<String>, u32), PlanError> {
    let format = DataFormat::of(path);
    let sheet_keys = [
        data.sheet.as_ref().map(|s| ("data.sheet", s.span())),
        data.header_row
            .as_ref()
            .map(|h| ("data.header_row", h.span())),
    ];
    if !format.is_sheet()
        && let Some((key, span)) = sheet_keys.into_iter().flatten().next()
    {
        return Err(err(
            span,
            format!(
                "{key} applies to spreadsheets, but data.path names {}",
                format.name()
            ),
            "data.path must end in .xlsx or .ods for a sheet to be read; remove the key for a CSV file",
        ));
    }
    if format != DataFormat::Csv
        && let Some(d) = &data.delimiter
    {
        return Err(err(
            d.span(),
            format!(
                "data.delimiter applies to CSV files, but data.path names {}",
                format.name()
            ),
            "remove data.delimiter: its cells need none",
        ));
    }
    let sheet = match &data.sheet {
        Some(s) => Some(super::nonempty(s, "data.sheet", err)?),
        None => None,
    };
    let header_row = match &data.header_row {
        None => 1,
        Some(h) => match u32::try_from(*h.get_ref()) {
            Ok(row) if row >= 1 => row,
            _ => {
                return Err(err(
                    h.span(),
                    format!(
                        "data.header_row must be a row number of 1 or more, found {}",
                        h.get_ref()
                    ),
                    "give the spreadsheet row that holds the column names, as the spreadsheet numbers it (1 for the first row)",
                ));
            }
        },
    };
    Ok((format, sheet, header_row))
}

/// The file `[data]` names: `path` (rows) or `moments` (per-group moments), exactly
/// one, with its span and whether it holds moments.
pub(super) fn file(
    data: &schema::RawData,
    table: Range<usize>,
    err: &impl Fn(Range<usize>, String, &str) -> PlanError,
) -> Result<(String, Range<usize>, bool), PlanError> {
    match (&data.path, &data.moments) {
        (Some(path), None) => Ok((super::nonempty(path, "data.path", err)?, path.span(), false)),
        (None, Some(m)) => {
            let path = super::nonempty(m, "data.moments", err)?;
            let format = DataFormat::of(&path);
            if format.is_sheet() || path.trim() == "-" {
                return Err(err(
                    m.span(),
                    format!(
                        "data.moments must name a CSV or Parquet file, found {}",
                        if format.is_sheet() {
                            "a spreadsheet"
                        } else {
                            "standard input"
                        }
                    ),
                    "save the engine's result as CSV (or .parquet) and name that file",
                ));
            }
            if let Some(missing) = &data.missing {
                return Err(err(
                    missing.span(),
                    "data.missing applies to rows, but data.moments names a file of moments".into(),
                    "remove data.missing: the engine's query leaves out rows with a null response or covariate",
                ));
            }
            Ok((path, m.span(), true))
        }
        (Some(path), Some(m)) => Err(err(
            path.span().start..m.span().end.max(path.span().end),
            "[data] gives both `path` and `moments`".into(),
            "keep `path` to read the rows, or `moments` to read an engine's per-group moments",
        )),
        (None, None) => Err(err(
            table,
            "[data] names no data: neither `path` nor `moments`".into(),
            "add `path = \"file.csv\"` (the rows), or `moments = \"file.csv\"` (per-group moments from `slopewise sql`)",
        )),
    }
}

/// Options that need the rows, refused with a moments file: the robust covariance
/// takes every residual, the sensitivity rerun drops rows.
pub(super) fn without_rows(
    raw: &schema::RawPlan,
    err: &impl Fn(Range<usize>, String, &str) -> PlanError,
) -> Result<(), PlanError> {
    if let Some(c) = raw
        .tests
        .as_ref()
        .and_then(|t| t.get_ref().covariance.as_ref())
        && *c.get_ref() != schema::Covariance::Classical
    {
        return Err(err(
            c.span(),
            format!(
                "tests.covariance = \"{}\" needs every residual, but data.moments gives only per-group moments",
                c.get_ref().name()
            ),
            "remove tests.covariance (classical), or read the rows with data.path",
        ));
    }
    if let Some(s) = raw.checks.as_ref().and_then(|c| c.sensitivity.as_ref())
        && *s.get_ref()
    {
        return Err(err(
            s.span(),
            "checks.sensitivity = true reruns the analysis without rows, but data.moments gives no rows".into(),
            "remove checks.sensitivity, or read the rows with data.path",
        ));
    }
    Ok(())
}
