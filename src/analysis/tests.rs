use super::*;
use crate::{data, plan};

fn run_csv(model_extra: &str, csv: &str) -> Result<Results, AnalysisError> {
    let text = format!(
        "title = \"t\"\n[data]\npath = \"d.csv\"\n[model]\nresponse = \"y\"\ncovariate = \"x\"\ngroup = \"g\"\n{model_extra}\n"
    );
    let plan = plan::load("p.toml", &text).unwrap();
    let dataset = data::load(&plan, csv.as_bytes()).unwrap();
    let provenance = Provenance::default();
    run(&plan, &dataset, provenance)
}

/// Invented rows: two parallel groups (slope 2), noise by a fixed pattern.
fn parallel(extra: &str) -> String {
    let mut s = String::from("g,x,y\n");
    for i in 0..12 {
        let e = [0.3, -0.2, 0.1, -0.4, 0.2, 0.0][i % 6];
        s.push_str(&format!("a,{i},{}\n", 1.0 + 2.0 * i as f64 + e));
        s.push_str(&format!("b,{i},{}\n", 4.0 + 2.0 * i as f64 - e));
    }
    s.push_str(extra);
    s
}

#[test]
fn small_and_flat_groups_are_left_out_with_warnings() {
    let r = run_csv("", &parallel("c,1,1\nc,2,2\nd,5,1\nd,5,2\nd,5,3\n")).unwrap();
    let levels: Vec<_> = r.groups.iter().map(|g| g.level.as_str()).collect();
    assert_eq!(levels, ["a", "b"]);
    assert_eq!(r.data.rows_dropped["group_too_small"], 2);
    assert_eq!(r.data.rows_dropped["no_covariate_spread"], 3);
    assert_eq!(r.data.rows_used, 24);
    assert!(
        r.warnings
            .iter()
            .any(|w| w == "Group `c` was left out: it has 2 usable rows; a line needs at least 3.")
    );
    assert!(
        r.warnings
            .iter()
            .any(|w| w.starts_with("Group `d` was left out: it has the same covariate value"))
    );
}

#[test]
fn one_usable_group_is_an_error() {
    let e = run_csv("", "g,x,y\na,1,1\na,2,3\na,3,2\nb,1,1\n").unwrap_err();
    assert!(
        e.to_string()
            .starts_with("only one group (`a`) has enough usable rows"),
        "{e}"
    );
    assert!(
        e.to_string()
            .contains("`b` has 1 usable row; a line needs at least 3"),
        "{e}"
    );
}

#[test]
fn parallel_groups_lead_with_the_common_slope() {
    let r = run_csv("", &parallel("")).unwrap();
    assert!(r.decision.homogeneous);
    assert_eq!(r.decision.lead, "common-slope");
    // The noise pattern is mirrored, so the common slope is exactly 2 up to rounding.
    assert!((r.common_slope.slope - 2.0).abs() < 0.05);
    assert!((r.pairwise_adjusted[0].difference + 3.0).abs() < 0.2);
}

#[test]
fn crossing_groups_warn_that_adjusted_means_are_local() {
    let mut s = String::from("g,x,y\n");
    for i in 0..12 {
        let e = [0.3, -0.2, 0.1, -0.4, 0.2, 0.0][i % 6];
        s.push_str(&format!("a,{i},{}\n", 1.0 + 2.0 * i as f64 + e));
        s.push_str(&format!("b,{i},{}\n", 20.0 - 1.0 * i as f64 - e));
    }
    let r = run_csv("adjust_at = 40", &s).unwrap();
    assert!(!r.decision.homogeneous);
    assert_eq!(r.decision.lead, "separate-slopes");
    assert!(r.warnings.iter().any(|w| {
        w.starts_with("Slopes differ, so the adjusted means compare the groups at x = 40.00 only")
    }));
    assert!(
        r.warnings
            .iter()
            .any(|w| w.starts_with("Adjusted means for `a`, `b` are extrapolations"))
    );
    assert!(r.adjusted_means.iter().all(|m| !m.within_range));
}

/// No NaN and no infinity anywhere in the serialized results.
fn assert_all_finite(v: &serde_json::Value, path: &str) {
    match v {
        serde_json::Value::Number(n) => {
            assert!(n.as_f64().is_some_and(f64::is_finite), "{path}: {n}")
        }
        serde_json::Value::Array(a) => a
            .iter()
            .enumerate()
            .for_each(|(i, x)| assert_all_finite(x, &format!("{path}[{i}]"))),
        serde_json::Value::Object(o) => o
            .iter()
            .for_each(|(k, x)| assert_all_finite(x, &format!("{path}.{k}"))),
        _ => {}
    }
}

#[test]
fn a_perfect_fit_gives_warnings_and_nulls_not_nan() {
    // Every row on its group's line: all residuals are zero.
    let mut s = String::from("g,x,y\n");
    for i in 0..6 {
        s.push_str(&format!("a,{i},{}\n", 1.0 + 2.0 * i as f64));
        s.push_str(&format!("b,{i},{}\n", 3.0 + 2.0 * i as f64));
    }
    let r = run_csv("", &s).unwrap();
    let json = serde_json::to_value(&r).unwrap();
    assert_all_finite(&json, "results");
    assert_eq!(json["equal_slopes"]["f"], serde_json::Value::Null);
    assert_eq!(
        json["checks"]["normality"]["statistic"],
        serde_json::Value::Null
    );
    assert_eq!(
        json["checks"]["equal_variance"]["statistic"],
        serde_json::Value::Null
    );
    assert!(
        r.warnings
            .iter()
            .any(|w| w.starts_with("The equal-slopes F test cannot be computed (0/0)"))
    );
    assert_eq!(r.equal_slopes.status, "not-computable");
    assert!(r.warnings.iter().any(|w| {
        w.starts_with("The Shapiro–Wilk test of the pooled residuals could not be computed")
    }));
    assert!(
        r.warnings
            .iter()
            .any(|w| w.starts_with("The Brown–Forsythe test could not be computed"))
    );
    // Equal slopes exactly: the gate takes them as equal because they are identical,
    // and says so rather than quoting a test.
    assert!(r.decision.homogeneous);
    assert!(
        r.decision.reason.contains("cannot be computed"),
        "{}",
        r.decision.reason
    );
}

#[test]
fn identical_residual_spreads_give_a_null_spread_test() {
    // Residuals ±1 around each line in both groups: every |e − median| is 1.
    let mut s = String::from("g,x,y\n");
    for i in 0..8 {
        let e = if i % 2 == 0 { 1.0 } else { -1.0 };
        s.push_str(&format!("a,{},{}\n", i / 2, 1.0 + 2.0 * (i / 2) as f64 + e));
        s.push_str(&format!("b,{},{}\n", i / 2, 3.0 + 2.0 * (i / 2) as f64 + e));
    }
    let r = run_csv("", &s).unwrap();
    assert_eq!(r.checks.equal_variance.statistic, None);
    assert!(
        r.warnings
            .iter()
            .any(|w| w.starts_with("The Brown–Forsythe test could not be computed"))
    );
    assert_all_finite(&serde_json::to_value(&r).unwrap(), "results");
}

#[test]
fn sensitivity_rerun_leaves_out_the_flagged_rows() {
    // One wild row in group a.
    let mut s = parallel("");
    s.push_str("a,11,60\n");
    // The wild row drives the fit, so the refit without it runs unasked (issue 13).
    let with = run_csv("", &s).unwrap();
    let inf = &with.checks.influence;
    assert!(inf.flagged.iter().any(|f| f.row == 25 && f.matters));
    assert_eq!(inf.matters.iter().map(|f| f.row).collect::<Vec<_>>(), [25]);
    let sens = with.sensitivity.clone().expect("sensitivity rerun");
    assert_eq!(sens.rows, [25]);
    assert_eq!(sens.rows_removed, inf.matters_total);
    // The summary's finding names the row and its group.
    let finding = with
        .decision
        .findings
        .iter()
        .find(|f| f.check == "influence")
        .expect("an influence finding");
    assert!(
        finding.statement.contains("row 25 (`a`)"),
        "{}",
        finding.statement
    );
    // Turned off, there is no refit.
    let text = "title = \"t\"\n[data]\npath = \"d.csv\"\n[model]\nresponse = \"y\"\ncovariate = \"x\"\ngroup = \"g\"\n[checks]\nsensitivity = false\n";
    let plan = plan::load("p.toml", text).unwrap();
    let dataset = data::load(&plan, s.as_bytes()).unwrap();
    let without = run(&plan, &dataset, with.provenance.clone()).unwrap();
    assert!(without.sensitivity.is_none());
    assert_eq!(sens.rows_used, with.data.rows_used - sens.rows_removed);
    // Without the wild row group a's slope returns close to 2.
    assert!(
        (sens.groups[0].slope - 2.0).abs() < 0.1,
        "{}",
        sens.groups[0].slope
    );
}

#[test]
fn magnitudes_beyond_floating_point_are_refused_plainly() {
    for (scale, shown) in [(1e300, "e300"), (1e-300, "e-300")] {
        let mut s = String::from("g,x,y\n");
        for g in ["a", "b"] {
            for i in 1..6 {
                s.push_str(&format!(
                    "{g},{:e},{:e}\n",
                    i as f64 * scale,
                    (2 * i + i % 2) as f64 * scale
                ));
            }
        }
        let e = run_csv("", &s).unwrap_err();
        let text = e.to_string();
        assert!(
            text.starts_with("the values of `x` work at a scale of"),
            "{text}"
        );
        assert!(text.contains(shown), "{text}");
    }
}

#[test]
fn many_groups_skip_tukey_with_a_warning() {
    let mut s = String::from("g,x,y\n");
    for g in 0..50 {
        for i in 0..4 {
            let e = [0.3, -0.2, 0.1, -0.4][i];
            s.push_str(&format!(
                "g{g:02},{i},{}\n",
                g as f64 * 0.1 + 2.0 * i as f64 + e
            ));
        }
    }
    let r = run_csv("", &s).unwrap();
    assert_eq!(r.groups.len(), 50);
    assert_eq!(r.pairwise_adjusted.len(), 50 * 49 / 2);
    assert!(r.pairwise_adjusted.iter().all(|p| p.p_tukey.is_none()));
    assert!(r.warnings.iter().any(|w| w.starts_with(
        "Tukey–Kramer p-values are left out (null): with 50 groups there are 1225 pairs"
    )));
}

#[test]
fn a_huge_value_in_one_group_gives_finite_welch_tests() {
    // Found by the analysis fuzz target: one response of about 3e113 made that
    // group's slope variance about 2e225, whose square overflowed the
    // Welch–Satterthwaite df to NaN, and the t tail then panicked inside statrs.
    let mut s = String::from("g,x,y\n");
    for i in 0..8 {
        let x = i as f64;
        let e = [0.1, -0.2, 0.15, -0.05][i % 4];
        s.push_str(&format!(
            "a,{x},{}\nb,{x},{}\n",
            1.0 + 0.5 * x + e,
            2.0 + 2.0 * x - e
        ));
        let y = if i == 3 { 3.3e113 } else { 3.0 + x + e };
        s.push_str(&format!("c,{x},{y:e}\n"));
    }
    let r = run_csv("", &s).unwrap();
    assert_eq!(crate::results::first_non_finite(&r), None);
    for p in &r.pairwise_slopes {
        let df = p.welch.df.expect("a Welch df");
        let p_value = p.welch.p_value.expect("a Welch p-value");
        assert!(df.is_finite() && (0.0..=1.0).contains(&p_value), "{p:?}");
        if p.b == "c" {
            // The huge variance dominates: the df tend to group c's own, 8 - 2.
            assert!((df - 6.0).abs() < 1e-6, "{df}");
        }
    }
}

#[test]
fn one_group_with_a_tiny_covariate_spread_is_refused_plainly() {
    // Found by the analysis fuzz target: the spread check looked at the widest
    // group only, so a group spread over 1e-250 passed, its sum of squares
    // underflowed to zero and fitting its line failed an internal expectation.
    let mut s = String::from("g,x,y\n");
    for i in 0..5 {
        let x = i as f64;
        s.push_str(&format!(
            "a,{x},{}\nb,{:e},{}\n",
            1.0 + x,
            1.7e-250 * (1.0 + x),
            2.0 + x
        ));
    }
    match run_csv("", &s) {
        Err(AnalysisError::Magnitude { column, magnitude }) => {
            assert_eq!(column, "x");
            assert!((magnitude - 6.8e-250).abs() < 1e-262, "{magnitude:e}");
        }
        other => panic!("{other:?}"),
    }
}
