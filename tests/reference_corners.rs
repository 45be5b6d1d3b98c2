//! The corners of the procedure (issue 20): exact fits, crossings of a rising lot,
//! three-row groups, the sensitivity rerun, two levels that choose two models, and
//! large offsets. Every case's data, plan and expected values come from
//! tests/reference/corners.json, written by tests/reference/generate_corners.py
//! (statsmodels, scipy and Python fractions at the pins of requirements.txt); each
//! check names its source beside it.

use std::path::Path;

use serde_json::Value;
use slopewise::results::{Provenance, Results};
use slopewise::{analysis, data, plan};

fn corners() -> Value {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/reference/corners.json");
    serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap()
}

/// The case's data and plan through the library as the binary runs them.
fn run(name: &str) -> (Results, Value) {
    let all = corners();
    let case = all["cases"][name].clone();
    assert!(case.is_object(), "no case {name}");
    let text = format!(
        "title = \"corner case {name}\"\n[data]\npath = \"d.csv\"\n[model]\nresponse = \"y\"\ncovariate = \"x\"\ngroup = \"g\"\n{}",
        case["plan"].as_str().unwrap()
    );
    let plan = plan::load("corners.toml", &text).unwrap();
    let dataset = data::load(&plan, case["csv"].as_str().unwrap().as_bytes()).unwrap();
    let results = analysis::run(&plan, &dataset, Provenance::default()).unwrap();
    (results, case["expected"].clone())
}

fn f(v: &Value) -> f64 {
    v.as_f64().unwrap()
}

fn close(a: f64, b: f64, rel: f64) -> bool {
    (a - b).abs() <= rel * a.abs().max(b.abs()).max(1e-300)
}

fn crossing(r: &Results, level: &str) -> (Option<f64>, Option<String>) {
    let c = r
        .limits
        .iter()
        .find(|c| c.level == level)
        .unwrap_or_else(|| panic!("no crossing for {level}"));
    (c.crossing, c.reason.clone())
}

#[test]
fn an_exact_fit_with_different_slopes_is_p_zero_and_pooling_follows_it() {
    let (r, want) = run("exact_lines");
    // Worked by hand (generate_corners.py, exact_lines): zero residuals, slopes differ.
    assert_eq!(r.equal_slopes.status, "exact-fit");
    assert_eq!(r.equal_slopes.p_value, Some(0.0));
    assert_eq!(r.equal_slopes.f, None);
    assert!(!r.equal_slopes.homogeneous);
    let pooling = r.pooling.as_ref().unwrap();
    assert_eq!(pooling.decision, want["pooling_decision"].as_str().unwrap());
    assert_eq!(pooling.slopes_p, Some(f(&want["slopes_p"])));
    // Crossings of 95 by the exact lines 100 − b x: 5, 10, 20 (by hand).
    for (level, x) in want["crossings"].as_object().unwrap() {
        let (c, reason) = crossing(&r, level);
        let c = c.unwrap_or_else(|| panic!("{level}: {reason:?}"));
        assert!(close(c, f(x), 1e-9), "{level}: {c} against {}", f(x));
    }
    assert!(
        r.warnings.iter().any(|w| w.contains("p = 0 (exact fit)")),
        "{:?}",
        r.warnings
    );
}

#[test]
fn a_test_that_cannot_be_computed_stops_the_pooling_steps() {
    let (r, want) = run("identical_exact");
    // By hand: identical slopes on exact lines, F = 0/0 (generate_corners.py).
    assert_eq!(r.equal_slopes.status, "not-computable");
    assert_eq!(r.equal_slopes.p_value, None);
    let pooling = r.pooling.as_ref().unwrap();
    assert_eq!(pooling.decision, want["pooling_decision"].as_str().unwrap());
    assert_eq!(pooling.stopped_at.as_deref(), want["stopped_at"].as_str());
    // No line was chosen, so no crossing is read, and the statement comes first.
    assert!(
        r.limits
            .iter()
            .all(|c| c.crossing.is_none() && c.reason.as_deref() == Some("not-decided"))
    );
    assert!(r.limits_earliest.is_empty());
    assert!(
        r.warnings[0].starts_with("Lot pooling stopped at its slopes step"),
        "{:?}",
        r.warnings
    );
}

#[test]
fn a_rising_lot_not_significantly_rising_reaches_a_lower_limit() {
    let (r, want) = run("rising_lot");
    assert!(!r.decision.homogeneous);
    let rising = r.groups.iter().find(|g| g.level == "rising").unwrap();
    // statsmodels OLS of the lot: a positive slope whose interval includes zero.
    assert!(close(rising.slope, f(&want["rising_slope"]), 1e-9));
    assert!(rising.slope > 0.0 && rising.slope_ci.unwrap()[0] < 0.0);
    // statsmodels get_prediction(...).conf_int(alpha=0.10) lower side = 95, brentq.
    for (level, x) in want["crossings"].as_object().unwrap() {
        let (c, reason) = crossing(&r, level);
        let c = c.unwrap_or_else(|| panic!("{level}: {reason:?}"));
        assert!(close(c, f(x), 1e-9), "{level}: {c} against {}", f(x));
    }
    // A significantly rising lot's bound stays above 95 (statsmodels bounds on a grid).
    for level in want["never"].as_array().unwrap() {
        let (c, reason) = crossing(&r, level.as_str().unwrap());
        assert_eq!(c, None);
        assert_eq!(reason.as_deref(), Some("never-within"));
    }
}

#[test]
fn three_row_groups_get_no_per_group_normality_verdict() {
    let (r, want) = run("three_rows");
    let n = &r.checks.normality;
    // scipy.stats.shapiro: W = 0.75 for any three equally spaced rows, so no verdict.
    assert!(f(&want["per_group_w_any_data"]) == 0.75);
    for g in &n.groups {
        assert_eq!(g.statistic, None, "{}", g.level);
        assert_eq!(g.p_value, None);
        assert_eq!(g.not_tested.as_deref(), Some("too-few-rows"));
    }
    assert!(
        r.warnings
            .iter()
            .any(|w| w.contains("too few rows to check") && w.contains("The pooled check stands")),
        "{:?}",
        r.warnings
    );
    // The pooled check stays: scipy.stats.shapiro on the nine residuals, 1e-6.
    assert!(close(
        n.statistic.unwrap(),
        f(&want["pooled_statistic"]),
        1e-6
    ));
    assert!(close(n.p_value.unwrap(), f(&want["pooled_p_value"]), 1e-6));
}

#[test]
fn the_sensitivity_rerun_holds_adjust_at_and_keeps_leverage_only_rows() {
    let (r, want) = run("sensitivity");
    let s = r.sensitivity.as_ref().expect("a rerun");
    // statsmodels OLSInfluence with the cut-offs 2p/n, 4/n and |t| > 3.
    assert_eq!(s.rows_removed, want["rows_removed"].as_u64().unwrap());
    assert_eq!(
        s.rows_kept_leverage_only,
        want["rows_kept_leverage_only"].as_u64().unwrap()
    );
    assert_eq!(s.rows_used, r.data.rows_used - s.rows_removed);
    // The full data's covariate mean, held (numpy mean of all rows).
    assert_eq!(s.adjust_at, r.adjust_at);
    assert!(close(s.adjust_at, f(&want["adjust_at"]), 1e-12));
    // The reduced parallel-lines fit, predicted at that point (statsmodels, 1e-9).
    assert!(close(s.common_slope.slope, f(&want["common_slope"]), 1e-9));
    assert!(close(
        s.common_slope.se.unwrap(),
        f(&want["common_slope_se"]),
        1e-9
    ));
    for m in want["adjusted_means"].as_array().unwrap() {
        let got = s
            .adjusted_means
            .iter()
            .find(|a| a.level == m["level"].as_str().unwrap())
            .unwrap();
        assert!(close(got.mean, f(&m["mean"]), 1e-9), "{}", got.mean);
        assert!(close(got.se.unwrap(), f(&m["se"]), 1e-9));
    }
}

#[test]
fn two_levels_that_choose_two_models_are_named_and_said_first() {
    let (r, want) = run("levels_disagree");
    // statsmodels compare_f_test: 0.05 ≤ p < 0.25.
    assert!(close(
        r.equal_slopes.f.unwrap(),
        f(&want["equal_slopes_f"]),
        1e-9
    ));
    assert!(close(
        r.equal_slopes.p_value.unwrap(),
        f(&want["equal_slopes_p"]),
        1e-9
    ));
    let m = &want["models"];
    let got = &r.decision.models;
    assert_eq!(got.comparisons, m["comparisons"].as_str().unwrap());
    assert_eq!(got.influence, m["influence"].as_str().unwrap());
    assert_eq!(got.limits.as_deref(), m["limits"].as_str());
    assert_eq!(got.agree, m["agree"].as_bool().unwrap());
    assert_eq!(got.influence, r.checks.influence.model);
    assert!(r.limits.iter().all(|c| c.model == "separate"));
    assert!(
        r.warnings[0].starts_with("The plan's two levels lead to different models"),
        "{:?}",
        r.warnings
    );
}

#[test]
fn slopes_at_large_offsets_match_exact_rational_arithmetic() {
    for name in ["offsets_1e6", "offsets_1e8"] {
        let (r, want) = run(name);
        // Python fractions on the same doubles, rounded once: 1e-12 relative.
        for (level, w) in want["groups"].as_object().unwrap() {
            let g = r.groups.iter().find(|g| &g.level == level).unwrap();
            assert!(
                close(g.slope, f(&w["slope"]), 1e-12),
                "{name} {level}: slope {} against {}",
                g.slope,
                f(&w["slope"])
            );
            assert!(
                close(g.slope_se.unwrap(), f(&w["slope_se"]), 1e-12),
                "{name} {level}: se {} against {}",
                g.slope_se.unwrap(),
                f(&w["slope_se"])
            );
        }
    }
}
