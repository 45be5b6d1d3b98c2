//! `slopewise check`: everything a run does except writing.

use std::path::Path;

use super::analyse::analyse_all;
use super::plan_file::{load_plan, target_of};
use super::run::render_all;
use super::say;
use crate::diagnostic::Diagnostic;

/// `slopewise check`: everything a run does except writing.
pub(super) fn check(plan_path: &Path) -> Result<(), Diagnostic> {
    let lp = load_plan(plan_path)?;
    let target = target_of(&lp, None).ok();
    let data_path = lp.dir.join(&lp.plan.data.path);
    let all = analyse_all(&lp, &data_path)?;
    render_all(&lp, &all)?;
    let mut out = String::new();
    out.push_str(&format!(
        "plan {} is valid: \"{}\"\n",
        lp.file, all[0].results.title
    ));
    for a in &all {
        if all.len() > 1 {
            out.push_str(&format!("attribute {}:\n", a.results.model.response));
        }
        describe(&mut out, &a.results, &data_path);
    }
    let formats: Vec<&str> = lp.plan.report.formats.iter().map(|f| f.name()).collect();
    match target {
        Some(t) => out.push_str(&format!(
            "a run would write {} ({})\n",
            t.display(),
            formats.join(", ")
        )),
        None => out.push_str("a run needs --out DIR: the plan names no report.out\n"),
    }
    say(&out);
    Ok(())
}

/// What a run would use and say for one response.
fn describe(out: &mut String, r: &crate::results::Results, data_path: &Path) {
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
    for w in &r.warnings {
        out.push_str(&format!("warning: {w}\n"));
    }
}
