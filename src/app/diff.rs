//! `slopewise diff`: what changed between runs.

use std::io::Write;
use std::path::{Path, PathBuf};

use super::files::write_new_file;
use super::say;
use crate::diagnostic::Diagnostic;

/// `slopewise diff`: what changed between runs.
///
/// Runs that measure different things (another response, covariate, group column,
/// transform or unit) are refused unless `allow_mismatch`, and then no change is
/// tested. The comparison (and its Markdown) is written before any figure, and a
/// figure that cannot be drawn is a warning: it never costs the user the text.
pub(super) fn diff(
    paths: &[PathBuf],
    markdown: Option<&Path>,
    figure: Option<&Path>,
    alpha: f64,
    fail_on_change: bool,
    allow_mismatch: bool,
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
    for pair in runs.windows(2) {
        let mismatched = crate::seasons::mismatches(&pair[0].results, &pair[1].results);
        if !mismatched.is_empty() && !allow_mismatch {
            return Err(Diagnostic::new(format!(
                "{} and {} measure different things: {}",
                pair[0].label,
                pair[1].label,
                mismatched.join("; ")
            ))
            .help("compare runs of the same plan over seasons; to set them side by side anyway, add --allow-mismatch (no change is then tested)"));
        }
    }
    let mut comparison = crate::seasons::compare(&runs[n - 2], &runs[n - 1], alpha);
    let mismatched = crate::seasons::mismatches(&runs[n - 2].results, &runs[n - 1].results);
    comparison.untest_for(&mismatched);
    let mut text = String::new();
    let mut md = String::new();
    if !mismatched.is_empty() {
        // Said before anything else: every number below compares different things.
        let warning = format!(
            "Warning: these runs measure different things ({}). They are set side by side as asked (--allow-mismatch); no change between them is tested.\n\n",
            mismatched.join("; ")
        );
        text.push_str(&warning);
        md.push_str(&format!("> {}", crate::report::escape_markdown(&warning)));
    }
    let trend = crate::seasons::trend(&runs, alpha);
    if n > 2 {
        text.push_str(&crate::report::seasons::trend_text(&trend));
        text.push('\n');
        md.push_str(&crate::report::seasons::trend_markdown(&trend));
        md.push('\n');
    }
    text.push_str(&crate::report::seasons::comparison_text(&comparison));
    md.push_str(&crate::report::seasons::comparison_markdown(&comparison));
    say(&text);
    if let Some(path) = markdown {
        write_new_file(path, md.as_bytes())?;
    }
    if let Some(path) = figure {
        // Two runs draw as well as many: each group's slope at each run.
        let drawn = crate::report::figures::trend_svg(&trend)
            .map_err(|e| Diagnostic::new(format!("the figure could not be drawn: {e}")))
            .and_then(|svg| write_new_file(path, svg.as_bytes()));
        if let Err(d) = drawn {
            let _ = writeln!(
                std::io::stderr(),
                "warning: {} (the comparison above{} is complete)",
                d.message,
                if markdown.is_some() {
                    " and its Markdown"
                } else {
                    ""
                }
            );
        }
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
    // A study of several attributes holds one results per attribute: say so rather
    // than report a missing key.
    if serde_json::from_slice::<crate::results::Study>(&bytes).is_ok() {
        return Err(Diagnostic::new(format!(
            "{} holds several attributes ([[responses]]); diff compares runs of one response",
            file.display()
        ))
        .help("comparing studies of several attributes across seasons is not offered yet; diff a single-response plan per attribute"));
    }
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
