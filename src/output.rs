//! Run folders that appear whole or not at all, and never at the cost of a user's
//! file.
//!
//! Files are written into a hidden staging folder beside the target (made by the
//! `tempfile` crate, so its name cannot collide) and put in place only when every
//! file is complete. An existing target is replaced only when its `manifest.json`
//! lists every file in it, in every sub-folder, and names the same plan file; any
//! other file makes the folder foreign and the run is refused with that file named.
//!
//! Old and new are exchanged in one step with `renameat2(RENAME_EXCHANGE)` where
//! the platform has it. Elsewhere the old folder is first renamed to
//! `.NAME.previous-PID`; a run killed between the two renames leaves it there, and
//! the next run for the same target (holding the same lock) puts it back before
//! anything else. Stale staging folders of killed runs are removed under the lock.
//! A symbolic link as the target is refused (the link would be replaced by a
//! folder), and so is a target inside another run folder.

use std::fs;
use std::path::{Path, PathBuf};

use crate::audit::{MANIFEST, Manifest};
use crate::diagnostic::Diagnostic;

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

fn refuse(path: &Path, message: String, help: &str) -> OutputError {
    OutputError {
        path: path.to_path_buf(),
        message,
        help: help.into(),
    }
}

/// The target's name and parent folder.
fn split(target: &Path) -> Result<(String, PathBuf), OutputError> {
    let name = target
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .ok_or_else(|| {
            refuse(
                target,
                "the output path has no folder name".into(),
                "name a folder, for example `--out reports/season-2026`",
            )
        })?;
    let parent = match target.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    };
    Ok((name, parent))
}

/// Writes `files` (relative path, bytes) as the folder `target` for the plan file
/// named `plan_file`, atomically.
pub fn write_run_folder(
    target: &Path,
    plan_file: &str,
    files: &[(String, Vec<u8>)],
) -> Result<(), OutputError> {
    write_run_folder_with(target, plan_file, files, |_| {
        Ok::<(), std::convert::Infallible>(())
    })
    .map(|_| ())
}

/// As [`write_run_folder`], but runs `finish` on the staging folder once the files
/// are in it (the PDF and the manifest are made there). The folder is moved into
/// place whatever `finish` returns, so what was written is kept; its error is
/// handed back.
pub fn write_run_folder_with<E>(
    target: &Path,
    plan_file: &str,
    files: &[(String, Vec<u8>)],
    finish: impl FnOnce(&Path) -> Result<(), E>,
) -> Result<Result<(), E>, OutputError> {
    let (name, parent) = split(target)?;
    check_target(target, &parent)?;
    fs::create_dir_all(&parent)
        .map_err(|e| io_err(&parent, "cannot create the output's parent folder", e))?;
    let _lock = Lock::take(&parent, &name)?;
    recover_locked(target, &parent, &name)?;
    if fs::symlink_metadata(target).is_ok() {
        check_replaceable(target, plan_file)?;
    }
    let staging = tempfile::Builder::new()
        .prefix(&format!(".{name}.partial-"))
        .tempdir_in(&parent)
        .map_err(|e| io_err(&parent, "cannot create the staging folder", e))?;
    stage(staging.path(), files)?;
    let finished = finish(staging.path());
    swap_in(staging, target, &parent, &name)?;
    Ok(finished)
}

/// Puts back a previous report that a killed run left aside, and removes staging
/// folders that killed runs left behind. Called before a run reads its data, so a
/// failing run still restores the folder; also part of every write.
pub fn recover(target: &Path) -> Result<(), OutputError> {
    let (name, parent) = split(target)?;
    if !parent.is_dir() {
        return Ok(());
    }
    let _lock = Lock::take(&parent, &name)?;
    recover_locked(target, &parent, &name)
}

fn recover_locked(target: &Path, parent: &Path, name: &str) -> Result<(), OutputError> {
    let entries = match fs::read_dir(parent) {
        Ok(e) => e,
        Err(_) => return Ok(()),
    };
    let previous = format!(".{name}.previous-");
    let partial = format!(".{name}.partial-");
    let mut found: Vec<(String, PathBuf)> = entries
        .filter_map(Result::ok)
        .map(|e| (e.file_name().to_string_lossy().into_owned(), e.path()))
        .filter(|(n, _)| n.starts_with(&previous) || n.starts_with(&partial))
        .collect();
    found.sort();
    for (entry, path) in found {
        if entry.starts_with(&partial) {
            fs::remove_dir_all(&path)
                .map_err(|e| io_err(&path, "cannot remove a stale staging folder", e))?;
        } else if fs::symlink_metadata(target).is_err() {
            // Killed between moving the old report aside and moving the new one in.
            fs::rename(&path, target)
                .map_err(|e| io_err(&path, "cannot restore the previous report", e))?;
        } else {
            // Killed after the new report was in place: the old one is surplus.
            fs::remove_dir_all(&path)
                .map_err(|e| io_err(&path, "cannot remove the previous report", e))?;
        }
    }
    Ok(())
}

/// Refuses a symbolic link as the target and a target inside another run folder.
fn check_target(target: &Path, parent: &Path) -> Result<(), OutputError> {
    if let Ok(meta) = fs::symlink_metadata(target)
        && meta.file_type().is_symlink()
    {
        let to = fs::read_link(target)
            .map(|p| p.display().to_string())
            .unwrap_or_else(|_| "?".into());
        return Err(refuse(
            target,
            format!(
                "the output folder is a symbolic link (to {to}); slopewise does not write through links, since replacing the folder would replace the link"
            ),
            "pass the folder the link points to with --out, or remove the link",
        ));
    }
    let mut dir = Some(parent);
    while let Some(d) = dir {
        if d.join(MANIFEST).is_file() {
            return Err(refuse(
                target,
                format!(
                    "the output folder would be inside the run folder {}",
                    d.display()
                ),
                "run folders are replaced whole, so one cannot hold another; choose a folder outside it",
            ));
        }
        dir = d.parent().filter(|p| !p.as_os_str().is_empty());
    }
    Ok(())
}

fn stage(staging: &Path, files: &[(String, Vec<u8>)]) -> Result<(), OutputError> {
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
    staging: tempfile::TempDir,
    target: &Path,
    parent: &Path,
    name: &str,
) -> Result<(), OutputError> {
    if fs::symlink_metadata(target).is_err() {
        let path = staging.keep();
        return fs::rename(&path, target).map_err(|e| {
            let _ = fs::remove_dir_all(&path);
            io_err(target, "cannot move the new report into place", e)
        });
    }
    match exchange(staging.path(), target) {
        // The staging path now holds the old report; dropping it removes it.
        Ok(true) => {
            let old = staging.path().to_path_buf();
            staging
                .close()
                .map_err(|e| io_err(&old, "cannot remove the previous report", e))
        }
        Ok(false) => {
            let old = parent.join(format!(".{name}.previous-{}", std::process::id()));
            fs::rename(target, &old)
                .map_err(|e| io_err(target, "cannot move the previous report aside", e))?;
            let path = staging.keep();
            if let Err(e) = fs::rename(&path, target) {
                let _ = fs::rename(&old, target);
                let _ = fs::remove_dir_all(&path);
                return Err(io_err(target, "cannot move the new report into place", e));
            }
            fs::remove_dir_all(&old)
                .map_err(|e| io_err(&old, "cannot remove the previous report", e))
        }
        Err(e) => Err(io_err(
            target,
            "cannot exchange the new report for the old",
            e,
        )),
    }
}

/// Exchanges two paths in one step. `Ok(false)` when the platform or the file
/// system cannot (the caller then renames twice under the lock).
#[cfg(target_os = "linux")]
fn exchange(a: &Path, b: &Path) -> std::io::Result<bool> {
    use std::ffi::CString;
    use std::os::unix::ffi::OsStrExt;
    let c = |p: &Path| {
        CString::new(p.as_os_str().as_bytes())
            .map_err(|e| std::io::Error::new(std::io::ErrorKind::InvalidInput, e))
    };
    let (a, b) = (c(a)?, c(b)?);
    // SAFETY: both are valid NUL-terminated paths; AT_FDCWD resolves them against
    // the current folder, as `std::fs::rename` does.
    let rc = unsafe {
        libc::syscall(
            libc::SYS_renameat2,
            libc::AT_FDCWD,
            a.as_ptr(),
            libc::AT_FDCWD,
            b.as_ptr(),
            libc::RENAME_EXCHANGE,
        )
    };
    if rc == 0 {
        return Ok(true);
    }
    let e = std::io::Error::last_os_error();
    match e.raw_os_error() {
        Some(libc::ENOSYS) | Some(libc::EINVAL) | Some(libc::ENOTSUP) => Ok(false),
        _ => Err(e),
    }
}

#[cfg(not(target_os = "linux"))]
fn exchange(_a: &Path, _b: &Path) -> std::io::Result<bool> {
    Ok(false)
}

/// An exclusive lock on `.NAME.lock` beside the target, held while the folder is
/// checked, recovered and exchanged, so two runs for one target cannot interleave.
/// The lock file is removed on release; a waiting run that then holds a removed
/// file notices and takes the lock again.
struct Lock {
    path: PathBuf,
    /// Held open: closing it releases the lock.
    _file: fs::File,
}

impl Lock {
    fn take(parent: &Path, name: &str) -> Result<Lock, OutputError> {
        let path = parent.join(format!(".{name}.lock"));
        loop {
            let file = fs::OpenOptions::new()
                .create(true)
                .truncate(false)
                .write(true)
                .open(&path)
                .map_err(|e| io_err(&path, "cannot create the output's lock file", e))?;
            #[cfg(unix)]
            {
                use std::os::unix::fs::MetadataExt;
                use std::os::unix::io::AsRawFd;
                // SAFETY: a valid open descriptor; flock only takes a lock on it.
                if unsafe { libc::flock(file.as_raw_fd(), libc::LOCK_EX) } != 0 {
                    return Err(io_err(
                        &path,
                        "cannot lock the output folder",
                        std::io::Error::last_os_error(),
                    ));
                }
                let held = file.metadata().map(|m| m.ino()).ok();
                let now = fs::metadata(&path).map(|m| m.ino()).ok();
                if held.is_none() || held != now {
                    continue;
                }
            }
            return Ok(Lock { path, _file: file });
        }
    }
}

impl Drop for Lock {
    fn drop(&mut self) {
        // Removed while still held; closing the file then releases the lock.
        let _ = fs::remove_file(&self.path);
    }
}

/// Replaceable only when the manifest names this plan and lists every file (an
/// empty folder is replaceable: nothing in it can be lost).
fn check_replaceable(target: &Path, plan_file: &str) -> Result<(), OutputError> {
    let help = "slopewise replaces only a folder it wrote for the same plan; move that file out, or choose a new folder with report.out or --out";
    if !target.is_dir() {
        return Err(refuse(
            target,
            "the output path exists and is not a folder".into(),
            help,
        ));
    }
    if target.join(crate::audit::approval::APPROVALS_DIR).exists() {
        return Err(OutputError {
            path: target.to_path_buf(),
            message: "the output folder holds approvals of its report, which a new run would discard".into(),
            help: "write the new run to another folder (report.out or --out) and approve that one; the approved folder stays as it is".into(),
        });
    }
    let mut files = Vec::new();
    list_files(target, target, &mut files)
        .map_err(|e| io_err(target, "cannot read the output folder", e))?;
    files.sort();
    let manifest: Option<Manifest> = fs::read(target.join(MANIFEST))
        .ok()
        .and_then(|b| serde_json::from_slice(&b).ok());
    let foreign = |rel: &str| {
        refuse(
            target,
            format!(
                "the output folder already exists and holds `{rel}`, which slopewise did not write"
            ),
            help,
        )
    };
    let Some(manifest) = manifest else {
        return match files.first() {
            None => Ok(()),
            Some(rel) => Err(foreign(rel)),
        };
    };
    if manifest.plan_file != plan_file {
        return Err(refuse(
            target,
            format!(
                "the output folder holds the report of another plan ({}, not {plan_file})",
                manifest.plan_file
            ),
            "give each plan its own output folder",
        ));
    }
    match files
        .iter()
        .find(|rel| rel.as_str() != MANIFEST && !manifest.outputs.contains_key(rel.as_str()))
    {
        Some(rel) => Err(foreign(rel)),
        None => Ok(()),
    }
}

/// Every non-folder entry under `dir`, by relative path with `/` separators; links
/// are listed, never followed.
fn list_files(base: &Path, dir: &Path, out: &mut Vec<String>) -> std::io::Result<()> {
    for entry in fs::read_dir(dir)? {
        let entry = entry?;
        let path = entry.path();
        if entry.file_type()?.is_dir() {
            list_files(base, &path, out)?;
        } else {
            let rel = path.strip_prefix(base).unwrap_or(&path);
            out.push(
                rel.components()
                    .map(|c| c.as_os_str().to_string_lossy())
                    .collect::<Vec<_>>()
                    .join("/"),
            );
        }
    }
    Ok(())
}
