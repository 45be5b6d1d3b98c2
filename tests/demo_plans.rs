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
        let text = std::fs::read_to_string(plan).unwrap();
        // The limits figure: lines, one-sided bounds and the limit; one per attribute
        // (under figures/<column>/) for a plan with several.
        let limit_figures: Vec<String> = if text.contains("[[responses]]") {
            let json: serde_json::Value =
                serde_json::from_str(&std::fs::read_to_string(a.join("results.json")).unwrap())
                    .unwrap();
            json["attributes"]
                .as_array()
                .unwrap()
                .iter()
                .map(|at| format!("figures/{}/limits.svg", at["column"].as_str().unwrap()))
                .collect()
        } else if text.contains("[limits]") {
            vec!["figures/limits.svg".to_string()]
        } else {
            Vec::new()
        };
        for file in limit_figures {
            let svg = std::fs::read_to_string(a.join(&file)).unwrap();
            assert!(
                svg.contains("When does each line reach its limit?"),
                "{stem} {file}"
            );
            assert!(report.contains(&file), "{stem} {file}");
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

#[test]
fn the_three_attribute_study_is_each_attribute_run_alone_and_names_the_limiting_one() {
    // demo-data/README.md: the degradant is built to reach its limit first and
    // hardness to rise away from its lower limit. Each attribute's results in the
    // study must be exactly what a single-response plan of that attribute gives.
    let dir = scratch("study");
    let plan_path = root().join("plans/tablet-attributes-2026.toml");
    let data = root().join("demo-data/tablet-attributes-2026.csv");
    let text = std::fs::read_to_string(&plan_path)
        .unwrap()
        .replace(
            "formats = [\"markdown\", \"json\", \"pdf\"]",
            "formats = [\"markdown\", \"json\"]",
        )
        .replace(
            "../demo-data/tablet-attributes-2026.csv",
            &data.display().to_string(),
        );
    let plans = dir.join("plans");
    std::fs::create_dir_all(&plans).unwrap();
    std::fs::write(plans.join("study.toml"), &text).unwrap();
    let out = dir.join("study");
    let o = run(&plans.join("study.toml"), &out);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let study: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("results.json")).unwrap()).unwrap();
    assert_eq!(study["answer"]["limiting"], "degradant_pct");
    let rows = study["answer"]["rows"].as_array().unwrap();
    let hardness = rows.iter().find(|r| r["column"] == "hardness_n").unwrap();
    assert_eq!(hardness["outcome"], "never");
    let report = std::fs::read_to_string(out.join("report.md")).unwrap();
    assert!(report.contains("set by degradant\\_pct"), "{report}");
    assert!(
        report.contains("Never reaching a limit: hardness\\_n"),
        "{report}"
    );
    // The shortest supported period among the attributes is the answer.
    let shortest = rows
        .iter()
        .filter_map(|r| r["supported"].as_f64())
        .fold(f64::INFINITY, f64::min);
    assert_eq!(study["answer"]["supported"].as_f64(), Some(shortest));

    // Each attribute alone: the same plan with its column as model.response.
    let single_head = text.split("[[responses]]").next().unwrap().to_string();
    let shared_limits = "[limits]\nconfidence = 0.95\nstorage = \"room\"\nround_to = 1\n";
    let tail = text.split("[tests]").nth(1).unwrap();
    for (i, (column, units, limits)) in [
        (
            "assay_pct",
            "% of label claim",
            "lower = 95.0\nupper = 105.0",
        ),
        ("degradant_pct", "%", "upper = 0.5"),
        ("hardness_n", "N", "lower = 40.0"),
    ]
    .into_iter()
    .enumerate()
    {
        let single = single_head
            .replace("[model]\n", &format!("[model]\nresponse = \"{column}\"\n"))
            .replace(
                "covariate = \"months\"\n\n",
                &format!("covariate = \"months\"\nresponse = \"{units}\"\n\n"),
            )
            + &format!("{shared_limits}{limits}\n\n[tests]{tail}");
        let path = plans.join(format!("{column}.toml"));
        std::fs::write(&path, &single).unwrap();
        let out = dir.join(column);
        let o = run(&path, &out);
        assert!(
            o.status.success(),
            "{column}: {}\n{single}",
            String::from_utf8_lossy(&o.stderr)
        );
        let mut alone: serde_json::Value =
            serde_json::from_str(&std::fs::read_to_string(out.join("results.json")).unwrap())
                .unwrap();
        let mut inside = study["attributes"][i]["results"].clone();
        assert_eq!(study["attributes"][i]["column"], column);
        // Only the plan file and its hash differ.
        for r in [&mut alone, &mut inside] {
            r["provenance"]["plan_sha256"] = serde_json::Value::Null;
            r["provenance"]["plan_file"] = serde_json::Value::Null;
        }
        assert_eq!(alone, inside, "{column}");
    }
    let _ = std::fs::remove_dir_all(&dir);
}
