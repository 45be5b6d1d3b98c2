//! Calendar dates for the two dated records (approvals, self-test records). The
//! clock itself is read at the edge; this turns its seconds into text.

/// Seconds since 1970-01-01T00:00:00Z as RFC 3339 UTC, e.g. `2026-12-02T18:42:10Z`.
pub fn rfc3339_utc(secs: i64) -> String {
    let (y, m, d, hh, mm, ss) = civil(secs);
    format!("{y:04}-{m:02}-{d:02}T{hh:02}:{mm:02}:{ss:02}Z")
}

/// The same instant in a form that fits a file name, e.g. `20261202T184210Z`.
pub fn file_stamp(secs: i64) -> String {
    let (y, m, d, hh, mm, ss) = civil(secs);
    format!("{y:04}{m:02}{d:02}T{hh:02}{mm:02}{ss:02}Z")
}

/// Year, month, day, hour, minute, second (proleptic Gregorian, UTC).
/// Days to date by Hinnant's `civil_from_days` (Hinnant 2013, "chrono-Compatible
/// Low-Level Date Algorithms").
fn civil(secs: i64) -> (i64, u32, u32, u32, u32, u32) {
    let days = secs.div_euclid(86_400);
    let rem = secs.rem_euclid(86_400);
    let z = days + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z.rem_euclid(146_097);
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = (doy - (153 * mp + 2) / 5 + 1) as u32;
    let m = if mp < 10 { mp + 3 } else { mp - 9 } as u32;
    let y = yoe + era * 400 + i64::from(m <= 2);
    let (hh, mm, ss) = (rem / 3600, rem % 3600 / 60, rem % 60);
    (y, m, d, hh as u32, mm as u32, ss as u32)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn known_instants() {
        // The epoch itself, and 2000-02-29 (a leap day in a century leap year):
        // 951782400 s after the epoch (common practice, no source: 30 years of
        // 365 days + 7 leap days + 59 days, times 86400).
        assert_eq!(rfc3339_utc(0), "1970-01-01T00:00:00Z");
        assert_eq!(rfc3339_utc(951_782_400), "2000-02-29T00:00:00Z");
        assert_eq!(rfc3339_utc(951_782_400 - 1), "2000-02-28T23:59:59Z");
        // 2^31 seconds: the 32-bit rollover, 2038-01-19T03:14:08Z (from memory).
        assert_eq!(rfc3339_utc(2_147_483_648), "2038-01-19T03:14:08Z");
        assert_eq!(file_stamp(2_147_483_648), "20380119T031408Z");
        assert_eq!(rfc3339_utc(-1), "1969-12-31T23:59:59Z");
    }
}
