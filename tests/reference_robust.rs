//! The heteroscedasticity-consistent gate and comparisons (issue 14 item 2) against
//! statsmodels 0.15.0: OLS with cov_type "HC0".."HC3" and use_t=True, its
//! wald_test(use_f=True) for equal slopes and t_test for each contrast
//! (tests/reference/generate_robust.py wrote tests/reference/robust.json). Data: the
//! palmerpenguins package's penguins (open data) and an invented fanning data set.

use serde_json::Value;
use std::path::PathBuf;
use std::process::Command;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn reference() -> Value {
    serde_json::from_str(
        &std::fs::read_to_string(root().join("tests/reference/robust.json")).unwrap(),
    )
    .unwrap()
}

fn close(found: f64, want: f64, tol: f64, what: &str) {
    let scale = want.abs().max(1e-300);
    assert!(
        (found - want).abs() <= tol * scale,
        "{what}: found {found:e}, statsmodels {want:e}"
    );
}

/// Runs one case with one covariance and returns results.json.
fn run(case: &Value, covariance: &str) -> Value {
    run_with_report(case, covariance).0
}

/// As [`run`], and the report's Markdown.
fn run_with_report(case: &Value, covariance: &str) -> (Value, String) {
    run_with(case, &format!("covariance = \"{covariance}\""), covariance)
}

/// Runs a case with the given lines under [tests]; `tag` names the scratch folder.
fn run_with(case: &Value, tests: &str, tag: &str) -> (Value, String) {
    let name = case["name"].as_str().unwrap();
    let dir = std::env::temp_dir().join(format!(
        "slopewise-robust-{}-{name}-{}",
        tag.replace([' ', '"', '='], ""),
        std::process::id()
    ));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let data = match case["csv"].as_str() {
        Some(text) => {
            std::fs::write(dir.join("data.csv"), text).unwrap();
            "data.csv".to_string()
        }
        None => root()
            .join("tests/reference/data/penguins.csv")
            .display()
            .to_string(),
    };
    let plan = format!(
        r#"title = "Robust covariance reference ({name})"

[data]
path = "{data}"
missing = ["", "NA"]

[model]
response = "{}"
covariate = "{}"
group = "{}"

[tests]
comparisons = "none"
{tests}

[report]
out = "out"
formats = ["json", "markdown"]
"#,
        case["response"].as_str().unwrap(),
        case["covariate"].as_str().unwrap(),
        case["group"].as_str().unwrap(),
    );
    std::fs::write(dir.join("plan.toml"), plan).unwrap();
    let o = Command::new(env!("CARGO_BIN_EXE_slopewise"))
        .arg("run")
        .arg(dir.join("plan.toml"))
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let json =
        serde_json::from_str(&std::fs::read_to_string(dir.join("out/results.json")).unwrap())
            .unwrap();
    let report = std::fs::read_to_string(dir.join("out/report.md")).unwrap();
    let _ = std::fs::remove_dir_all(dir);
    (json, report)
}

fn find<'a>(list: &'a Value, a: &str, b: &str) -> &'a Value {
    list.as_array()
        .unwrap()
        .iter()
        .find(|p| (p["a"] == a && p["b"] == b) || (p["a"] == b && p["b"] == a))
        .unwrap_or_else(|| panic!("no pair {a}, {b}"))
}

#[test]
fn every_hc_form_matches_statsmodels() {
    let reference = reference();
    for case in reference["cases"].as_array().unwrap() {
        let name = case["name"].as_str().unwrap();
        for (cov, want) in case["covariances"].as_object().unwrap() {
            let r = run(case, cov);
            let rb = &r["robust"];
            assert_eq!(rb["covariance"], cov.as_str());
            let tag = |what: &str| format!("{name} {cov} {what}");
            // The adjustment point is the covariate mean in both.
            close(
                r["adjust_at"].as_f64().unwrap(),
                case["adjust_at"].as_f64().unwrap(),
                1e-12,
                &tag("adjust_at"),
            );
            let es = &want["equal_slopes"];
            close(
                rb["equal_slopes"]["f"].as_f64().unwrap(),
                es["f"].as_f64().unwrap(),
                1e-9,
                &tag("F"),
            );
            close(
                rb["equal_slopes"]["df2"].as_f64().unwrap(),
                es["df2"].as_f64().unwrap(),
                0.0,
                &tag("df2"),
            );
            close(
                rb["equal_slopes"]["p_value"].as_f64().unwrap(),
                es["p_value"].as_f64().unwrap(),
                1e-8,
                &tag("p"),
            );
            for (key, list) in [("pairwise_slopes", "slope"), ("pairwise_adjusted", "mean")] {
                for w in want[key].as_array().unwrap() {
                    let (a, b) = (w["a"].as_str().unwrap(), w["b"].as_str().unwrap());
                    let f = find(&rb[key], a, b);
                    let sign = if f["a"] == a { 1.0 } else { -1.0 };
                    let what = |q: &str| tag(&format!("{list} {a}-{b} {q}"));
                    close(
                        sign * f["difference"].as_f64().unwrap(),
                        w["difference"].as_f64().unwrap(),
                        1e-9,
                        &what("difference"),
                    );
                    close(
                        f["se"].as_f64().unwrap(),
                        w["se"].as_f64().unwrap(),
                        1e-9,
                        &what("se"),
                    );
                    close(
                        sign * f["t"].as_f64().unwrap(),
                        w["t"].as_f64().unwrap(),
                        1e-9,
                        &what("t"),
                    );
                    close(
                        f["p_value"].as_f64().unwrap(),
                        w["p_value"].as_f64().unwrap(),
                        1e-8,
                        &what("p"),
                    );
                    let ci = f["ci"].as_array().unwrap();
                    let wci = w["ci"].as_array().unwrap();
                    let (lo, hi) = if sign > 0.0 { (0, 1) } else { (1, 0) };
                    close(
                        sign * ci[lo].as_f64().unwrap(),
                        wci[0].as_f64().unwrap(),
                        1e-9,
                        &what("ci low"),
                    );
                    close(
                        sign * ci[hi].as_f64().unwrap(),
                        wci[1].as_f64().unwrap(),
                        1e-9,
                        &what("ci high"),
                    );
                }
            }
            for w in want["adjusted_means"].as_array().unwrap() {
                let level = w["level"].as_str().unwrap();
                let f = rb["adjusted_means"]
                    .as_array()
                    .unwrap()
                    .iter()
                    .find(|m| m["level"] == level)
                    .unwrap();
                let what = |q: &str| tag(&format!("mean {level} {q}"));
                close(
                    f["mean"].as_f64().unwrap(),
                    w["mean"].as_f64().unwrap(),
                    1e-10,
                    &what("mean"),
                );
                close(
                    f["se"].as_f64().unwrap(),
                    w["se"].as_f64().unwrap(),
                    1e-9,
                    &what("se"),
                );
                close(
                    f["ci"][0].as_f64().unwrap(),
                    w["ci"][0].as_f64().unwrap(),
                    1e-9,
                    &what("ci low"),
                );
                close(
                    f["ci"][1].as_f64().unwrap(),
                    w["ci"][1].as_f64().unwrap(),
                    1e-9,
                    &what("ci high"),
                );
            }
        }
    }
}

/// On the fanning data the classical F rejects at 0.05 and HC3 does not
/// (generate_robust.py chose the seed for it): the gate follows HC3, and the record,
/// the summary and the gate section say that the classical test would have decided
/// otherwise.
#[test]
fn a_robust_gate_that_disagrees_is_shown_beside_the_classical_one() {
    let reference = reference();
    let case = &reference["cases"].as_array().unwrap()[1];
    assert_eq!(case["name"], "fanning");
    let classical_p = case["classical_equal_slopes_p"].as_f64().unwrap();
    let robust_p = case["covariances"]["hc3"]["equal_slopes"]["p_value"]
        .as_f64()
        .unwrap();
    assert!(
        classical_p < 0.05 && robust_p >= 0.05,
        "the case must disagree"
    );

    let (r, report) = run_with_report(case, "hc3");
    let brief = &report[..report.find("## Rows in and out").unwrap()];
    assert!(brief.contains("with HC3 covariance"), "{brief}");
    assert!(brief.contains("decide differently"), "{brief}");
    let section = &report[report
        .find("### The same questions with HC3 covariance")
        .unwrap()..];
    assert!(section.contains("would have decided otherwise"));
    assert!(report.contains("MacKinnon & White 1985") && report.contains("White 1980"));
    close(
        r["equal_slopes"]["p_value"].as_f64().unwrap(),
        classical_p,
        1e-8,
        "classical p",
    );
    assert_eq!(r["robust"]["disagree"], true);
    assert_eq!(r["robust"]["classical_homogeneous"], false);
    assert_eq!(
        r["equal_slopes"]["homogeneous"], true,
        "the gate follows HC3"
    );
    assert_eq!(r["decision"]["lead"], "common-slope");
    assert!(
        r["decision"]["findings"]
            .as_array()
            .unwrap()
            .iter()
            .any(|f| f["check"] == "covariance-disagrees")
    );

    // The same case with the classical covariance decides the other way.
    let c = run(case, "classical");
    assert!(c["robust"].is_null());
    assert_eq!(c["equal_slopes"]["homogeneous"], false);
}

/// Two one-sided tests of each slope difference against the margin (Schuirmann 1987;
/// Dixon & Pechmann 2005): difference and SE from statsmodels' t_test, the 90 %
/// interval from its conf_int(alpha = 0.10), the one-sided p-values from scipy's t on
/// the model's residual df (generate_robust.py), classical and HC3.
#[test]
fn equivalence_of_slopes_matches_statsmodels_and_scipy() {
    let reference = reference();
    for case in reference["cases"].as_array().unwrap() {
        let name = case["name"].as_str().unwrap();
        let margin = case["slope_margin"].as_f64().unwrap();
        for (cov, want) in case["equivalence"].as_object().unwrap() {
            let tests = format!("covariance = \"{cov}\"\nslope_margin = {margin:?}");
            let (r, report) = run_with(case, &tests, &format!("eq-{cov}"));
            let e = &r["equivalence"];
            assert_eq!(e["covariance"], cov.as_str());
            let mut readings = Vec::new();
            for w in want.as_array().unwrap() {
                let (a, b) = (w["a"].as_str().unwrap(), w["b"].as_str().unwrap());
                let f = find(&e["pairs"], a, b);
                assert_eq!(f["a"], a, "pairs keep the reference's order");
                let what = |q: &str| format!("{name} {cov} {a}-{b} {q}");
                for q in ["difference", "se"] {
                    close(
                        f[q].as_f64().unwrap(),
                        w[q].as_f64().unwrap(),
                        1e-9,
                        &what(q),
                    );
                }
                close(
                    f["df"].as_f64().unwrap(),
                    w["df"].as_f64().unwrap(),
                    0.0,
                    &what("df"),
                );
                for i in 0..2 {
                    close(
                        f["ci"][i].as_f64().unwrap(),
                        w["ci"][i].as_f64().unwrap(),
                        1e-9,
                        &what("ci"),
                    );
                }
                for q in ["p_lower", "p_upper", "p_tost"] {
                    close(
                        f[q].as_f64().unwrap(),
                        w[q].as_f64().unwrap(),
                        1e-8,
                        &what(q),
                    );
                }
                // The reading follows from the interval and the margin.
                let (lo, hi) = (w["ci"][0].as_f64().unwrap(), w["ci"][1].as_f64().unwrap());
                let want_reading = if lo > -margin && hi < margin {
                    "shown-equivalent"
                } else if lo > margin || hi < -margin {
                    "shown-different"
                } else {
                    "not-settled"
                };
                assert_eq!(f["reading"], want_reading, "{}", what("reading"));
                readings.push(want_reading);
            }
            // The crafted margins give each reading at least once over the two cases.
            let overall = if readings.contains(&"shown-different") {
                "shown-different"
            } else if readings.iter().all(|x| *x == "shown-equivalent") {
                "shown-equivalent"
            } else {
                "not-settled"
            };
            assert_eq!(e["reading"], overall, "{name} {cov}");
            assert_eq!(r["decision"]["equivalence"], overall);
            assert!(report.contains("Dixon & Pechmann 2005"), "{name}");
            assert!(report.contains("Is each slope difference within"), "{name}");
        }
    }
}

/// Under `gate = "equivalence"` the common-slope branch needs every pair shown
/// equivalent: a test that does not reject is not enough.
#[test]
fn the_equivalence_gate_takes_the_common_slope_only_when_shown() {
    let reference = reference();
    let fanning = &reference["cases"].as_array().unwrap()[1];
    // Margin 0.6: one pair shown equivalent, two not settled: separate slopes, although
    // the HC3 test does not reject.
    let (r, report) = run_with(
        fanning,
        "covariance = \"hc3\"\nslope_margin = 0.6\ngate = \"equivalence\"",
        "eq-gate-narrow",
    );
    assert_eq!(r["robust"]["equal_slopes"]["homogeneous"], true);
    assert_eq!(r["equal_slopes"]["homogeneous"], false);
    assert_eq!(r["decision"]["gate"]["outcome"], "not-shown-equivalent");
    assert!(report.contains("not shown parallel"), "{report}");
    // Margin 2: every interval (all within ±1.01) lies inside: common slope.
    let (r, report) = run_with(
        fanning,
        "slope_margin = 2.0\ngate = \"equivalence\"",
        "eq-gate-wide",
    );
    assert_eq!(r["equivalence"]["reading"], "shown-equivalent");
    assert_eq!(r["equal_slopes"]["homogeneous"], true);
    assert_eq!(r["decision"]["gate"]["outcome"], "shown-equivalent");
    assert!(
        report.contains("every pair of slopes is shown equivalent within ±2.000"),
        "{report}"
    );
}

/// A margin needs untransformed columns, and the equivalence gate needs a margin:
/// both are plan errors at the key's line.
#[test]
fn margin_plan_errors_point_at_the_key() {
    let dir = std::env::temp_dir().join(format!("slopewise-robust-{}-errors", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    std::fs::write(
        dir.join("data.csv"),
        "g,x,y\na,1,2\na,2,3\na,3,5\nb,1,1\nb,2,2\nb,3,4\n",
    )
    .unwrap();
    for (extra, message) in [
        (
            "[model.transform]\nresponse = \"log\"\n\n[tests]\nslope_margin = 0.1\n",
            "tests.slope_margin is on the measured scale",
        ),
        (
            "[tests]\ngate = \"equivalence\"\n",
            "needs tests.slope_margin",
        ),
        (
            "[tests]\nslope_margin = -1.0\n",
            "must be a positive number",
        ),
    ] {
        let plan = format!(
            "title = \"t\"\n\n[data]\npath = \"data.csv\"\n\n[model]\nresponse = \"y\"\ncovariate = \"x\"\ngroup = \"g\"\n\n{extra}\n[report]\nout = \"out\"\n"
        );
        std::fs::write(dir.join("plan.toml"), &plan).unwrap();
        let o = Command::new(env!("CARGO_BIN_EXE_slopewise"))
            .arg("run")
            .arg(dir.join("plan.toml"))
            .output()
            .unwrap();
        let err = String::from_utf8_lossy(&o.stderr);
        assert!(!o.status.success(), "{extra}");
        assert!(err.contains(message), "{err}");
        let key = if extra.contains("gate") && !extra.contains("margin") {
            "gate"
        } else {
            "slope_margin"
        };
        let line = plan.lines().position(|l| l.starts_with(key)).unwrap() + 1;
        assert!(err.contains(&format!("plan.toml:{line}:")), "{err}");
        assert!(!dir.join("out").exists());
    }
    let _ = std::fs::remove_dir_all(dir);
}

/// Every pair's classical slope difference with its 1 − alpha interval (issue 13
/// item 3): statsmodels OLS (nonrobust) t_test on the contrast, conf_int(0.05).
#[test]
fn slope_difference_intervals_match_statsmodels() {
    let reference = reference();
    for case in reference["cases"].as_array().unwrap() {
        let name = case["name"].as_str().unwrap();
        let (r, report) = run_with(case, "", "classical-ci");
        for w in case["equivalence"]["classical"].as_array().unwrap() {
            let (a, b) = (w["a"].as_str().unwrap(), w["b"].as_str().unwrap());
            let f = find(&r["pairwise_slopes"], a, b);
            assert_eq!(f["a"], a);
            for i in 0..2 {
                close(
                    f["ci"][i].as_f64().unwrap(),
                    w["ci_two_sided"][i].as_f64().unwrap(),
                    1e-9,
                    &format!("{name} {a}-{b} ci"),
                );
            }
        }
        assert!(report.contains("slope differences outside it are ruled out"));
    }
}

/// The rows that drive the fit (issue 13 item 5), on the separate-lines model both
/// cases select: the cut-offs against scipy (f.ppf(0.5, p, n − p) and
/// t.isf(alpha/(2n), n − p − 1)), the rows and their measures against statsmodels
/// OLSInfluence (generate_robust.py), the refit without them, and the summary naming
/// each by data row and group.
#[test]
fn rows_that_drive_the_fit_match_statsmodels() {
    let reference = reference();
    for case in reference["cases"].as_array().unwrap() {
        let name = case["name"].as_str().unwrap();
        let want = &case["influence"];
        let (r, report) = run_with(case, "", "influence");
        let inf = &r["checks"]["influence"];
        assert_eq!(inf["model"], want["model"], "{name}");
        for q in ["cooks_distance_matters", "studentized_bonferroni"] {
            close(
                inf["cutoffs"][q].as_f64().unwrap(),
                want[q].as_f64().unwrap(),
                1e-9,
                &format!("{name} {q}"),
            );
        }
        let rows: Vec<u64> = inf["matters"]
            .as_array()
            .unwrap()
            .iter()
            .map(|f| f["row"].as_u64().unwrap())
            .collect();
        let want_rows: Vec<u64> = want["matters"]
            .as_array()
            .unwrap()
            .iter()
            .map(|v| v.as_u64().unwrap())
            .collect();
        assert_eq!(rows, want_rows, "{name}");
        assert_eq!(
            inf["matters_total"].as_u64().unwrap(),
            want_rows.len() as u64
        );
        for f in inf["matters"].as_array().unwrap() {
            let row = f["row"].as_u64().unwrap().to_string();
            close(
                f["cooks_distance"].as_f64().unwrap(),
                want["cooks_distance"][&row].as_f64().unwrap(),
                1e-9,
                &format!("{name} row {row} Cook's distance"),
            );
            close(
                f["studentized_residual"].as_f64().unwrap(),
                want["studentized_residual"][&row].as_f64().unwrap(),
                1e-9,
                &format!("{name} row {row} studentized residual"),
            );
            let level = f["level"].as_str().unwrap();
            assert!(report.contains(&format!("{row} (`{level}`)")), "{name}");
        }
        // A refit exactly when some row drives the fit; leverage alone never does.
        assert_eq!(
            r["sensitivity"].is_object(),
            !want_rows.is_empty(),
            "{name}"
        );
        if let Some(s) = r["sensitivity"].as_object() {
            assert_eq!(s["rows"], json_rows(&want_rows));
        }
        for f in inf["flagged"].as_array().unwrap() {
            if f["why"] == serde_json::json!(["leverage"]) {
                assert_eq!(f["matters"], false);
            }
        }
    }
}

fn json_rows(rows: &[u64]) -> Value {
    Value::Array(rows.iter().map(|r| Value::from(*r)).collect())
}

/// A log response read on its measured scale (issue 13 item 8): penguins on the
/// log–log scale, the classical parallel-lines fit of statsmodels, adjusted means and
/// their differences exponentiated in generate_robust.py: geometric means and ratios
/// with intervals, and the slope read as an elasticity.
#[test]
fn log_responses_give_geometric_means_ratios_and_elasticities() {
    let reference = reference();
    let want = &reference["back_transformed"];
    let case = &reference["cases"].as_array().unwrap()[0];
    assert_eq!(case["name"], "penguins");
    let dir = std::env::temp_dir().join(format!("slopewise-robust-{}-loglog", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let plan = format!(
        "title = \"log-log\"\n\n[data]\npath = \"{}\"\nmissing = [\"\", \"NA\"]\n\n[model]\nresponse = \"body_mass_g\"\ncovariate = \"flipper_length_mm\"\ngroup = \"species\"\n\n[model.transform]\nresponse = \"log\"\ncovariate = \"log\"\n\n[tests]\nslopes_alpha = 0.001\n\n[report]\nout = \"out\"\nformats = [\"json\", \"markdown\"]\n",
        root().join("tests/reference/data/penguins.csv").display()
    );
    std::fs::write(dir.join("plan.toml"), plan).unwrap();
    let o = Command::new(env!("CARGO_BIN_EXE_slopewise"))
        .arg("run")
        .arg(dir.join("plan.toml"))
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let r: Value =
        serde_json::from_str(&std::fs::read_to_string(dir.join("out/results.json")).unwrap())
            .unwrap();
    let report = std::fs::read_to_string(dir.join("out/report.md")).unwrap();
    assert_eq!(r["model"]["slope_reading"], "elasticity");
    assert_eq!(
        r["decision"]["homogeneous"], true,
        "slopes_alpha 0.001 keeps the common slope"
    );
    close(
        r["adjust_at"].as_f64().unwrap(),
        want["adjust_at"].as_f64().unwrap(),
        1e-12,
        "adjust_at",
    );
    close(
        r["common_slope"]["slope"].as_f64().unwrap(),
        want["common_slope"].as_f64().unwrap(),
        1e-9,
        "slope",
    );
    for w in want["adjusted_means"].as_array().unwrap() {
        let m = r["adjusted_means"]
            .as_array()
            .unwrap()
            .iter()
            .find(|m| m["level"] == w["level"])
            .unwrap();
        let bt = &m["back_transformed"];
        close(
            bt["value"].as_f64().unwrap(),
            w["geometric_mean"].as_f64().unwrap(),
            1e-9,
            "geometric mean",
        );
        for i in 0..2 {
            close(
                bt["ci"][i].as_f64().unwrap(),
                w["ci"][i].as_f64().unwrap(),
                1e-9,
                "geometric mean ci",
            );
        }
    }
    for w in want["ratios"].as_array().unwrap() {
        let d = find(
            &r["pairwise_adjusted"],
            w["a"].as_str().unwrap(),
            w["b"].as_str().unwrap(),
        );
        assert_eq!(d["a"], w["a"]);
        close(
            d["ratio"]["value"].as_f64().unwrap(),
            w["ratio"].as_f64().unwrap(),
            1e-9,
            "ratio",
        );
        for i in 0..2 {
            close(
                d["ratio"]["ci"][i].as_f64().unwrap(),
                w["ci"][i].as_f64().unwrap(),
                1e-9,
                "ratio ci",
            );
        }
    }
    assert!(
        report.contains("geometric mean of body\\_mass\\_g"),
        "table column"
    );
    assert!(
        report.contains("an elasticity: 1 % more"),
        "summary reading"
    );
    assert!(report.contains("the geometric means stand in the ratio"));
    let _ = std::fs::remove_dir_all(dir);
}
