//! The demo plans run end to end, and the same plan and data give the same bytes.

use std::path::{Path, PathBuf};
use std::process::Command;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn run(plan: &Path, out: &Path) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_slopewise"))
        .arg("run")
        .arg(plan)
        .arg("--out")
        .arg(out)
        .output()
        .unwrap()
}

fn scratch(name: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("slopewise-demo-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

/// The demo plans ask for a PDF, which needs typst; without it (and outside CI, see
/// `.ci/run`) those plans are skipped with a note.
fn typst_present() -> bool {
    let ok = Command::new("typst")
        .arg("--version")
        .output()
        .is_ok_and(|o| o.status.success());
    if !ok {
        assert!(
            std::env::var_os("SLOPEWISE_REQUIRE_PDF_TOOLS").is_none(),
            "typst is missing and SLOPEWISE_REQUIRE_PDF_TOOLS forbids skipping"
        );
        eprintln!("note: typst is not installed; demo plans that ask for a PDF are skipped");
    }
    ok
}

#[test]
fn every_demo_plan_runs_and_reruns_byte_for_byte() {
    let typst = typst_present();
    let dir = scratch("rerun");
    let mut plans: Vec<PathBuf> = std::fs::read_dir(root().join("plans"))
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|e| e == "toml"))
        .collect();
    plans.sort();
    assert!(plans.len() >= 3);
    for plan in &plans {
        let stem = plan.file_stem().unwrap().to_string_lossy().into_owned();
        if !typst && std::fs::read_to_string(plan).unwrap().contains("\"pdf\"") {
            continue;
        }
        let (a, b) = (dir.join(format!("{stem}-a")), dir.join(format!("{stem}-b")));
        for out in [&a, &b] {
            let o = run(plan, out);
            assert!(
                o.status.success(),
                "{stem}: {}",
                String::from_utf8_lossy(&o.stderr)
            );
        }
        for file in ["results.json", "report.md", "report.pdf"] {
            if !a.join(file).exists() {
                continue;
            }
            let x = std::fs::read(a.join(file)).unwrap();
            let y = std::fs::read(b.join(file)).unwrap();
            assert!(x == y, "{stem}/{file} differs between two runs");
        }
        let report = std::fs::read_to_string(a.join("report.md")).unwrap();
        if std::fs::read_to_string(plan).unwrap().contains("[limits]") {
            // The limits figure: lines, one-sided bounds and the limit.
            let svg = std::fs::read_to_string(a.join("figures/limits.svg")).unwrap();
            assert!(
                svg.contains("When does each line reach its limit?"),
                "{stem}"
            );
            assert!(report.contains("figures/limits.svg"), "{stem}");
        }
        assert!(
            report.contains("professional judgement"),
            "{stem}: cautions missing"
        );
        assert!(
            report.contains("Holm 1979") || report.contains("Dunn 1961"),
            "{stem}: citations missing"
        );
    }
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn the_two_nursery_seasons_take_different_branches() {
    // The demo data are built so that 2025 has parallel beds and 2026 does not
    // (demo-data/README.md); the report must lead with the matching comparison.
    if !typst_present() {
        return;
    }
    let dir = scratch("seasons");
    for (season, homogeneous) in [("2025", true), ("2026", false)] {
        let out = dir.join(season);
        let o = run(&root().join(format!("plans/nursery-{season}.toml")), &out);
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
        let json: serde_json::Value =
            serde_json::from_str(&std::fs::read_to_string(out.join("results.json")).unwrap())
                .unwrap();
        assert_eq!(json["equal_slopes"]["homogeneous"], homogeneous, "{season}");
        let report = std::fs::read_to_string(out.join("report.md")).unwrap();
        // Slopes agree: the common-slope section is part of the main body. Slopes
        // differ: it is not; the same tables appear only as a what-if after the checks.
        let gate = report.find("## Do the slopes agree?").unwrap();
        let pairs = report.find("### Slope differences, pair by pair").unwrap();
        assert!(gate < pairs, "{season}: slope pairs belong to the gate");
        assert_eq!(
            report.contains("## Groups on a common slope"),
            homogeneous,
            "{season}"
        );
        match report.find("## If the slopes were forced equal") {
            Some(what_if) => {
                assert!(!homogeneous, "{season}: a what-if on agreeing slopes");
                let checks = report.find("## Checking the assumptions").unwrap();
                assert!(what_if > checks, "{season}: the what-if leads the body");
            }
            None => assert!(homogeneous, "{season}: common-slope tables lost"),
        }
    }
    let _ = std::fs::remove_dir_all(&dir);
}
