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
