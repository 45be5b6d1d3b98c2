//! The report reasons from one decision: for crafted plans on every branch (slopes
//! not shown to differ / differing; lot pooling to one line, parallel lines or
//! separate lines; a crossing inside the data, beyond it, already passed, never),
//! the summary states the branch `results.json` records, the common-slope tables
//! never sit in the main body under unequal slopes, and `diff` speaks of adjusted
//! means exactly when both reports print them (issue 13).
//!
//! The data are invented here: three production lots measured every two months
//! from 0 to 24, each a straight line plus a fixed, small wobble. What each case must
//! come out as follows from the lines chosen (common practice, no source: slopes far
//! apart relative to the wobble are detected, equal ones are not).

use serde_json::Value;
use std::path::{Path, PathBuf};
use std::process::Command;

fn bin() -> &'static str {
    env!("CARGO_BIN_EXE_slopewise")
}

/// Rows of three lots: lot g's line is `a[g] + b[g]·month`.
fn lots(a: [f64; 3], b: [f64; 3]) -> String {
    let wobble = [0.3, -0.2, 0.1, -0.4, 0.2, 0.0, -0.1];
    let mut s = String::from("lot,month,assay\n");
    for (g, name) in ["L1", "L2", "L3"].iter().enumerate() {
        for (i, month) in (0..=24).step_by(2).enumerate() {
            let e = wobble[(i + 2 * g) % wobble.len()];
            let y = a[g] + b[g] * month as f64 + e;
            s.push_str(&format!("{name},{month},{y:.4}\n"));
        }
    }
    s
}

/// Writes plan and data to a fresh folder, runs the plan and returns the folder.
fn run(name: &str, data: &str, extra: &str) -> (PathBuf, Value, String) {
    run_report(name, data, extra, "")
}

/// As [`run`], with more keys under [report].
fn run_report(name: &str, data: &str, extra: &str, report: &str) -> (PathBuf, Value, String) {
    let dir =
        std::env::temp_dir().join(format!("slopewise-reasoning-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    std::fs::write(dir.join("data.csv"), data).unwrap();
    let plan = format!(
        r#"title = "Invented lots ({name})"

[data]
path = "data.csv"

[model]
response = "assay"
covariate = "month"
group = "lot"

[model.units]
response = "%"
covariate = "months"
{extra}
[report]
out = "out"
formats = ["markdown", "json"]
{report}"#
    );
    std::fs::write(dir.join("plan.toml"), plan).unwrap();
    let o = Command::new(bin())
        .arg("run")
        .arg(dir.join("plan.toml"))
        .output()
        .unwrap();
    assert!(
        o.status.success(),
        "{name}: {}",
        String::from_utf8_lossy(&o.stderr)
    );
    let json: Value =
        serde_json::from_str(&std::fs::read_to_string(dir.join("out/results.json")).unwrap())
            .unwrap();
    let report = std::fs::read_to_string(dir.join("out/report.md")).unwrap();
    (dir, json, report)
}

/// The summary's text: from "## In brief" to the next section.
fn summary(report: &str) -> &str {
    let start = report.find("## In brief").expect("summary");
    let rest = &report[start + 3..];
    let end = rest.find("\n## ").map_or(rest.len(), |e| e + 3);
    &report[start..start + end]
}

/// The summary's words for each gate outcome the record can hold.
fn gate_phrase(outcome: &str) -> &'static str {
    match outcome {
        "not-shown-to-differ" => "does not show the slopes to differ",
        "differ" | "exact-fit" => "lines are not parallel",
        "identical" => "parallel to rounding",
        other => panic!("unknown gate outcome {other}"),
    }
}

/// The summary's words for each limits outcome.
fn limits_phrase(outcome: &str) -> &'static str {
    match outcome {
        "crossed-within" => "inside the observed data",
        "crossed-beyond" => "an extrapolation",
        "already-crossed" => "already past the",
        "never" => "meets a limit after the first observation",
        "not-decided" => "No line was chosen",
        other => panic!("unknown limits outcome {other}"),
    }
}

/// The summary's words for each pooling model.
fn pooling_phrase(model: &str) -> &'static str {
    match model {
        "pooled" => "chose one pooled line",
        "common-slope" => "chose parallel lines",
        "separate" => "chose separate lines",
        other => panic!("unknown pooling model {other}"),
    }
}

struct Case {
    name: &'static str,
    data: String,
    extra: &'static str,
    gate: &'static str,
    pooling: Option<&'static str>,
    limits: Option<&'static str>,
}

const PARALLEL: ([f64; 3], [f64; 3]) = ([100.0, 101.0, 102.0], [-0.5, -0.5, -0.5]);
const SPREAD: ([f64; 3], [f64; 3]) = ([100.0, 100.5, 101.0], [-0.2, -0.5, -0.9]);
const ONE_LINE: ([f64; 3], [f64; 3]) = ([100.0, 100.0, 100.0], [-0.5, -0.5, -0.5]);

fn cases() -> Vec<Case> {
    let d = |(a, b): ([f64; 3], [f64; 3])| lots(a, b);
    vec![
        Case {
            name: "parallel",
            data: d(PARALLEL),
            extra: "",
            gate: "not-shown-to-differ",
            pooling: None,
            limits: None,
        },
        Case {
            name: "unequal",
            data: d(SPREAD),
            extra: "",
            gate: "differ",
            pooling: None,
            limits: None,
        },
        Case {
            name: "unequal-omit",
            data: d(SPREAD),
            extra: "",
            gate: "differ",
            pooling: None,
            limits: None,
        },
        Case {
            name: "pool-one-line",
            data: d(ONE_LINE),
            extra: "\n[tests]\nprocedure = \"lot-pooling\"\npooling_alpha = 0.25\n\n[limits]\nlower = 80.0\n",
            gate: "not-shown-to-differ",
            pooling: Some("pooled"),
            limits: Some("crossed-beyond"),
        },
        Case {
            name: "pool-parallel",
            data: d(PARALLEL),
            extra: "\n[tests]\nprocedure = \"lot-pooling\"\npooling_alpha = 0.25\n\n[limits]\nlower = 80.0\n",
            gate: "not-shown-to-differ",
            pooling: Some("common-slope"),
            limits: Some("crossed-beyond"),
        },
        Case {
            name: "pool-separate",
            data: d(SPREAD),
            extra: "\n[tests]\nprocedure = \"lot-pooling\"\npooling_alpha = 0.25\n\n[limits]\nlower = 80.0\n",
            gate: "differ",
            pooling: Some("separate"),
            limits: Some("crossed-within"),
        },
        Case {
            name: "cross-within",
            data: d(PARALLEL),
            extra: "\n[limits]\nlower = 93.0\n",
            gate: "not-shown-to-differ",
            pooling: None,
            limits: Some("crossed-within"),
        },
        Case {
            name: "already-crossed",
            data: d(PARALLEL),
            extra: "\n[limits]\nlower = 101.5\n",
            gate: "not-shown-to-differ",
            pooling: None,
            limits: Some("already-crossed"),
        },
        Case {
            name: "never",
            data: d(PARALLEL),
            extra: "\n[limits]\nupper = 110.0\n",
            gate: "not-shown-to-differ",
            pooling: None,
            limits: Some("never"),
        },
    ]
}

#[test]
fn every_branch_is_stated_as_the_record_holds_it() {
    for case in cases() {
        // `forced_equal` lives under [report], which `run` writes last.
        let (dir, json, report) = if case.name == "unequal-omit" {
            run_omit(&case.data)
        } else {
            run(case.name, &case.data, case.extra)
        };
        let d = &json["decision"];
        let name = case.name;
        let brief = summary(&report);

        // What the crafted data must come out as.
        assert_eq!(d["gate"]["outcome"], case.gate, "{name}: gate outcome");
        // And the summary says what the record holds.
        let gate = d["gate"]["outcome"].as_str().unwrap();
        assert!(
            brief.contains(gate_phrase(gate)),
            "{name}: the summary does not state the gate outcome {gate}:\n{brief}"
        );
        for other in ["not-shown-to-differ", "differ"] {
            if other != gate {
                assert!(
                    !brief.contains(gate_phrase(other)),
                    "{name}: the summary states {other} as well"
                );
            }
        }
        if gate == "not-shown-to-differ" {
            // Never "equal": what the data rule out, from the pairs' intervals.
            assert!(brief.contains("not evidence that they are equal"), "{name}");
            assert!(!brief.contains("taken as equal"), "{name}");
            let within = d["gate"]["slope_differences_within"].as_array().unwrap();
            let lo = within[0].as_f64().unwrap();
            assert!(lo < 0.0 && within[1].as_f64().unwrap() > 0.0, "{name}");
            assert!(brief.contains("leave open run from"), "{name}");
        }

        // Section choice follows the record.
        let sections: Vec<&str> = d["sections"]
            .as_array()
            .unwrap()
            .iter()
            .map(|s| s.as_str().unwrap())
            .collect();
        let homogeneous = d["homogeneous"].as_bool().unwrap();
        assert_eq!(
            report.contains("## Groups on a common slope"),
            homogeneous,
            "{name}: the common-slope section in the main body"
        );
        assert_eq!(sections.contains(&"common-slope"), homogeneous, "{name}");
        if !homogeneous {
            let what_if = report.find("## If the slopes were forced equal");
            if name == "unequal-omit" {
                assert_eq!(d["common_slope_tables"], "omitted", "{name}");
                assert!(what_if.is_none(), "{name}: omitted tables printed");
                assert!(!report.contains("### Adjusted means at"), "{name}");
            } else {
                assert_eq!(d["common_slope_tables"], "forced-equal", "{name}");
                let what_if = what_if.expect("the what-if section");
                let checks = report.find("## Checking the assumptions").unwrap();
                let regions = report.find("## Where along").unwrap();
                assert!(regions < checks && checks < what_if, "{name}: order");
                // The adjusted-means tables appear only inside the what-if.
                let first_table = report.find("### Adjusted means at").unwrap();
                assert!(first_table > what_if, "{name}: a table in the main body");
            }
        }

        // Lot pooling: the first sentence gives the pooling decision and the crossing.
        match case.pooling {
            Some(model) => {
                assert_eq!(json["pooling"]["decision"], model, "{name}: pooling");
                let first = brief
                    .lines()
                    .find(|l| !l.is_empty() && !l.starts_with('#'))
                    .unwrap();
                assert!(first.starts_with("Lot pooling"), "{name}: {first}");
                let recorded = json["pooling"]["decision"].as_str().unwrap();
                assert!(first.contains(pooling_phrase(recorded)), "{name}: {first}");
                let outcome = d["limits"]["outcome"].as_str().unwrap();
                assert!(first.contains(limits_phrase(outcome)), "{name}: {first}");
                // The limits section uses the same decision.
                let limits = &report[report.find("## When the mean reaches").unwrap()..];
                assert!(limits.contains(limits_phrase(outcome)), "{name}");
            }
            None => assert!(!brief.contains("Lot pooling"), "{name}"),
        }
        match case.limits {
            Some(expected) => {
                assert_eq!(d["limits"]["outcome"], expected, "{name}: limits outcome");
                assert!(
                    brief.contains(limits_phrase(expected)),
                    "{name}: the summary does not say {expected}:\n{brief}"
                );
                if expected == "already-crossed" {
                    assert!(!brief.contains("moves away"), "{name}");
                    assert!(
                        d["findings"]
                            .as_array()
                            .unwrap()
                            .iter()
                            .any(|f| f["check"] == "limit-already-crossed")
                    );
                }
                if expected == "crossed-within" {
                    let c = d["limits"]["crossing"].as_f64().unwrap();
                    assert!(
                        c <= d["limits"]["last_observed"].as_f64().unwrap(),
                        "{name}"
                    );
                }
            }
            None => assert!(d["limits"].is_null(), "{name}"),
        }
        // Units appear in the prose.
        assert!(
            brief.contains("% per months"),
            "{name}: slope units:\n{brief}"
        );
        let _ = std::fs::remove_dir_all(dir);
    }
}

/// The unequal-slopes case with the what-if left out.
fn run_omit(data: &str) -> (PathBuf, Value, String) {
    run_report("omit", data, "", "forced_equal = \"omit\"\n")
}

/// A failed per-group check reaches the summary on both branches.
#[test]
fn a_failed_group_check_reaches_the_summary_on_every_branch() {
    for (name, (a, b)) in [("parallel", PARALLEL), ("unequal", SPREAD)] {
        // One lot gets a gross outlier in the middle: its own residuals fail
        // Shapiro–Wilk, whatever the gate decides.
        let data = lots(a, b);
        let mut rows: Vec<String> = data.lines().map(str::to_string).collect();
        let i = rows.iter().position(|r| r.starts_with("L2,12,")).unwrap();
        let y: f64 = rows[i].rsplit(',').next().unwrap().parse().unwrap();
        rows[i] = format!("L2,12,{:.4}", y + 6.0);
        let data = rows.join("\n") + "\n";
        let (dir, json, report) = run(&format!("outlier-{name}"), &data, "");
        let groups = json["checks"]["normality"]["groups"].as_array().unwrap();
        let l2 = groups.iter().find(|g| g["level"] == "L2").unwrap();
        assert!(l2["p_value"].as_f64().unwrap() < 0.05, "{name}: {l2}");
        let finding = json["decision"]["findings"]
            .as_array()
            .unwrap()
            .iter()
            .find(|f| f["check"] == "normality-group" && f["level"] == "L2")
            .unwrap_or_else(|| panic!("{name}: no finding for L2"))
            .clone();
        let brief = summary(&report);
        assert!(
            brief.contains("The residuals of `L2` depart from a normal distribution"),
            "{name}:\n{brief}"
        );
        assert!(
            brief.contains(finding["consequence"].as_str().unwrap()),
            "{name}"
        );
        let _ = std::fs::remove_dir_all(dir);
    }
}

/// `diff` speaks of adjusted means exactly when both reports print them.
#[test]
fn diff_mentions_adjusted_means_exactly_when_both_reports_print_them() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let dir = std::env::temp_dir().join(format!("slopewise-reasoning-{}-diff", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    // Both nursery plans with one fixed adjustment point, so the means are comparable;
    // 2026 once with its what-if printed and once with it left out.
    let mut runs = Vec::new();
    for (season, omit) in [("2025", false), ("2026", false), ("2026", true)] {
        let text = std::fs::read_to_string(root.join(format!("plans/nursery-{season}.toml")))
            .unwrap()
            .replace("../demo-data/", &format!("{}/demo-data/", root.display()));
        let mut text = text.replace("[model]\n", "[model]\nadjust_at = 30.0\n");
        if omit {
            text = text.replace("[report]\n", "[report]\nforced_equal = \"omit\"\n");
        }
        let name = format!("{season}{}", if omit { "-omit" } else { "" });
        let plan = dir.join(format!("{name}.toml"));
        std::fs::write(&plan, text).unwrap();
        let out = dir.join(&name);
        let o = Command::new(bin())
            .args([
                "run",
                plan.to_str().unwrap(),
                "--out",
                out.to_str().unwrap(),
            ])
            .output()
            .unwrap();
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
        let report = std::fs::read_to_string(out.join("report.md")).unwrap();
        runs.push((out, report));
    }
    let prints = |report: &str| report.contains("### Adjusted means at");
    assert!(prints(&runs[0].1) && prints(&runs[1].1) && !prints(&runs[2].1));
    let diff = |a: &Path, b: &Path| {
        let o = Command::new(bin())
            .args(["diff", a.to_str().unwrap(), b.to_str().unwrap()])
            .output()
            .unwrap();
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
        String::from_utf8(o.stdout).unwrap()
    };
    let both = diff(&runs[0].0, &runs[1].0);
    assert!(both.contains("adjusted mean"), "{both}");
    assert!(
        both.contains("its adjusted means are a what-if on slopes forced equal"),
        "{both}"
    );
    assert!(!both.contains("has no adjusted means"), "{both}");
    let one = diff(&runs[0].0, &runs[2].0);
    assert!(
        one.contains("The later run's report does not print adjusted means"),
        "{one}"
    );
    let _ = std::fs::remove_dir_all(dir);
}

/// The methods paragraph states the bound kind and the two-sided rule the limits used
/// (issue 15: the rule from ICH Q1E 2003, from memory of the guideline).
#[test]
fn methods_state_the_bound_and_the_two_sided_rule() {
    let (dir, json, report) = run(
        "two-sided-prediction",
        &lots(PARALLEL.0, PARALLEL.1),
        "\n[limits]\nlower = 90.0\nupper = 110.0\nbound = \"prediction\"\n",
    );
    let first = &json["limits"][0];
    assert_eq!(first["two_sided"], true);
    assert_eq!(first["bound"], "prediction");
    let methods = &report[report.find("## How this was computed").unwrap()..];
    assert!(methods.contains("one-sided prediction bound for a single future result"));
    assert!(methods.contains("each side uses the one-sided level (1 + confidence)/2"));
    assert!(methods.contains("one-sided level of 97.5%"), "{methods}");
    let _ = std::fs::remove_dir_all(dir);
}

/// One rule for scales (issue 13 item 9): covariate values in a plan are on the
/// measured scale and slopewise transforms them. With a log covariate, `adjust_at = 20`
/// gives adjusted means at log(20): each is the group's mean response plus the common
/// slope times (log 20 − the group's mean log covariate), from the lines in
/// results.json (the parallel-lines fit, by hand); `compare_at = [20]` likewise. A value
/// outside the log's domain is a plan error at its line and column.
#[test]
fn covariate_values_in_a_plan_are_on_the_measured_scale() {
    let data = {
        // Months 1..13 so that log(month) exists.
        let mut s = String::from("lot,month,assay\n");
        for (g, (a, b)) in [
            ("L1", (100.0, -1.5)),
            ("L2", (101.0, -1.0)),
            ("L3", (99.0, -2.2)),
        ] {
            for (i, m) in (1..=13).enumerate() {
                let e = [0.2, -0.3, 0.1, 0.0, -0.1, 0.25, -0.15][i % 7];
                s.push_str(&format!("{g},{m},{:.4}\n", a + b * (m as f64).ln() + e));
            }
        }
        s
    };
    let extra = "\n[model.transform]\ncovariate = \"log\"\n\n[tests]\ncompare_at = [20.0]\nslopes_alpha = 0.0001\n";
    // adjust_at sits in [model]: write the plan by hand.
    let dir =
        std::env::temp_dir().join(format!("slopewise-reasoning-{}-scale", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    std::fs::write(dir.join("data.csv"), &data).unwrap();
    let plan = |adjust: &str| {
        format!(
            "title = \"scale\"\n\n[data]\npath = \"data.csv\"\n\n[model]\nresponse = \"assay\"\ncovariate = \"month\"\ngroup = \"lot\"\nadjust_at = {adjust}\n{extra}\n[report]\nout = \"out\"\nformats = [\"json\", \"markdown\"]\n"
        )
    };
    std::fs::write(dir.join("plan.toml"), plan("20.0")).unwrap();
    let o = Command::new(bin())
        .arg("run")
        .arg(dir.join("plan.toml"))
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let r: Value =
        serde_json::from_str(&std::fs::read_to_string(dir.join("out/results.json")).unwrap())
            .unwrap();
    let at = 20f64.ln();
    assert!((r["adjust_at"].as_f64().unwrap() - at).abs() < 1e-15);
    assert!((r["adjust_at_measured"].as_f64().unwrap() - 20.0).abs() < 1e-12);
    let b = r["common_slope"]["slope"].as_f64().unwrap();
    for (m, g) in r["adjusted_means"]
        .as_array()
        .unwrap()
        .iter()
        .zip(r["groups"].as_array().unwrap())
    {
        let by_hand =
            g["response_mean"].as_f64().unwrap() + b * (at - g["covariate_mean"].as_f64().unwrap());
        let got = m["mean"].as_f64().unwrap();
        assert!(
            (got - by_hand).abs() < 1e-10 * by_hand.abs(),
            "{got} {by_hand}"
        );
    }
    let report = std::fs::read_to_string(dir.join("out/report.md")).unwrap();
    assert!(
        report.contains("(month = 20.00 as measured)"),
        "measured point shown"
    );

    // Separate slopes need a rejecting gate: the same plan at the default level, where
    // compare_at = [20] is read as log(20).
    std::fs::write(
        dir.join("plan.toml"),
        plan("20.0").replace("slopes_alpha = 0.0001", "slopes_alpha = 0.9999"),
    )
    .unwrap();
    let o = Command::new(bin())
        .arg("run")
        .arg(dir.join("plan.toml"))
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let r: Value =
        serde_json::from_str(&std::fs::read_to_string(dir.join("out/results.json")).unwrap())
            .unwrap();
    assert_eq!(r["decision"]["homogeneous"], false);
    for d in r["differences_at"].as_array().unwrap() {
        assert!((d["at"].as_f64().unwrap() - at).abs() < 1e-15);
        assert!((d["at_measured"].as_f64().unwrap() - 20.0).abs() < 1e-12);
    }

    // -1 months has no logarithm: a plan error at adjust_at's line and column.
    let _ = std::fs::remove_dir_all(dir.join("out"));
    let text = plan("-1.0");
    std::fs::write(dir.join("plan.toml"), &text).unwrap();
    let o = Command::new(bin())
        .arg("run")
        .arg(dir.join("plan.toml"))
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(!o.status.success());
    assert!(
        err.contains("model.adjust_at = -1 is outside the domain of the covariate's log transform"),
        "{err}"
    );
    let line = text
        .lines()
        .position(|l| l.starts_with("adjust_at"))
        .unwrap()
        + 1;
    assert!(err.contains(&format!("plan.toml:{line}:13")), "{err}");
    assert!(!dir.join("out").exists());
    let _ = std::fs::remove_dir_all(dir);
}

/// Planning the next season (issue 14 item 4): without a margin the record gives the
/// smallest slope difference detectable with power 0.8 at this season's rows; given
/// that difference as the margin, this season's power for it is 0.8 and the rows for
/// 0.8 are this season's. (The noncentral F itself is checked against scipy in
/// src/stats/noncentral_f.rs.)
#[test]
fn next_season_planning_is_consistent_between_its_two_bases() {
    let data = lots(PARALLEL.0, PARALLEL.1);
    let (dir, r, report) = run("plan-detectable", &data, "");
    let p = &r["next_season"];
    assert_eq!(p["basis"], "detectable-difference");
    let delta = p["difference"].as_f64().unwrap();
    assert!(delta > 0.0);
    assert!(report.contains("## Planning the next season"));
    let _ = std::fs::remove_dir_all(dir);
    let extra = format!("\n[tests]\nslope_margin = {delta:?}\n");
    let (dir, r, _) = run("plan-margin", &data, &extra);
    let q = &r["next_season"];
    assert_eq!(q["basis"], "slope-margin");
    assert!((q["power_now"].as_f64().unwrap() - 0.8).abs() < 1e-6, "{q}");
    assert_eq!(q["rows_for_80"], q["rows_now"]);
    let _ = std::fs::remove_dir_all(dir);
}
