//! Stability evidence on the three invented stability reference sets:
//! equivalence-based lot pooling against statsmodels OLS contrasts (`t_test`) and
//! scipy's t (tests/reference/generate_pooling.py wrote pooling.json, with margins
//! chosen there so that each set ends on another decision), and the crossings of the
//! simultaneous Working–Hotelling band against statsmodels `se_mean` with scipy's F
//! (generate_limit_bands.py wrote limit_bands.json). Versions pinned in the scripts.

use std::path::{Path, PathBuf};

use serde_json::Value;
use slopewise::plan::{BandKind, GateRule, Plan, PoolingMargins};
use slopewise::results::{EquivalencePair, Provenance};
use slopewise::{analysis, data, plan};

fn reference_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/reference")
}

fn load(name: &str, margins: PoolingMargins) -> (Plan, data::Dataset) {
    let plan_path = reference_dir().join(format!("plans/{name}.toml"));
    let text = std::fs::read_to_string(&plan_path).unwrap();
    let mut plan = plan::load(name, &text).unwrap();
    plan.tests.pooling_rule = GateRule::Equivalence;
    plan.tests.pooling_margins = Some(margins);
    let bytes = std::fs::read(plan_path.parent().unwrap().join(&plan.data.path)).unwrap();
    let dataset = data::load(&plan, &bytes).unwrap();
    (plan, dataset)
}

fn f(v: &Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("not a number: {v}"))
}

/// Difference, SE, interval and both one-sided p-values to 1e-9 relative.
fn check_pairs(what: &str, got: &[EquivalencePair], want: &Value) {
    let want = want.as_array().unwrap();
    assert_eq!(got.len(), want.len(), "{what}");
    let close = |g: f64, w: f64| (g - w).abs() <= 1e-9 * w.abs().max(1e-9);
    for (g, w) in got.iter().zip(want) {
        assert_eq!(
            (g.a.as_str(), g.b.as_str()),
            (w["a"].as_str().unwrap(), w["b"].as_str().unwrap())
        );
        assert!(close(g.difference, f(&w["difference"])), "{what} {g:?}");
        assert!(close(g.se.unwrap(), f(&w["se"])), "{what} {g:?}");
        assert_eq!(g.df, f(&w["df"]), "{what}");
        let [lo, hi] = g.ci.unwrap();
        assert!(
            close(lo, f(&w["ci"][0])) && close(hi, f(&w["ci"][1])),
            "{what} {g:?}"
        );
        assert!(close(g.p_lower.unwrap(), f(&w["p_lower"])), "{what} {g:?}");
        assert!(close(g.p_upper.unwrap(), f(&w["p_upper"])), "{what} {g:?}");
        assert_eq!(g.reading, w["reading"].as_str().unwrap(), "{what}");
    }
}

#[test]
fn equivalence_pooling_matches_statsmodels_and_reaches_each_decision() {
    let text = std::fs::read_to_string(reference_dir().join("pooling.json")).unwrap();
    let all: Value = serde_json::from_str(&text).unwrap();
    let mut decisions = Vec::new();
    for (name, want) in all["cases"].as_object().unwrap() {
        let margins = PoolingMargins {
            slope: f(&want["slope_margin"]),
            intercept: f(&want["intercept_margin"]),
        };
        let (plan, dataset) = load(name, margins);
        let r = analysis::run(&plan, &dataset, Provenance::default()).unwrap();
        let pool = r.pooling.as_ref().expect("lot pooling ran");
        assert_eq!(pool.rule, "equivalence");
        assert_eq!(pool.decision, want["decision"].as_str().unwrap(), "{name}");
        check_pairs(
            &format!("{name} slopes"),
            &pool.slope_pairs,
            &want["slope_pairs"],
        );
        check_pairs(
            &format!("{name} lines"),
            &pool.intercept_pairs,
            &want["intercept_pairs"],
        );
        // The crossings are read from the line pooling chose.
        assert!(r.limits.iter().all(|l| l.model == pool.decision), "{name}");
        decisions.push(pool.decision.clone());
    }
    decisions.sort();
    assert_eq!(decisions, ["common-slope", "pooled", "separate"]);
}

#[test]
fn simultaneous_band_crossings_match_statsmodels_and_scipy() {
    let text = std::fs::read_to_string(reference_dir().join("limit_bands.json")).unwrap();
    let all: Value = serde_json::from_str(&text).unwrap();
    for (name, want) in all["cases"].as_object().unwrap() {
        let plan_path = reference_dir().join(format!("plans/{name}.toml"));
        let text = std::fs::read_to_string(&plan_path).unwrap();
        let mut plan = plan::load(name, &text).unwrap();
        let spec = plan.limits.as_mut().unwrap();
        spec.band = BandKind::Simultaneous;
        assert_eq!(spec.confidence, f(&all["confidence"]));
        let bytes = std::fs::read(plan_path.parent().unwrap().join(&plan.data.path)).unwrap();
        let dataset = data::load(&plan, &bytes).unwrap();
        let r = analysis::run(&plan, &dataset, Provenance::default()).unwrap();
        let lines = want["lines"].as_array().unwrap();
        assert_eq!(r.limits.len(), lines.len(), "{name}");
        for (got, w) in r.limits.iter().zip(lines) {
            assert_eq!(got.model, want["model"].as_str().unwrap(), "{name}");
            assert_eq!(got.level, w["level"].as_str().unwrap(), "{name}");
            assert_eq!(got.band, "simultaneous");
            // √(2 F(0.95; 2, df)) against scipy's f.ppf, 1e-12 relative.
            let c = got.critical_value.unwrap();
            assert!(
                (c - f(&w["critical_value"])).abs() <= 1e-12 * c,
                "{name} {c}"
            );
            // The crossing against brentq on statsmodels' bound, 1e-9 relative.
            let x = got.crossing.unwrap();
            let wx = f(&w["crossing"]);
            assert!(
                (x - wx).abs() <= 1e-9 * wx,
                "{name} {}: {x} vs {wx}",
                got.level
            );
        }
    }
}
