//! `slopewise check`: everything a run does except writing.

use std::path::Path;

use super::analyse::analyse;
use super::plan_file::{load_plan, target_of};
use super::run::render;
use super::say;
use crate::diagnostic::Diagnostic;

/// `slopewise check`: everything a run does except writing.
pub(super) fn check(plan_path: &Path) -> Result<(), Diagnostic> {
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
