//! Run folders an auditor can check: the manifest each run writes, and the
//! comparison `slopewise verify` makes between a folder and a fresh rerun.

use std::collections::BTreeMap;

use serde::{Deserialize, Serialize};

use crate::digest::sha256_hex;

/// The manifest file's name inside a run folder.
pub const MANIFEST: &str = "manifest.json";
/// The copy of the plan kept in a run folder.
pub const PLAN_COPY: &str = "plan.toml";

/// What a run folder holds and where its inputs came from.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Manifest {
    /// slopewise version that wrote the folder.
    pub tool_version: String,
    /// Commit slopewise was built from ("unknown" outside git). Older folders lack it.
    #[serde(default)]
    pub build_commit: String,
    /// The compiler that built slopewise.
    #[serde(default)]
    pub rustc_version: String,
    /// `typst --version` when a PDF was asked for and typst was found.
    #[serde(default)]
    pub typst_version: Option<String>,
    /// SHA-256 of every font handed to typst, by file name.
    #[serde(default)]
    pub font_sha256: BTreeMap<String, String>,
    /// SHA-256 of every template that shaped the PDF, by file name.
    #[serde(default)]
    pub template_sha256: BTreeMap<String, String>,
    /// The plan's file name when it ran (the copy is `plan.toml`).
    pub plan_file: String,
    /// SHA-256 of the plan's bytes.
    pub plan_sha256: String,
    /// The data path as the plan names it.
    pub data_file: String,
    /// Where the data file is, relative to the run folder, for `verify`.
    pub data_from_run_folder: String,
    /// SHA-256 of the data file's bytes.
    pub data_sha256: String,
    /// SHA-256 of every other file in the folder, by relative path.
    pub outputs: BTreeMap<String, String>,
}

impl Manifest {
    /// The manifest as written: pretty JSON with a final newline.
    pub fn to_bytes(&self) -> Vec<u8> {
        let mut s = serde_json::to_string_pretty(self).unwrap_or_default();
        s.push('\n');
        s.into_bytes()
    }

    /// Hashes of `files` (relative path, bytes), leaving out the manifest itself.
    pub fn hash_outputs(files: &BTreeMap<String, Vec<u8>>) -> BTreeMap<String, String> {
        files
            .iter()
            .filter(|(name, _)| name.as_str() != MANIFEST)
            .map(|(name, bytes)| (name.clone(), sha256_hex(bytes)))
            .collect()
    }
}

/// One way a run folder differs from its rerun.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Difference {
    /// In the folder but not produced by the rerun.
    Extra(String),
    /// Produced by the rerun but missing from the folder.
    Missing(String),
    /// Present in both with different bytes.
    Changed(String),
}

impl std::fmt::Display for Difference {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            Difference::Extra(p) => {
                write!(f, "{p}: in the folder, but the rerun does not write it")
            }
            Difference::Missing(p) => {
                write!(f, "{p}: written by the rerun, but missing from the folder")
            }
            Difference::Changed(p) => write!(f, "{p}: differs from the rerun"),
        }
    }
}

/// Every difference between the folder's files and the rerun's, in path order.
pub fn differences(
    folder: &BTreeMap<String, Vec<u8>>,
    rerun: &BTreeMap<String, Vec<u8>>,
) -> Vec<Difference> {
    let mut out = Vec::new();
    for (path, bytes) in folder {
        match rerun.get(path) {
            None => out.push(Difference::Extra(path.clone())),
            Some(other) if other != bytes => out.push(Difference::Changed(path.clone())),
            Some(_) => {}
        }
    }
    for path in rerun.keys() {
        if !folder.contains_key(path) {
            out.push(Difference::Missing(path.clone()));
        }
    }
    out.sort_by(|a, b| key(a).cmp(key(b)));
    out
}

fn key(d: &Difference) -> &str {
    match d {
        Difference::Extra(p) | Difference::Missing(p) | Difference::Changed(p) => p,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn differences_name_each_file() {
        let a: BTreeMap<String, Vec<u8>> =
            [("x".into(), b"1".to_vec()), ("y".into(), b"2".to_vec())].into();
        let b: BTreeMap<String, Vec<u8>> =
            [("x".into(), b"1".to_vec()), ("z".into(), b"3".to_vec())].into();
        assert_eq!(
            differences(&a, &b),
            vec![
                Difference::Extra("y".into()),
                Difference::Missing("z".into())
            ]
        );
        let c: BTreeMap<String, Vec<u8>> =
            [("x".into(), b"9".to_vec()), ("y".into(), b"2".to_vec())].into();
        assert_eq!(differences(&a, &c), vec![Difference::Changed("x".into())]);
        assert!(differences(&a, &a).is_empty());
    }
}
