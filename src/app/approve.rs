//! `slopewise approve`: a dated approval record, signed when a key is given,
//! written into the run folder's `approvals/` subfolder. The report itself is never
//! touched, so the hashes the record pins stay true.

use std::collections::BTreeMap;
use std::fs::File;
use std::path::{Path, PathBuf};

use super::analyse::hash_file;
use super::files::{read_tree, write_new_file};
use super::{clock, say};
use crate::audit::approval::{APPROVALS_DIR, Approval, Present, RECORD, default_meaning};
use crate::audit::{self, keys, time};
use crate::diagnostic::Diagnostic;
use crate::digest::sha256_hex;

/// What `approve` was asked.
pub(super) struct Request<'a> {
    pub(super) folder: &'a Path,
    pub(super) by: &'a str,
    pub(super) role: &'a str,
    pub(super) key: Option<&'a Path>,
    pub(super) meaning: Option<&'a str>,
    pub(super) data: Option<&'a Path>,
}

/// Reads a run folder's manifest, saying clearly when there is none.
pub(super) fn read_manifest(folder: &Path) -> Result<audit::Manifest, Diagnostic> {
    let path = folder.join(audit::MANIFEST);
    std::fs::read(&path)
        .map_err(|e| e.to_string())
        .and_then(|b| serde_json::from_slice(&b).map_err(|e| e.to_string()))
        .map_err(|e| {
            Diagnostic::new(format!(
                "{} has no readable {} ({e})",
                folder.display(),
                audit::MANIFEST
            ))
            .help("give a folder written by `slopewise run`")
        })
}

/// The data file a run folder's manifest points at, or the override.
pub(super) fn data_path(folder: &Path, manifest: &audit::Manifest, data: Option<&Path>) -> PathBuf {
    data.map_or_else(
        || folder.join(&manifest.data_from_run_folder),
        Path::to_path_buf,
    )
}

/// The folder as it is now: every file's hash (approvals left out) and the data's.
pub(super) fn present(folder: &Path, data: &Path) -> Result<Present, Diagnostic> {
    let files: BTreeMap<String, String> = read_tree(folder)?
        .into_iter()
        .filter(|(name, _)| !name.starts_with(&format!("{APPROVALS_DIR}/")))
        .map(|(name, bytes)| (name, sha256_hex(&bytes)))
        .collect();
    let shown = data.display().to_string();
    let data_sha256 = File::open(data)
        .map_err(|e| format!("cannot open {shown}: {e}"))
        .and_then(|f| hash_file(f, &shown).map_err(|d| d.message));
    Ok(Present { files, data_sha256 })
}

/// Writes the approval record and says where.
pub(super) fn approve(req: &Request) -> Result<(), Diagnostic> {
    for (what, value) in [("--by", req.by), ("--role", req.role)] {
        if value.trim().is_empty() {
            return Err(Diagnostic::new(format!("{what} is empty"))
                .help("an approval names who approves (--by) and in what role (--role)"));
        }
    }
    let key = req.key.map(read_private).transpose()?;
    let manifest = read_manifest(req.folder)?;
    let data = data_path(req.folder, &manifest, req.data);
    let now = present(req.folder, &data)?;
    let shown = req.folder.display();
    // Approve only what the run wrote: an edited folder is refused, not pinned.
    let mut changed: Vec<String> = manifest
        .outputs
        .iter()
        .filter(|(file, hash)| now.files.get(*file) != Some(hash))
        .map(|(file, _)| format!("{file} differs from what the run wrote"))
        .collect();
    if now.files.get(audit::PLAN_COPY) != Some(&manifest.plan_sha256) {
        changed.push(format!(
            "{} is not the plan the run recorded",
            audit::PLAN_COPY
        ));
    }
    match &now.data_sha256 {
        Ok(h) if *h == manifest.data_sha256 => {}
        Ok(_) => changed.push(format!(
            "the data file {} has changed since the run",
            data.display()
        )),
        Err(why) => {
            return Err(Diagnostic::new(format!("cannot approve {shown}: {why}"))
                .help("if the data moved, pass its new place with --data"));
        }
    }
    if !changed.is_empty() {
        return Err(Diagnostic::new(format!(
            "cannot approve {shown}: it no longer matches its run:\n  {}",
            changed.join("\n  ")
        ))
        .help("run the plan again and approve the new folder"));
    }
    let when = clock::now()?;
    let record = Approval {
        record: RECORD.into(),
        by: req.by.trim().into(),
        role: req.role.trim().into(),
        when: time::rfc3339_utc(when),
        meaning: req.meaning.map_or_else(
            || default_meaning(req.by.trim(), req.role.trim()),
            str::to_string,
        ),
        tool_version: crate::TOOL_VERSION.into(),
        plan_file: manifest.plan_file.clone(),
        data_file: manifest.data_file.clone(),
        data_sha256: manifest.data_sha256.clone(),
        files: now.files,
        signature: None,
    };
    let record = match &key {
        Some(k) => record.sign(k),
        None => record,
    };
    let dir = req.folder.join(APPROVALS_DIR);
    std::fs::create_dir_all(&dir)
        .map_err(|e| Diagnostic::new(format!("cannot create {}: {e}", dir.display())))?;
    let path = dir.join(format!(
        "{:03}-{}.json",
        next_number(&dir)?,
        slug(&record.by)
    ));
    write_new_file(&path, &record.to_bytes())?;
    let signed = match &record.signature {
        Some(s) => format!("signed with key {}…", &s.public_key[..12]),
        None => "unsigned (give --key to sign)".into(),
    };
    say(&format!(
        "{shown}: approved by {} ({}) at {}, {signed}; {} files and the data pinned in {}\n",
        record.by,
        record.role,
        record.when,
        record.files.len(),
        path.display()
    ));
    Ok(())
}

fn read_private(path: &Path) -> Result<ed25519_dalek::SigningKey, Diagnostic> {
    let text = std::fs::read_to_string(path)
        .map_err(|e| Diagnostic::new(format!("cannot read the key {}: {e}", path.display())))?;
    keys::parse_private(&text).map_err(|e| {
        Diagnostic::new(format!("{} cannot sign: {e}", path.display())).help(
            "make a key pair with `slopewise keygen` and pass the private file (not the .pub)",
        )
    })
}

/// One more than the highest record number in the folder, so records sort in the
/// order they were made and none is ever replaced.
fn next_number(dir: &Path) -> Result<u32, Diagnostic> {
    let entries = std::fs::read_dir(dir)
        .map_err(|e| Diagnostic::new(format!("cannot read {}: {e}", dir.display())))?;
    let highest = entries
        .filter_map(|e| e.ok())
        .filter_map(|e| {
            let name = e.file_name().to_string_lossy().into_owned();
            name.split('-').next()?.parse::<u32>().ok()
        })
        .max()
        .unwrap_or(0);
    Ok(highest + 1)
}

/// A file-name-safe form of a person's name.
fn slug(name: &str) -> String {
    let mut s = String::new();
    for c in name.chars().flat_map(char::to_lowercase) {
        if c.is_ascii_alphanumeric() {
            s.push(c);
        } else if !s.ends_with('-') {
            s.push('-');
        }
    }
    let s: String = s.trim_matches('-').chars().take(40).collect();
    if s.is_empty() { "approval".into() } else { s }
}
