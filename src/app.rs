//! The edge: the only code that reads files, writes folders and sets the exit
//! status. Each command is one function; every error becomes a [`Diagnostic`] and is
//! printed once, here.

use std::fs::File;
use std::io::{IsTerminal, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use clap::Parser;

use crate::cli::{Cli, Command};
use crate::diagnostic::{Diagnostic, Snippet};
use crate::digest::{HashingReader, sha256_hex};
use crate::plan::{Format, Plan};
use crate::results::Provenance;
use crate::{TOOL_VERSION, analysis, audit, data, output, plan, report};

/// Parses the command line and runs it.
pub fn main() -> ExitCode {
    let cli = Cli::parse();
    let outcome = match cli.command {
        Command::Run { plans, out } => return run_plans(&plans, out.as_deref()),
        Command::Check { plan } => check(&plan),
        Command::Verify { folder, data } => verify(&folder, data.as_deref()),
        Command::Diff {
            runs,
            markdown,
            figure,
            alpha,
            fail_on_change,
        } => diff(
            &runs,
            markdown.as_deref(),
            figure.as_deref(),
            alpha,
            fail_on_change,
        ),
        Command::Init { data, out } => init(&data, out.as_deref()),
        Command::Schema => {
            say(crate::schema::PLAN_SCHEMA);
            Ok(())
        }
        Command::Completions { shell } => {
            let mut cmd = <Cli as clap::CommandFactory>::command();
            let mut script = Vec::new();
            clap_complete::generate(shell, &mut cmd, "slopewise", &mut script);
            say(&String::from_utf8_lossy(&script));
            Ok(())
        }
        Command::Man => {
            let cmd = <Cli as clap::CommandFactory>::command();
            let mut page = Vec::new();
            clap_mangen::Man::new(cmd)
                .render(&mut page)
                .map(|()| say(&String::from_utf8_lossy(&page)))
                .map_err(|e| Diagnostic::new(format!("cannot write the manual page: {e}")))
        }
    };
    finish(outcome)
}

/// Writes to stdout; a closed pipe (`slopewise diff … | head`) ends output quietly.
fn say(text: &str) {
    let mut out = std::io::stdout().lock();
    let _ = out.write_all(text.as_bytes()).and_then(|()| out.flush());
}

/// Prints an error once and turns the outcome into the exit status.
fn finish(outcome: Result<(), Diagnostic>) -> ExitCode {
    match outcome {
        Ok(()) => ExitCode::SUCCESS,
        Err(d) => {
            let _ = std::io::stderr().write_all(d.render().as_bytes());
            ExitCode::FAILURE
        }
    }
}

/// `slopewise run`: runs each plan; a failing plan does not stop the others.
fn run_plans(plans: &[PathBuf], out: Option<&Path>) -> ExitCode {
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
            _ => run_plan(plan_path, target.as_deref()),
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

/// A plan file read and parsed, with what error messages need to point into it.
struct LoadedPlan {
    plan: Plan,
    /// The path as shown in messages.
    file: String,
    /// The file name recorded in provenance.
    name: String,
    bytes: Vec<u8>,
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

fn parse_plan(
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
fn target_of(lp: &LoadedPlan, out: Option<&Path>) -> Result<PathBuf, Diagnostic> {
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

/// The data read and analysed, with their hash.
struct Analysed {
    dataset: data::Dataset,
    results: crate::results::Results,
    data_path: PathBuf,
}

/// Reads the data (checking any pin) and runs the analysis.
fn analyse(lp: &LoadedPlan, data_path: &Path) -> Result<Analysed, Diagnostic> {
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
    let provenance = Provenance {
        tool_version: TOOL_VERSION.to_string(),
        plan_sha256: lp.sha256.clone(),
        data_sha256,
        plan_file: lp.name.clone(),
        data_file: plan.data.path.clone(),
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

fn hash_file(file: File, shown: &str) -> Result<String, Diagnostic> {
    HashingReader::new(file)
        .finish()
        .map_err(|e| Diagnostic::new(format!("cannot read the data file {shown}: {e}")))
}

/// Renders every output the plan asks for, plus the plan copy.
fn render(lp: &LoadedPlan, a: &Analysed) -> Result<Vec<(String, Vec<u8>)>, Diagnostic> {
    let results = &a.results;
    let formats = &lp.plan.report.formats;
    let wants = |f: Format| formats.contains(&f);
    let mut files = vec![(audit::PLAN_COPY.to_string(), lp.bytes.clone())];
    let mut figure_refs = Vec::new();
    if wants(Format::Markdown) || wants(Format::Pdf) {
        let points = analysis::figure_points(&a.dataset, results);
        for fig in report::figures::render(results, &points)
            .map_err(|e| Diagnostic::new(format!("the figures could not be drawn: {e}")))?
        {
            figure_refs.push(report::FigureRef {
                file: fig.file.clone(),
                title: fig.title.clone(),
                caption: fig.caption.clone(),
                width: fig.width,
            });
            files.push((fig.file, fig.svg.into_bytes()));
        }
    }
    let rendered = |r: Result<String, report::ReportError>| {
        r.map(String::into_bytes).map_err(|e| e.diagnostic())
    };
    if wants(Format::Json) {
        files.push(("results.json".to_string(), rendered(report::json(results))?));
    }
    if wants(Format::Markdown) {
        files.push((
            "report.md".to_string(),
            rendered(report::markdown(results, &figure_refs))?,
        ));
    }
    if wants(Format::Pdf) {
        files.push((
            "report.typ".to_string(),
            report::pdf::TEMPLATE.as_bytes().to_vec(),
        ));
        files.push((
            "report-data.json".to_string(),
            rendered(report::pdf::data(results, &figure_refs))?,
        ));
    }
    Ok(files)
}

/// Writes the run folder: outputs, then the PDF (if asked) and the manifest, in the
/// staging folder before it is moved into place. `as_if` is the folder the manifest
/// describes (the target, or for `verify` the folder being checked).
fn write_outputs(
    lp: &LoadedPlan,
    a: &Analysed,
    files: &[(String, Vec<u8>)],
    target: &Path,
    as_if: &Path,
) -> Result<(), Diagnostic> {
    let pdf = lp.plan.report.formats.contains(&Format::Pdf);
    let data_from_run_folder = relative_to(as_if, &a.data_path);
    let finish = |staging: &Path| -> Result<(), Diagnostic> {
        let compiled = if pdf { compile_pdf(staging) } else { Ok(()) };
        let manifest = audit::Manifest {
            tool_version: TOOL_VERSION.to_string(),
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
    output::write_run_folder_with(target, files, finish).map_err(|e| e.diagnostic())?
}

/// Runs one plan end to end and returns the folder it wrote.
fn run_plan(plan_path: &Path, out: Option<&Path>) -> Result<PathBuf, Diagnostic> {
    let lp = load_plan(plan_path)?;
    let target = target_of(&lp, out)?;
    let analysed = analyse(&lp, &lp.dir.join(&lp.plan.data.path))?;
    let files = render(&lp, &analysed)?;
    write_outputs(&lp, &analysed, &files, &target, &target)?;
    Ok(target)
}

/// `slopewise check`: everything a run does except writing.
fn check(plan_path: &Path) -> Result<(), Diagnostic> {
    let lp = load_plan(plan_path)?;
    let target = target_of(&lp, None).ok();
    let data_path = lp.dir.join(&lp.plan.data.path);
    let a = analyse(&lp, &data_path)?;
    render(&lp, &a)?;
    let r = &a.results;
    let mut out = String::new();
    out.push_str(&format!("plan {} is valid: \"{}\"\n", lp.file, r.title));
    out.push_str(&format!(
        "data {}: {} rows read, {} would be used",
        data_path.display(),
        r.data.rows_read,
        r.data.rows_used
    ));
    let dropped: Vec<String> = r
        .data
        .rows_dropped
        .iter()
        .map(|(k, n)| format!("{n} {}", k.replace('_', " ")))
        .collect();
    if !dropped.is_empty() {
        out.push_str(&format!(
            " ({} left out: {})",
            r.data.rows_read - r.data.rows_used,
            dropped.join(", ")
        ));
    }
    out.push('\n');
    let groups: Vec<String> = r
        .groups
        .iter()
        .map(|g| format!("{} (n = {})", g.level, g.n))
        .collect();
    out.push_str(&format!(
        "model: {} on {} by {}; groups: {}\n",
        r.model.response,
        r.model.covariate,
        r.model.group,
        groups.join(", ")
    ));
    let formats: Vec<&str> = lp.plan.report.formats.iter().map(|f| f.name()).collect();
    match target {
        Some(t) => out.push_str(&format!(
            "a run would write {} ({})\n",
            t.display(),
            formats.join(", ")
        )),
        None => out.push_str("a run needs --out DIR: the plan names no report.out\n"),
    }
    for w in &r.warnings {
        out.push_str(&format!("warning: {w}\n"));
    }
    say(&out);
    Ok(())
}

/// `slopewise verify`: rerun the folder's plan on its data and compare bytes.
fn verify(folder: &Path, data_override: Option<&Path>) -> Result<(), Diagnostic> {
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
    let scratch = std::env::temp_dir().join(format!("slopewise-verify-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&scratch);
    let rerun_dir = scratch.join("run");
    let written = write_outputs(&lp, &a, &files, &rerun_dir, folder);
    let rerun = written.and_then(|()| read_tree(&rerun_dir));
    let _ = std::fs::remove_dir_all(&scratch);
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

/// `slopewise diff`: what changed between runs.
fn diff(
    paths: &[PathBuf],
    markdown: Option<&Path>,
    figure: Option<&Path>,
    alpha: f64,
    fail_on_change: bool,
) -> Result<(), Diagnostic> {
    if !(alpha > 0.0 && alpha < 1.0) {
        return Err(Diagnostic::new(format!(
            "--alpha must lie strictly between 0 and 1, found {alpha}"
        )));
    }
    let runs = paths
        .iter()
        .map(|p| load_run(p))
        .collect::<Result<Vec<_>, _>>()?;
    let n = runs.len();
    let comparison = crate::seasons::compare(&runs[n - 2], &runs[n - 1], alpha);
    let mut text = String::new();
    let mut md = String::new();
    if n > 2 {
        let trend = crate::seasons::trend(&runs, alpha);
        text.push_str(&crate::seasons::trend_text(&trend));
        text.push('\n');
        md.push_str(&crate::seasons::trend_markdown(&trend));
        md.push('\n');
        if let Some(path) = figure {
            let svg = crate::seasons::trend_svg(&trend).map_err(|e| {
                Diagnostic::new(format!("the trend figure could not be drawn: {e}"))
            })?;
            write_new_file(path, svg.as_bytes())?;
        }
    } else if figure.is_some() {
        return Err(Diagnostic::new(
            "--figure draws a trend, which needs three or more runs",
        ));
    }
    text.push_str(&crate::seasons::comparison_text(&comparison));
    md.push_str(&crate::seasons::comparison_markdown(&comparison));
    say(&text);
    if let Some(path) = markdown {
        write_new_file(path, md.as_bytes())?;
    }
    if fail_on_change && comparison.flagged() {
        return Err(Diagnostic::new(
            "a decision flipped or a change is significant between the last two runs (--fail-on-change)",
        ));
    }
    Ok(())
}

/// A run for `diff`: a results.json file, or a run folder holding one.
fn load_run(path: &Path) -> Result<crate::seasons::Run, Diagnostic> {
    let file = if path.is_dir() {
        path.join("results.json")
    } else {
        path.to_path_buf()
    };
    let bytes = std::fs::read(&file).map_err(|e| {
        Diagnostic::new(format!("cannot read {}: {e}", file.display()))
            .help("diff takes results.json files or folders written by `slopewise run`")
    })?;
    let results = serde_json::from_slice(&bytes).map_err(|e| {
        Diagnostic::new(format!(
            "{} is not a slopewise results.json: {e}",
            file.display()
        ))
        .help("it may come from another version; rerun that plan")
    })?;
    Ok(crate::seasons::Run {
        label: path.display().to_string(),
        results,
    })
}

/// Writes a file whole (through a temporary name) and refuses to overwrite one.
fn write_new_file(path: &Path, bytes: &[u8]) -> Result<(), Diagnostic> {
    if path.exists() {
        return Err(
            Diagnostic::new(format!("{} already exists", path.display()))
                .help("choose a new file name, or remove the old file first"),
        );
    }
    let tmp = path.with_extension("partial");
    std::fs::write(&tmp, bytes)
        .and_then(|()| std::fs::rename(&tmp, path))
        .map_err(|e| {
            let _ = std::fs::remove_file(&tmp);
            Diagnostic::new(format!("cannot write {}: {e}", path.display()))
        })
}

/// `slopewise init`: a commented draft plan from the data's header.
fn init(data: &Path, out: Option<&Path>) -> Result<(), Diagnostic> {
    let shown = data.display().to_string();
    let mut sample = Vec::new();
    File::open(data)
        .and_then(|f| std::io::Read::read_to_end(&mut std::io::Read::take(f, 4 << 20), &mut sample))
        .map_err(|e| Diagnostic::new(format!("cannot read the data file {shown}: {e}")))?;
    let in_plan = match out {
        Some(plan) => relative_to(plan.parent().unwrap_or(Path::new(".")), data),
        None => shown.clone(),
    };
    let text = crate::draft::draft_plan(&shown, &in_plan, &sample)
        .map_err(|e| Diagnostic::new(e.to_string()).in_file(shown.clone()))?;
    match out {
        Some(path) => {
            write_new_file(path, text.as_bytes())?;
            say(&format!(
                "wrote {}; review it, then `slopewise check {}`\n",
                path.display(),
                path.display()
            ));
        }
        None => say(&text),
    }
    Ok(())
}

/// Every file under `dir`, by relative path with `/` separators.
fn read_tree(dir: &Path) -> Result<std::collections::BTreeMap<String, Vec<u8>>, Diagnostic> {
    fn walk(
        base: &Path,
        dir: &Path,
        out: &mut std::collections::BTreeMap<String, Vec<u8>>,
    ) -> std::io::Result<()> {
        for entry in std::fs::read_dir(dir)? {
            let path = entry?.path();
            if path.is_dir() {
                walk(base, &path, out)?;
            } else {
                let rel = path.strip_prefix(base).unwrap_or(&path);
                let key = rel
                    .components()
                    .map(|c| c.as_os_str().to_string_lossy())
                    .collect::<Vec<_>>()
                    .join("/");
                out.insert(key, std::fs::read(&path)?);
            }
        }
        Ok(())
    }
    let mut out = std::collections::BTreeMap::new();
    walk(dir, dir, &mut out)
        .map_err(|e| Diagnostic::new(format!("cannot read {}: {e}", dir.display())))?;
    Ok(out)
}

/// `to` relative to the folder `from` (neither needs to exist yet; both are made
/// absolute against the current folder). Falls back to the absolute path.
fn relative_to(from: &Path, to: &Path) -> String {
    let absolute = |p: &Path| {
        let p = if p.is_absolute() {
            p.to_path_buf()
        } else {
            std::env::current_dir().unwrap_or_default().join(p)
        };
        // Resolve what exists (symlinks, ..) and keep the rest as written.
        let mut existing = p.clone();
        let mut rest = Vec::new();
        while !existing.exists() {
            match (
                existing.file_name().map(|n| n.to_os_string()),
                existing.parent(),
            ) {
                (Some(name), Some(parent)) => {
                    rest.push(name);
                    existing = parent.to_path_buf();
                }
                _ => break,
            }
        }
        let mut out = existing.canonicalize().unwrap_or(existing);
        for name in rest.into_iter().rev() {
            out.push(name);
        }
        out
    };
    let (from, to) = (absolute(from), absolute(to));
    let f: Vec<_> = from.components().collect();
    let t: Vec<_> = to.components().collect();
    let common = f.iter().zip(&t).take_while(|(a, b)| a == b).count();
    if common == 0 {
        return to.display().to_string();
    }
    let mut parts: Vec<String> = vec!["..".to_string(); f.len() - common];
    parts.extend(
        t[common..]
            .iter()
            .map(|c| c.as_os_str().to_string_lossy().into_owned()),
    );
    parts.join("/")
}

/// The typst-cli version the PDF template is tested against.
pub const TYPST_VERSION: &str = "0.15.1";

/// Environment variable naming the typst binary, when it is not `typst` on PATH.
pub const TYPST_ENV: &str = "SLOPEWISE_TYPST";

/// Font the PDF and the figures use, handed to typst so no system font is needed.
const FONT: &[u8] = crate::report::figures::FONT_BYTES;

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
