//! `slopewise verify`: rerun a run folder's recorded plan on its data and compare
//! every output byte for byte.

use std::fs::File;
use std::path::Path;

use super::analyse::{analyse, hash_file};
use super::files::read_tree;
use super::plan_file::parse_plan;
use super::run::{render, write_outputs};
use super::say;
use crate::audit;
use crate::diagnostic::Diagnostic;

/// `slopewise verify`: rerun the folder's plan on its data and compare bytes.
pub(super) fn verify(folder: &Path, data_override: Option<&Path>) -> Result<(), Diagnostic> {
    let shown = folder.display().to_string();
    let manifest_path = folder.join(audit::MANIFEST);
    let manifest: audit::Manifest = std::fs::read(&manifest_path)
        .map_err(|e| e.to_string())
        .and_then(|b| serde_json::from_slice(&b).map_err(|e| e.to_string()))
        .map_err(|e| {
            Diagnostic::new(format!("{shown} has no readable {} ({e})", audit::MANIFEST))
                .help("verify takes a folder written by `slopewise run`")
        })?;
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
    let data_path = data_override.map_or_else(
        || folder.join(&manifest.data_from_run_folder),
        Path::to_path_buf,
    );
    let data_shown = data_path.display().to_string();
    let file = File::open(&data_path).map_err(|e| {
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
    let a = analyse(&lp, &data_path)?;
    let files = render(&lp, &a)?;
    let scratch = tempfile::Builder::new()
        .prefix("slopewise-verify-")
        .tempdir()
        .map_err(|e| Diagnostic::new(format!("cannot create a scratch folder: {e}")))?;
    let rerun_dir = scratch.path().join("run");
    let written = write_outputs(
        &lp,
        &a,
        &files,
        &rerun_dir,
        folder,
        Some(&manifest.data_from_run_folder),
    );
    let rerun = written.and_then(|()| read_tree(&rerun_dir));
    drop(scratch);
    let differences = audit::differences(&read_tree(folder)?, &rerun?);
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
