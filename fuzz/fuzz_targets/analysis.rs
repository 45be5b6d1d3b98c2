//! The whole analysis on small inputs: load, run, render JSON and Markdown. An
//! error is fine; a panic, or a non-finite number anywhere in the results, is not.
#![no_main]

use libfuzzer_sys::fuzz_target;
use slopewise::results::Provenance;
use slopewise::{analysis, data, report};

#[path = "common.rs"]
mod common;

/// Groups beyond this are not analysed here (see below).
const MAX_GROUPS: usize = 6;

fuzz_target!(|input: &[u8]| {
    let Some((selector, bytes)) = common::split(input) else {
        return;
    };
    // Small inputs only: the analysis is linear in rows, and libFuzzer explores
    // shapes faster on short files.
    if bytes.len() > 4096 {
        return;
    }
    let plan = common::plan_for(selector);
    let Ok(dataset) = data::load(&plan, bytes) else {
        return;
    };
    // Tukey–Kramer costs about a millisecond a pair, so many groups would slow the
    // search a hundredfold; tests cover many groups (analysis::tests).
    if dataset.groups.len() > MAX_GROUPS {
        return;
    }
    let results = match analysis::run(&plan, &dataset, Provenance::default()) {
        Ok(r) => r,
        Err(e) => {
            let _ = e.diagnostic().render();
            return;
        }
    };
    if let Some(path) = slopewise::results::first_non_finite(&results) {
        panic!("non-finite number at {path}");
    }
    report::json(&results).expect("results serialize");
    report::markdown(&results, &[]).expect("the report renders");
});
