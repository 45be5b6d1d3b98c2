//! Invariances the statistics must obey (facts of least squares; common practice,
//! no source): row order does not matter; adding a constant to the response moves
//! intercepts and adjusted means by that constant and nothing else; with two groups
//! the pooled pairwise slope t² equals the equal-slopes F.

use serde_json::Value;
use slopewise::results::{Provenance, Results};
use slopewise::{analysis, data, plan};

const PLAN: &str = r#"title = "invariance"
[data]
path = "unused.csv"
[model]
response = "y"
covariate = "x"
group = "g"
"#;

/// Invented rows: three groups with different slopes, deterministic noise.
fn rows(groups: usize) -> Vec<(String, f64, f64)> {
    let mut state: u64 = 0x2545_f491_4f6c_dd1d;
    let mut noise = move || {
        state ^= state << 13;
        state ^= state >> 7;
        state ^= state << 17;
        (state % 10_000) as f64 / 10_000.0 - 0.5
    };
    let mut out = Vec::new();
    for g in 0..groups {
        for i in 0..40 {
            let x = 10.0 + i as f64 * 0.7 + noise();
            let y = 3.0 + g as f64 + (0.5 + 0.1 * g as f64) * x + noise() * 2.0;
            out.push((format!("site-{g}"), x, y));
        }
    }
    out
}

fn csv(rows: &[(String, f64, f64)]) -> String {
    let mut s = String::from("g,x,y\n");
    for (g, x, y) in rows {
        s.push_str(&format!("{g},{x},{y}\n"));
    }
    s
}

fn run(rows: &[(String, f64, f64)]) -> Results {
    let plan = plan::load("p.toml", PLAN).unwrap();
    let text = csv(rows);
    let dataset = data::load(&plan, text.as_bytes()).unwrap();
    let provenance = Provenance::default();
    analysis::run(&plan, &dataset, provenance).unwrap()
}

/// Every number in `a` and `b` agrees to `tol` relative (absolute near zero).
fn assert_close(a: &Value, b: &Value, path: &str, tol: f64) {
    match (a, b) {
        (Value::Object(x), Value::Object(y)) => {
            assert_eq!(x.len(), y.len(), "{path}");
            for (k, v) in x {
                assert_close(v, &y[k], &format!("{path}.{k}"), tol);
            }
        }
        (Value::Array(x), Value::Array(y)) => {
            assert_eq!(x.len(), y.len(), "{path}");
            for (i, (v, w)) in x.iter().zip(y).enumerate() {
                assert_close(v, w, &format!("{path}[{i}]"), tol);
            }
        }
        (Value::Number(x), Value::Number(y)) => {
            let (x, y) = (x.as_f64().unwrap(), y.as_f64().unwrap());
            let scale = x.abs().max(y.abs()).max(1e-12);
            assert!((x - y).abs() <= tol * scale, "{path}: {x} vs {y}");
        }
        (x, y) => assert_eq!(x, y, "{path}"),
    }
}

#[test]
fn shuffling_rows_changes_nothing() {
    let original = rows(3);
    let mut shuffled = original.clone();
    // A fixed permutation: reverse, then interleave halves.
    shuffled.reverse();
    let (left, right) = shuffled.split_at(shuffled.len() / 2);
    let interleaved: Vec<_> = left
        .iter()
        .zip(right)
        .flat_map(|(a, b)| [a.clone(), b.clone()])
        .collect();
    let mut a = serde_json::to_value(run(&original)).unwrap();
    let mut b = serde_json::to_value(run(&interleaved)).unwrap();
    // Data row numbers follow the file order by definition; everything else must not.
    for v in [&mut a, &mut b] {
        for f in v["checks"]["influence"]["flagged"].as_array_mut().unwrap() {
            f["row"] = Value::Null;
        }
    }
    // Summation order changes the last bits only.
    assert_close(&a, &b, "results", 1e-10);
}

#[test]
fn shifting_the_response_moves_intercepts_and_means_only() {
    let c = 1000.0;
    let base = rows(3);
    let shifted: Vec<_> = base
        .iter()
        .map(|(g, x, y)| (g.clone(), *x, y + c))
        .collect();
    let a = run(&base);
    let b = run(&shifted);
    let close = |x: f64, y: f64| (x - y).abs() <= 1e-8 * x.abs().max(y.abs()).max(1.0);
    for (ga, gb) in a.groups.iter().zip(&b.groups) {
        assert!(close(ga.slope, gb.slope));
        assert!(
            close(ga.intercept + c, gb.intercept),
            "{} {}",
            ga.intercept,
            gb.intercept
        );
        assert!(close(ga.slope_se.unwrap(), gb.slope_se.unwrap()));
        assert!(close(ga.residual_sd.unwrap(), gb.residual_sd.unwrap()));
    }
    for (ma, mb) in a.adjusted_means.iter().zip(&b.adjusted_means) {
        assert!(close(ma.mean + c, mb.mean));
        assert!(close(ma.se.unwrap(), mb.se.unwrap()));
    }
    for (pa, pb) in a.pairwise_adjusted.iter().zip(&b.pairwise_adjusted) {
        assert!((pa.difference - pb.difference).abs() < 1e-8);
        assert!(close(pa.p_value.unwrap(), pb.p_value.unwrap()));
    }
    assert!(close(a.equal_slopes.f.unwrap(), b.equal_slopes.f.unwrap()));
    assert!(close(a.group_effect.f.unwrap(), b.group_effect.f.unwrap()));
    assert!(close(a.common_slope.slope, b.common_slope.slope));
    // The decision's words and choices are the same; its few numbers (interval ends,
    // finding p-values) agree to rounding.
    let (da, db) = (&a.decision, &b.decision);
    assert_eq!(
        (da.homogeneous, &da.lead, &da.reason, &da.models),
        (db.homogeneous, &db.lead, &db.reason, &db.models)
    );
    assert_eq!(da.gate.outcome, db.gate.outcome);
    assert_eq!(da.sections, db.sections);
    let words = |d: &slopewise::results::Decision| {
        d.findings
            .iter()
            .map(|f| (f.check.clone(), f.statement.clone(), f.consequence.clone()))
            .collect::<Vec<_>>()
    };
    assert_eq!(words(da), words(db));
    let (wa, wb) = (
        da.gate.slope_differences_within.unwrap(),
        db.gate.slope_differences_within.unwrap(),
    );
    assert!(close(wa[0], wb[0]) && close(wa[1], wb[1]));
}

#[test]
fn with_two_groups_pooled_t_squared_is_the_equal_slopes_f() {
    let r = run(&rows(2));
    assert_eq!(r.pairwise_slopes.len(), 1);
    let t = r.pairwise_slopes[0].t.unwrap();
    let f = r.equal_slopes.f.unwrap();
    assert!((t * t - f).abs() <= 1e-10 * f, "t² = {} F = {f}", t * t);
    let p_t = r.pairwise_slopes[0].p_value.unwrap();
    let p_f = r.equal_slopes.p_value.unwrap();
    assert!((p_t - p_f).abs() <= 1e-10 * p_f.max(1e-300), "{p_t} {p_f}");
}
