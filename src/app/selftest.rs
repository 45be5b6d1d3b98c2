//! `slopewise selftest`: runs the embedded reference cases, prints them, and files a
//! dated record (JSON and Markdown) of the result; non-zero exit on any failure.

use std::path::Path;

use super::files::write_new_file;
use super::{clock, say};
use crate::audit::{selftest, time};
use crate::diagnostic::Diagnostic;

/// Hidden: names one certified value ("case.quantity") to alter before comparing, so
/// a test can show that a wrong value makes the self-test fail. The record says so.
pub(super) const CORRUPT_ENV: &str = "SLOPEWISE_SELFTEST_CORRUPT";

/// Runs the self-test and writes its record into `out`.
pub(super) fn selftest(out: &Path) -> Result<(), Diagnostic> {
    let corrupt = std::env::var(CORRUPT_ENV).ok().filter(|v| !v.is_empty());
    let outcome = selftest::run(corrupt.as_deref()).map_err(|e| {
        Diagnostic::new(format!("the self-test could not run: {e}"))
            .help("this build is damaged; rebuild slopewise from its source")
    })?;
    let secs = clock::now()?;
    let setting = selftest::Setting {
        when: time::rfc3339_utc(secs),
        platform: format!("{} {}", std::env::consts::OS, std::env::consts::ARCH),
        host: host_name(),
    };
    say(&selftest::summary(&outcome));
    std::fs::create_dir_all(out)
        .map_err(|e| Diagnostic::new(format!("cannot create {}: {e}", out.display())))?;
    let stem = format!("selftest-{}", time::file_stamp(secs));
    let json = out.join(format!("{stem}.json"));
    let md = out.join(format!("{stem}.md"));
    write_new_file(&json, &selftest::record_json(&outcome, &setting))?;
    if let Err(e) = write_new_file(
        &md,
        selftest::record_markdown(&outcome, &setting).as_bytes(),
    ) {
        let _ = std::fs::remove_file(&json);
        return Err(e);
    }
    say(&format!(
        "record: {} and {}\n",
        json.display(),
        md.display()
    ));
    if outcome.passed() {
        Ok(())
    } else {
        let first = outcome
            .failures()
            .next()
            .map(selftest::Check::line)
            .unwrap_or_default();
        Err(Diagnostic::new(format!(
            "the self-test failed: {} of {} checks; first: {first}",
            outcome.failures().count(),
            outcome.checks.len()
        ))
        .help("do not use this installation for reported results until the cause is found"))
    }
}

fn host_name() -> Option<String> {
    std::fs::read_to_string("/etc/hostname")
        .ok()
        .or_else(|| std::env::var("HOSTNAME").ok())
        .or_else(|| std::env::var("COMPUTERNAME").ok())
        .map(|s| s.trim().to_string())
        .filter(|s| !s.is_empty())
}
