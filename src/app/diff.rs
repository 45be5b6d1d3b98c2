//! `slopewise diff`: what changed between runs.

use std::path::{Path, PathBuf};

use super::files::write_new_file;
use super::say;
use crate::diagnostic::Diagnostic;

/// `slopewise diff`: what changed between runs.
pub(super) fn diff(
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
        text.push_str(&crate::report::seasons::trend_text(&trend));
        text.push('\n');
        md.push_str(&crate::report::seasons::trend_markdown(&trend));
        md.push('\n');
        if let Some(path) = figure {
            let svg = crate::report::figures::trend_svg(&trend).map_err(|e| {
                Diagnostic::new(format!("the trend figure could not be drawn: {e}"))
            })?;
            write_new_file(path, svg.as_bytes())?;
        }
    } else if figure.is_some() {
        return Err(Diagnostic::new(
            "--figure draws a trend, which needs three or more runs",
        ));
    }
    text.push_str(&crate::report::seasons::comparison_text(&comparison));
    md.push_str(&crate::report::seasons::comparison_markdown(&comparison));
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
pub(super) fn load_run(path: &Path) -> Result<crate::seasons::Run, Diagnostic> {
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
