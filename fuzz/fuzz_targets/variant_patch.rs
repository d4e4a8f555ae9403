//! Any bytes as a JSON Merge Patch on an example house: patching, validating and compiling must
//! return `Ok` or an error, never panic.
#![no_main]

use libfuzzer_sys::fuzz_target;

const BASE: &str = include_str!("../../zones-examples/fernhollow-cabin.json");

fuzz_target!(|data: &[u8]| {
    let Ok(patch) = serde_json::from_slice::<serde_json::Value>(data) else { return };
    let mut model: serde_json::Value = serde_json::from_str(BASE).expect("the example is JSON");
    dwell_model::patch::merge_patch(&mut model, &patch);
    if let Ok(m) = dwell_model::from_value(model, "cabin + fuzz patch") {
        let _ = dwell_model::compile(&m, "cabin + fuzz patch");
    }
});
