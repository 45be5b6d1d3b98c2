//! Plan parsing and validation on arbitrary text: an error or a plan, never a
//! panic, and every error renders with its span inside the source.
#![no_main]

use libfuzzer_sys::fuzz_target;
use slopewise::plan;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    if let Err(e) = plan::load("fuzz.toml", text) {
        let d = e.diagnostic();
        // Rendering must not panic, whatever the span.
        let _ = d.render();
    }
});
