//! Assumption checks and follow-ups against scipy and statsmodels on the reference
//! plans (open datasets shipped by registry packages, plus two invented
//! Johnson–Neyman cases). Values, script and pinned versions: tests/reference/
//! (generate_checks.py writes expected/checks_NAME.json).

use std::path::{Path, PathBuf};

use serde_json::Value;
use slopewise::plan::{Plan, Regions};
use slopewise::results::{Provenance, Results};
use slopewise::{analysis, data, plan};

fn reference_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/reference")
}

fn load(name: &str) -> (Plan, data::Dataset) {
    let plan_path = reference_dir().join(format!("plans/{name}.toml"));
    let text = std::fs::read_to_string(&plan_path).unwrap();
    let plan = plan::load(name, &text).unwrap();
    let bytes = std::fs::read(plan_path.parent().unwrap().join(&plan.data.path)).unwrap();
    let dataset = data::load(&plan, &bytes).unwrap();
    (plan, dataset)
}

fn run(plan: &Plan, dataset: &data::Dataset) -> Results {
    let provenance = Provenance::default();
    analysis::run(plan, dataset, provenance).unwrap()
}

fn names() -> Vec<String> {
    let mut names: Vec<String> = std::fs::read_dir(reference_dir().join("expected"))
        .unwrap()
        .filter_map(|e| {
            let name = e.unwrap().file_name().to_string_lossy().into_owned();
            name.strip_prefix("checks_")
                .and_then(|n| n.strip_suffix(".json"))
                .map(str::to_string)
        })
        .collect();
    names.sort();
    assert!(names.len() >= 8, "{names:?}");
    names
}

fn expected(name: &str) -> Value {
    let text =
        std::fs::read_to_string(reference_dir().join(format!("expected/checks_{name}.json")))
            .unwrap();
    serde_json::from_str(&text).unwrap()
}

fn f(v: &Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("not a number: {v}"))
}

/// |got − want| ≤ tol · max(|want|, floor).
fn close(got: f64, want: f64, tol: f64, floor: f64) -> bool {
    (got - want).abs() <= tol * want.abs().max(floor)
}

#[test]
fn normality_and_spread_match_scipy() {
    for name in names() {
        let want = expected(&name);
        let (plan, dataset) = load(&name);
        let r = run(&plan, &dataset);
        let n = &r.checks.normality;
        let w = &want["normality"]["pooled"];
        // scipy.stats.shapiro, within 1e-6 (tests/reference/generate_checks.py).
        assert!(
            close(n.statistic.unwrap(), f(&w["statistic"]), 1e-6, 1e-300),
            "{name} W"
        );
        assert!(
            close(n.p_value.unwrap(), f(&w["p_value"]), 1e-6, 1e-300),
            "{name} p {:?} {}",
            n.p_value,
            w["p_value"]
        );
        assert_eq!(n.n, w["n"].as_u64().unwrap());
        for (g, w) in n
            .groups
            .iter()
            .zip(want["normality"]["groups"].as_array().unwrap())
        {
            assert_eq!(g.level, w["level"].as_str().unwrap());
            assert!(
                close(g.statistic.unwrap(), f(&w["statistic"]), 1e-6, 1e-300),
                "{name} {} W",
                g.level
            );
            assert!(
                close(g.p_value.unwrap(), f(&w["p_value"]), 1e-6, 1e-300),
                "{name} {} p",
                g.level
            );
        }
        // scipy.stats.levene(center="median"), within 1e-6.
        let ev = &r.checks.equal_variance;
        let w = &want["equal_variance"];
        assert!(
            close(ev.statistic.unwrap(), f(&w["statistic"]), 1e-6, 1e-300),
            "{name} BF"
        );
        assert!(
            close(ev.p_value.unwrap(), f(&w["p_value"]), 1e-6, 1e-300),
            "{name} BF p"
        );
        assert_eq!((ev.df1, ev.df2), (f(&w["df1"]), f(&w["df2"])));
        // scipy.stats.f_oneway on the covariate, and the common range.
        let cb = &r.checks.covariate_balance;
        let w = &want["covariate_balance"];
        assert!(
            close(cb.f.unwrap(), f(&w["f"]), 1e-9, 1e-300),
            "{name} balance F"
        );
        assert!(
            close(cb.p_value.unwrap(), f(&w["p_value"]), 1e-6, 1e-300),
            "{name} balance p"
        );
        match (&cb.overlap, w["overlap"].as_array()) {
            (Some([lo, hi]), Some(o)) => assert_eq!((*lo, *hi), (f(&o[0]), f(&o[1])), "{name}"),
            (None, None) => {}
            (got, want) => panic!("{name} overlap {got:?} vs {want:?}"),
        }
        // Partial eta squared from the statsmodels residual sums of squares.
        let es = &want["effect_sizes"];
        assert!(close(
            r.effect_sizes.equal_slopes_partial_eta2.unwrap(),
            f(&es["equal_slopes_partial_eta2"]),
            1e-9,
            1e-300
        ));
        assert!(close(
            r.effect_sizes.group_effect_partial_eta2.unwrap(),
            f(&es["group_effect_partial_eta2"]),
            1e-9,
            1e-300
        ));
    }
}

#[test]
fn tukey_kramer_matches_the_studentized_range() {
    for name in names() {
        let want = expected(&name);
        let (plan, dataset) = load(&name);
        let r = run(&plan, &dataset);
        let pairs = want["tukey"].as_array().unwrap();
        assert_eq!(pairs.len(), r.pairwise_adjusted.len());
        for (got, w) in r.pairwise_adjusted.iter().zip(pairs) {
            assert_eq!(got.a, w["a"].as_str().unwrap());
            // scipy.stats.studentized_range.sf, or the script's own integration of the
            // definition where scipy's absolute accuracy (about 1e-13) falls short;
            // p_tukey_source says which. Within 1e-6 relative.
            let p = got.p_tukey.unwrap();
            assert!(
                close(p, f(&w["p_tukey"]), 1e-6, 1e-300),
                "{name} {}-{}: {p} vs {}",
                got.a,
                got.b,
                w["p_tukey"]
            );
        }
    }
}

#[test]
fn influence_matches_statsmodels() {
    for name in names() {
        let want = expected(&name);
        let w = &want["influence"];
        let (plan, dataset) = load(&name);
        let r = run(&plan, &dataset);
        assert_eq!(
            r.checks.influence.model,
            w["model"].as_str().unwrap(),
            "{name}"
        );
        // statsmodels OLSInfluence, within 1e-9.
        assert!(close(
            r.checks.influence.max_leverage.unwrap(),
            f(&w["max_leverage"]),
            1e-9,
            1e-300
        ));
        assert!(close(
            r.checks.influence.max_cooks_distance.unwrap(),
            f(&w["max_cooks_distance"]),
            1e-9,
            1e-300
        ));
        let mut rows = analysis::row_influence(&plan, &dataset).unwrap();
        rows.sort_by_key(|x| x.row);
        let want_rows = w["row"].as_array().unwrap();
        assert_eq!(rows.len(), want_rows.len(), "{name}");
        let scale = |key: &str| {
            w[key]
                .as_array()
                .unwrap()
                .iter()
                .map(|v| f(v).abs())
                .fold(0.0, f64::max)
        };
        let (sl, ss, sc) = (
            scale("leverage"),
            scale("studentized_residual"),
            scale("cooks_distance"),
        );
        for (i, got) in rows.iter().enumerate() {
            assert_eq!(u64::from(got.row), want_rows[i].as_u64().unwrap(), "{name}");
            // Relative to the array's largest value: rows with residuals near zero
            // carry only absolute accuracy (tests/reference/README.md).
            assert!(
                close(got.leverage, f(&w["leverage"][i]), 1e-9, sl),
                "{name} row {} h",
                got.row
            );
            assert!(
                close(
                    got.studentized_residual.unwrap(),
                    f(&w["studentized_residual"][i]),
                    1e-9,
                    ss
                ),
                "{name} row {} t",
                got.row
            );
            assert!(
                close(
                    got.cooks_distance.unwrap(),
                    f(&w["cooks_distance"][i]),
                    1e-9,
                    sc
                ),
                "{name} row {} D",
                got.row
            );
        }
    }
}

#[test]
fn johnson_neyman_regions_and_differences_match_statsmodels() {
    for name in names() {
        let want = expected(&name);
        let (mut plan, dataset) = load(&name);
        // Regions are reported when slopes differ; force that branch so every plan's
        // regions are checked (the reference computes them for every pair).
        plan.tests.slopes_alpha = 1.0 - 1e-12;
        for form in [Regions::Pointwise, Regions::Simultaneous] {
            plan.tests.regions = form;
            let r = run(&plan, &dataset);
            assert!(!r.decision.homogeneous);
            let want_regions: Vec<&Value> = want["regions"]
                .as_array()
                .unwrap()
                .iter()
                .filter(|g| g["method"] == form.method())
                .collect();
            assert_eq!(r.regions.len(), want_regions.len(), "{name}");
            let range = want["observed_range"].as_array().unwrap();
            for (got, w) in r.regions.iter().zip(want_regions) {
                assert_eq!(
                    (got.a.as_str(), got.b.as_str()),
                    (w["a"].as_str().unwrap(), w["b"].as_str().unwrap())
                );
                assert_eq!(got.observed_range, [f(&range[0]), f(&range[1])]);
                // Bounds from statsmodels' coefficient covariance, root-polished by
                // brentq, within 1e-8 relative.
                let wb = w["bounds"].as_array().unwrap();
                assert_eq!(
                    got.bounds.len(),
                    wb.len(),
                    "{name} {}-{} {:?} vs {wb:?}",
                    got.a,
                    got.b,
                    got.bounds
                );
                for (b, wb) in got.bounds.iter().zip(wb) {
                    assert!(
                        close(*b, f(wb), 1e-8, 1.0),
                        "{name} {}-{} bound {b} vs {wb}",
                        got.a,
                        got.b
                    );
                }
                let ws = w["significant"].as_array().unwrap();
                assert_eq!(
                    got.significant.len(),
                    ws.len(),
                    "{name} {}-{} {:?} vs {ws:?}",
                    got.a,
                    got.b,
                    got.significant
                );
                for (s, ws) in got.significant.iter().zip(ws) {
                    assert!(
                        close(s[0], f(&ws[0]), 1e-8, 1.0) && close(s[1], f(&ws[1]), 1e-8, 1.0),
                        "{name} {s:?} vs {ws}"
                    );
                }
            }
            // Differences at the covariate quartiles (numpy.percentile, linear).
            let wd = want["differences_at"].as_array().unwrap();
            assert_eq!(r.differences_at.len(), wd.len(), "{name}");
            for (got, w) in r.differences_at.iter().zip(wd) {
                assert!(close(got.at, f(&w["at"]), 1e-12, 1.0), "{name} at");
                for (g, key) in [
                    (got.difference, "difference"),
                    (got.se.unwrap(), "se"),
                    (got.t.unwrap(), "t"),
                ] {
                    assert!(
                        close(g, f(&w[key]), 1e-9, 1e-12),
                        "{name} {key} {g} vs {}",
                        w[key]
                    );
                }
                assert!(
                    close(got.p_value.unwrap(), f(&w["p_value"]), 1e-9, 1e-300),
                    "{name} p"
                );
                let ci = got.ci.unwrap();
                assert!(
                    close(ci[0], f(&w["ci"][0]), 1e-9, 1e-12)
                        && close(ci[1], f(&w["ci"][1]), 1e-9, 1e-12)
                );
            }
        }
    }
}

#[test]
fn the_invented_johnson_neyman_cases_have_their_shapes() {
    let (mut plan, dataset) = load("jn_empty");
    plan.tests.slopes_alpha = 1.0 - 1e-12;
    let r = run(&plan, &dataset);
    assert!(
        r.regions.iter().all(|g| g.significant.is_empty()),
        "{:?}",
        r.regions
    );
    let (mut plan, dataset) = load("jn_one_sided");
    plan.tests.slopes_alpha = 1.0 - 1e-12;
    let r = run(&plan, &dataset);
    let g = &r.regions[0];
    // One bound inside the range, significance from it to the top of the range.
    assert_eq!(g.significant.len(), 1);
    assert_eq!(g.significant[0][1], g.observed_range[1]);
    assert!(g.significant[0][0] > g.observed_range[0]);
}
