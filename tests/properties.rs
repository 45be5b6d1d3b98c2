//! Property tests of the statistics' invariances on random finite data (facts of
//! least squares; common practice, no source): row order changes nothing; scaling
//! the response scales slopes, intercepts and means and leaves F and p alone;
//! shifting the covariate leaves slopes alone; relabelling groups changes only the
//! labels; and no input gives NaN or a panic.

use proptest::prelude::*;
use serde_json::Value;
use slopewise::results::{Provenance, Results};
use slopewise::{analysis, data, plan};

const PLAN: &str = "title = \"p\"\n[data]\npath = \"d.csv\"\n[model]\nresponse = \"y\"\ncovariate = \"x\"\ngroup = \"g\"\n";

fn run(rows: &[(usize, f64, f64)], labels: &[&str]) -> Option<Results> {
    let plan = plan::load("p.toml", PLAN).unwrap();
    let mut csv = String::from("g,x,y\n");
    for (g, x, y) in rows {
        csv.push_str(&format!("{},{x:e},{y:e}\n", labels[*g]));
    }
    let dataset = data::load(&plan, csv.as_bytes()).expect("finite data always load");
    analysis::run(&plan, &dataset, Provenance::default()).ok()
}

/// Three groups of 4 to 20 rows with moderate finite values.
fn dataset() -> impl Strategy<Value = Vec<(usize, f64, f64)>> {
    prop::collection::vec((0usize..3, -1e3f64..1e3, -1e3f64..1e3), 12..60)
}

fn finite(v: &Value) -> bool {
    match v {
        Value::Number(n) => n.as_f64().is_some_and(f64::is_finite),
        Value::Array(a) => a.iter().all(finite),
        Value::Object(o) => o.values().all(finite),
        _ => true,
    }
}

fn close(a: f64, b: f64, tol: f64) -> bool {
    (a - b).abs() <= tol * a.abs().max(b.abs()).max(1e-6)
}

const LABELS: [&str; 3] = ["a", "b", "c"];

proptest! {
    #![proptest_config(ProptestConfig { cases: 64, .. ProptestConfig::default() })]

    #[test]
    fn no_nan_and_no_panic(rows in dataset()) {
        // `run` fails on a non-finite number (analysis::run checks every field),
        // so only the reasons it may refuse are allowed here.
        let plan = plan::load("p.toml", PLAN).unwrap();
        let mut csv = String::from("g,x,y\n");
        for (g, x, y) in &rows {
            csv.push_str(&format!("{},{x:e},{y:e}\n", LABELS[*g]));
        }
        let dataset = data::load(&plan, csv.as_bytes()).unwrap();
        match analysis::run(&plan, &dataset, Provenance::default()) {
            Ok(r) => {
                prop_assert_eq!(slopewise::results::first_non_finite(&r), None);
                prop_assert!(finite(&serde_json::to_value(&r).unwrap()));
            }
            Err(e) => prop_assert!(
                matches!(e, analysis::AnalysisError::TooFewGroups { .. }),
                "{e}"
            ),
        }
    }

    #[test]
    fn row_order_changes_nothing(rows in dataset(), seed in any::<u64>()) {
        let mut shuffled = rows.clone();
        // A seeded Fisher–Yates shuffle.
        let mut s = seed | 1;
        for i in (1..shuffled.len()).rev() {
            s ^= s << 13; s ^= s >> 7; s ^= s << 17;
            shuffled.swap(i, (s % (i as u64 + 1)) as usize);
        }
        if let (Some(a), Some(b)) = (run(&rows, &LABELS), run(&shuffled, &LABELS)) {
            prop_assert_eq!(a.groups.len(), b.groups.len());
            for (x, y) in a.groups.iter().zip(&b.groups) {
                prop_assert!(close(x.slope, y.slope, 1e-8));
            }
            prop_assert_eq!(a.equal_slopes.homogeneous, b.equal_slopes.homogeneous);
            if let (Some(f), Some(g)) = (a.equal_slopes.f, b.equal_slopes.f) {
                prop_assert!(close(f, g, 1e-7));
            }
        }
    }

    #[test]
    fn scaling_the_response_scales_estimates(rows in dataset(), c in 0.01f64..100.0) {
        let scaled: Vec<_> = rows.iter().map(|(g, x, y)| (*g, *x, y * c)).collect();
        if let (Some(a), Some(b)) = (run(&rows, &LABELS), run(&scaled, &LABELS)) {
            for (x, y) in a.groups.iter().zip(&b.groups) {
                prop_assert!(close(x.slope * c, y.slope, 1e-7), "{} {}", x.slope * c, y.slope);
                prop_assert!(close(x.intercept * c, y.intercept, 1e-7));
            }
            for (x, y) in a.adjusted_means.iter().zip(&b.adjusted_means) {
                prop_assert!(close(x.mean * c, y.mean, 1e-7));
            }
            if let (Some(f), Some(g)) = (a.equal_slopes.f, b.equal_slopes.f) {
                prop_assert!(close(f, g, 1e-6));
            }
        }
    }

    #[test]
    fn shifting_the_covariate_keeps_slopes(rows in dataset(), d in -500.0f64..500.0) {
        let shifted: Vec<_> = rows.iter().map(|(g, x, y)| (*g, x + d, *y)).collect();
        if let (Some(a), Some(b)) = (run(&rows, &LABELS), run(&shifted, &LABELS)) {
            for (x, y) in a.groups.iter().zip(&b.groups) {
                prop_assert!(close(x.slope, y.slope, 1e-6), "{} {}", x.slope, y.slope);
            }
            prop_assert!(close(a.common_slope.slope, b.common_slope.slope, 1e-6));
        }
    }

    #[test]
    fn relabelling_groups_changes_only_labels(rows in dataset()) {
        // Same order when sorted as text, so the groups line up one to one.
        let other = ["g1", "g2", "g3"];
        if let (Some(a), Some(b)) = (run(&rows, &LABELS), run(&rows, &other)) {
            for (x, y) in a.groups.iter().zip(&b.groups) {
                prop_assert_eq!(x.slope, y.slope);
                prop_assert_eq!(x.n, y.n);
            }
            prop_assert_eq!(a.equal_slopes.f, b.equal_slopes.f);
            prop_assert_eq!(a.decision.homogeneous, b.decision.homogeneous);
        }
    }
}

/// One cell of a generated file: mostly numbers, sometimes a missing token, a
/// bad cell or a quoted value.
fn cell() -> impl Strategy<Value = String> {
    prop_oneof![
        8 => (-1e3f64..1e3).prop_map(|v| format!("{v}")),
        1 => Just("NA".to_string()),
        1 => prop_oneof![Just("x9"), Just("inf"), Just("\"7\""), Just("")].prop_map(String::from),
    ]
}

/// A generated file: rows of group, x, y with blank lines, short rows and a
/// choice of line end.
fn messy_file() -> impl Strategy<Value = String> {
    let row = (0usize..4, cell(), cell(), 0u8..40).prop_map(|(g, x, y, shape)| {
        let g = ["a", "b", "c", "NA"][g];
        match shape {
            0 => String::new(),      // a blank line
            1 => format!("{g},{x}"), // a short row
            _ => format!("{g},{x},{y}"),
        }
    });
    (prop::collection::vec(row, 0..120), any::<bool>()).prop_map(|(rows, crlf)| {
        let end = if crlf { "\r\n" } else { "\n" };
        let mut text = format!("g,x,y{end}");
        for r in rows {
            text.push_str(&r);
            text.push_str(end);
        }
        text
    })
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 256, .. ProptestConfig::default() })]

    /// Reading a file in two halves on two threads gives what one pass gives:
    /// the same rows, values and drop counts, or the same error (rows and lines
    /// included). Moments are merged, so they agree to rounding.
    #[test]
    fn two_halves_read_as_one_pass(text in messy_file()) {
        let plan = plan::load("p.toml", &PLAN.replace("[model]", "missing = [\"NA\"]\n[model]")).unwrap();
        let bytes = text.as_bytes();
        let len = bytes.len() as u64;
        let open = || Ok(std::io::Cursor::new(bytes));
        let one = data::load_seekable(&plan, len, u64::MAX, open);
        let two = data::load_seekable(&plan, len, 0, open);
        match (one, two) {
            (Err(a), Err(b)) => prop_assert_eq!(a, b),
            (Ok(a), Ok(b)) => {
                prop_assert_eq!(a.rows_read, b.rows_read);
                prop_assert_eq!(&a.dropped, &b.dropped);
                prop_assert_eq!(a.groups.len(), b.groups.len());
                for (g, h) in a.groups.iter().zip(&b.groups) {
                    prop_assert_eq!(&g.level, &h.level);
                    prop_assert_eq!(g.x.to_vec(), h.x.to_vec());
                    prop_assert_eq!(g.y.to_vec(), h.y.to_vec());
                    prop_assert_eq!(g.rows.to_vec(), h.rows.to_vec());
                    prop_assert_eq!(g.moments.n, h.moments.n);
                    prop_assert!(close(g.moments.sxy, h.moments.sxy, 1e-9));
                }
            }
            (a, b) => prop_assert!(false, "one pass {:?}, halves {:?}", a.err(), b.err()),
        }
    }
}
