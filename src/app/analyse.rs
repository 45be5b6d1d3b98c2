//! Reading the data a plan names (checking any pin, hashing it) and running the
//! analysis on it.

use std::fs::File;
use std::path::{Path, PathBuf};

use super::plan_file::LoadedPlan;
use super::typst;
use crate::diagnostic::Diagnostic;
use crate::digest::HashingReader;
use crate::results::Provenance;
use crate::{BUILD_COMMIT, RUSTC_VERSION, TOOL_VERSION, analysis, data};

/// The data read and analysed, with their hash.
pub(super) struct Analysed {
    pub(super) dataset: data::Dataset,
    pub(super) results: crate::results::Results,
    pub(super) data_path: PathBuf,
}

/// Reads the data (checking any pin) and runs the analysis.
pub(super) fn analyse(lp: &LoadedPlan, data_path: &Path) -> Result<Analysed, Diagnostic> {
    let plan = &lp.plan;
    let data_file = data_path.display().to_string();
    let open = || {
        File::open(data_path).map_err(|e| {
            Diagnostic::new(format!("cannot open the data file {data_file}: {e}"))
                .at(lp.snippet(plan.spans.data_path.clone(), "named here"))
                .help("data.path is relative to the folder that holds the plan file")
        })
    };
    if let Some(pin) = &plan.data.sha256 {
        let actual = hash_file(open()?, &data_file)?;
        if &actual != pin {
            return Err(Diagnostic::new(format!(
                "the data file {data_file} is not the one the plan pins: its SHA-256 is {actual}, the plan expects {pin}"
            ))
            .at(lp.snippet(plan.spans.data_sha256.clone().unwrap_or_default(), "pinned here"))
            .help("if the new data are intended, update data.sha256; otherwise restore the pinned file"));
        }
    }
    // Hash on a second core while the first parses: the file is read twice, but
    // the second read comes from the page cache and the hash leaves the critical path.
    // A large file is also parsed in two halves (see `data::load_seekable`).
    let for_hash = open()?;
    let len = for_hash
        .metadata()
        .map_err(|e| Diagnostic::new(format!("cannot read the data file {data_file}: {e}")))?
        .len();
    let (dataset, data_sha256) = std::thread::scope(|scope| {
        let hasher = scope.spawn(|| hash_file(for_hash, &data_file));
        let dataset = data::load_seekable(plan, len, data::PARALLEL_MIN_BYTES, || {
            File::open(data_path)
        })
        .map_err(|e| data_diagnostic(&e, lp, &data_file));
        let hash = hasher
            .join()
            .unwrap_or_else(|_| Err(Diagnostic::new("hashing the data file failed")));
        (dataset, hash)
    });
    let (dataset, data_sha256) = (dataset?, data_sha256?);
    // What shaped the PDF is recorded only when there is one; a run without it
    // does not depend on typst at all.
    let pdf = plan.report.formats.contains(&crate::plan::Format::Pdf);
    let provenance = Provenance {
        tool_version: TOOL_VERSION.to_string(),
        plan_sha256: lp.sha256.clone(),
        data_sha256,
        plan_file: lp.name.clone(),
        data_file: plan.data.path.clone(),
        build_commit: BUILD_COMMIT.to_string(),
        rustc_version: RUSTC_VERSION.to_string(),
        typst_version: if pdf { typst::version() } else { None },
        font_sha256: if pdf {
            typst::font_hashes()
        } else {
            Default::default()
        },
        template_sha256: if pdf {
            typst::template_hashes()
        } else {
            Default::default()
        },
    };
    let results = analysis::run(plan, &dataset, provenance).map_err(|e| {
        let mut d = e.diagnostic();
        d.file = Some(data_file.clone());
        d
    })?;
    Ok(Analysed {
        dataset,
        results,
        data_path: data_path.to_path_buf(),
    })
}

pub(super) fn hash_file(file: File, shown: &str) -> Result<String, Diagnostic> {
    HashingReader::new(file)
        .finish()
        .map_err(|e| Diagnostic::new(format!("cannot read the data file {shown}: {e}")))
}

/// A data error, pointing into the plan when a plan key is involved.
pub(super) fn data_diagnostic(e: &data::DataError, lp: &LoadedPlan, data_file: &str) -> Diagnostic {
    let mut d = e.diagnostic().in_file(data_file);
    let spans = &lp.plan.spans;
    let span = e.plan_key().and_then(|key| match key {
        data::PlanKey::Response => Some(spans.response.clone()),
        data::PlanKey::Covariate => Some(spans.covariate.clone()),
        data::PlanKey::Group => Some(spans.group.clone()),
        data::PlanKey::Keep(i) => spans.keep_columns.get(i).cloned(),
        data::PlanKey::Level(i) => spans.levels.get(i).cloned(),
    });
    if let data::DataError::OutsideDomain { column, .. } = e {
        let span = if *column == lp.plan.model.response {
            spans.response_transform.clone()
        } else {
            spans.covariate_transform.clone()
        };
        d = d.at(lp.snippet(span, "transform chosen here"));
    } else if let Some(span) = span {
        d = d.at(lp.snippet(span, "named here"));
    }
    d
}
