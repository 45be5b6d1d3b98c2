//! The data stage's per-group moments are the exact moments of the doubles read,
//! rounded once: on invented adversarial data (offsets of 1e15 and 1e12, values
//! near 1e-8, spreads of 1e-3 at 1e8, mixed signs and magnitudes), each of n, the
//! means, Sxx, Syy, Sxy and the covariate range within 1 ulp of the value Python's
//! exact fractions give (tests/reference/generate_exact_moments.py, numpy pinned
//! there; the correctly rounded values that math.fsum-style summation aims at).
//! Also: the same moments whatever the row order of the groups' interleaving, and
//! when the file is read in two halves.

use std::path::{Path, PathBuf};

use serde_json::Value;
use slopewise::{data, plan};

fn root() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).to_path_buf()
}

/// Distance in units in the last place between two doubles of the same sign (0 when
/// they are equal, including 0 and −0).
fn ulps(a: f64, b: f64) -> u64 {
    if a == b {
        return 0;
    }
    if a.signum() != b.signum() {
        return u64::MAX;
    }
    a.abs().to_bits().abs_diff(b.abs().to_bits())
}

fn plan() -> plan::Plan {
    plan::load(
        "plan.toml",
        "title = \"Exact moments (invented data)\"\n[data]\npath = \"d.csv\"\n[model]\nresponse = \"y\"\ncovariate = \"x\"\ngroup = \"g\"\n",
    )
    .unwrap()
}

#[test]
fn moments_are_the_exact_ones_rounded_once() {
    let bytes = std::fs::read(root().join("tests/reference/data/adversarial_moments.csv")).unwrap();
    let reference: Value = serde_json::from_str(
        &std::fs::read_to_string(root().join("tests/reference/exact_moments.json")).unwrap(),
    )
    .unwrap();
    let dataset = data::load(&plan(), &bytes).unwrap();
    let groups = reference["groups"].as_object().unwrap();
    assert_eq!(dataset.groups.len(), groups.len());
    for g in &dataset.groups {
        let want = &groups[&g.level];
        let m = g.moments;
        assert_eq!(m.n, want["n"].as_u64().unwrap(), "{}", g.level);
        for (name, got) in [
            ("mean_x", m.mean_x),
            ("mean_y", m.mean_y),
            ("sxx", m.sxx),
            ("syy", m.syy),
            ("sxy", m.sxy),
            ("min_x", m.min_x),
            ("max_x", m.max_x),
        ] {
            let exact = want[name].as_f64().unwrap();
            assert!(
                ulps(got, exact) <= 1,
                "group {} {name}: {got:e} against the exact {exact:e} ({} ulps)",
                g.level,
                ulps(got, exact)
            );
        }
    }
}

#[test]
fn moments_do_not_depend_on_how_the_file_is_read() {
    let bytes = std::fs::read(root().join("tests/reference/data/adversarial_moments.csv")).unwrap();
    let whole = data::load(&plan(), &bytes).unwrap();
    // Read in two halves (the large-file path), with the threshold forced to zero.
    let halves = data::load_seekable(&plan(), bytes.len() as u64, 0, || {
        Ok(std::io::Cursor::new(bytes.clone()))
    })
    .unwrap();
    // The columns are held in chunks cut where the halves meet, so the groups are
    // compared by what they hold: labels, moments, and every point with its row.
    assert_eq!(whole.groups.len(), halves.groups.len());
    for (a, b) in whole.groups.iter().zip(&halves.groups) {
        assert_eq!(a.level, b.level);
        assert_eq!(a.moments, b.moments, "{}", a.level);
        let pa: Vec<_> = a.rows_with_points().collect();
        let pb: Vec<_> = b.rows_with_points().collect();
        assert_eq!(pa, pb, "{}", a.level);
    }
    assert_eq!(whole.rows_read, halves.rows_read);
}
