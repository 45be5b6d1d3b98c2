//! CSV loading on arbitrary bytes under a plan chosen by the first byte. Besides
//! "no panic", a differential check: reading in two halves on two threads gives
//! exactly what one pass gives (rows, values, drop counts or the same error).
#![no_main]

use libfuzzer_sys::fuzz_target;
use slopewise::data;
use std::io::Cursor;

#[path = "common.rs"]
mod common;

fuzz_target!(|input: &[u8]| {
    let Some((selector, bytes)) = common::split(input) else {
        return;
    };
    let plan = common::plan_for(selector);
    let len = bytes.len() as u64;
    let open = || Ok(Cursor::new(bytes));
    let one = data::load_seekable(&plan, len, u64::MAX, open);
    let two = data::load_seekable(&plan, len, 0, open);
    match (&one, &two) {
        (Err(a), Err(b)) => {
            assert_eq!(a, b);
            let _ = a.diagnostic().render();
        }
        (Ok(a), Ok(b)) => {
            assert_eq!(a.rows_read, b.rows_read);
            assert_eq!(a.dropped, b.dropped);
            assert_eq!(a.groups.len(), b.groups.len());
            for (g, h) in a.groups.iter().zip(&b.groups) {
                assert_eq!(g.level, h.level);
                assert_eq!(g.x.to_vec(), h.x.to_vec());
                assert_eq!(g.y.to_vec(), h.y.to_vec());
                assert_eq!(g.rows.to_vec(), h.rows.to_vec());
                assert_eq!(g.moments.n, h.moments.n);
                assert!(g.x.iter().chain(g.y.iter()).all(f64::is_finite));
            }
        }
        _ => panic!("one pass {:?}, halves {:?}", one.err(), two.err()),
    }
});
