//! Reading the data a plan names (checking any pin, hashing it) and running the
//! analysis on it.

use std::fs::File;
use std::path::{Path, PathBuf};

use super::plan_file::LoadedPlan;
use super::typst;
use crate::diagnostic::Diagnostic;
use crate::digest::HashingReader;
use crate::plan::DataFormat;
use crate::results::Provenance;
use crate::{BUILD_COMMIT, RUSTC_VERSION, TOOL_VERSION, analysis, data};

/// The data read and analysed, with their hash.
pub(super) struct Analysed {
    pub(super) dataset: data::Dataset,
    pub(super) results: crate::results::Results,
    pub(super) data_path: PathBuf,
}

/// Every attribute of the plan read and analysed, in the plan's order: one entry for
/// a single response. Each attribute is a whole plan of its own (see
/// `plan::Plan::attributes`), so each reads the data with its own column's missing
/// values and drops.
pub(super) fn analyse_all(lp: &LoadedPlan, data_path: &Path) -> Result<Vec<Analysed>, Diagnostic> {
    if lp.plan.attributes.is_empty() {
        return Ok(vec![analyse(lp, data_path)?]);
    }
    if lp.plan.data.path == STDIN && data_path == lp.dir.join(STDIN) {
        return Err(Diagnostic::new(
            "a plan with several [[responses]] reads its data once per attribute, and standard input can be read only once"
                .to_string(),
        )
        .at(lp.snippet(lp.plan.spans.data_path.clone(), "named here"))
        .help("save the data to a file and name it in data.path"));
    }
    lp.plan
        .attributes
        .iter()
        .map(|plan| {
            let one = LoadedPlan {
                plan: plan.clone(),
                ..lp.clone()
            };
            analyse(&one, data_path)
        })
        .collect()
}

/// Reads the data (checking any pin) and runs the analysis.
pub(super) fn analyse(lp: &LoadedPlan, data_path: &Path) -> Result<Analysed, Diagnostic> {
    let plan = &lp.plan;
    // `path = "-"` means standard input, unless `verify --data` names a saved copy.
    let stdin = plan.data.path == STDIN && data_path == lp.dir.join(STDIN);
    let data_file = if stdin {
        "standard input".to_string()
    } else {
        data_path.display().to_string()
    };
    let open = || {
        File::open(data_path).map_err(|e| {
            Diagnostic::new(format!("cannot open the data file {data_file}: {e}"))
                .at(lp.snippet(plan.spans.data_path.clone(), "named here"))
                .help("data.path is relative to the folder that holds the plan file")
        })
    };
    let check_pin = |actual: &str| -> Result<(), Diagnostic> {
        match &plan.data.sha256 {
            Some(pin) if actual != pin => Err(Diagnostic::new(format!(
                "the data file {data_file} is not the one the plan pins: its SHA-256 is {actual}, the plan expects {pin}"
            ))
            .at(lp.snippet(plan.spans.data_sha256.clone().unwrap_or_default(), "pinned here"))
            .help("if the new data are intended, update data.sha256; otherwise restore the pinned file")),
            _ => Ok(()),
        }
    };
    // `path = "-"`: the data come on standard input, read once and hashed as read.
    let source = if stdin {
        Source::Stdin
    } else {
        source_kind(data_path)
    };
    let (dataset, data_sha256) = match source {
        Source::Regular if plan.data.format == DataFormat::Csv && !plan.data.moments => {
            sniff(open()?, &data_file)?;
            if plan.data.sha256.is_some() {
                check_pin(&hash_file(open()?, &data_file)?)?;
            }
            read_regular(lp, data_path, &data_file, open()?)?
        }
        // A pipe can be read only once, and a spreadsheet or a Parquet file is read
        // whole: read the bytes, hash them, and parse exactly them, so the record,
        // the pin and the parse agree.
        Source::Regular | Source::Pipe | Source::Stdin => {
            let mut bytes = Vec::new();
            let read = if stdin {
                std::io::Read::read_to_end(&mut std::io::stdin().lock(), &mut bytes)
            } else {
                std::io::Read::read_to_end(&mut open()?, &mut bytes)
            };
            read.map_err(|e| {
                Diagnostic::new(format!("cannot read the data file {data_file}: {e}"))
            })?;
            if plan.data.format == DataFormat::Csv {
                check_text(&bytes, &data_file)?;
            }
            let hash = crate::digest::sha256_hex(&bytes);
            check_pin(&hash)?;
            let dataset = match plan.data.format {
                _ if plan.data.moments => data::load_moments(plan, &bytes),
                DataFormat::Csv => data::load(plan, &bytes),
                DataFormat::Xlsx | DataFormat::Ods => data::load_sheet(plan, &bytes),
                DataFormat::Parquet => data::load_parquet(plan, &bytes),
            }
            .map_err(|e| data_diagnostic(&e, lp, &data_file))?;
            (dataset, hash)
        }
        Source::Other(what) => {
            return Err(Diagnostic::new(format!(
                "the data file {data_file} is not a regular file but {what}"
            ))
            .at(lp.snippet(plan.spans.data_path.clone(), "named here"))
            .help("data.path must name a CSV file (or a named pipe that delivers one)"));
        }
    };
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
        reference_snippet(d, &e, lp)
    })?;
    Ok(Analysed {
        dataset,
        results,
        data_path: data_path.to_path_buf(),
    })
}

/// Under many-to-one comparisons, too few groups or a reference that cannot carry a
/// line is also the plan's doing: point at the reference in `model.levels` when it is
/// named there, else at `tests.comparisons`.
fn reference_snippet(
    mut d: Diagnostic,
    e: &analysis::AnalysisError,
    lp: &LoadedPlan,
) -> Diagnostic {
    use analysis::AnalysisError::{ReferenceExcluded, TooFewGroups};
    let plan = &lp.plan;
    if plan.tests.comparisons != crate::plan::Comparisons::AgainstReference
        || !matches!(e, TooFewGroups { .. } | ReferenceExcluded { .. })
    {
        return d;
    }
    if let (ReferenceExcluded { .. }, Some(span)) = (e, plan.spans.levels.first()) {
        d = d.at(lp.snippet(span.clone(), "the reference, named first here"));
    } else if let Some(span) = &plan.spans.comparisons {
        d = d.at(lp.snippet(span.clone(), "many-to-one comparisons chosen here"));
    }
    d
}

/// The data path that names standard input.
pub(super) const STDIN: &str = "-";

/// What kind of thing a data path names.
enum Source {
    Regular,
    Pipe,
    /// `path = "-"`.
    Stdin,
    /// Anything else, described for the message.
    Other(&'static str),
}

fn source_kind(path: &Path) -> Source {
    let Ok(meta) = std::fs::metadata(path) else {
        // Let opening it give the error (not found, no permission).
        return Source::Regular;
    };
    let kind = meta.file_type();
    if kind.is_file() {
        return Source::Regular;
    }
    if kind.is_dir() {
        return Source::Other("a folder");
    }
    #[cfg(unix)]
    {
        use std::os::unix::fs::FileTypeExt;
        if kind.is_fifo() {
            return Source::Pipe;
        }
        if kind.is_char_device() {
            return Source::Other("a character device (such as /dev/zero)");
        }
        if kind.is_block_device() {
            return Source::Other("a block device");
        }
        if kind.is_socket() {
            return Source::Other("a socket");
        }
    }
    Source::Other("a special file")
}

/// Bytes looked at before parsing to tell text from binary.
const SNIFF_BYTES: u64 = 64 << 10;

/// Refuses binary and UTF-16 content from the file's first bytes, before a
/// multi-gigabyte file of zeros is parsed as one endless field.
fn sniff(file: File, shown: &str) -> Result<(), Diagnostic> {
    let mut head = Vec::new();
    std::io::Read::read_to_end(&mut std::io::Read::take(file, SNIFF_BYTES), &mut head)
        .map_err(|e| Diagnostic::new(format!("cannot read the data file {shown}: {e}")))?;
    check_text(&head, shown)
}

fn check_text(head: &[u8], shown: &str) -> Result<(), Diagnostic> {
    let head = &head[..head.len().min(SNIFF_BYTES as usize)];
    let utf16 = head.starts_with(b"\xFF\xFE") || head.starts_with(b"\xFE\xFF") || {
        // No byte-order mark: ASCII text in UTF-16 has a zero in every other byte.
        let pairs = head.len() / 2;
        let zero_odd = head.iter().skip(1).step_by(2).filter(|b| **b == 0).count();
        let zero_even = head.iter().step_by(2).filter(|b| **b == 0).count();
        pairs >= 2 && (zero_odd * 10 >= pairs * 9) != (zero_even * 10 >= pairs * 9)
    };
    if utf16 {
        return Err(Diagnostic::new(format!(
            "the data file {shown} is UTF-16 text; slopewise reads UTF-8"
        ))
        .help("save the file as UTF-8 (\"CSV UTF-8\" in most spreadsheet programs)"));
    }
    if let Some(at) = head.iter().position(|b| *b == 0) {
        return Err(Diagnostic::new(format!(
            "the data file {shown} is not text: it holds a NUL byte at byte {}",
            at + 1
        ))
        .help("data.path must name a CSV text file, or a spreadsheet with a .xlsx or .ods ending; check that it is not an archive or an image"));
    }
    Ok(())
}

/// A regular file: parsed (in halves when large) while a second core hashes it.
fn read_regular(
    lp: &LoadedPlan,
    data_path: &Path,
    data_file: &str,
    for_hash: File,
) -> Result<(data::Dataset, String), Diagnostic> {
    let plan = &lp.plan;
    let len = for_hash
        .metadata()
        .map_err(|e| Diagnostic::new(format!("cannot read the data file {data_file}: {e}")))?
        .len();
    // A large file shows its progress on a terminal (never in logs or pipes). The
    // bar follows the hash, which reads the whole file beside the parse.
    // SLOPEWISE_PROGRESS_MIN_BYTES (hidden, for the tests) lowers the size.
    let min = std::env::var("SLOPEWISE_PROGRESS_MIN_BYTES")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(PROGRESS_MIN_BYTES);
    let bar = (len > min && std::io::IsTerminal::is_terminal(&std::io::stderr())).then(|| {
        let bar = indicatif::ProgressBar::new(len);
        bar.set_style(
            indicatif::ProgressStyle::with_template("reading {bytes}/{total_bytes} {bar:30} {eta}")
                .unwrap_or_else(|_| indicatif::ProgressStyle::default_bar()),
        );
        bar
    });
    let (dataset, data_sha256) = std::thread::scope(|scope| {
        let hasher = scope.spawn(|| match &bar {
            Some(b) => HashingReader::new(b.wrap_read(for_hash))
                .finish()
                .map_err(|e| {
                    Diagnostic::new(format!("cannot read the data file {data_file}: {e}"))
                }),
            None => hash_file(for_hash, data_file),
        });
        let dataset = data::load_seekable(plan, len, data::PARALLEL_MIN_BYTES, || {
            File::open(data_path)
        })
        .map_err(|e| data_diagnostic(&e, lp, data_file));
        let hash = hasher
            .join()
            .unwrap_or_else(|_| Err(Diagnostic::new("hashing the data file failed")));
        (dataset, hash)
    });
    if let Some(b) = bar {
        b.finish_and_clear();
    }
    Ok((dataset?, data_sha256?))
}

/// Files above this size (about 100 MB) show a progress bar on a terminal.
const PROGRESS_MIN_BYTES: u64 = 100 * 1024 * 1024;

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
        data::PlanKey::Sheet => Some(spans.sheet.clone().unwrap_or(spans.data_path.clone())),
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
