//! The edge: the only code that reads files, writes folders and sets the exit
//! status. Each command is one function; every error becomes a [`Diagnostic`] and is
//! printed once, here.

use std::fs::File;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use clap::Parser;

use crate::cli::{Cli, Command};
use crate::diagnostic::{Diagnostic, Snippet};
use crate::digest::{HashingReader, sha256_hex};
use crate::plan::{Format, Plan};
use crate::results::Provenance;
use crate::{TOOL_VERSION, analysis, data, output, plan, report};

/// Parses the command line and runs it.
pub fn main() -> ExitCode {
    let cli = Cli::parse();
    match cli.command {
        Command::Run { plans, out } => run_plans(&plans, out.as_deref()),
    }
}

/// `slopewise run`: runs each plan; a failing plan does not stop the others.
fn run_plans(plans: &[PathBuf], out: Option<&Path>) -> ExitCode {
    let several = plans.len() > 1;
    let mut failed = 0;
    for plan_path in plans {
        let stem = plan_path.file_stem().unwrap_or_default();
        let target = out.map(|o| {
            if several {
                o.join(stem)
            } else {
                o.to_path_buf()
            }
        });
        let clash: Vec<String> = plans
            .iter()
            .filter(|p| *p != plan_path && p.file_stem().unwrap_or_default() == stem)
            .map(|p| p.display().to_string())
            .collect();
        let outcome = match (&target, clash.is_empty()) {
            (Some(t), false) if several => Err(Diagnostic::new(format!(
                "{} and {} share the file name stem `{}`, so both would write {}",
                plan_path.display(),
                clash.join(", "),
                stem.to_string_lossy(),
                t.display()
            ))
            .help(
                "rename one of the plan files, or run them separately with different --out folders",
            )),
            _ => run_plan(plan_path, target.as_deref()),
        };
        match outcome {
            Ok(written) => println!("{}: wrote {}", plan_path.display(), written.display()),
            Err(d) => {
                failed += 1;
                let _ = std::io::stderr().write_all(d.render().as_bytes());
            }
        }
    }
    if several {
        println!(
            "{} of {} plans ran; {failed} failed",
            plans.len() - failed,
            plans.len()
        );
    }
    if failed == 0 {
        ExitCode::SUCCESS
    } else {
        ExitCode::FAILURE
    }
}

/// A plan file read and parsed, with what error messages need to point into it.
struct LoadedPlan {
    plan: Plan,
    file: String,
    source: String,
    sha256: String,
    dir: PathBuf,
}

impl LoadedPlan {
    fn snippet(&self, span: std::ops::Range<usize>, label: &str) -> Snippet {
        Snippet {
            file: self.file.clone(),
            source: self.source.clone(),
            span,
            label: label.to_string(),
        }
    }
}

fn load_plan(path: &Path) -> Result<LoadedPlan, Diagnostic> {
    let file = path.display().to_string();
    let bytes = std::fs::read(path).map_err(|e| {
        Diagnostic::new(format!("cannot read the plan file {file}: {e}"))
            .help("check the path; `slopewise run plans/NAME.toml` runs a plan in the plans folder")
    })?;
    let source = String::from_utf8(bytes.clone()).map_err(|_| {
        Diagnostic::new(format!("the plan file {file} is not UTF-8 text"))
            .help("save the plan as UTF-8")
    })?;
    let plan = plan::load(&file, &source).map_err(|e| e.diagnostic())?;
    Ok(LoadedPlan {
        plan,
        file,
        sha256: sha256_hex(&bytes),
        source,
        dir: path.parent().map(Path::to_path_buf).unwrap_or_default(),
    })
}

/// Runs one plan end to end and returns the folder it wrote.
fn run_plan(plan_path: &Path, out: Option<&Path>) -> Result<PathBuf, Diagnostic> {
    let lp = load_plan(plan_path)?;
    let plan = &lp.plan;
    let target = match (out, &plan.report.out) {
        (Some(o), _) => o.to_path_buf(),
        (None, Some(o)) => lp.dir.join(o),
        (None, None) => {
            return Err(
                Diagnostic::new(format!("the plan {} names no output folder", lp.file))
                    .help("add `out = \"../reports/NAME\"` under [report], or pass `--out DIR`"),
            );
        }
    };
    let data_path = lp.dir.join(&plan.data.path);
    let data_file = data_path.display().to_string();
    let open = || {
        File::open(&data_path).map_err(|e| {
            Diagnostic::new(format!("cannot open the data file {data_file}: {e}"))
                .at(lp.snippet(plan.spans.data_path.clone(), "named here"))
                .help("data.path is relative to the folder that holds the plan file")
        })
    };
    if let Some(pin) = &plan.data.sha256 {
        let mut reader = HashingReader::new(open()?);
        std::io::copy(&mut reader, &mut std::io::sink())
            .map_err(|e| Diagnostic::new(format!("cannot read the data file {data_file}: {e}")))?;
        let actual = reader
            .finish()
            .map_err(|e| Diagnostic::new(format!("cannot read {data_file}: {e}")))?;
        if &actual != pin {
            return Err(Diagnostic::new(format!(
                "the data file {data_file} is not the one the plan pins: its SHA-256 is {actual}, the plan expects {pin}"
            ))
            .at(lp.snippet(plan.spans.data_sha256.clone().unwrap_or_default(), "pinned here"))
            .help("if the new data are intended, update data.sha256; otherwise restore the pinned file"));
        }
    }
    let mut reader = HashingReader::new(open()?);
    let dataset =
        data::load(plan, &mut reader).map_err(|e| data_diagnostic(&e, &lp, &data_file))?;
    let data_sha256 = reader
        .finish()
        .map_err(|e| Diagnostic::new(format!("cannot read the data file {data_file}: {e}")))?;
    let provenance = Provenance {
        tool_version: TOOL_VERSION.to_string(),
        plan_sha256: lp.sha256.clone(),
        data_sha256,
        plan_file: plan_path
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_default(),
        data_file: plan.data.path.clone(),
    };
    let results = analysis::run(plan, &dataset, provenance).map_err(|e| {
        let mut d = e.diagnostic();
        d.file = Some(data_file.clone());
        d
    })?;
    let formats = &plan.report.formats;
    let wants = |f: Format| formats.contains(&f);
    let mut files = Vec::new();
    let mut figure_refs = Vec::new();
    if wants(Format::Markdown) || wants(Format::Pdf) {
        let points = analysis::figure_points(&dataset, &results);
        for fig in report::figures::render(&results, &points)
            .map_err(|e| Diagnostic::new(format!("the figures could not be drawn: {e}")))?
        {
            figure_refs.push(report::FigureRef {
                file: fig.file.clone(),
                title: fig.title.clone(),
                caption: fig.caption.clone(),
            });
            files.push((fig.file, fig.svg.into_bytes()));
        }
    }
    let rendered = |r: Result<String, report::ReportError>| {
        r.map(String::into_bytes).map_err(|e| e.diagnostic())
    };
    if wants(Format::Json) {
        files.push((
            "results.json".to_string(),
            rendered(report::json(&results))?,
        ));
    }
    if wants(Format::Markdown) {
        files.push((
            "report.md".to_string(),
            rendered(report::markdown(&results, &figure_refs))?,
        ));
    }
    if !wants(Format::Pdf) {
        output::write_run_folder(&target, &files).map_err(|e| e.diagnostic())?;
        return Ok(target);
    }
    files.push((
        "report.typ".to_string(),
        report::pdf::TEMPLATE.as_bytes().to_vec(),
    ));
    files.push((
        "report-data.json".to_string(),
        rendered(report::pdf::data(&results, &figure_refs))?,
    ));
    let compiled =
        output::write_run_folder_with(&target, &files, compile_pdf).map_err(|e| e.diagnostic())?;
    compiled.map(|()| target)
}

/// The typst-cli version the PDF template is tested against.
pub const TYPST_VERSION: &str = "0.15.1";

/// Environment variable naming the typst binary, when it is not `typst` on PATH.
pub const TYPST_ENV: &str = "SLOPEWISE_TYPST";

/// Font the PDF and the figures use, handed to typst so no system font is needed.
const FONT: &[u8] = include_bytes!("../assets/fonts/DejaVuSans.ttf");

/// Compiles `report.typ` in the staging folder into `report.pdf` with the external
/// `typst`: project root fixed to the folder, system fonts ignored, and a fixed
/// creation date (SOURCE_DATE_EPOCH if set, else 0), so reruns give the same bytes.
fn compile_pdf(staging: &Path) -> Result<(), Diagnostic> {
    let typst = std::env::var_os(TYPST_ENV).unwrap_or_else(|| "typst".into());
    let fonts = staging.join(".fonts");
    let cleanup = || {
        let _ = std::fs::remove_dir_all(staging.join(".fonts"));
        let _ = std::fs::remove_file(staging.join("report.pdf.partial"));
    };
    std::fs::create_dir_all(&fonts)
        .and_then(|()| std::fs::write(fonts.join("DejaVuSans.ttf"), FONT))
        .map_err(|e| Diagnostic::new(format!("cannot prepare the PDF fonts: {e}")))?;
    let epoch = std::env::var("SOURCE_DATE_EPOCH")
        .ok()
        .filter(|v| v.parse::<u64>().is_ok())
        .unwrap_or_else(|| "0".into());
    let output = std::process::Command::new(&typst)
        .current_dir(staging)
        .args([
            "compile",
            "--root",
            ".",
            "--ignore-system-fonts",
            "--font-path",
            ".fonts",
        ])
        .args(["--creation-timestamp", &epoch, "report.typ", "report.pdf"])
        .output();
    cleanup();
    let shown = Path::new(&typst).display().to_string();
    match output {
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => Err(Diagnostic::new(format!(
            "the PDF was not written: the `typst` program was not found ({shown}); report.md and results.json were written"
        ))
        .help(format!("install it with `cargo install typst-cli --version {TYPST_VERSION} --locked`"))
        .help(format!("or set {TYPST_ENV} to the path of a typst binary"))),
        Err(e) => Err(Diagnostic::new(format!("the PDF was not written: cannot run {shown}: {e}"))),
        Ok(out) if !out.status.success() => Err(Diagnostic::new(format!(
            "the PDF was not written: typst failed ({}); the other outputs were written. typst said:\n{}",
            out.status,
            String::from_utf8_lossy(&out.stderr).trim_end()
        ))
        .help(format!("slopewise is tested with typst {TYPST_VERSION}; check `{shown} --version`"))),
        Ok(_) => Ok(()),
    }
}

/// A data error, pointing into the plan when a plan key is involved.
fn data_diagnostic(e: &data::DataError, lp: &LoadedPlan, data_file: &str) -> Diagnostic {
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
