//! The clock, for the only dated records: approvals and self-test records. Run
//! outputs are never dated, so a rerun gives the same bytes.

use std::time::{SystemTime, UNIX_EPOCH};

use crate::diagnostic::Diagnostic;

/// Seconds since 1970-01-01 UTC: SOURCE_DATE_EPOCH when set (reproducible builds'
/// convention, so tests and archived procedures can fix the date), else the system
/// clock.
pub(super) fn now() -> Result<i64, Diagnostic> {
    match std::env::var("SOURCE_DATE_EPOCH") {
        Ok(v) => v.trim().parse::<i64>().map_err(|_| {
            Diagnostic::new(format!(
                "SOURCE_DATE_EPOCH is `{v}`, not a whole number of seconds since 1970-01-01 UTC"
            ))
            .help("unset it to date the record by the system clock, or set it to e.g. 1767225600")
        }),
        Err(_) => SystemTime::now()
            .duration_since(UNIX_EPOCH)
            .map(|d| i64::try_from(d.as_secs()).unwrap_or(i64::MAX))
            .map_err(|_| {
                Diagnostic::new("the system clock is set before 1970")
                    .help("set the clock, or set SOURCE_DATE_EPOCH")
            }),
    }
}
