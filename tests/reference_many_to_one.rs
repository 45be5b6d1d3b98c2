//! Many-to-one comparisons (Dunnett 1955) on open datasets, against statsmodels OLS
//! contrasts and scipy's multivariate t: tests/reference/generate_many_to_one.py
//! wrote tests/reference/many_to_one.json (versions pinned there). The reference
//! plans are the iris and penguin plans of the other reference checks, switched to
//! `comparisons = "against-reference"` (and `covariance = "hc3"` for the robust
//! families).

use std::path::{Path, PathBuf};

use serde_json::Value;
use slopewise::plan::{Comparisons, Covariance, Plan};
use slopewise::results::{Provenance, Results};
use slopewise::{analysis, data, plan};

fn reference_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/reference")
}

fn load(name: &str) -> (Plan, data::Dataset) {
    let plan_path = reference_dir().join(format!("plans/{name}.toml"));
    let text = std::fs::read_to_string(&plan_path).unwrap();
    let mut plan = plan::load(name, &text).unwrap();
    plan.tests.comparisons = Comparisons::AgainstReference;
    let bytes = std::fs::read(plan_path.parent().unwrap().join(&plan.data.path)).unwrap();
    let dataset = data::load(&plan, &bytes).unwrap();
    (plan, dataset)
}

fn run(plan: &Plan, dataset: &data::Dataset) -> Results {
    analysis::run(plan, dataset, Provenance::default()).unwrap()
}

fn expected() -> Value {
    let text = std::fs::read_to_string(reference_dir().join("many_to_one.json")).unwrap();
    serde_json::from_str(&text).unwrap()
}

fn nums(v: &Value) -> Vec<f64> {
    v.as_array()
        .unwrap()
        .iter()
        .map(|x| x.as_f64().unwrap())
        .collect()
}

/// One family: differences, SEs and t to 1e-9 relative (statsmodels contrasts);
/// simultaneous p-values to 1e-4 (scipy's multivariate t, its error and ours); the
/// critical value to 1e-3 (a probability error of 1e-5 moves it by about 1e-4).
#[allow(clippy::too_many_arguments)]
fn check(
    what: &str,
    want: &Value,
    difference: &[f64],
    se: &[f64],
    t: &[f64],
    p: &[f64],
    critical: f64,
    df: f64,
) {
    let rel = |g: f64, w: f64| (g - w).abs() <= 1e-9 * w.abs().max(1e-12);
    for (i, (g, w)) in difference.iter().zip(nums(&want["difference"])).enumerate() {
        assert!(rel(*g, w), "{what} difference {i}: {g} vs {w}");
    }
    for (g, w) in se.iter().zip(nums(&want["se"])) {
        assert!(rel(*g, w), "{what} se: {g} vs {w}");
    }
    for (g, w) in t.iter().zip(nums(&want["t"])) {
        assert!(rel(*g, w), "{what} t: {g} vs {w}");
    }
    let want_p = nums(&want["p_adjusted"]);
    assert_eq!(p.len(), want_p.len(), "{what}");
    for (g, w) in p.iter().zip(want_p) {
        assert!((g - w).abs() <= 1e-4, "{what} p: {g} vs {w}");
    }
    let want_c = want["critical_value"].as_f64().unwrap();
    assert!(
        (critical - want_c).abs() <= 1e-3,
        "{what} critical: {critical} vs {want_c}"
    );
    assert_eq!(df, want["df"].as_f64().unwrap(), "{what} df");
}

#[test]
fn classical_families_match_statsmodels_and_scipy() {
    let all = expected();
    for name in ["iris_petal", "penguins_mass"] {
        let (plan, dataset) = load(name);
        let r = run(&plan, &dataset);
        let want = &all["cases"][name]["classical"];
        let levels: Vec<String> = all["cases"][name]["levels"]
            .as_array()
            .unwrap()
            .iter()
            .map(|v| v.as_str().unwrap().to_string())
            .collect();
        let m = r.many_to_one.as_ref().expect("many_to_one is filled");
        assert_eq!(m.reference, levels[0]);
        // Only the pairs against the reference, in level order, a the level.
        let pairs: Vec<(String, String)> = r
            .pairwise_adjusted
            .iter()
            .map(|p| (p.a.clone(), p.b.clone()))
            .collect();
        let want_pairs: Vec<(String, String)> = levels[1..]
            .iter()
            .map(|l| (l.clone(), levels[0].clone()))
            .collect();
        assert_eq!(pairs, want_pairs, "{name}");
        let a = &r.pairwise_adjusted;
        check(
            &format!("{name} adjusted"),
            &want["adjusted"],
            &a.iter().map(|p| p.difference).collect::<Vec<_>>(),
            &a.iter().map(|p| p.se.unwrap()).collect::<Vec<_>>(),
            &a.iter().map(|p| p.t.unwrap()).collect::<Vec<_>>(),
            &a.iter().map(|p| p.p_adjusted.unwrap()).collect::<Vec<_>>(),
            m.adjusted.critical_value.unwrap(),
            m.adjusted.df,
        );
        let s = &r.pairwise_slopes;
        check(
            &format!("{name} slopes"),
            &want["slopes"],
            &s.iter().map(|p| p.difference).collect::<Vec<_>>(),
            &s.iter().map(|p| p.se.unwrap()).collect::<Vec<_>>(),
            &s.iter().map(|p| p.t.unwrap()).collect::<Vec<_>>(),
            &s.iter().map(|p| p.p_adjusted.unwrap()).collect::<Vec<_>>(),
            m.slopes.critical_value.unwrap(),
            m.slopes.df,
        );
        // The simultaneous interval is d ± c·se and contains the unadjusted one.
        for p in a {
            let [lo, hi] = p.ci_simultaneous.unwrap();
            let c = m.adjusted.critical_value.unwrap();
            assert!((hi - p.difference - c * p.se.unwrap()).abs() < 1e-12 * hi.abs().max(1.0));
            let [ulo, uhi] = p.ci.unwrap();
            assert!(lo < ulo && hi > uhi, "{p:?}");
            assert_eq!(p.p_tukey, None, "Tukey–Kramer is not a many-to-one family");
        }
        assert!(m.adjusted.error.unwrap() <= 1e-4 && m.slopes.error.unwrap() <= 1e-4);
    }
}

#[test]
fn hc3_families_match_statsmodels_and_scipy() {
    let all = expected();
    for name in ["iris_petal", "penguins_mass"] {
        let (mut plan, dataset) = load(name);
        plan.tests.covariance = Covariance::Hc3;
        let r = run(&plan, &dataset);
        let want = &all["cases"][name]["hc3"];
        let m = r.many_to_one.as_ref().unwrap();
        let rb = r.robust.as_ref().unwrap();
        let fam = m.robust_adjusted.as_ref().unwrap();
        let a = &rb.pairwise_adjusted;
        check(
            &format!("{name} hc3 adjusted"),
            &want["adjusted"],
            &a.iter().map(|p| p.difference).collect::<Vec<_>>(),
            &a.iter().map(|p| p.se.unwrap()).collect::<Vec<_>>(),
            &a.iter().map(|p| p.t.unwrap()).collect::<Vec<_>>(),
            &a.iter().map(|p| p.p_adjusted.unwrap()).collect::<Vec<_>>(),
            fam.critical_value.unwrap(),
            fam.df,
        );
        let fam = m.robust_slopes.as_ref().unwrap();
        let s = &rb.pairwise_slopes;
        check(
            &format!("{name} hc3 slopes"),
            &want["slopes"],
            &s.iter().map(|p| p.difference).collect::<Vec<_>>(),
            &s.iter().map(|p| p.se.unwrap()).collect::<Vec<_>>(),
            &s.iter().map(|p| p.t.unwrap()).collect::<Vec<_>>(),
            &s.iter().map(|p| p.p_adjusted.unwrap()).collect::<Vec<_>>(),
            fam.critical_value.unwrap(),
            fam.df,
        );
    }
}

#[test]
fn the_same_plan_gives_the_same_bytes() {
    let (plan, dataset) = load("iris_petal");
    let a = serde_json::to_string(&run(&plan, &dataset)).unwrap();
    let b = serde_json::to_string(&run(&plan, &dataset)).unwrap();
    assert_eq!(a, b);
}
