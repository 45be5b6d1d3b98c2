//! Approvals and provenance through the binary: keygen, approve, verify after a
//! change to the report, the data or the plan, wrong keys, damaged records, and the
//! build and typst provenance every run records.

mod common;

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use common::{BASE_PLAN, THREE_PLOTS, unindent};

/// A fixed date for the records (2026-01-01T00:00:00Z), so tests can check it.
const EPOCH: &str = "1767225600";

fn scratch(name: &str) -> PathBuf {
    let dir =
        std::env::temp_dir().join(format!("slopewise-approval-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

fn sw(dir: &Path, args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_slopewise"))
        .current_dir(dir)
        .env("SOURCE_DATE_EPOCH", EPOCH)
        .args(args)
        .output()
        .unwrap()
}

fn ok(o: &Output) -> String {
    assert!(
        o.status.success(),
        "stdout:\n{}\nstderr:\n{}",
        String::from_utf8_lossy(&o.stdout),
        String::from_utf8_lossy(&o.stderr)
    );
    String::from_utf8_lossy(&o.stdout).into_owned()
}

/// Fails, and returns stdout + stderr.
fn fails(o: &Output) -> String {
    let text = format!(
        "{}{}",
        String::from_utf8_lossy(&o.stdout),
        String::from_utf8_lossy(&o.stderr)
    );
    assert!(!o.status.success(), "expected a failure:\n{text}");
    assert!(!text.contains("panicked"), "{text}");
    text
}

/// A run folder `out` of the invented three-plot data, with a key pair `k`, `k.pub`.
fn approved_run(name: &str, sign: bool) -> PathBuf {
    let dir = scratch(name);
    std::fs::write(dir.join("plan.toml"), unindent(BASE_PLAN)).unwrap();
    std::fs::write(dir.join("data.csv"), THREE_PLOTS).unwrap();
    ok(&sw(&dir, &["run", "plan.toml"]));
    ok(&sw(&dir, &["keygen", "--out", "k"]));
    let mut args = vec![
        "approve",
        "out",
        "--by",
        "Ana Reviewer",
        "--role",
        "QA reviewer",
    ];
    if sign {
        args.extend(["--key", "k"]);
    }
    let said = ok(&sw(&dir, &args));
    assert!(
        said.contains("approved by Ana Reviewer (QA reviewer)"),
        "{said}"
    );
    dir
}

const RECORD: &str = "out/approvals/001-ana-reviewer.json";

fn flip_last_byte(path: &Path) {
    let mut bytes = std::fs::read(path).unwrap();
    let last = bytes.len() - 2;
    bytes[last] ^= 0x01;
    std::fs::write(path, bytes).unwrap();
}

#[test]
fn keygen_writes_an_owner_only_private_key_and_never_overwrites() {
    let dir = scratch("keygen");
    ok(&sw(&dir, &["keygen", "--out", "k"]));
    let private = std::fs::read_to_string(dir.join("k")).unwrap();
    let public = std::fs::read_to_string(dir.join("k.pub")).unwrap();
    assert!(private.contains("ed25519-private-key "), "{private}");
    assert!(public.contains("ed25519-public-key "), "{public}");
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        let mode = std::fs::metadata(dir.join("k"))
            .unwrap()
            .permissions()
            .mode();
        assert_eq!(mode & 0o777, 0o600, "private key mode {mode:o}");
    }
    let err = fails(&sw(&dir, &["keygen", "--out", "k"]));
    assert!(err.contains("k already exists"), "{err}");
    assert_eq!(std::fs::read_to_string(dir.join("k")).unwrap(), private);
    // A second pair is a different key.
    ok(&sw(&dir, &["keygen", "--out", "k2"]));
    assert_ne!(std::fs::read_to_string(dir.join("k2.pub")).unwrap(), public);
}

#[test]
fn a_signed_approval_holds_and_pins_who_when_and_every_hash() {
    let dir = approved_run("holds", true);
    let record: serde_json::Value =
        serde_json::from_slice(&std::fs::read(dir.join(RECORD)).unwrap()).unwrap();
    assert_eq!(record["by"], "Ana Reviewer");
    assert_eq!(record["role"], "QA reviewer");
    // SOURCE_DATE_EPOCH 1767225600 is 2026-01-01T00:00:00Z (common practice, no source:
    // 56 years of 365 days + 14 leap days, times 86400).
    assert_eq!(record["when"], "2026-01-01T00:00:00Z");
    assert!(record["meaning"].as_str().unwrap().contains("approve"));
    // The hashes are the files' own, computed here independently.
    for file in ["report.md", "results.json", "plan.toml", "manifest.json"] {
        let bytes = std::fs::read(dir.join("out").join(file)).unwrap();
        assert_eq!(
            record["files"][file],
            slopewise::digest::sha256_hex(&bytes),
            "{file}"
        );
    }
    assert_eq!(
        record["data_sha256"],
        slopewise::digest::sha256_hex(THREE_PLOTS.as_bytes())
    );
    assert_eq!(record["signature"]["algorithm"], "ed25519");
    // The report is not touched by approving: the run's manifest still matches it.
    ok(&sw(&dir, &["verify", "out"]));
    let said = ok(&sw(&dir, &["verify", "out", "--trusted-key", "k.pub"]));
    assert!(
        said.contains(
            "001-ana-reviewer.json: Ana Reviewer (QA reviewer), 2026-01-01T00:00:00Z: holds"
        ),
        "{said}"
    );
    assert!(
        said.contains("signature checks with a trusted key"),
        "{said}"
    );
    assert!(said.contains("identical to a fresh run"), "{said}");
}

#[test]
fn one_changed_byte_of_report_data_or_plan_ends_the_approval_and_is_named() {
    for (case, path, named) in [
        (
            "report",
            "out/report.md",
            "report.md changed since the approval",
        ),
        (
            "results",
            "out/results.json",
            "results.json changed since the approval",
        ),
        (
            "plan",
            "out/plan.toml",
            "plan.toml changed since the approval",
        ),
        (
            "data",
            "data.csv",
            "the data file data.csv changed since the approval",
        ),
    ] {
        let dir = approved_run(&format!("change-{case}"), true);
        flip_last_byte(&dir.join(path));
        let said = fails(&sw(&dir, &["verify", "out", "--trusted-key", "k.pub"]));
        assert!(said.contains("NO LONGER HOLDS"), "{case}: {said}");
        assert!(said.contains(named), "{case}: {said}");
        assert!(
            said.contains("1 of 1 approvals no longer hold"),
            "{case}: {said}"
        );
        // Only that change is named: the signature itself still checks.
        assert!(
            said.contains("signature checks with a trusted key"),
            "{case}: {said}"
        );
    }
}

#[test]
fn a_wrong_key_fails() {
    let dir = approved_run("wrong-key", true);
    ok(&sw(&dir, &["keygen", "--out", "other"]));
    // Signed with k, but the checker trusts only `other`.
    let said = fails(&sw(&dir, &["verify", "out", "--trusted-key", "other.pub"]));
    assert!(said.contains("not among the trusted keys"), "{said}");
    // The record edited to name another key than the one that signed it.
    let record_path = dir.join(RECORD);
    let mut record: serde_json::Value =
        serde_json::from_slice(&std::fs::read(&record_path).unwrap()).unwrap();
    let other = std::fs::read_to_string(dir.join("other.pub")).unwrap();
    let other_hex = other.lines().last().unwrap().split(' ').nth(1).unwrap();
    record["signature"]["public_key"] = other_hex.into();
    std::fs::write(&record_path, serde_json::to_vec_pretty(&record).unwrap()).unwrap();
    let said = fails(&sw(&dir, &["verify", "out"]));
    assert!(said.contains("signature fails"), "{said}");
    // A public key cannot sign; a private key is not a trusted key.
    let said = fails(&sw(
        &dir,
        &[
            "approve", "out", "--by", "B", "--role", "R", "--key", "k.pub",
        ],
    ));
    assert!(
        said.contains("k.pub cannot sign: it holds a public key"),
        "{said}"
    );
    let said = fails(&sw(&dir, &["verify", "out", "--trusted-key", "k"]));
    assert!(
        said.contains("k is not a public key: it holds a private key"),
        "{said}"
    );
}

#[test]
fn an_edited_record_fails_its_signature() {
    let dir = approved_run("edited", true);
    let path = dir.join(RECORD);
    let text = std::fs::read_to_string(&path).unwrap();
    std::fs::write(&path, text.replace("QA reviewer", "Director")).unwrap();
    let said = fails(&sw(&dir, &["verify", "out"]));
    assert!(
        said.contains("signature fails: the signature does not match the record"),
        "{said}"
    );
}

#[test]
fn a_record_with_a_missing_field_is_rejected_clearly() {
    let dir = approved_run("missing-field", true);
    let path = dir.join(RECORD);
    let mut record: serde_json::Value =
        serde_json::from_slice(&std::fs::read(&path).unwrap()).unwrap();
    record.as_object_mut().unwrap().remove("role");
    std::fs::write(&path, serde_json::to_vec_pretty(&record).unwrap()).unwrap();
    let said = fails(&sw(&dir, &["verify", "out"]));
    assert!(
        said.contains("approvals/001-ana-reviewer.json: REJECTED, not a valid approval record: it has no `role` field"),
        "{said}"
    );
    // Nothing else can sit among the records unseen.
    let dir = approved_run("stray-file", true);
    std::fs::write(dir.join("out/approvals/notes.txt"), "approved, trust me").unwrap();
    let said = fails(&sw(&dir, &["verify", "out"]));
    assert!(
        said.contains("approvals/notes.txt: REJECTED, not an approval record"),
        "{said}"
    );
    assert!(said.contains("1 of 2 approvals no longer hold"), "{said}");
}

#[test]
fn an_unsigned_approval_holds_on_hashes_but_not_against_trusted_keys() {
    let dir = approved_run("unsigned", false);
    let said = ok(&sw(&dir, &["verify", "out"]));
    assert!(said.contains(": holds"), "{said}");
    assert!(said.contains("unsigned"), "{said}");
    let said = fails(&sw(&dir, &["verify", "out", "--trusted-key", "k.pub"]));
    assert!(said.contains("NO LONGER HOLDS"), "{said}");
}

#[test]
fn approvals_are_numbered_and_a_run_never_discards_them() {
    let dir = approved_run("second", true);
    ok(&sw(
        &dir,
        &[
            "approve",
            "out",
            "--by",
            "Bo Lead",
            "--role",
            "Study director",
            "--key",
            "k",
        ],
    ));
    assert!(dir.join("out/approvals/002-bo-lead.json").exists());
    let said = ok(&sw(&dir, &["verify", "out", "--trusted-key", "k.pub"]));
    assert_eq!(said.matches(": holds").count(), 2, "{said}");
    let before = std::fs::read(dir.join("out/report.md")).unwrap();
    let said = fails(&sw(&dir, &["run", "plan.toml"]));
    assert!(said.contains("holds approvals of its report"), "{said}");
    assert_eq!(std::fs::read(dir.join("out/report.md")).unwrap(), before);
}

#[test]
fn an_edited_folder_or_an_unusable_request_is_not_approved() {
    let dir = approved_run("refuse", true);
    flip_last_byte(&dir.join("out/report.md"));
    let said = fails(&sw(&dir, &["approve", "out", "--by", "C", "--role", "R"]));
    assert!(
        said.contains("report.md differs from what the run wrote"),
        "{said}"
    );
    let said = fails(&sw(&dir, &["approve", "out", "--by", " ", "--role", "R"]));
    assert!(said.contains("--by is empty"), "{said}");
    let said = fails(&sw(&dir, &["approve", ".", "--by", "C", "--role", "R"]));
    assert!(said.contains("has no readable manifest.json"), "{said}");
    let bad_clock = Command::new(env!("CARGO_BIN_EXE_slopewise"))
        .current_dir(&dir)
        .env("SOURCE_DATE_EPOCH", "yesterday")
        .args(["selftest", "--out", "st"])
        .output()
        .unwrap();
    assert!(fails(&bad_clock).contains("SOURCE_DATE_EPOCH is `yesterday`"));
    assert!(!dir.join("out/approvals/002-c.json").exists());
}

/// The commit the tree is at, when git can say (a CI clone can).
fn git_head() -> Option<String> {
    let out = Command::new("git")
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .args(["rev-parse", "HEAD"])
        .output()
        .ok()?;
    out.status
        .success()
        .then(|| String::from_utf8_lossy(&out.stdout).trim().to_string())
}

#[test]
fn provenance_names_the_build_and_what_shaped_the_pdf() {
    let dir = scratch("provenance");
    std::fs::write(
        dir.join("plan.toml"),
        unindent(BASE_PLAN).replace(
            "out = \"out\"",
            "formats = [\"markdown\", \"json\", \"pdf\"]\nout = \"out\"",
        ),
    )
    .unwrap();
    std::fs::write(dir.join("data.csv"), THREE_PLOTS).unwrap();
    // A stand-in for typst: says its version and writes a PDF, so this test needs no
    // real typst (tests/pdf.rs covers that).
    let fake = dir.join("fake-typst");
    std::fs::write(
        &fake,
        "#!/bin/sh\nif [ \"$1\" = \"--version\" ]; then echo 'typst 9.9.9 (test stand-in)'; exit 0; fi\nprintf '%%PDF-stand-in\\n%%%%EOF\\n' > report.pdf\n",
    )
    .unwrap();
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        std::fs::set_permissions(&fake, std::fs::Permissions::from_mode(0o755)).unwrap();
    }
    let out = Command::new(env!("CARGO_BIN_EXE_slopewise"))
        .current_dir(&dir)
        .env("SLOPEWISE_TYPST", &fake)
        .args(["run", "plan.toml"])
        .output()
        .unwrap();
    ok(&out);
    let results: serde_json::Value =
        serde_json::from_slice(&std::fs::read(dir.join("out/results.json")).unwrap()).unwrap();
    let manifest: serde_json::Value =
        serde_json::from_slice(&std::fs::read(dir.join("out/manifest.json")).unwrap()).unwrap();
    let pv = &results["provenance"];
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let font = slopewise::digest::sha256_hex(
        &std::fs::read(root.join("assets/fonts/DejaVuSans.ttf")).unwrap(),
    );
    let template =
        slopewise::digest::sha256_hex(&std::fs::read(root.join("templates/report.typ")).unwrap());
    for record in [pv, &manifest] {
        let commit = record["build_commit"].as_str().unwrap();
        // CI (.ci/run) builds a clean clone and sets SLOPEWISE_REQUIRE_BUILD_COMMIT:
        // there the commit must be real.
        if std::env::var_os("SLOPEWISE_REQUIRE_BUILD_COMMIT").is_some() {
            assert_ne!(commit, "unknown", "a CI build must record its commit");
        }
        match git_head() {
            // Built inside git: the real commit, never "unknown".
            Some(head) if std::env::var_os("SLOPEWISE_BUILD_COMMIT").is_none() => {
                assert_eq!(commit, head)
            }
            Some(_) => {}
            None => assert!(!commit.is_empty()),
        }
        assert!(
            record["rustc_version"]
                .as_str()
                .unwrap()
                .starts_with("rustc "),
            "{record}"
        );
        assert_eq!(record["typst_version"], "typst 9.9.9 (test stand-in)");
        assert_eq!(record["font_sha256"]["DejaVuSans.ttf"], font.as_str());
        assert_eq!(record["template_sha256"]["report.typ"], template.as_str());
    }
    assert_eq!(pv["tool_version"], slopewise::TOOL_VERSION);
    let md = std::fs::read_to_string(dir.join("out/report.md")).unwrap();
    for needle in [
        format!(
            "| build commit | {} |",
            pv["build_commit"].as_str().unwrap()
        ),
        "| typst | typst 9.9.9 (test stand-in) |".to_string(),
        format!("| font DejaVuSans.ttf SHA-256 | {font} |"),
        format!("| template report.typ SHA-256 | {template} |"),
    ] {
        assert!(md.contains(&needle), "report.md lacks {needle}");
    }
    assert!(
        md.contains("not approved"),
        "the first page states the approval rule"
    );

    // Without a PDF nothing about typst is recorded, and typst is never asked.
    let dir2 = scratch("provenance-nopdf");
    std::fs::write(dir2.join("plan.toml"), unindent(BASE_PLAN)).unwrap();
    std::fs::write(dir2.join("data.csv"), THREE_PLOTS).unwrap();
    ok(&sw(&dir2, &["run", "plan.toml"]));
    let results: serde_json::Value =
        serde_json::from_slice(&std::fs::read(dir2.join("out/results.json")).unwrap()).unwrap();
    assert!(results["provenance"]["typst_version"].is_null());
    assert!(
        !results["provenance"]["build_commit"]
            .as_str()
            .unwrap()
            .is_empty()
    );
}

#[test]
fn a_real_typst_reports_its_version() {
    let real = Command::new("typst").arg("--version").output();
    let Some(version) = real.ok().filter(|o| o.status.success()) else {
        assert!(
            std::env::var_os("SLOPEWISE_REQUIRE_PDF_TOOLS").is_none(),
            "typst is missing, and SLOPEWISE_REQUIRE_PDF_TOOLS forbids skipping"
        );
        eprintln!("skipped: typst is not installed");
        return;
    };
    let first = String::from_utf8_lossy(&version.stdout)
        .lines()
        .next()
        .unwrap()
        .trim()
        .to_string();
    let dir = scratch("real-typst");
    std::fs::write(
        dir.join("plan.toml"),
        unindent(BASE_PLAN).replace(
            "out = \"out\"",
            "formats = [\"json\", \"pdf\"]\nout = \"out\"",
        ),
    )
    .unwrap();
    std::fs::write(dir.join("data.csv"), THREE_PLOTS).unwrap();
    ok(&sw(&dir, &["run", "plan.toml"]));
    let results: serde_json::Value =
        serde_json::from_slice(&std::fs::read(dir.join("out/results.json")).unwrap()).unwrap();
    assert_eq!(results["provenance"]["typst_version"], first.as_str());
}
