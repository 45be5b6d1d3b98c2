//! Times the t and F quantiles over the grid of issue 19 (df 1 to 1e12, upper
//! tails 0.5 to 1e-100) and writes the slowest call per distribution into a
//! section of bench/RESULTS.md (between the markers below; the rest of the file is
//! bench/run.sh's). Timing stays out of the test suite; the bound the tests rely on
//! is the solver's fixed cap on steps and terms (`stats::dist::MAX_STEPS`,
//! `MAX_TERMS`).
//!
//!     cargo run --release --example quantile_timing

use std::time::Instant;

use slopewise::stats::dist::{MAX_STEPS, MAX_TERMS, f_upper_quantile, t_upper_quantile};

const BEGIN: &str = "<!-- quantile timing: examples/quantile_timing.rs -->";
const END: &str = "<!-- end quantile timing -->";

fn slowest(f: impl Fn(f64, f64) -> f64, dfs: &[f64], ps: &[f64]) -> (f64, f64, f64) {
    let mut worst = (0.0, 0.0, 0.0);
    for &df in dfs {
        for &p in ps {
            // Best of 20 calls, so one descheduling does not count as the call's time.
            let mut best = f64::INFINITY;
            for _ in 0..20 {
                let t0 = Instant::now();
                std::hint::black_box(f(std::hint::black_box(p), df));
                best = best.min(t0.elapsed().as_secs_f64());
            }
            if best > worst.0 {
                worst = (best, df, p);
            }
        }
    }
    worst
}

fn main() {
    let dfs = [1.0, 2.0, 10.0, 1e3, 1e6, 1e8, 1e10, 1e12];
    let ps = [0.5, 0.025, 1e-6, 1e-12, 1e-100];
    let t = slowest(|p, df| t_upper_quantile(p.min(0.5), df), &dfs, &ps);
    let mut f = (0.0, 0.0, 0.0, 0.0);
    for d1 in [1.0, 2.0, 3.0, 8.0] {
        let w = slowest(|p, d2| f_upper_quantile(p.min(0.5), d1, d2), &dfs, &ps);
        if w.0 > f.0 {
            f = (w.0, d1, w.1, w.2);
        }
    }
    let section = format!(
        "{BEGIN}\n## Quantile timing\n\nSlowest single call (best of 20) over df {{1, 2, 10, 1e3, 1e6, 1e8, 1e10, 1e12}} \
         × upper tail {{0.5, 0.025, 1e-6, 1e-12, 1e-100}} (F: numerator df {{1, 2, 3, 8}}); \
         the solver is capped at {MAX_STEPS} steps of at most {MAX_TERMS} fraction terms.\n\n\
         | quantile | slowest call | at | target | |\n|---|---|---|---|---|\n\
         | t | {:.1} µs | df {:e}, p {:e} | < 1 ms | {} |\n\
         | F | {:.1} µs | df ({}, {:e}), p {:e} | < 1 ms | {} |\n{END}\n",
        t.0 * 1e6,
        t.1,
        t.2,
        if t.0 < 1e-3 { "pass" } else { "FAIL" },
        f.0 * 1e6,
        f.1,
        f.2,
        f.3,
        if f.0 < 1e-3 { "pass" } else { "FAIL" },
    );
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/bench/RESULTS.md");
    let old = std::fs::read_to_string(path).unwrap_or_default();
    let kept = match (old.find(BEGIN), old.find(END)) {
        (Some(a), Some(b)) if b > a => {
            format!("{}{}", &old[..a], &old[b + END.len()..].trim_start())
        }
        _ => old,
    };
    let new = format!("{}\n\n{section}", kept.trim_end());
    std::fs::write(path, new).expect("write bench/RESULTS.md");
    print!("{section}");
}
