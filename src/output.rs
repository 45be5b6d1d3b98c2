//! Run folders that appear whole or not at all.
//!
//! Files are written into a hidden temporary folder beside the target and renamed
//! into place when every file is complete, so a failed or killed run never leaves a
//! half-written report and never damages the previous one. An existing target is
//! replaced only when it holds nothing but files slopewise writes, so a mistyped
//! `out` can never delete a folder of the user's.

use std::fs;
use std::path::{Path, PathBuf};

use crate::diagnostic::Diagnostic;

/// Names slopewise writes into a run folder; anything else makes a folder foreign.
pub const KNOWN_ENTRIES: [&str; 8] = [
    "results.json",
    "report.md",
    "report.pdf",
    "report.typ",
    "report-data.json",
    "figures",
    "manifest.json",
    "plan.toml",
];

/// The output stage's error.
#[derive(Debug, thiserror::Error)]
#[error("{message}: {path}")]
pub struct OutputError {
    /// The folder or file concerned.
    pub path: PathBuf,
    /// What went wrong.
    pub message: String,
    /// How to fix it.
    pub help: String,
}

impl OutputError {
    /// The error with advice.
    pub fn diagnostic(&self) -> Diagnostic {
        Diagnostic::new(self.to_string()).help(self.help.clone())
    }
}

fn io_err(path: &Path, what: &str, e: std::io::Error) -> OutputError {
    OutputError {
        path: path.to_path_buf(),
        message: format!("{what} ({e})"),
        help: "check that the folder is writable and the disk has room".into(),
    }
}

/// Writes `files` (relative path, bytes) as the folder `target`, atomically.
pub fn write_run_folder(target: &Path, files: &[(String, Vec<u8>)]) -> Result<(), OutputError> {
    write_run_folder_with(target, files, |_| Ok::<(), std::convert::Infallible>(())).map(|_| ())
}

/// As [`write_run_folder`], but runs `finish` on the staging folder once the files
/// are in it (the PDF is compiled there). The folder is moved into place whatever
/// `finish` returns, so what was written is kept; its error is handed back.
pub fn write_run_folder_with<E>(
    target: &Path,
    files: &[(String, Vec<u8>)],
    finish: impl FnOnce(&Path) -> Result<(), E>,
) -> Result<Result<(), E>, OutputError> {
    let name = target
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .ok_or_else(|| OutputError {
            path: target.to_path_buf(),
            message: "the output path has no folder name".into(),
            help: "name a folder, for example `--out reports/season-2026`".into(),
        })?;
    if target.exists() {
        check_replaceable(target)?;
    }
    let parent = match target.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    };
    fs::create_dir_all(&parent)
        .map_err(|e| io_err(&parent, "cannot create the output's parent folder", e))?;
    let pid = std::process::id();
    let staging = parent.join(format!(".{name}.partial-{pid}"));
    let mut finished = None;
    let result = stage(&staging, files).and_then(|()| {
        finished = Some(finish(&staging));
        swap_in(&staging, target, &parent, &name, pid)
    });
    if result.is_err() {
        let _ = fs::remove_dir_all(&staging);
    }
    result.map(|()| finished.unwrap_or(Ok(())))
}

fn stage(staging: &Path, files: &[(String, Vec<u8>)]) -> Result<(), OutputError> {
    if staging.exists() {
        fs::remove_dir_all(staging)
            .map_err(|e| io_err(staging, "cannot clear a stale staging folder", e))?;
    }
    fs::create_dir(staging).map_err(|e| io_err(staging, "cannot create the staging folder", e))?;
    for (rel, bytes) in files {
        let path = staging.join(rel);
        if let Some(dir) = path.parent() {
            fs::create_dir_all(dir).map_err(|e| io_err(dir, "cannot create a folder", e))?;
        }
        fs::write(&path, bytes).map_err(|e| io_err(&path, "cannot write a file", e))?;
    }
    Ok(())
}

fn swap_in(
    staging: &Path,
    target: &Path,
    parent: &Path,
    name: &str,
    pid: u32,
) -> Result<(), OutputError> {
    if !target.exists() {
        return fs::rename(staging, target)
            .map_err(|e| io_err(target, "cannot move the new report into place", e));
    }
    let old = parent.join(format!(".{name}.previous-{pid}"));
    fs::rename(target, &old)
        .map_err(|e| io_err(target, "cannot move the previous report aside", e))?;
    if let Err(e) = fs::rename(staging, target) {
        let _ = fs::rename(&old, target);
        return Err(io_err(target, "cannot move the new report into place", e));
    }
    fs::remove_dir_all(&old).map_err(|e| io_err(&old, "cannot remove the previous report", e))
}

fn check_replaceable(target: &Path) -> Result<(), OutputError> {
    let foreign = |what: &str| {
        OutputError {
        path: target.to_path_buf(),
        message: format!("the output folder already exists and {what}"),
        help: "slopewise replaces only folders it wrote; choose a new or empty folder with report.out or --out".into(),
    }
    };
    if !target.is_dir() {
        return Err(foreign("is not a folder"));
    }
    let entries =
        fs::read_dir(target).map_err(|e| io_err(target, "cannot read the output folder", e))?;
    for entry in entries {
        let entry = entry.map_err(|e| io_err(target, "cannot read the output folder", e))?;
        let name = entry.file_name().to_string_lossy().into_owned();
        if name == crate::audit::approval::APPROVALS_DIR {
            return Err(OutputError {
                path: target.to_path_buf(),
                message: "the output folder holds approvals of its report, which a new run would discard".into(),
                help: "write the new run to another folder (report.out or --out) and approve that one; the approved folder stays as it is".into(),
            });
        }
        if !KNOWN_ENTRIES.contains(&name.as_str()) {
            return Err(foreign(&format!(
                "holds `{name}`, which slopewise did not write"
            )));
        }
    }
    Ok(())
}
