//! Tests of the studentized range against scipy's values in tests/reference/stats.json.

use super::*;
use serde_json::Value;
use statrs::function::gamma::gamma_ur;

/// Reference values written by tests/reference/generate_stats.py
/// (scipy 1.17.1, numpy 2.4.6, pinned and checked by the script).
fn reference() -> Value {
    serde_json::from_str(include_str!("../../../tests/reference/stats.json"))
        .expect("stats.json parses")
}

fn df_of(v: &Value) -> f64 {
    match v.as_str() {
        Some("inf") => f64::INFINITY,
        Some(other) => panic!("unexpected df {other}"),
        None => v.as_f64().expect("df"),
    }
}

#[test]
fn gauss_legendre_is_exact_for_polynomials() {
    // An n-point rule integrates x^j exactly for j ≤ 2n − 1 (common
    // practice, no source): ∫_{-1}^{1} x^j = 2/(j+1) for even j, else 0.
    for n in [7usize, 8, 12] {
        let rule = gauss_legendre(n);
        for j in 0..2 * n {
            let got: f64 = rule.iter().map(|(x, w)| w * x.powi(j as i32)).sum();
            let want = if j % 2 == 0 {
                2.0 / (j as f64 + 1.0)
            } else {
                0.0
            };
            assert!((got - want).abs() < 1e-14, "n {n}, j {j}: {got}");
        }
    }
}

#[test]
fn kronrod_constants_are_exact_for_polynomials() {
    // K15 is exact to degree 22 and G7 to degree 13 (Kronrod 1965); the
    // G7 nodes are the Gauss–Legendre nodes of order 7.
    let k15 = |j: i32| {
        let mut s = WGK[7] * 0f64.powi(j);
        for i in 0..7 {
            s += WGK[i] * (XGK[i].powi(j) + (-XGK[i]).powi(j));
        }
        s
    };
    let g7 = |j: i32| {
        let mut s = WG[3] * 0f64.powi(j);
        for i in 0..3 {
            let x = XGK[2 * i + 1];
            s += WG[i] * (x.powi(j) + (-x).powi(j));
        }
        s
    };
    for j in 0..=22 {
        let want = if j % 2 == 0 {
            2.0 / (j as f64 + 1.0)
        } else {
            0.0
        };
        assert!((k15(j) - want).abs() < 1e-15, "K15 degree {j}: {}", k15(j));
        if j <= 13 {
            assert!((g7(j) - want).abs() < 1e-15, "G7 degree {j}: {}", g7(j));
        }
    }
    let mut ours: Vec<f64> = gauss_legendre(7).iter().map(|r| r.0).collect();
    ours.sort_by(|a, b| b.total_cmp(a));
    for (i, x) in ours.iter().take(3).enumerate() {
        assert!((x - XGK[2 * i + 1]).abs() < 1e-15, "node {i}: {x}");
    }
}

/// P(Q > q) for k = 2 in closed form: Q = √2·|t_df|, so for df = ∞ it is
/// erfc(q/2) = Γ(½, q²/4)/Γ(½); for df = 1, (2/π)·atan(√2/q); for df = 2,
/// 2/(s(s + t)) with t = q/√2, s = √(2 + t²) (Student's t in closed form
/// for 1 and 2 df; common practice, no source).
fn two_mean_exact(q: f64, df: f64) -> f64 {
    if df.is_infinite() {
        gamma_ur(0.5, 0.25 * q * q)
    } else if df == 1.0 {
        2.0 / PI * (SQRT_2 / q).atan()
    } else if df == 2.0 {
        let t = q / SQRT_2;
        let s = (2.0 + t * t).sqrt();
        2.0 / (s * (s + t))
    } else {
        unreachable!()
    }
}

#[test]
fn two_means_match_closed_forms_including_far_tails() {
    for df in [1.0, 2.0, f64::INFINITY] {
        for q in [0.01, 0.3, 1.0, 2.5, 4.0, 7.0, 15.0, 30.0, 300.0, 1e4] {
            let want = two_mean_exact(q, df);
            if want < 1e-290 {
                continue;
            }
            let up = sf(q, 2, df);
            let lo = cdf(q, 2, df);
            assert!(
                ((up - want) / want).abs() < 1e-8,
                "sf({q}, 2, {df}) = {up:e}, exact {want:e}"
            );
            assert!(
                (lo - (1.0 - want)).abs() < 1e-10,
                "cdf({q}, 2, {df}) = {lo}"
            );
        }
    }
    // The far tail keeps its relative accuracy: erfc(15) ≈ 7.2e-100.
    let want = two_mean_exact(30.0, f64::INFINITY);
    assert!(want < 1e-98 && ((sf(30.0, 2, f64::INFINITY) - want) / want).abs() < 1e-8);
}

#[test]
fn matches_scipy_cdf_and_sf() {
    // Source: scipy.stats.studentized_range.cdf / .sf at the points in
    // stats.json (k 2..100, df 1..1000 and ∞).
    let doc = reference();
    let points = doc["studentized_range"]["points"].as_array().unwrap();
    assert!(points.len() >= 30, "reference file lost its points");
    let (mut worst_c, mut worst_s) = (0.0f64, 0.0f64);
    for pt in points {
        let q = pt["q"].as_f64().unwrap();
        let k = pt["k"].as_u64().unwrap() as usize;
        let df = df_of(&pt["df"]);
        let (want_c, want_s) = (pt["cdf"].as_f64().unwrap(), pt["sf"].as_f64().unwrap());
        let (got_c, got_s) = (cdf(q, k, df), sf(q, k, df));
        assert!(
            (got_c - want_c).abs() <= 1e-6,
            "cdf({q}, {k}, {df}) = {got_c} vs {want_c}"
        );
        assert!(
            (got_s - want_s).abs() <= 1e-6,
            "sf({q}, {k}, {df}) = {got_s} vs {want_s}"
        );
        worst_c = worst_c.max((got_c - want_c).abs());
        worst_s = worst_s.max((got_s - want_s).abs());
    }
    eprintln!("studentized range vs scipy: worst |Δcdf| = {worst_c:.2e}, |Δsf| = {worst_s:.2e}");
}

#[test]
fn matches_scipy_quantiles() {
    // Source: scipy.stats.studentized_range.ppf in stats.json.
    let doc = reference();
    let cases = doc["studentized_range"]["quantiles"].as_array().unwrap();
    assert!(cases.len() >= 20, "reference file lost its quantiles");
    let mut worst = 0.0f64;
    for c in cases {
        let p = c["p"].as_f64().unwrap();
        let k = c["k"].as_u64().unwrap() as usize;
        let df = df_of(&c["df"]);
        let want = c["q"].as_f64().unwrap();
        let got = quantile(p, k, df);
        let rel = ((got - want) / want).abs();
        assert!(rel <= 1e-6, "quantile({p}, {k}, {df}) = {got} vs {want}");
        worst = worst.max(rel);
    }
    eprintln!("studentized range quantiles vs scipy: worst relative error {worst:.2e}");
}

#[test]
fn matches_published_upper_five_percent_points() {
    // Upper 5% (and two 1%) points of the studentized range as printed in
    // the usual tables (to 3 decimals), from memory: q(α; k, df).
    let table = [
        (0.05, 3, 10.0, 3.877),
        (0.05, 4, 20.0, 3.958),
        (0.05, 2, f64::INFINITY, 2.772),
        (0.05, 10, 60.0, 4.646),
        (0.05, 5, f64::INFINITY, 3.858),
        (0.05, 2, 5.0, 3.635),
        (0.01, 3, 10.0, 5.270),
        (0.01, 2, f64::INFINITY, 3.643),
    ];
    for (alpha, k, df, want) in table {
        let got = quantile(1.0 - alpha, k, df);
        assert!(
            (got - want).abs() <= 1e-3,
            "q({alpha}; {k}, {df}) = {got}, table {want}"
        );
    }
}

#[test]
fn inner_rule_agrees_with_a_much_finer_one() {
    // Our panels against panels ≤ 0.25 wide with 12 points (the inner
    // integral's discretisation error).
    for k in [2usize, 3, 5, 10, 20, 50, 100] {
        let g = InnerGrid::new(k);
        let fine = InnerGrid::with_rule(k, 0.25, 12, 1.0);
        for i in 1..60 {
            let w = 0.2 * i as f64;
            let (a, _) = g.range(w, Tail::Lower, false);
            let (b, _) = fine.range(w, Tail::Lower, false);
            assert!((a - b).abs() < 1e-9, "k {k}, w {w}: {a} vs {b}");
            let (c, _) = g.range(w, Tail::Upper, false);
            let (d, _) = fine.range(w, Tail::Upper, false);
            assert!(((c - d) / d).abs() < 1e-8, "k {k}, w {w}: {c:e} vs {d:e}");
        }
    }
}

#[test]
fn tails_add_to_one_and_are_monotone() {
    for (k, df) in [(3usize, 4.0), (6, 30.0), (12, f64::INFINITY)] {
        let mut last = 0.0;
        for i in 1..40 {
            let q = 0.25 * i as f64;
            let c = cdf(q, k, df);
            assert!(c >= last, "cdf not increasing at q {q}");
            assert!((c + sf(q, k, df) - 1.0).abs() < 1e-9, "q {q}");
            last = c;
        }
    }
}

#[test]
fn upper_quantiles_far_out_keep_relative_accuracy() {
    for (k, df) in [(3usize, 20.0), (5, f64::INFINITY), (2, 1.0)] {
        let q = upper_quantile(1e-12, k, df);
        let back = sf(q, k, df);
        assert!(
            ((back - 1e-12) / 1e-12).abs() < 1e-6,
            "k {k}, df {df}: sf = {back:e}"
        );
    }
    // And lower ones, via the lower tail.
    let q = quantile(1e-9, 4, 10.0);
    assert!(((cdf(q, 4, 10.0) - 1e-9) / 1e-9).abs() < 1e-6);
}

#[test]
fn edge_values_and_invalid_parameters() {
    assert_eq!(cdf(0.0, 3, 10.0), 0.0);
    assert_eq!(cdf(-1.0, 3, 10.0), 0.0);
    assert_eq!(sf(0.0, 3, 10.0), 1.0);
    assert_eq!(cdf(f64::INFINITY, 3, 10.0), 1.0);
    assert_eq!(sf(f64::INFINITY, 3, 10.0), 0.0);
    assert_eq!(quantile(0.0, 3, 10.0), 0.0);
    assert_eq!(quantile(1.0, 3, 10.0), f64::INFINITY);
    assert_eq!(upper_quantile(0.0, 3, 10.0), f64::INFINITY);
    assert_eq!(upper_quantile(1.0, 3, 10.0), 0.0);
    let (a, b) = (upper_quantile(0.05, 4, 12.0), quantile(0.95, 4, 12.0));
    assert!(((a - b) / b).abs() < 1e-9, "{a} vs {b}");
    let (a, b) = (upper_quantile(0.9, 4, 12.0), quantile(0.1, 4, 12.0));
    assert!(((a - b) / b).abs() < 1e-9, "{a} vs {b}");
    assert!(cdf(2.0, 1, 10.0).is_nan());
    assert!(cdf(2.0, 3, 0.0).is_nan());
    assert!(sf(f64::NAN, 3, 10.0).is_nan());
    assert!(quantile(1.5, 3, 10.0).is_nan());
    assert!(quantile(0.5, 3, f64::NAN).is_nan());
    // Fractional and sub-unit df are accepted.
    let c = cdf(3.0, 3, 0.5);
    assert!(c > 0.0 && c < 1.0);
    assert!((c + sf(3.0, 3, 0.5) - 1.0).abs() < 1e-8);
    let q = quantile(0.95, 4, 7.5);
    assert!(((cdf(q, 4, 7.5) - 0.95) / 0.05).abs() < 1e-7);
}

/// Accuracy survey behind `REL_TOL`'s documentation (slow: about a minute
/// in release mode). Run with `cargo test --release -- --ignored`.
#[test]
#[ignore]
fn accuracy_survey_against_dense_reference() {
    let (mut worst_lo, mut worst_up, mut worst_up_big) = (0.0f64, 0.0f64, 0.0f64);
    for df in [
        0.5f64, 1.0, 2.0, 3.0, 5.0, 10.0, 20.0, 60.0, 120.0, 1000.0, 1e5,
    ] {
        for k in [2usize, 3, 5, 10, 20, 50, 100] {
            let g = InnerGrid::new(k);
            let fine = InnerGrid::with_rule(k, 0.25, 12, 1.0);
            for q in [
                0.05, 0.3, 1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 8.0, 12.0, 20.0, 50.0, 200.0, 1e3,
            ] {
                let (lo, _, _) = outer(q, df, Tail::Lower, false, &g, REL_TOL, false);
                let (up, _, _) = outer(q, df, Tail::Upper, false, &g, REL_TOL, false);
                let (rl, _, _) = outer(q, df, Tail::Lower, false, &fine, 1e-13, true);
                let (ru, _, _) = outer(q, df, Tail::Upper, false, &fine, 1e-13, true);
                worst_lo = worst_lo.max((lo - rl).abs());
                if ru > 1e-290 {
                    let rel = ((up - ru) / ru).abs();
                    worst_up = worst_up.max(rel);
                    if ru > 1e-30 {
                        worst_up_big = worst_up_big.max(rel);
                    }
                }
            }
        }
    }
    eprintln!(
        "lower abs {worst_lo:.1e}, upper rel {worst_up:.1e} ({worst_up_big:.1e} above 1e-30)"
    );
    assert!(worst_lo < 1e-10 && worst_up < 2e-7 && worst_up_big < 1e-9);
}
