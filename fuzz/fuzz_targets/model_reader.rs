//! Any bytes as a model file: reading and compiling must return `Ok` or an error, never panic.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    if let Ok(model) = dwell_model::parse_model(text, "fuzz.json") {
        let _ = dwell_model::compile(&model, "fuzz.json");
    }
});
