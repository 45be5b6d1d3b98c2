//! `slopewise verify`: check every approval of a run folder (its hashes and
//! signature), then rerun the folder's recorded plan on its data and compare every
//! output byte for byte.

use std::path::{Path, PathBuf};

use super::analyse::{analyse_all, hash_file};
use super::approve::{data_path, present, read_manifest};
use super::files::read_tree;
use super::plan_file::parse_plan;
use super::run::{render_all, write_outputs};
use super::say;
use crate::audit::approval::{APPROVALS_DIR, Approval};
use crate::audit::{self, keys};
use crate::diagnostic::Diagnostic;

/// `slopewise verify`: approvals first (so they are reported whatever changed),
/// then the rerun.
pub(super) fn verify(
    folder: &Path,
    data_override: Option<&Path>,
    trusted: &[PathBuf],
) -> Result<(), Diagnostic> {
    let manifest = read_manifest(folder)?;
    let trusted = trusted
        .iter()
        .map(|p| read_public(p))
        .collect::<Result<Vec<_>, _>>()?;
    let approvals = check_approvals(folder, &manifest, data_override, &trusted)?;
    let rerun = rerun(folder, &manifest, data_override);
    match approvals {
        Some((held, total)) if held < total => {
            let mut d = Diagnostic::new(format!(
                "{}: {} of {total} approvals no longer hold",
                folder.display(),
                total - held
            ))
            .help(
                "an approval covers the folder as it was approved; approve again after a new run",
            );
            if let Err(e) = rerun {
                d = d.help(format!("also: {}", e.message));
            }
            Err(d)
        }
        None if !trusted.is_empty() => Err(Diagnostic::new(format!(
            "{} has no approvals, so none is signed by the trusted keys",
            folder.display()
        ))
        .help("approve it with `slopewise approve RUN --by NAME --role ROLE --key FILE`")),
        _ => rerun,
    }
}

fn read_public(path: &Path) -> Result<ed25519_dalek::VerifyingKey, Diagnostic> {
    let text = std::fs::read_to_string(path)
        .map_err(|e| Diagnostic::new(format!("cannot read the key {}: {e}", path.display())))?;
    keys::parse_public(&text).map_err(|e| {
        Diagnostic::new(format!("{} is not a public key: {e}", path.display()))
            .help("pass the .pub file `slopewise keygen` wrote")
    })
}

/// Prints each approval's standing; returns (holding, total), or `None` when the
/// folder has no approvals.
fn check_approvals(
    folder: &Path,
    manifest: &audit::Manifest,
    data_override: Option<&Path>,
    trusted: &[ed25519_dalek::VerifyingKey],
) -> Result<Option<(usize, usize)>, Diagnostic> {
    let dir = folder.join(APPROVALS_DIR);
    if !dir.is_dir() {
        say(&format!(
            "{}: not approved (no records in {APPROVALS_DIR}/)\n",
            folder.display()
        ));
        return Ok(None);
    }
    // Every entry counts: anything that is not a record file is named, so nothing
    // can sit in approvals/ unseen (the rerun comparison leaves this folder out).
    let mut records: Vec<PathBuf> = std::fs::read_dir(&dir)
        .map_err(|e| Diagnostic::new(format!("cannot read {}: {e}", dir.display())))?
        .filter_map(|e| e.ok().map(|e| e.path()))
        .collect();
    records.sort();
    if records.is_empty() {
        say(&format!(
            "{}: not approved (no records in {APPROVALS_DIR}/)\n",
            folder.display()
        ));
        return Ok(None);
    }
    let now = present(folder, &data_path(folder, manifest, data_override))?;
    let mut held = 0;
    let mut text = String::new();
    for path in &records {
        let name = format!(
            "{APPROVALS_DIR}/{}",
            path.file_name().unwrap_or_default().to_string_lossy()
        );
        if !path.is_file() || path.extension().is_none_or(|e| e != "json") {
            text.push_str(&format!(
                "{name}: REJECTED, not an approval record (slopewise writes only NNN-name.json files here)\n"
            ));
            continue;
        }
        let parsed = std::fs::read(path)
            .map_err(|e| e.to_string())
            .and_then(|b| Approval::parse(&b).map_err(|e| e.to_string()));
        match parsed {
            Err(why) => text.push_str(&format!(
                "{name}: REJECTED, not a valid approval record: {why}\n"
            )),
            Ok(a) => {
                let standing = a.check(&now, trusted);
                let verdict = if standing.holds() {
                    held += 1;
                    "holds"
                } else {
                    "NO LONGER HOLDS"
                };
                text.push_str(&format!(
                    "{name}: {} ({}), {}: {verdict}\n",
                    a.by, a.role, a.when
                ));
                for line in standing.describe() {
                    text.push_str(&format!("  {line}\n"));
                }
            }
        }
    }
    say(&text);
    Ok(Some((held, records.len())))
}

/// Reruns the folder's plan on its data and compares bytes (approvals left out).
fn rerun(
    folder: &Path,
    manifest: &audit::Manifest,
    data_override: Option<&Path>,
) -> Result<(), Diagnostic> {
    let shown = folder.display().to_string();
    let plan_copy = folder.join(audit::PLAN_COPY);
    let bytes = std::fs::read(&plan_copy)
        .map_err(|e| Diagnostic::new(format!("cannot read {}: {e}", plan_copy.display())))?;
    let lp = parse_plan(
        &plan_copy.display().to_string(),
        manifest.plan_file.clone(),
        &bytes,
        folder.to_path_buf(),
    )?;
    if lp.sha256 != manifest.plan_sha256 {
        return Err(Diagnostic::new(format!(
            "{} is not the plan the run recorded: its SHA-256 is {}, the manifest says {}",
            plan_copy.display(),
            lp.sha256,
            manifest.plan_sha256
        )));
    }
    if manifest.data_file == super::analyse::STDIN && data_override.is_none() {
        return Err(Diagnostic::new(format!(
            "{shown} was run on data read from standard input, which cannot be read again"
        ))
        .help(format!(
            "save those bytes to a file and pass it with --data FILE; verify checks that its SHA-256 is {}",
            manifest.data_sha256
        )));
    }
    let data_path = data_path(folder, manifest, data_override);
    let data_shown = data_path.display().to_string();
    let file = std::fs::File::open(&data_path).map_err(|e| {
        Diagnostic::new(format!("cannot open the data file {data_shown}: {e}"))
            .help("if the data moved, pass its new place with --data")
    })?;
    let actual = hash_file(file, &data_shown)?;
    if actual != manifest.data_sha256 {
        return Err(Diagnostic::new(format!(
            "the data file {data_shown} has changed since the run: its SHA-256 is {actual}, the run recorded {}",
            manifest.data_sha256
        ))
        .help("verify reruns on the recorded data only; restore that file, or run the plan again"));
    }
    let all = analyse_all(&lp, &data_path)?;
    let files = render_all(&lp, &all)?;
    let a = &all[0];
    let scratch = tempfile::Builder::new()
        .prefix("slopewise-verify-")
        .tempdir()
        .map_err(|e| Diagnostic::new(format!("cannot create a scratch folder: {e}")))?;
    let rerun_dir = scratch.path().join("run");
    let written = write_outputs(
        &lp,
        a,
        &files,
        &rerun_dir,
        folder,
        Some(&manifest.data_from_run_folder),
    );
    let rerun = written.and_then(|()| read_tree(&rerun_dir));
    drop(scratch);
    let mut in_folder = read_tree(folder)?;
    in_folder.retain(|name, _| !name.starts_with(&format!("{APPROVALS_DIR}/")));
    let differences = audit::differences(&in_folder, &rerun?);
    if differences.is_empty() {
        say(&format!(
            "{shown}: every output is identical to a fresh run ({} files)\n",
            manifest.outputs.len() + 1
        ));
        return Ok(());
    }
    let list: Vec<String> = differences.iter().map(|d| format!("  {d}")).collect();
    Err(Diagnostic::new(format!(
        "{shown} does not match a fresh run of its plan on its data:\n{}",
        list.join("\n")
    ))
    .help("the folder was edited after the run, or was written by another slopewise version"))
}
