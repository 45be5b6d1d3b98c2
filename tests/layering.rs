//! Module boundaries that DEVELOPERS.md states, checked on the source text (common
//! practice, no source; the pure core's imports are checked in architecture.rs): the
//! two kinds of pairwise comparison share `analysis/pairwise.rs` instead of importing each other,
//! and the Welch–Satterthwaite df is computed in one place.

use std::path::{Path, PathBuf};

fn src() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("src")
}

fn rust_files(dir: &Path, out: &mut Vec<PathBuf>) {
    for entry in std::fs::read_dir(dir).unwrap() {
        let path = entry.unwrap().path();
        if path.is_dir() {
            rust_files(&path, out);
        } else if path.extension().is_some_and(|e| e == "rs") {
            out.push(path);
        }
    }
}

fn read(rel: &str) -> String {
    std::fs::read_to_string(src().join(rel)).unwrap()
}

#[test]
fn gate_and_comparisons_share_the_pairwise_module() {
    let gate = read("analysis/gate.rs");
    let compare = read("analysis/compare.rs");
    assert!(!gate.contains("compare::"), "gate.rs imports compare.rs");
    assert!(!compare.contains("gate::"), "compare.rs imports gate.rs");
    assert!(gate.contains("pairwise::") && compare.contains("pairwise::"));
}

#[test]
fn the_welch_df_lives_in_one_function() {
    // Every caller goes through stats::welch::welch_df.
    for rel in ["analysis/pairwise.rs", "seasons/mod.rs"] {
        assert!(
            read(rel).contains("welch_df("),
            "{rel} does not call welch_df"
        );
    }
    let mut files = Vec::new();
    rust_files(&src(), &mut files);
    let defining: Vec<_> = files
        .iter()
        .filter(|f| {
            let t = std::fs::read_to_string(f).unwrap();
            // The df formula's denominator, written with the variance shares.
            t.contains("1.0 / (w") && t.contains("/ df")
        })
        .collect();
    assert_eq!(
        defining,
        vec![&src().join("stats/welch.rs")],
        "the Welch–Satterthwaite formula is written outside stats/welch.rs"
    );
}
