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
