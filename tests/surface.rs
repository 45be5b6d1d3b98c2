//! Issue 19, "Nothing lost, nothing hung": the command surface under careless or
//! hostile use. Each test reproduces one defect measured on c464eb8 (named in its
//! comment) and states what must happen instead. All data are invented.

mod common;

use std::fs;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use common::{BASE_PLAN, THREE_PLOTS};

/// A fresh folder holding `plan.toml` (BASE_PLAN, reports in `out`) and `data.csv`.
fn setup(name: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("slopewise-surface-{name}-{}", std::process::id()));
    let _ = fs::remove_dir_all(&dir);
    fs::create_dir_all(&dir).unwrap();
    fs::write(dir.join("plan.toml"), unindent(BASE_PLAN)).unwrap();
    fs::write(dir.join("data.csv"), unindent(THREE_PLOTS)).unwrap();
    dir
}

fn unindent(text: &str) -> String {
    text.lines()
        .map(str::trim_start)
        .collect::<Vec<_>>()
        .join("\n")
        + "\n"
}

fn slopewise(dir: &Path, args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_slopewise"))
        .args(args)
        .current_dir(dir)
        .output()
        .expect("run slopewise")
}

fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

fn hidden_leftovers(dir: &Path) -> Vec<String> {
    fs::read_dir(dir)
        .unwrap()
        .filter_map(|e| e.ok())
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .filter(|n| n.contains(".partial-") || n.contains(".previous-") || n.ends_with(".lock"))
        .collect()
}

// ---- 1. never deleting a user's files -------------------------------------------

#[test]
fn a_users_file_inside_figures_survives_and_is_named() {
    // Defect: the replace check looked only at top-level names, so a user's
    // figures/fig1-final.png inside an earlier run folder was deleted.
    let dir = setup("figures");
    assert!(slopewise(&dir, &["run", "plan.toml"]).status.success());
    fs::write(dir.join("out/figures/fig1-final.png"), "x\n").unwrap();
    let o = slopewise(&dir, &["run", "plan.toml"]);
    assert!(!o.status.success(), "{}", stderr(&o));
    assert!(
        stderr(&o).contains("holds `figures/fig1-final.png`, which slopewise did not write"),
        "{}",
        stderr(&o)
    );
    assert_eq!(
        fs::read_to_string(dir.join("out/figures/fig1-final.png")).unwrap(),
        "x\n"
    );
    assert!(
        hidden_leftovers(&dir).is_empty(),
        "{:?}",
        hidden_leftovers(&dir)
    );
}

#[test]
fn a_users_report_md_in_a_folder_slopewise_never_wrote_survives() {
    // Defect: `mypaper/report.md` (a user's notes) and `mypaper/figures/…` were
    // replaced because their names are names slopewise writes.
    let dir = setup("mypaper");
    fs::create_dir_all(dir.join("mypaper/figures")).unwrap();
    fs::write(dir.join("mypaper/report.md"), "notes\n").unwrap();
    fs::write(dir.join("mypaper/figures/fig1-final.png"), "x\n").unwrap();
    let o = slopewise(&dir, &["run", "plan.toml", "--out", "mypaper"]);
    assert!(!o.status.success());
    assert!(
        stderr(&o).contains("which slopewise did not write"),
        "{}",
        stderr(&o)
    );
    assert_eq!(
        fs::read_to_string(dir.join("mypaper/report.md")).unwrap(),
        "notes\n"
    );
    assert_eq!(
        fs::read_to_string(dir.join("mypaper/figures/fig1-final.png")).unwrap(),
        "x\n"
    );
}

#[test]
fn a_run_folder_of_another_plan_is_not_replaced() {
    // Defect: a drafted plan's `out` met a demo's report folder and replaced it.
    let dir = setup("other_plan");
    assert!(slopewise(&dir, &["run", "plan.toml"]).status.success());
    fs::copy(dir.join("plan.toml"), dir.join("second.toml")).unwrap();
    let before = fs::read(dir.join("out/manifest.json")).unwrap();
    let o = slopewise(&dir, &["run", "second.toml"]);
    assert!(!o.status.success());
    assert!(
        stderr(&o).contains("holds the report of another plan (plan.toml, not second.toml)"),
        "{}",
        stderr(&o)
    );
    assert_eq!(fs::read(dir.join("out/manifest.json")).unwrap(), before);
}

#[test]
fn the_same_plans_folder_is_replaced_whole() {
    let dir = setup("rerun");
    assert!(slopewise(&dir, &["run", "plan.toml"]).status.success());
    fs::write(dir.join("out/report.md"), "edited\n").unwrap();
    let o = slopewise(&dir, &["run", "plan.toml"]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert_ne!(
        fs::read_to_string(dir.join("out/report.md")).unwrap(),
        "edited\n"
    );
    assert!(
        hidden_leftovers(&dir).is_empty(),
        "{:?}",
        hidden_leftovers(&dir)
    );
}

#[test]
fn a_kill_between_the_two_renames_is_restored_by_the_next_run() {
    // Defect: a kill at the rename left the old report only in a hidden
    // `.previous-PID` that no later run restored. The state such a kill leaves is
    // made by hand: the target gone, the old report aside.
    let dir = setup("killed");
    assert!(slopewise(&dir, &["run", "plan.toml"]).status.success());
    let old = fs::read(dir.join("out/report.md")).unwrap();
    fs::rename(dir.join("out"), dir.join(".out.previous-4242")).unwrap();
    // A run that fails before writing still puts the old report back.
    fs::write(dir.join("data.csv"), "").unwrap();
    let o = slopewise(&dir, &["run", "plan.toml"]);
    assert!(!o.status.success());
    assert_eq!(fs::read(dir.join("out/report.md")).unwrap(), old);
    assert!(
        hidden_leftovers(&dir).is_empty(),
        "{:?}",
        hidden_leftovers(&dir)
    );
    // And with the old report aside again, a good run restores and then replaces it.
    fs::write(dir.join("data.csv"), unindent(THREE_PLOTS)).unwrap();
    fs::rename(dir.join("out"), dir.join(".out.previous-4243")).unwrap();
    let o = slopewise(&dir, &["run", "plan.toml"]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(dir.join("out/manifest.json").is_file());
    assert!(
        hidden_leftovers(&dir).is_empty(),
        "{:?}",
        hidden_leftovers(&dir)
    );
}

#[test]
fn stale_staging_folders_are_cleaned() {
    // Defect: `.partial-PID` folders of killed runs stayed forever.
    let dir = setup("stale");
    fs::create_dir_all(dir.join(".out.partial-999/figures")).unwrap();
    fs::write(dir.join(".out.partial-999/report.md"), "half").unwrap();
    let o = slopewise(&dir, &["run", "plan.toml"]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(
        hidden_leftovers(&dir).is_empty(),
        "{:?}",
        hidden_leftovers(&dir)
    );
}

#[cfg(unix)]
#[test]
fn a_symlinked_out_is_refused_and_the_link_kept() {
    // Defect: a symlinked --out was replaced by a folder.
    let dir = setup("symlink");
    fs::create_dir_all(dir.join("real")).unwrap();
    std::os::unix::fs::symlink("real", dir.join("link")).unwrap();
    let o = slopewise(&dir, &["run", "plan.toml", "--out", "link"]);
    assert!(!o.status.success());
    assert!(
        stderr(&o).contains("is a symbolic link (to real)"),
        "{}",
        stderr(&o)
    );
    assert!(
        fs::symlink_metadata(dir.join("link"))
            .unwrap()
            .file_type()
            .is_symlink()
    );
}

#[test]
fn out_inside_a_run_folder_is_refused() {
    // Defect: `--out` pointing into an existing run folder nested runs inside it.
    let dir = setup("nested");
    assert!(slopewise(&dir, &["run", "plan.toml"]).status.success());
    let o = slopewise(&dir, &["run", "plan.toml", "--out", "out/inner"]);
    assert!(!o.status.success());
    assert!(
        stderr(&o).contains("would be inside the run folder out"),
        "{}",
        stderr(&o)
    );
    assert!(!dir.join("out/inner").exists());
}

#[test]
fn the_same_plan_twice_runs_once() {
    // Defect: the same plan twice on one command line ran twice into one folder.
    let dir = setup("twice");
    let o = slopewise(&dir, &["run", "plan.toml", "./plan.toml"]);
    assert!(!o.status.success());
    assert!(
        stderr(&o).contains("is named twice on the command line"),
        "{}",
        stderr(&o)
    );
    assert!(dir.join("out/manifest.json").is_file());
}

#[test]
fn two_plans_aimed_at_one_folder_are_refused() {
    let dir = setup("one_folder");
    fs::create_dir_all(dir.join("b")).unwrap();
    fs::write(
        dir.join("b/other.toml"),
        unindent(BASE_PLAN)
            .replace("data.csv", "../data.csv")
            .replace("out = \"out\"", "out = \"../out\""),
    )
    .unwrap();
    let o = slopewise(&dir, &["run", "plan.toml", "b/other.toml"]);
    assert!(!o.status.success());
    let err = stderr(&o);
    assert!(
        err.contains("plan.toml and b/other.toml both write b/../out"),
        "{err}"
    );
}

// ---- 2. nothing hung -----------------------------------------------------------

#[cfg(unix)]
#[test]
fn dev_zero_as_data_is_refused_at_once() {
    // Defect: /dev/zero was read whole into memory.
    let dir = setup("dev_zero");
    let plan = unindent(BASE_PLAN).replace("\"data.csv\"", "\"/dev/zero\"");
    fs::write(dir.join("plan.toml"), plan).unwrap();
    let started = std::time::Instant::now();
    let o = slopewise(&dir, &["run", "plan.toml"]);
    // Common practice, no source: a refusal needs no reading at all; a second is
    // a wide margin even on a loaded machine.
    assert!(started.elapsed() < std::time::Duration::from_secs(1));
    assert!(!o.status.success());
    assert!(
        stderr(&o).contains("is not a regular file but a character device"),
        "{}",
        stderr(&o)
    );
    assert!(!dir.join("out").exists());
}

#[test]
fn a_file_of_zeros_is_refused_as_binary() {
    // Defect: a 2 GB sparse file was read whole; its zeros are caught in the first
    // bytes now (a small file stands for it here).
    let dir = setup("zeros");
    fs::write(dir.join("data.csv"), vec![0u8; 200_000]).unwrap();
    let o = slopewise(&dir, &["run", "plan.toml"]);
    assert!(!o.status.success());
    assert!(
        stderr(&o).contains("is not text: it holds a NUL byte at byte 1"),
        "{}",
        stderr(&o)
    );
}

#[test]
fn a_utf16_file_is_named_as_utf16() {
    // Defect: a UTF-16 file was reported as odd characters in "data row 0".
    let dir = setup("utf16");
    let mut bytes = vec![0xFF, 0xFE];
    for unit in unindent(THREE_PLOTS).encode_utf16() {
        bytes.extend_from_slice(&unit.to_le_bytes());
    }
    fs::write(dir.join("data.csv"), bytes).unwrap();
    let o = slopewise(&dir, &["run", "plan.toml"]);
    assert!(!o.status.success());
    assert!(
        stderr(&o).contains("is UTF-16 text; slopewise reads UTF-8"),
        "{}",
        stderr(&o)
    );
}

#[cfg(unix)]
fn fifo_run(name: &str, pin: bool) -> (PathBuf, Output) {
    let dir = setup(name);
    let csv = unindent(THREE_PLOTS);
    fs::remove_file(dir.join("data.csv")).unwrap();
    assert!(
        Command::new("mkfifo")
            .arg(dir.join("data.csv"))
            .status()
            .unwrap()
            .success()
    );
    if pin {
        let plan = unindent(BASE_PLAN).replace(
            "path = \"data.csv\"",
            &format!(
                "path = \"data.csv\"\nsha256 = \"{}\"",
                slopewise::digest::sha256_hex(csv.as_bytes())
            ),
        );
        fs::write(dir.join("plan.toml"), plan).unwrap();
    }
    let fifo = dir.join("data.csv");
    let writer = std::thread::spawn(move || fs::write(fifo, csv));
    let o = slopewise(&dir, &["run", "plan.toml"]);
    writer.join().unwrap().unwrap();
    (dir, o)
}

#[cfg(unix)]
#[test]
fn fifo_data_records_the_hash_of_the_bytes_parsed() {
    // Defect: the hash, the pin check and the parse each opened the pipe, so the
    // hash was that of an empty file, and a pinned pipe hung.
    let (dir, o) = fifo_run("fifo", false);
    assert!(o.status.success(), "{}", stderr(&o));
    let results = fs::read_to_string(dir.join("out/results.json")).unwrap();
    let want = slopewise::digest::sha256_hex(unindent(THREE_PLOTS).as_bytes());
    assert!(results.contains(&want), "results.json lacks {want}");
    let (_, o) = fifo_run("fifo_pinned", true);
    assert!(o.status.success(), "{}", stderr(&o));
}

#[cfg(unix)]
fn fake_typst(dir: &Path, script: &str) -> PathBuf {
    use std::os::unix::fs::PermissionsExt;
    let fake = dir.join("fake-typst");
    fs::write(&fake, script).unwrap();
    fs::set_permissions(&fake, fs::Permissions::from_mode(0o755)).unwrap();
    fake
}

#[cfg(unix)]
fn pdf_run(dir: &Path, fake: &Path) -> Output {
    let plan = unindent(BASE_PLAN).replace(
        "out = \"out\"",
        "out = \"out\"\nformats = [\"markdown\", \"json\", \"pdf\"]",
    );
    fs::write(dir.join("plan.toml"), plan).unwrap();
    Command::new(env!("CARGO_BIN_EXE_slopewise"))
        .args(["run", "plan.toml"])
        .current_dir(dir)
        .env("SLOPEWISE_TYPST", fake)
        .env("SLOPEWISE_TYPST_TIMEOUT", "1")
        .output()
        .unwrap()
}

#[cfg(unix)]
#[test]
fn a_hanging_typst_is_stopped() {
    // Defect: a typst that hangs hung the run.
    let dir = setup("typst_hangs");
    let fake = fake_typst(&dir, "#!/bin/sh\nexec sleep 30\n");
    let started = std::time::Instant::now();
    let o = pdf_run(&dir, &fake);
    assert!(started.elapsed() < std::time::Duration::from_secs(20));
    assert!(!o.status.success());
    assert!(
        stderr(&o).contains("did not finish within 1 s and was stopped"),
        "{}",
        stderr(&o)
    );
    assert!(dir.join("out/report.md").is_file() && !dir.join("out/report.pdf").exists());
    assert!(!String::from_utf8_lossy(&o.stdout).contains("wrote"));
}

#[cfg(unix)]
#[test]
fn a_typst_that_writes_no_pdf_is_not_reported_as_wrote() {
    // Defect: a typst that exits 0 without a PDF was reported as "wrote".
    let dir = setup("typst_no_pdf");
    let fake = fake_typst(&dir, "#!/bin/sh\nexit 0\n");
    let o = pdf_run(&dir, &fake);
    assert!(!o.status.success());
    assert!(
        stderr(&o).contains("reported success, but no report.pdf appeared"),
        "{}",
        stderr(&o)
    );
    let cut = fake_typst(
        &dir,
        "#!/bin/sh\nprintf '%%PDF-1.7\\n1 0 obj' > report.pdf\n",
    );
    let o = pdf_run(&dir, &cut);
    assert!(!o.status.success());
    assert!(stderr(&o).contains("is cut short"), "{}", stderr(&o));
    assert!(!dir.join("out/report.pdf").exists());
}

// ---- 3. honest records ---------------------------------------------------------

#[test]
fn verify_with_data_accepts_a_byte_identical_copy_elsewhere() {
    // Defect: `verify --data` on a byte-identical copy said the folder was edited.
    let dir = setup("verify_copy");
    assert!(slopewise(&dir, &["run", "plan.toml"]).status.success());
    fs::create_dir_all(dir.join("elsewhere/deeper")).unwrap();
    fs::copy(dir.join("data.csv"), dir.join("elsewhere/deeper/copy.csv")).unwrap();
    let o = slopewise(
        &dir,
        &["verify", "out", "--data", "elsewhere/deeper/copy.csv"],
    );
    assert!(o.status.success(), "{}", stderr(&o));
}

// ---- 4. every write checked ------------------------------------------------------

#[cfg(target_os = "linux")]
#[test]
fn writing_to_a_full_disk_fails_with_one_line() {
    // Defect: `slopewise schema > /dev/full` (and man, completions, init, check)
    // exited 0 with nothing written.
    let dir = setup("dev_full");
    for args in [
        &["schema"][..],
        &["man"][..],
        &["completions", "bash"][..],
        &["check", "plan.toml"][..],
        &["init", "data.csv"][..],
    ] {
        let full = fs::OpenOptions::new()
            .write(true)
            .open("/dev/full")
            .unwrap();
        let o = Command::new(env!("CARGO_BIN_EXE_slopewise"))
            .args(args)
            .current_dir(&dir)
            .stdout(full)
            .output()
            .unwrap();
        assert_eq!(o.status.code(), Some(1), "{args:?}: {}", stderr(&o));
        assert_eq!(
            stderr(&o).lines().count(),
            1,
            "{args:?}: one line, got {}",
            stderr(&o)
        );
        assert!(
            stderr(&o).contains("cannot write to standard output"),
            "{}",
            stderr(&o)
        );
    }
}

#[cfg(unix)]
#[test]
fn a_closed_pipe_ends_quietly_with_status_0() {
    use std::os::fd::{FromRawFd, OwnedFd};
    // A pipe whose reading end is closed before slopewise writes: every write
    // fails with EPIPE, as with `slopewise schema | head -0`.
    let mut fds = [0; 2];
    // SAFETY: `fds` has room for the two descriptors pipe() returns.
    assert_eq!(unsafe { libc::pipe(fds.as_mut_ptr()) }, 0);
    // SAFETY: both descriptors were just returned by pipe() and are owned here.
    let (read, write) = unsafe { (OwnedFd::from_raw_fd(fds[0]), OwnedFd::from_raw_fd(fds[1])) };
    drop(read);
    let o = Command::new(env!("CARGO_BIN_EXE_slopewise"))
        .arg("schema")
        .stdout(write)
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(0));
    assert_eq!(stderr(&o), "");
}

// ---- 3. honest records: covariate values in the plan -------------------------------

#[test]
fn compare_at_nan_is_a_plan_error_at_its_line() {
    // Defect: `compare_at = [nan]`, `[inf]` and `adjust_at = 1e308` passed
    // validation and failed later as "a defect".
    for (value, shown) in [("nan", "NaN"), ("inf", "inf"), ("-inf", "-inf")] {
        let plan = format!(
            "{}\n[tests]\ncompare_at = [5.0, {value}]\n",
            unindent(BASE_PLAN)
        );
        common::Test::new(&format!("compare_at_{}", value.replace('-', "minus_")))
            .plan(&plan)
            .data(THREE_PLOTS)
            .fails()
            .stderr_has(&[
                &format!("error: tests.compare_at must hold finite numbers; {shown} is not"),
                // The harness drops BASE_PLAN's opening blank line: its text is
                // lines 1-12, a blank 13, [tests] 14, the key 15; the value sits
                // after `compare_at = [5.0, ` (19 characters), at column 20.
                "--> plan.toml:15:20",
            ])
            .run();
    }
    let plan =
        unindent(BASE_PLAN).replace("group = \"plot\"", "group = \"plot\"\nadjust_at = 1e308");
    common::Test::new("adjust_at_huge")
        .plan(&plan)
        .data(THREE_PLOTS)
        .fails()
        .stderr_has(&[
            "error: model.adjust_at holds 1e308, beyond ±1e100",
            "--> plan.toml:10:13",
        ])
        .run();
}

/// Invented: two groups whose slopes clearly differ (1 and 3 per unit), covariate
/// from `lo` to `lo + 36` in steps, with a small alternating wobble.
fn crossing_lines(offset: f64, step: f64) -> String {
    let mut s = String::from("plot,length_cm,mass_g\n");
    for (g, slope) in [("a", 1.0), ("b", 3.0)] {
        for i in 0..10 {
            let x = offset + step * f64::from(i);
            let wobble = if i % 2 == 0 { 0.05 } else { -0.05 };
            s.push_str(&format!(
                "{g},{x},{}\n",
                slope * step * f64::from(i) + wobble
            ));
        }
    }
    s
}

#[test]
fn compare_at_outside_the_data_is_flagged_as_extrapolation() {
    // Defect: `compare_at = [300]` on data spanning 14–50 reported p < 0.0001 with
    // no extrapolation flag.
    let dir = setup("extrapolation");
    fs::write(dir.join("data.csv"), crossing_lines(14.0, 4.0)).unwrap();
    let plan = format!(
        "{}\n[tests]\ncompare_at = [30.0, 300.0]\n",
        unindent(BASE_PLAN)
    );
    fs::write(dir.join("plan.toml"), plan).unwrap();
    let o = slopewise(&dir, &["run", "plan.toml"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let results = fs::read_to_string(dir.join("out/results.json")).unwrap();
    assert!(
        results.contains(
            "tests.compare_at value 300 lies outside the observed covariate range [14, 50]"
        ),
        "{results}"
    );
    assert!(
        !results.contains("tests.compare_at value 30 "),
        "30 lies inside"
    );
}

#[test]
fn a_covariate_with_a_huge_offset_warns() {
    // Defect: x = 1e15 + U(0, 0.1) gave slopes 35–65 % off with no warning.
    let dir = setup("offset");
    fs::write(dir.join("data.csv"), crossing_lines(1e15, 0.01)).unwrap();
    let o = slopewise(&dir, &["run", "plan.toml"]);
    let all = format!(
        "{}{}",
        stderr(&o),
        fs::read_to_string(dir.join("out/results.json")).unwrap_or_default()
    );
    assert!(all.contains("significant digits of its spread"), "{all}");
    // And an ordinary covariate does not.
    let dir = setup("no_offset");
    let o = slopewise(&dir, &["run", "plan.toml"]);
    assert!(o.status.success());
    let results = fs::read_to_string(dir.join("out/results.json")).unwrap();
    assert!(!results.contains("significant digits of its spread"));
}

#[test]
fn a_200000_column_header_is_read_in_one_pass() {
    // Defect: a 200,000-column header took a minute (each name was compared with
    // every earlier one). Here the duplicate at its end must still be found and
    // named by both positions; the run takes well under a second in a debug build
    // (measured), where the quadratic check took minutes.
    let dir = setup("wide_header");
    let mut header: Vec<String> = (0..200_000).map(|i| format!("c{i}")).collect();
    header.push("c17".into());
    fs::write(dir.join("data.csv"), header.join(",") + "\n1\n").unwrap();
    let o = slopewise(&dir, &["run", "plan.toml"]);
    assert!(!o.status.success());
    assert!(
        stderr(&o).contains("c17"),
        "{}",
        &stderr(&o)[..stderr(&o).len().min(2000)]
    );
    assert!(
        stderr(&o).contains("200001"),
        "{}",
        &stderr(&o)[..stderr(&o).len().min(2000)]
    );
}

// ---- messages -------------------------------------------------------------------

/// Measured on c464eb8: a one-field row was reported as having "1 fields".
#[test]
fn a_one_field_row_is_reported_in_the_singular() {
    let dir = setup("one-field");
    fs::write(
        dir.join("data.csv"),
        "plot,length_cm,mass_g\nnorth,4.0,1.12\nnorth\nnorth,7.0,2.05\n",
    )
    .unwrap();
    let o = slopewise(&dir, &["run", "plan.toml"]);
    assert!(!o.status.success());
    let err = stderr(&o);
    assert!(
        err.contains("data row 2 (file line 3) has 1 field, but the header has 3"),
        "{err}"
    );
    assert!(!err.contains("1 fields"), "{err}");
}

/// Measured on c464eb8: `1e-400` was read as 0 without a word, while `1e400` was
/// refused; both change the data, so both are refused with row and column.
#[test]
fn an_underflowing_cell_is_refused_like_an_overflowing_one() {
    let dir = setup("underflow");
    fs::write(
        dir.join("data.csv"),
        "plot,length_cm,mass_g\nnorth,4.0,1.12\nnorth,5.5,1e-400\nnorth,7.0,2.05\n",
    )
    .unwrap();
    let o = slopewise(&dir, &["run", "plan.toml"]);
    assert!(!o.status.success());
    let err = stderr(&o);
    assert!(err.contains("1e-400"), "{err}");
    assert!(err.contains("row 2"), "{err}");
    assert!(err.contains("mass_g"), "{err}");
    assert!(!dir.join("out").exists(), "nothing written on a data error");
}

/// Measured on c464eb8: a very large integer where text belongs was reported as
/// "found the number 99999999999999999999` as i128", serde's internals.
#[test]
fn serde_integer_widths_never_reach_a_plan_error() {
    let dir = setup("i128");
    let plan = unindent(common::BASE_PLAN)
        .replace("response = \"mass_g\"", "response = 99999999999999999999");
    fs::write(dir.join("plan.toml"), plan).unwrap();
    let o = slopewise(&dir, &["run", "plan.toml"]);
    assert!(!o.status.success());
    let err = stderr(&o);
    assert!(
        err.contains(
            "model.response must be text in quotes, found the number 99999999999999999999\n"
        ),
        "{err}"
    );
    assert!(!err.contains("i128"), "{err}");
}

// ---- diff: different measures, two-run figures, figure failures -----------------

/// Two runs of one plan and one run of a plan on another response.
fn diff_runs(name: &str) -> PathBuf {
    let dir = setup(name);
    assert!(
        slopewise(&dir, &["run", "plan.toml", "--out", "a"])
            .status
            .success()
    );
    assert!(
        slopewise(&dir, &["run", "plan.toml", "--out", "b"])
            .status
            .success()
    );
    let other = unindent(BASE_PLAN)
        .replace("response = \"mass_g\"", "response = \"length_cm\"")
        .replace("covariate = \"length_cm\"", "covariate = \"mass_g\"");
    fs::write(dir.join("other.toml"), other).unwrap();
    assert!(
        slopewise(&dir, &["run", "other.toml", "--out", "c"])
            .status
            .success()
    );
    dir
}

#[test]
fn diff_of_runs_that_measure_different_things_is_refused_or_untested() {
    // Defect: diff between runs of different responses flagged "significant" changes.
    let dir = diff_runs("diff-mismatch");
    let o = slopewise(&dir, &["diff", "a", "c"]);
    assert!(!o.status.success());
    let err = stderr(&o);
    assert!(
        err.contains("measure different things: the response (mass_g before, length_cm now)"),
        "{err}"
    );
    assert!(err.contains("--allow-mismatch"), "{err}");
    assert!(o.stdout.is_empty(), "nothing printed before the refusal");
    let o = slopewise(
        &dir,
        &["diff", "a", "c", "--allow-mismatch", "--fail-on-change"],
    );
    let out = String::from_utf8_lossy(&o.stdout);
    assert!(
        out.starts_with("Warning: these runs measure different things"),
        "{out}"
    );
    assert!(out.contains("Nothing flagged"), "{out}");
    assert!(!out.to_lowercase().contains("significant change"), "{out}");
    // Nothing is tested, so no slope change can fail the run.
    assert!(
        !stderr(&o).contains("a change is significant"),
        "{}",
        stderr(&o)
    );
    let _ = fs::remove_dir_all(dir);
}

#[test]
fn diff_figure_from_two_runs_and_a_failing_figure_keep_the_markdown() {
    // Defect: `diff --figure` with two runs failed and then wrote no Markdown either.
    let dir = diff_runs("diff-figure");
    let o = slopewise(
        &dir,
        &[
            "diff",
            "a",
            "b",
            "--figure",
            "trend.svg",
            "--markdown",
            "diff.md",
        ],
    );
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(
        fs::read_to_string(dir.join("trend.svg"))
            .unwrap()
            .starts_with("<svg")
    );
    assert!(
        fs::read_to_string(dir.join("diff.md"))
            .unwrap()
            .contains("Changes between two runs")
    );
    // A figure that cannot be written (its folder does not exist) is a warning; the
    // Markdown is still written.
    let o = slopewise(
        &dir,
        &[
            "diff",
            "a",
            "b",
            "--figure",
            "no/such/folder/trend.svg",
            "--markdown",
            "diff2.md",
        ],
    );
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(stderr(&o).starts_with("warning: "), "{}", stderr(&o));
    assert!(dir.join("diff2.md").exists());
    let _ = fs::remove_dir_all(dir);
}

#[test]
fn an_unterminated_quote_is_named_where_it_opens() {
    // Defect: an unterminated quote was reported as a ragged last row ("has 1 field").
    let dir = setup("unclosed-quote");
    fs::write(
        dir.join("data.csv"),
        "plot,length_cm,mass_g\nnorth,4.0,1.12\nnorth,5.5,1.58\n\"north,7.0,2.05\nnorth,8.5,2.41\nsouth,3.5,0.82\n",
    )
    .unwrap();
    let o = slopewise(&dir, &["run", "plan.toml"]);
    assert!(!o.status.success());
    let err = stderr(&o);
    assert!(
        err.contains("data row 3 (file line 4), field 1: a quoted field opens here and is never closed; it runs on over 3 lines"),
        "{err}"
    );
    assert!(!err.contains("but the header has"), "{err}");
    assert!(!dir.join("out").exists());
    let _ = fs::remove_dir_all(dir);
}

#[test]
fn the_manual_page_refers_to_no_page_that_does_not_exist() {
    // Defect: the man page listed slopewise-run(1) and the like, which do not exist.
    let dir = setup("man");
    let o = slopewise(&dir, &["man"]);
    assert!(o.status.success());
    let page = String::from_utf8(o.stdout).unwrap();
    let refs: Vec<&str> = page
        .split_whitespace()
        .filter(|w| w.ends_with("(1)") || w.contains("(1)"))
        .collect();
    assert!(
        refs.iter()
            .all(|w| w.contains("slopewise(1)") || *w == "slopewise"),
        "{refs:?}"
    );
    assert!(
        !page.contains("slopewise\\-run(1)"),
        "a page that does not exist"
    );
    for command in [
        "run", "check", "verify", "selftest", "keygen", "approve", "diff", "init", "schema",
    ] {
        assert!(
            page.contains(&format!(".SS \"slopewise {command}\"")),
            "{command} missing"
        );
    }
    let _ = fs::remove_dir_all(dir);
}

#[test]
fn thousands_of_groups_list_no_pairs_beyond_the_cap() {
    // Defect: 10,000 groups × 5 rows aborted on a 12 GB allocation in the pairwise
    // slopes (1,000 groups: 1.6 GB and a 367 MB results.json). Beyond
    // report.max_pairs no pair is built; the memory figures for 1k and 10k groups are
    // in bench/RESULTS.md (bench/groups.sh).
    let dir = setup("many-groups");
    let mut csv = String::from("plot,length_cm,mass_g\n");
    for g in 0..2000 {
        for i in 0..5 {
            let e = [0.02, -0.01, 0.03, -0.02, 0.0][(g + i) % 5];
            csv.push_str(&format!("p{g:04},{i},{}\n", 1.0 + 0.5 * i as f64 + e));
        }
    }
    fs::write(dir.join("data.csv"), csv).unwrap();
    let plan = unindent(BASE_PLAN).replace("[report]\n", "[report]\nformats = [\"json\"]\n");
    fs::write(dir.join("plan.toml"), plan).unwrap();
    let o = slopewise(&dir, &["run", "plan.toml"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let text = fs::read_to_string(dir.join("out/results.json")).unwrap();
    let r: serde_json::Value = serde_json::from_str(&text).unwrap();
    assert_eq!(r["groups"].as_array().unwrap().len(), 2000);
    for key in [
        "pairwise_slopes",
        "pairwise_adjusted",
        "regions",
        "differences_at",
    ] {
        assert!(r[key].as_array().unwrap().is_empty(), "{key} listed");
    }
    assert!(r["warnings"].as_array().unwrap().iter().any(|w| {
        w.as_str()
            .unwrap()
            .starts_with("2000 groups give 1999000 pairs, more than report.max_pairs = 5000")
    }));
    // Linear in the groups: about a kilobyte per group.
    assert!(text.len() < 4_000_000, "{} bytes", text.len());
    let _ = fs::remove_dir_all(dir);
}

/// The caret line of a rendered error: the columns before the carets and their count.
fn caret(err: &str) -> (usize, usize) {
    let line = err
        .lines()
        .find(|l| l.contains('^'))
        .unwrap_or_else(|| panic!("no caret in {err}"));
    let bar = line.find('|').unwrap() + 2;
    let rest = &line[bar..];
    let before = rest.chars().take_while(|c| *c == ' ').count();
    let carets = rest.chars().filter(|c| *c == '^').count();
    (before, carets)
}

#[test]
fn carets_sit_under_the_value_after_tabs_and_wide_characters() {
    // Defect: carets under TOML errors were misplaced on lines with tabs or wide
    // characters (they counted characters, not columns).
    let dir = setup("carets");
    // A tab before the key: the line is shown with the tab as four spaces, and the
    // caret under `5` sits at column 4 + len("alpha = ").
    fs::write(
        dir.join("plan.toml"),
        unindent(BASE_PLAN).replace("[report]\n", "[tests]\n\talpha = 5\n\n[report]\n"),
    )
    .unwrap();
    let err = stderr(&slopewise(&dir, &["run", "plan.toml"]));
    assert!(err.contains(" |     alpha = 5\n"), "{err}");
    assert_eq!(caret(&err), (4 + "alpha = ".len(), 1), "{err}");
    // CJK labels are two columns wide: the caret under the second "数据" starts
    // after `levels = ["数据", ` (11 + 4 + 3 columns) and spans its 6 columns.
    fs::write(
        dir.join("plan.toml"),
        unindent(BASE_PLAN).replace(
            "group = \"plot\"\n",
            "group = \"plot\"\nlevels = [\"数据\", \"数据\"]\n",
        ),
    )
    .unwrap();
    let err = stderr(&slopewise(&dir, &["run", "plan.toml"]));
    assert!(err.contains("is listed twice"), "{err}");
    assert_eq!(caret(&err), (18, 6), "{err}");
    // A combining accent takes no column: "e\u{301}" is one column wide.
    fs::write(
        dir.join("plan.toml"),
        unindent(BASE_PLAN).replace(
            "group = \"plot\"\n",
            "group = \"plot\"\nlevels = [\"e\u{301}\", \"e\u{301}\"]\n",
        ),
    )
    .unwrap();
    let err = stderr(&slopewise(&dir, &["run", "plan.toml"]));
    // `levels = ["` (11) + one column + `", ` (3).
    assert_eq!(caret(&err), (15, 3), "{err}");
    let _ = fs::remove_dir_all(dir);
}

#[test]
fn standard_input_is_a_data_source_read_once_and_hashed() {
    // `path = "-"`: the data come on stdin, are read once, and the record holds the
    // SHA-256 of exactly those bytes; verify cannot reread stdin and says how to
    // check (a saved copy with --data).
    let dir = setup("stdin");
    let plan = unindent(BASE_PLAN).replace("path = \"data.csv\"", "path = \"-\"");
    fs::write(dir.join("plan.toml"), plan).unwrap();
    let data = unindent(THREE_PLOTS);
    let mut child = Command::new(env!("CARGO_BIN_EXE_slopewise"))
        .args(["run", "plan.toml"])
        .current_dir(&dir)
        .stdin(std::process::Stdio::piped())
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    std::io::Write::write_all(&mut child.stdin.take().unwrap(), data.as_bytes()).unwrap();
    let o = child.wait_with_output().unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    let r: serde_json::Value =
        serde_json::from_str(&fs::read_to_string(dir.join("out/results.json")).unwrap()).unwrap();
    let want = slopewise::digest::sha256_hex(data.as_bytes());
    assert_eq!(r["provenance"]["data_sha256"], want.as_str());
    assert_eq!(r["data"]["rows_read"], 15);
    let o = slopewise(&dir, &["verify", "out"]);
    assert!(!o.status.success());
    assert!(
        stderr(&o).contains("read from standard input, which cannot be read again"),
        "{}",
        stderr(&o)
    );
    assert!(stderr(&o).contains("--data FILE"), "{}", stderr(&o));
    fs::write(dir.join("saved.csv"), &data).unwrap();
    let o = slopewise(&dir, &["verify", "out", "--data", "saved.csv"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let _ = fs::remove_dir_all(dir);
}

#[test]
fn no_progress_text_reaches_a_stderr_that_is_not_a_terminal() {
    // Progress shows on a terminal only (logs, pipes and CI stay clean). The hidden
    // SLOPEWISE_PROGRESS_MIN_BYTES lowers the 100 MB threshold so a small file
    // would qualify.
    let dir = setup("progress");
    let o = Command::new(env!("CARGO_BIN_EXE_slopewise"))
        .args(["run", "plan.toml"])
        .current_dir(&dir)
        .env("SLOPEWISE_PROGRESS_MIN_BYTES", "1")
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(stderr(&o).is_empty(), "{}", stderr(&o));
    let _ = fs::remove_dir_all(dir);
}

#[test]
fn max_pairs_of_zero_is_a_plan_error_at_its_line() {
    let dir = setup("max-pairs-zero");
    let plan = unindent(BASE_PLAN).replace("[report]\n", "[report]\nmax_pairs = 0\n");
    fs::write(dir.join("plan.toml"), &plan).unwrap();
    let o = slopewise(&dir, &["run", "plan.toml"]);
    assert!(!o.status.success());
    let err = stderr(&o);
    let line = plan
        .lines()
        .position(|l| l.starts_with("max_pairs"))
        .unwrap()
        + 1;
    assert!(err.contains("report.max_pairs must be at least 1"), "{err}");
    assert!(err.contains(&format!("plan.toml:{line}:")), "{err}");
    assert!(!dir.join("out").exists());
    let _ = fs::remove_dir_all(dir);
}
