//! Reading a plan file: its bytes, hash and parsed settings, and where its
//! output goes.

use std::path::{Path, PathBuf};

use crate::diagnostic::{Diagnostic, Snippet};
use crate::digest::sha256_hex;
use crate::plan::{self, Plan};

/// A plan file read and parsed, with what error messages need to point into it.
#[derive(Clone)]
pub(super) struct LoadedPlan {
    pub(super) plan: Plan,
    /// The path as shown in messages.
    pub(super) file: String,
    /// The file name recorded in provenance.
    pub(super) name: String,
    pub(super) bytes: Vec<u8>,
    pub(super) source: String,
    pub(super) sha256: String,
    pub(super) dir: PathBuf,
}

impl LoadedPlan {
    pub(super) fn snippet(&self, span: std::ops::Range<usize>, label: &str) -> Snippet {
        Snippet {
            file: self.file.clone(),
            source: self.source.clone(),
            span,
            label: label.to_string(),
        }
    }
}

pub(super) fn load_plan(path: &Path) -> Result<LoadedPlan, Diagnostic> {
    let file = path.display().to_string();
    let bytes = std::fs::read(path).map_err(|e| {
        Diagnostic::new(format!("cannot read the plan file {file}: {e}"))
            .help("check the path; `slopewise run plans/NAME.toml` runs a plan in the plans folder")
    })?;
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    parse_plan(
        &file,
        name,
        &bytes,
        path.parent().map(Path::to_path_buf).unwrap_or_default(),
    )
}

pub(super) fn parse_plan(
    file: &str,
    name: String,
    bytes: &[u8],
    dir: PathBuf,
) -> Result<LoadedPlan, Diagnostic> {
    let source = String::from_utf8(bytes.to_vec()).map_err(|_| {
        Diagnostic::new(format!("the plan file {file} is not UTF-8 text"))
            .help("save the plan as UTF-8")
    })?;
    let plan = plan::load(file, &source).map_err(|e| e.diagnostic())?;
    Ok(LoadedPlan {
        plan,
        file: file.to_string(),
        name,
        bytes: bytes.to_vec(),
        sha256: sha256_hex(bytes),
        source,
        dir,
    })
}

/// The plan's output folder: `--out`, else `report.out` beside the plan.
pub(super) fn target_of(lp: &LoadedPlan, out: Option<&Path>) -> Result<PathBuf, Diagnostic> {
    match (out, &lp.plan.report.out) {
        (Some(o), _) => Ok(o.to_path_buf()),
        (None, Some(o)) => Ok(lp.dir.join(o)),
        (None, None) => Err(Diagnostic::new(format!(
            "the plan {} names no output folder",
            lp.file
        ))
        .help("add `out = \"../reports/NAME\"` under [report], or pass `--out DIR`")),
    }
}
