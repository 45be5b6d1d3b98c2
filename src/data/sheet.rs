//! Spreadsheets (`.xlsx`, `.ods`, read by the `calamine` crate): one sheet's cells
//! from the header row down, handed to the CSV reader as the text a careful export
//! would give, so that filters, missing tokens, transforms, groups and every check
//! of a row are the very ones a CSV file gets.
//!
//! The text is laid out so that its line numbers are the sheet's row numbers (rows
//! above the header become blank lines, which the reader skips), and every error
//! that names a cell names it as the spreadsheet does too (`cell C12 of sheet
//! assays`). What a CSV cannot carry is refused before: a missing or empty sheet, a
//! formula whose value was never saved (the file was written by a program that does
//! not compute), and merged cells (their value sits in one cell and the others read
//! as empty, which would drop rows in silence).
//!
//! Numbers are written in Rust's shortest round-trip form, so they parse back to the
//! same double; dates, which a spreadsheet stores as day counts, are written as text
//! and so refused in a numeric column rather than read as a count of days.

use std::io::Cursor;

use calamine::{Data, Reader, Sheets, open_workbook_auto_from_rs};

use super::{DataError, Dataset};
use crate::plan::{DataFormat, Plan};

/// Reads the plan's sheet from the workbook `bytes`.
pub fn load_sheet(plan: &Plan, bytes: &[u8]) -> Result<Dataset, DataError> {
    let format = plan.data.format;
    let mut book = open_workbook_auto_from_rs(Cursor::new(bytes)).map_err(|e| {
        DataError::Workbook(format!(
            "it cannot be read as {}: {e}",
            match format {
                DataFormat::Ods => "an OpenDocument spreadsheet (.ods)",
                _ => "an Office Open XML workbook (.xlsx)",
            }
        ))
    })?;
    let names = book.sheet_names();
    let name =
        match &plan.data.sheet {
            Some(want) => names.iter().find(|n| *n == want).cloned().ok_or_else(|| {
                DataError::SheetMissing {
                    sheet: want.clone(),
                    available: names.clone(),
                }
            })?,
            None => names.first().cloned().ok_or(DataError::SheetEmpty {
                sheet: String::new(),
            })?,
        };
    let values = book
        .worksheet_range(&name)
        .map_err(|e| DataError::Workbook(format!("sheet `{name}` cannot be read: {e}")))?;
    let Some((row0, col0)) = values.start().filter(|_| !values.is_empty()) else {
        return Err(DataError::SheetEmpty { sheet: name });
    };
    if let Some(merged) = merged_cells(&mut book, bytes, &name) {
        return Err(DataError::MergedCells {
            sheet: name,
            range: merged,
        });
    }
    let formulas = book.worksheet_formula(&name).ok();
    let header = plan.data.header_row;
    let mut text = String::new();
    // Rows 1 … (first row with cells − 1), and any above the header, as blank lines:
    // the reader skips them and the line numbers stay the sheet's.
    for _ in 1..(row0 + 1).max(header) {
        text.push('\n');
    }
    let (height, width) = values.get_size();
    let mut any_row = false;
    for i in 0..height {
        let row = row0 + i as u32 + 1;
        if row < header {
            continue;
        }
        let mut fields = Vec::with_capacity(width);
        for j in 0..width {
            let col = col0 + j as u32;
            let value = values.get((i, j)).unwrap_or(&Data::Empty);
            if *value == Data::Empty
                && let Some(f) = formulas.as_ref().and_then(|f| f.get_value((row - 1, col)))
                && !f.is_empty()
            {
                return Err(DataError::FormulaWithoutValue {
                    cell: cell_name(&name, row, col),
                    formula: f.clone(),
                });
            }
            fields.push(field(value));
        }
        // Trailing empty rows in a sheet's used range are not records.
        if row > header && fields.iter().all(String::is_empty) {
            text.push('\n');
            continue;
        }
        any_row = true;
        text.push_str(&fields.join(","));
        text.push('\n');
    }
    if !any_row {
        return Err(DataError::SheetEmpty { sheet: name });
    }
    let mut csv_plan = plan.clone();
    csv_plan.data.delimiter = b',';
    csv_plan.data.format = DataFormat::Csv;
    super::load(&csv_plan, text.as_bytes()).map_err(|e| e.in_sheet(&name, col0))
}

/// One cell as CSV text, quoted when it must be.
fn field(value: &Data) -> String {
    let raw = match value {
        Data::Empty => return String::new(),
        Data::Int(i) => i.to_string(),
        Data::Float(f) => f.to_string(),
        Data::String(s) => s.clone(),
        Data::Bool(b) => if *b { "TRUE" } else { "FALSE" }.to_string(),
        // A date is a day count inside the file; as text it is refused in a numeric
        // column instead of entering a fit as thousands of days.
        Data::DateTime(d) => format!("date {}", d.as_f64()),
        Data::DateTimeIso(s) | Data::DurationIso(s) => s.clone(),
        Data::Error(e) => e.to_string(),
    };
    if raw.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", raw.replace('"', "\"\""))
    } else {
        raw
    }
}

/// `cell C12 of sheet `name``, for a 1-based row and 0-based column.
pub(super) fn cell_name(sheet: &str, row: u32, col: u32) -> String {
    format!("cell {}{row} of sheet `{sheet}`", column_letters(col))
}

/// A, B, …, Z, AA, … for a 0-based column.
pub(super) fn column_letters(col: u32) -> String {
    let mut n = col + 1;
    let mut letters = Vec::new();
    while n > 0 {
        let r = (n - 1) % 26;
        letters.push(b'A' + r as u8);
        n = (n - 1) / 26;
    }
    letters.reverse();
    String::from_utf8(letters).unwrap_or_default()
}

/// The first merged region of the sheet, as `B2:C3`, if any: from the workbook's
/// own list for .xlsx, and for .ods from the covered cells of the sheet's table.
fn merged_cells(book: &mut Sheets<Cursor<&[u8]>>, bytes: &[u8], name: &str) -> Option<String> {
    match book {
        Sheets::Xlsx(x) => {
            let regions = x.merge_cells_by_sheet_name(name).ok()?;
            regions.first().map(|d| {
                format!(
                    "{}{}:{}{}",
                    column_letters(d.start.1),
                    d.start.0 + 1,
                    column_letters(d.end.1),
                    d.end.0 + 1
                )
            })
        }
        Sheets::Ods(_) => ods_covered(bytes, name).then(|| "spanned cells".to_string()),
        _ => None,
    }
}

/// True when the sheet's table in an .ods file covers cells with a spanned one.
fn ods_covered(bytes: &[u8], name: &str) -> bool {
    let Ok(mut zip) = zip::ZipArchive::new(Cursor::new(bytes)) else {
        return false;
    };
    let Ok(mut content) = zip.by_name("content.xml") else {
        return false;
    };
    let mut xml = String::new();
    if std::io::Read::read_to_string(&mut content, &mut xml).is_err() {
        return false;
    }
    let escaped = name
        .replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
        .replace('\'', "&apos;");
    let open = format!("<table:table table:name=\"{escaped}\"");
    let Some(start) = xml.find(&open) else {
        return false;
    };
    let body = &xml[start..];
    let end = body.find("</table:table>").unwrap_or(body.len());
    body[..end].contains("<table:covered-table-cell")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn columns_are_lettered_as_spreadsheets_letter_them() {
        // Common practice, no source: A…Z, then AA, AB, …, AZ, BA, …
        assert_eq!(column_letters(0), "A");
        assert_eq!(column_letters(25), "Z");
        assert_eq!(column_letters(26), "AA");
        assert_eq!(column_letters(51), "AZ");
        assert_eq!(column_letters(52), "BA");
        assert_eq!(column_letters(701), "ZZ");
        assert_eq!(column_letters(702), "AAA");
    }

    #[test]
    fn fields_quote_what_csv_must_quote() {
        assert_eq!(field(&Data::String("a,b".into())), "\"a,b\"");
        assert_eq!(
            field(&Data::String("say \"x\"".into())),
            "\"say \"\"x\"\"\""
        );
        assert_eq!(field(&Data::Float(0.1)), "0.1");
        assert_eq!(field(&Data::Float(1e-300)).parse::<f64>().unwrap(), 1e-300);
        assert_eq!(field(&Data::Int(-3)), "-3");
        assert_eq!(field(&Data::Empty), "");
    }
}
