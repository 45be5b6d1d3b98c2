//! The pure core imports nothing from the edges: no file of plan, data, fit, stats,
//! analysis or the season statistics names `report`, `app`, `cli` or `output` in a
//! `use` (issue 12; the rule is in DEVELOPERS.md).

use std::path::{Path, PathBuf};

const CORE: [&str; 6] = [
    "src/plan",
    "src/data",
    "src/fit",
    "src/stats",
    "src/analysis",
    "src/seasons",
];
const EDGES: [&str; 4] = ["report", "app", "cli", "output"];

fn rust_files(dir: &Path, out: &mut Vec<PathBuf>) {
    for e in std::fs::read_dir(dir).unwrap() {
        let p = e.unwrap().path();
        if p.is_dir() {
            rust_files(&p, out);
        } else if p.extension().is_some_and(|x| x == "rs") {
            out.push(p);
        }
    }
}

/// The module paths a `use` line names, as `crate::a::b` words.
fn named(line: &str) -> Vec<String> {
    line.split(|c: char| !(c.is_alphanumeric() || c == '_' || c == ':'))
        .flat_map(|w| w.split("::"))
        .map(str::to_string)
        .collect()
}

#[test]
fn the_pure_core_uses_no_edge_module() {
    let root = PathBuf::from(env!("CARGO_MANIFEST_DIR"));
    let mut files = Vec::new();
    for dir in CORE {
        rust_files(&root.join(dir), &mut files);
    }
    assert!(files.len() > 20, "the core was not found");
    let mut bad = Vec::new();
    for f in &files {
        let text = std::fs::read_to_string(f).unwrap();
        // A `use` may span lines: read each statement up to its semicolon.
        for stmt in text.split(';') {
            let stmt = stmt.trim_start();
            let Some(body) = stmt
                .strip_prefix("use ")
                .or_else(|| stmt.strip_prefix("pub use "))
                .or_else(|| stmt.strip_prefix("pub(crate) use "))
            else {
                continue;
            };
            let words = named(body);
            let rooted = words.first().is_some_and(|w| w == "crate" || w == "super");
            if rooted && words.iter().any(|w| EDGES.contains(&w.as_str())) {
                bad.push(format!("{}: use {}", f.display(), body.trim()));
            }
        }
        // A path written out in the code (`crate::report::x(...)`) counts too.
        for edge in EDGES {
            if text.contains(&format!("crate::{edge}::")) {
                bad.push(format!("{}: names crate::{edge}", f.display()));
            }
        }
    }
    assert!(
        bad.is_empty(),
        "the core reaches the edges:\n{}",
        bad.join("\n")
    );
}

#[test]
fn the_check_sees_a_forbidden_use() {
    // The same reading on a line that breaks the rule, so the test above can fail.
    let words = named("crate::report::escape_markdown");
    assert!(words.iter().any(|w| w == "report"));
}
