//! Parquet files (crate `parquet`, its row reader): the columns the plan names are
//! checked for a type that holds numbers, then every row goes to the CSV reader as
//! the text a careful export would give, so filters, missing tokens (a null is a
//! missing cell), transforms, groups and drops are the very ones a CSV file gets.
//!
//! Numbers are written in Rust's shortest round-trip form of their double, so they
//! parse back to the same value (a 32-bit float widens to a double exactly first).
//! A response or covariate column of text, dates, times or binary is refused by its
//! type, before any row is read, rather than one cell at a time.

use parquet::basic::{ConvertedType, LogicalType, Type as PhysicalType};
use parquet::file::reader::{FileReader, SerializedFileReader};
use parquet::record::Field;

use super::{DataError, Dataset, PlanKey};
use crate::plan::{DataFormat, Plan};

/// Reads the Parquet file in `bytes`.
pub fn load_parquet(plan: &Plan, bytes: &[u8]) -> Result<Dataset, DataError> {
    let reader = open(bytes)?;
    let schema = reader.metadata().file_metadata().schema_descr_ptr();
    for (wanted, key) in [
        (&plan.model.response, PlanKey::Response),
        (&plan.model.covariate, PlanKey::Covariate),
    ] {
        if let Some(column) = schema
            .columns()
            .iter()
            .find(|c| c.name() == wanted.as_str())
            && let Some(found) = not_numeric(
                column.physical_type(),
                column.logical_type_ref(),
                column.converted_type(),
            )
        {
            return Err(DataError::ParquetType {
                column: wanted.clone(),
                found,
                key,
            });
        }
    }
    let text = text(&reader)?;
    let mut csv_plan = plan.clone();
    csv_plan.data.delimiter = b',';
    csv_plan.data.format = DataFormat::Csv;
    super::load(&csv_plan, text.as_bytes())
}

/// The file's reader, once its table is known to be flat.
fn open(bytes: &[u8]) -> Result<SerializedFileReader<bytes::Bytes>, DataError> {
    let reader = SerializedFileReader::new(bytes::Bytes::copy_from_slice(bytes))
        .map_err(|e| DataError::Parquet(format!("it cannot be read as Parquet: {e}")))?;
    for column in reader.metadata().file_metadata().schema_descr().columns() {
        if column.path().parts().len() > 1 {
            return Err(DataError::Parquet(format!(
                "its column `{}` is nested; slopewise reads flat tables",
                column.path().string()
            )));
        }
    }
    Ok(reader)
}

/// The whole table in `bytes` as CSV text (a header, then one line per row).
pub(super) fn table_text(bytes: &[u8]) -> Result<String, DataError> {
    text(&open(bytes)?)
}

/// The rows of `reader` as CSV text, its columns' names as the header.
fn text(reader: &SerializedFileReader<bytes::Bytes>) -> Result<String, DataError> {
    let names: Vec<String> = reader
        .metadata()
        .file_metadata()
        .schema_descr()
        .columns()
        .iter()
        .map(|c| c.name().to_string())
        .collect();
    let mut text = String::new();
    text.push_str(
        &names
            .iter()
            .map(|n| quoted(n))
            .collect::<Vec<_>>()
            .join(","),
    );
    text.push('\n');
    let rows = reader
        .get_row_iter(None)
        .map_err(|e| DataError::Parquet(format!("its rows cannot be read: {e}")))?;
    for row in rows {
        let row = row.map_err(|e| DataError::Parquet(format!("a row cannot be read: {e}")))?;
        let fields: Vec<String> = row.get_column_iter().map(|(_, f)| field(f)).collect();
        text.push_str(&fields.join(","));
        text.push('\n');
    }
    Ok(text)
}

/// Why a column's type holds no numbers, or None when it does (integers, floats and
/// decimals, whatever their width).
fn not_numeric(
    physical: PhysicalType,
    logical: Option<&LogicalType>,
    converted: ConvertedType,
) -> Option<String> {
    match logical {
        Some(LogicalType::Integer { .. } | LogicalType::Decimal { .. } | LogicalType::Float16) => {
            return None;
        }
        Some(LogicalType::String) => return Some("text".into()),
        Some(LogicalType::Date) => return Some("a date".into()),
        Some(LogicalType::Time { .. }) => return Some("a time of day".into()),
        Some(LogicalType::Timestamp { .. }) => return Some("a timestamp".into()),
        Some(other) => return Some(format!("{other:?}").to_lowercase()),
        None => {}
    }
    if converted == ConvertedType::DECIMAL {
        return None;
    }
    match physical {
        PhysicalType::INT32 | PhysicalType::INT64 | PhysicalType::FLOAT | PhysicalType::DOUBLE
            if converted == ConvertedType::NONE
                || converted.to_string().starts_with("INT")
                || converted.to_string().starts_with("UINT") =>
        {
            None
        }
        PhysicalType::BYTE_ARRAY if converted == ConvertedType::UTF8 => Some("text".into()),
        other => Some(format!("{other} ({converted})").to_lowercase()),
    }
}

/// One value as CSV text: a null is an empty (missing) cell.
fn field(f: &Field) -> String {
    match f {
        Field::Null => String::new(),
        Field::Bool(b) => if *b { "TRUE" } else { "FALSE" }.into(),
        Field::Byte(v) => v.to_string(),
        Field::Short(v) => v.to_string(),
        Field::Int(v) => v.to_string(),
        Field::Long(v) => v.to_string(),
        Field::UByte(v) => v.to_string(),
        Field::UShort(v) => v.to_string(),
        Field::UInt(v) => v.to_string(),
        Field::ULong(v) => v.to_string(),
        Field::Float16(v) => f64::from(f32::from(*v)).to_string(),
        Field::Float(v) => f64::from(*v).to_string(),
        Field::Double(v) => v.to_string(),
        Field::Str(s) => quoted(s),
        // Decimals, dates, times and the rest as the crate writes them.
        other => quoted(&other.to_string()),
    }
}

/// A CSV field, quoted when it must be.
fn quoted(raw: &str) -> String {
    if raw.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", raw.replace('"', "\"\""))
    } else {
        raw.to_string()
    }
}
