//! The supported period end to end: a reference plan of tests/reference with the
//! extrapolation keys added, through the library as the binary runs it. The raw
//! crossings are statsmodels' (tests/reference/expected, generate_limits.py); the
//! caps are worked by hand from ICH Q1E (2003), whose rules are quoted from memory:
//! room up to 2x the covered period and at most 12 months beyond it; refrigerated up
//! to 1.5x and at most 6 beyond; no extrapolation after significant accelerated
//! change; frozen no extrapolation (our reading: the guideline gives no rule).

use std::path::Path;

use serde_json::Value;
use slopewise::results::{Provenance, Results};
use slopewise::{analysis, data, plan};

fn reference(rel: &str) -> String {
    std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("tests/reference")
            .join(rel),
    )
    .unwrap()
}

/// Case `name` with `extra` lines added to its [limits] table.
fn run(name: &str, extra: &str) -> Results {
    let text = reference(&format!("plans/{name}.toml"))
        .replace("[limits]\n", &format!("[limits]\n{extra}\n"));
    let plan = plan::load("p.toml", &text).unwrap();
    let csv = reference(&format!("data/{name}.csv"));
    let dataset = data::load(&plan, csv.as_bytes()).unwrap();
    analysis::run(&plan, &dataset, Provenance::default()).unwrap()
}

/// statsmodels' crossing for one line (generate_limits.py).
fn expected(name: &str, level: &str) -> f64 {
    let want: Value = serde_json::from_str(&reference(&format!("expected/{name}.json"))).unwrap();
    want["limits"]
        .as_array()
        .unwrap()
        .iter()
        .find(|e| e["level"] == level)
        .unwrap()["crossing"]
        .as_f64()
        .unwrap()
}

#[test]
fn the_earliest_crossing_inside_the_cap_sets_the_period() {
    // limits_prediction: the earliest crossing is L-902 at 17.03 (statsmodels); the
    // data cover 24 months, room cap min(48, 36) = 36; 3-month steps give 15.
    let raw = expected("limits_prediction", "L-902");
    for storage in ["room", "refrigerated"] {
        let r = run(
            "limits_prediction",
            &format!("storage = \"{storage}\"\nround_to = 3"),
        );
        let s = r.limits_supported.unwrap();
        assert!((s.raw_crossing.unwrap() - raw).abs() <= 1e-9 * raw, "{s:?}");
        assert_eq!(s.limiting_level.as_deref(), Some("L-902"));
        assert_eq!(s.limiting_side.as_deref(), Some("lower"));
        // Refrigerated: min(1.5 x 24, 24 + 6) = 30.
        let cap = if storage == "room" { 36.0 } else { 30.0 };
        assert_eq!((s.covered, s.cap, s.capped), (24.0, Some(cap), false));
        assert_eq!(s.supported, Some(15.0));
    }
}

#[test]
fn a_far_crossing_is_capped_by_the_rule() {
    // limits_far: the pooled line crosses at 77.5 (statsmodels), far beyond 24.
    let raw = expected("limits_far", "pooled");
    assert!(raw > 77.0);
    let cases = [
        ("storage = \"room\"", 36.0, "room"),
        ("storage = \"refrigerated\"", 30.0, "refrigerated"),
        (
            "storage = \"room\"\naccelerated_change = true",
            24.0,
            "room",
        ),
        ("storage = \"frozen\"", 24.0, "frozen"),
        ("extrapolation_factor = 1.25", 30.0, "explicit"),
        ("max_beyond = 3", 27.0, "explicit"),
    ];
    for (extra, cap, rule) in cases {
        let s = run("limits_far", extra).limits_supported.unwrap();
        assert_eq!(
            (s.cap, s.supported, s.capped),
            (Some(cap), Some(cap), true),
            "{extra}"
        );
        assert_eq!(s.rule, rule);
    }
    // No rule: the crossing itself, rounded down to whole months.
    let s = run("limits_far", "").limits_supported.unwrap();
    assert_eq!(
        (s.cap, s.supported, s.rule.as_str()),
        (None, Some(raw.floor()), "none")
    );
}

#[test]
fn a_lot_past_the_limit_from_the_start_supports_no_period() {
    let s = run("limits_violated_first", "storage = \"room\"")
        .limits_supported
        .unwrap();
    assert_eq!(s.supported, None);
    assert_eq!(s.reason.as_deref(), Some("beyond-at-start"));
    assert_eq!(s.limiting_level.as_deref(), Some("L-402"));
}
