//! `slopewise run`: each plan read, analysed, rendered and written as a run folder.

use std::io::{IsTerminal, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use super::analyse::{Analysed, analyse_all};
use super::files::{read_tree, relative_to};
use super::plan_file::{LoadedPlan, load_plan, target_of};
use super::say;
use super::typst::compile_pdf;
use crate::diagnostic::Diagnostic;
use crate::plan::Format;
use crate::{TOOL_VERSION, analysis, audit, output, report};

/// `slopewise run`: runs each plan; a failing plan does not stop the others.
pub(super) fn run_plans(plans: &[PathBuf], out: Option<&Path>) -> ExitCode {
    let several = plans.len() > 1;
    let mut failed = 0;
    // A progress bar on a terminal; plain lines otherwise (logs, pipes, CI).
    let bar = (several && std::io::stderr().is_terminal()).then(|| {
        let bar = indicatif::ProgressBar::new(plans.len() as u64);
        bar.set_style(
            indicatif::ProgressStyle::with_template("{bar:30} {pos}/{len} {msg}")
                .unwrap_or_else(|_| indicatif::ProgressStyle::default_bar()),
        );
        bar
    });
    let progress_line = |line: String| match &bar {
        Some(b) => b.println(line),
        None => say(&format!("{line}\n")),
    };
    // Plans already run (by their resolved path) and the folders they wrote, so the
    // same plan twice, or two plans aimed at one folder, cannot write into each other.
    let mut seen: Vec<PathBuf> = Vec::new();
    let mut written_to: Vec<(PathBuf, PathBuf)> = Vec::new();
    for plan_path in plans {
        if let Some(b) = &bar {
            b.set_message(plan_path.display().to_string());
        }
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
            _ => {
                let real = std::fs::canonicalize(plan_path).unwrap_or_else(|_| plan_path.clone());
                if seen.contains(&real) {
                    Err(Diagnostic::new(format!(
                        "{} is named twice on the command line; it ran once",
                        plan_path.display()
                    ))
                    .help("name each plan once"))
                } else {
                    seen.push(real);
                    run_plan_once(plan_path, target.as_deref(), &mut written_to)
                }
            }
        };
        match outcome {
            Ok(written) => progress_line(format!(
                "{}: wrote {}",
                plan_path.display(),
                written.display()
            )),
            Err(d) => {
                failed += 1;
                match &bar {
                    Some(b) => b.suspend(|| {
                        let _ = std::io::stderr().write_all(d.render().as_bytes());
                    }),
                    None => {
                        let _ = std::io::stderr().write_all(d.render().as_bytes());
                    }
                }
            }
        }
        if let Some(b) = &bar {
            b.inc(1);
        }
    }
    if let Some(b) = &bar {
        b.finish_and_clear();
    }
    if several {
        say(&format!(
            "{} of {} plans ran; {failed} failed\n",
            plans.len() - failed,
            plans.len()
        ));
    }
    if failed == 0 {
        ExitCode::SUCCESS
    } else {
        ExitCode::FAILURE
    }
}

/// Renders every output the plan asks for, plus the plan copy: one response's
/// report, or for several attributes the study's.
pub(super) fn render_all(
    lp: &LoadedPlan,
    analysed: &[Analysed],
) -> Result<Vec<(String, Vec<u8>)>, Diagnostic> {
    match analysed {
        [one] if lp.plan.attributes.is_empty() => render(lp, one),
        several => render_study(lp, several),
    }
}

/// The figures of one analysis, placed in `files` (under `figures/<folder>/` when a
/// folder is given) and listed for the report, with the results carrying a warning
/// when they cannot be drawn (a figure never costs the user the report). None are
/// drawn when no format shows them.
fn draw(
    a: &Analysed,
    formats: &[Format],
    folder: Option<&str>,
    files: &mut Vec<(String, Vec<u8>)>,
) -> (Vec<report::FigureRef>, Option<crate::results::Results>) {
    if !formats.contains(&Format::Markdown) && !formats.contains(&Format::Pdf) {
        return (Vec::new(), None);
    }
    let (figures, with_warning) = drawn(a);
    let mut refs = Vec::new();
    for fig in figures {
        let file = match folder {
            Some(f) => fig.file.replacen("figures/", &format!("figures/{f}/"), 1),
            None => fig.file.clone(),
        };
        refs.push(report::FigureRef {
            file: file.clone(),
            title: fig.title.clone(),
            caption: fig.caption.clone(),
            width: fig.width,
        });
        files.push((file, fig.svg.into_bytes()));
    }
    (refs, with_warning)
}

/// The figures, or none and the results with a warning saying why.
fn drawn(
    a: &Analysed,
) -> (
    Vec<report::figures::Figure>,
    Option<crate::results::Results>,
) {
    let points = analysis::figure_points(&a.dataset, &a.results);
    match report::figures::render(&a.results, &points) {
        Ok(drawn) => (drawn, None),
        Err(e) => {
            let mut r = a.results.clone();
            r.warnings.push(format!(
                "The figures could not be drawn ({e}), so this report has none; every number is unaffected."
            ));
            (Vec::new(), Some(r))
        }
    }
}

/// The run folder's name for an attribute's figures: its column with anything but
/// letters, digits, `-` and `_` replaced, numbered when two columns come out alike.
fn figure_folder(column: &str, taken: &[String]) -> String {
    let mut slug: String = column
        .chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || c == '-' || c == '_' {
                c
            } else {
                '_'
            }
        })
        .collect();
    if slug.is_empty() {
        slug = "attribute".into();
    }
    let mut name = slug.clone();
    let mut n = 2;
    while taken.contains(&name) {
        name = format!("{slug}-{n}");
        n += 1;
    }
    name
}

/// The outputs of a plan with several attributes: each attribute's figures under
/// `figures/<column>/`, one `results.json` and one report for the study.
fn render_study(
    lp: &LoadedPlan,
    analysed: &[Analysed],
) -> Result<Vec<(String, Vec<u8>)>, Diagnostic> {
    let formats = &lp.plan.report.formats;
    let mut files = vec![(audit::PLAN_COPY.to_string(), lp.bytes.clone())];
    let mut taken = Vec::new();
    let mut attributes = Vec::new();
    let mut figure_refs = Vec::new();
    for a in analysed {
        let column = a.results.model.response.clone();
        let folder = figure_folder(&column, &taken);
        let (refs, with_warning) = draw(a, formats, Some(&folder), &mut files);
        taken.push(folder);
        figure_refs.push(refs);
        attributes.push((column, with_warning.unwrap_or_else(|| a.results.clone())));
    }
    let study = analysis::study(&lp.plan.title, attributes);
    push_outputs(
        &mut files,
        formats,
        || report::study::json(&study),
        || Ok(report::study::markdown(&study, &figure_refs)),
        || report::study::pdf_data(&study, &figure_refs),
    )?;
    Ok(files)
}

/// Renders every output of a single-response plan, plus the plan copy.
fn render(lp: &LoadedPlan, a: &Analysed) -> Result<Vec<(String, Vec<u8>)>, Diagnostic> {
    let formats = &lp.plan.report.formats;
    let mut files = vec![(audit::PLAN_COPY.to_string(), lp.bytes.clone())];
    let (figure_refs, with_warning) = draw(a, formats, None, &mut files);
    let results = with_warning.as_ref().unwrap_or(&a.results);
    push_outputs(
        &mut files,
        formats,
        || report::json(results),
        || report::markdown(results, &figure_refs),
        || report::pdf::data(results, &figure_refs),
    )?;
    Ok(files)
}

/// Adds the outputs the plan's formats ask for, each rendered only when asked:
/// `results.json`, `report.md`, and the PDF's template and data.
fn push_outputs(
    files: &mut Vec<(String, Vec<u8>)>,
    formats: &[Format],
    json: impl FnOnce() -> Result<String, report::ReportError>,
    markdown: impl FnOnce() -> Result<String, report::ReportError>,
    pdf_data: impl FnOnce() -> Result<String, report::ReportError>,
) -> Result<(), Diagnostic> {
    let rendered = |r: Result<String, report::ReportError>| {
        r.map(String::into_bytes).map_err(|e| e.diagnostic())
    };
    if formats.contains(&Format::Json) {
        files.push(("results.json".to_string(), rendered(json())?));
    }
    if formats.contains(&Format::Markdown) {
        files.push(("report.md".to_string(), rendered(markdown())?));
    }
    if formats.contains(&Format::Pdf) {
        files.push((
            "report.typ".to_string(),
            report::pdf::TEMPLATE.as_bytes().to_vec(),
        ));
        files.push(("report-data.json".to_string(), rendered(pdf_data())?));
    }
    Ok(())
}

/// Writes the run folder: outputs, then the PDF (if asked) and the manifest, in the
/// staging folder before it is moved into place. `as_if` is the folder the manifest
/// describes (the target, or for `verify` the folder being checked); `recorded`
/// is the data's place as a manifest already records it (for `verify`, so that a
/// byte-identical copy elsewhere given with `--data` reruns to the same manifest).
pub(super) fn write_outputs(
    lp: &LoadedPlan,
    a: &Analysed,
    files: &[(String, Vec<u8>)],
    target: &Path,
    as_if: &Path,
    recorded: Option<&str>,
) -> Result<(), Diagnostic> {
    let pdf = lp.plan.report.formats.contains(&Format::Pdf);
    let data_from_run_folder = recorded.map_or_else(
        || {
            if lp.plan.data.path == super::analyse::STDIN {
                // Standard input has no place to find it again.
                super::analyse::STDIN.to_string()
            } else {
                relative_to(as_if, &a.data_path)
            }
        },
        str::to_string,
    );
    let finish = |staging: &Path| -> Result<(), Diagnostic> {
        let compiled = if pdf { compile_pdf(staging) } else { Ok(()) };
        let pv = &a.results.provenance;
        let manifest = audit::Manifest {
            tool_version: TOOL_VERSION.to_string(),
            build_commit: pv.build_commit.clone(),
            rustc_version: pv.rustc_version.clone(),
            typst_version: pv.typst_version.clone(),
            font_sha256: pv.font_sha256.clone(),
            template_sha256: pv.template_sha256.clone(),
            plan_file: lp.name.clone(),
            plan_sha256: lp.sha256.clone(),
            data_file: lp.plan.data.path.clone(),
            data_from_run_folder: data_from_run_folder.clone(),
            data_sha256: a.results.provenance.data_sha256.clone(),
            outputs: audit::Manifest::hash_outputs(&read_tree(staging)?),
        };
        std::fs::write(staging.join(audit::MANIFEST), manifest.to_bytes())
            .map_err(|e| Diagnostic::new(format!("cannot write the manifest: {e}")))?;
        compiled
    };
    output::write_run_folder_with(target, &lp.name, files, finish).map_err(|e| e.diagnostic())?
}

/// Runs one plan unless an earlier plan of this command wrote the same folder.
fn run_plan_once(
    plan_path: &Path,
    target: Option<&Path>,
    written_to: &mut Vec<(PathBuf, PathBuf)>,
) -> Result<PathBuf, Diagnostic> {
    let lp = load_plan(plan_path)?;
    let folder = target_of(&lp, target)?;
    let key = absolute(&folder);
    if let Some((other, _)) = written_to.iter().find(|(_, t)| *t == key) {
        return Err(Diagnostic::new(format!(
            "{} and {} both write {}",
            other.display(),
            plan_path.display(),
            folder.display()
        ))
        .help("give each plan its own report.out, or run them with --out DIR so each gets a sub-folder"));
    }
    let written = run_plan(plan_path, target)?;
    written_to.push((plan_path.to_path_buf(), key));
    Ok(written)
}

/// `p` made absolute against the current folder, with what exists resolved.
fn absolute(p: &Path) -> PathBuf {
    let p = std::env::current_dir().unwrap_or_default().join(p);
    match (p.parent(), p.file_name()) {
        (Some(parent), Some(name)) => std::fs::canonicalize(parent)
            .map(|d| d.join(name))
            .unwrap_or(p.clone()),
        _ => p,
    }
}

/// Runs one plan end to end and returns the folder it wrote.
pub(super) fn run_plan(plan_path: &Path, out: Option<&Path>) -> Result<PathBuf, Diagnostic> {
    let lp = load_plan(plan_path)?;
    let target = target_of(&lp, out)?;
    // A run killed mid-exchange left the old report aside: put it back first, so
    // even a run that fails below leaves the folder as the user had it.
    output::recover(&target).map_err(|e| e.diagnostic())?;
    let analysed = analyse_all(&lp, &lp.dir.join(&lp.plan.data.path))?;
    let files = render_all(&lp, &analysed)?;
    // The attributes share the plan and the data, so the first one's provenance is
    // the run's.
    write_outputs(&lp, &analysed[0], &files, &target, &target, None)?;
    Ok(target)
}
