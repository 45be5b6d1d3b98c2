//! `slopewise selftest` through the binary: it passes on the embedded NIST StRD and
//! statsmodels references, files a dated record, and fails clearly when a certified
//! value is corrupted.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn scratch(name: &str) -> PathBuf {
    let dir =
        std::env::temp_dir().join(format!("slopewise-selftest-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

fn selftest(dir: &Path, corrupt: Option<&str>) -> Output {
    let mut cmd = Command::new(env!("CARGO_BIN_EXE_slopewise"));
    cmd.current_dir(dir)
        .env("SOURCE_DATE_EPOCH", "1767225600")
        .env_remove("SLOPEWISE_SELFTEST_CORRUPT")
        .args(["selftest", "--out", "records"]);
    if let Some(c) = corrupt {
        cmd.env("SLOPEWISE_SELFTEST_CORRUPT", c);
    }
    cmd.output().unwrap()
}

#[test]
fn selftest_passes_and_files_a_dated_record() {
    let dir = scratch("pass");
    let out = selftest(&dir, None);
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(
        out.status.success(),
        "{stdout}{}",
        String::from_utf8_lossy(&out.stderr)
    );
    // NIST StRD Norris certified slope, tests/reference/nist/certified.toml.
    assert!(
        stdout.contains("pass  norris b1: value 1.00211681802045")
            && stdout.contains("certified 1.00211681802045"),
        "{stdout}"
    );
    assert!(stdout.contains("norris: NIST StRD"), "{stdout}");
    assert!(stdout.contains("pass  longley b6:"), "{stdout}");
    for case in ["iris_petal", "penguins_mass", "grunfeld_log"] {
        assert!(
            stdout.contains(&format!("{case}: statsmodels OLS")),
            "{stdout}"
        );
    }
    assert!(stdout.contains("self-test passed"), "{stdout}");
    let json = dir.join("records/selftest-20260101T000000Z.json");
    let record: serde_json::Value = serde_json::from_slice(&std::fs::read(&json).unwrap()).unwrap();
    assert_eq!(record["when"], "2026-01-01T00:00:00Z");
    assert_eq!(record["passed"], true);
    assert!(record["corrupted"].is_null());
    assert!(!record["build_commit"].as_str().unwrap().is_empty());
    assert_eq!(record["checks_failed"], 0);
    assert!(record["checks_run"].as_u64().unwrap() > 100);
    let md = std::fs::read_to_string(dir.join("records/selftest-20260101T000000Z.md")).unwrap();
    assert!(md.contains("| result | passed"), "{md}");
    // A record is never overwritten: a second run in the same second refuses.
    let again = selftest(&dir, None);
    assert!(!again.status.success());
    assert!(String::from_utf8_lossy(&again.stderr).contains("already exists"));
}

#[test]
fn a_corrupted_certified_value_fails_with_a_clear_line() {
    let dir = scratch("corrupt");
    let out = selftest(&dir, Some("norris.b1"));
    let stdout = String::from_utf8_lossy(&out.stdout);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(!out.status.success(), "{stdout}");
    assert!(
        stdout.contains("FAIL  norris b1: value 1.00211681802045"),
        "{stdout}"
    );
    assert!(stdout.contains("self-test FAILED: 1 of"), "{stdout}");
    assert!(stdout.contains("altered on request"), "{stdout}");
    assert!(stderr.contains("the self-test failed: 1 of"), "{stderr}");
    let record: serde_json::Value = serde_json::from_slice(
        &std::fs::read(dir.join("records/selftest-20260101T000000Z.json")).unwrap(),
    )
    .unwrap();
    assert_eq!(record["passed"], false);
    assert_eq!(record["corrupted"], "norris.b1");
    // A statsmodels reference value, too.
    let dir = scratch("corrupt-statsmodels");
    let out = selftest(&dir, Some("penguins_mass.common_slope.slope"));
    assert!(!out.status.success());
    assert!(
        String::from_utf8_lossy(&out.stdout).contains("FAIL  penguins_mass common_slope.slope")
    );
}

#[test]
fn the_embedded_nist_copy_is_the_shared_one() {
    // The binary embeds tests/reference/nist/; it must equal ../shared/reference/nist,
    // the project's copy of the NIST StRD files (CI lays it beside the clone).
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let shared = root.join("../shared/reference/nist");
    if !shared.is_dir() {
        eprintln!("skipped: ../shared/reference/nist is not beside the repository");
        return;
    }
    for file in ["certified.toml", "norris.csv", "longley.csv"] {
        assert_eq!(
            std::fs::read(root.join("tests/reference/nist").join(file)).unwrap(),
            std::fs::read(shared.join(file)).unwrap(),
            "{file}"
        );
    }
}
