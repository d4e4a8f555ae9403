//! The sizing capacity curve: physics it must obey.

use std::path::PathBuf;

use dwell_studies::size::{size, SizeOptions};

#[test]
fn unmet_hours_fall_as_capacity_rises_and_vanish_at_the_dynamic_requirement() {
    let path = PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("../../zones-examples/brickworth-house.json");
    let m = dwell_model::read_model(&path).unwrap();
    let h = dwell_model::compile(&m, "brickworth").unwrap();
    let s = size(
        &m,
        &h,
        None,
        &SizeOptions {
            design_c: -4.0,
            ..SizeOptions::default()
        },
    )
    .unwrap();
    let c = &s.capacity_curve;
    assert_eq!(c.len(), dwell_studies::size::CAPACITY_FRACTIONS.len());
    // more capacity never leaves more occupied hours below the band (linear model, thermostat
    // saturating less)
    for w in c.windows(2) {
        assert!(w[1].total_capacity_w > w[0].total_capacity_w);
        assert!(
            w[1].occupied_hours_below_h <= w[0].occupied_hours_below_h,
            "{:?}",
            c
        );
    }
    // at the dynamic requirement the comfort test passes: no hour below; 5 % less fails it
    let at = |f: f64| {
        c.iter()
            .find(|p| (p.fraction - f).abs() < 1e-12)
            .unwrap()
            .occupied_hours_below_h
    };
    assert_eq!(at(1.0), 0, "{c:?}");
    assert!(at(0.95) > 0, "{c:?}");
    assert!(at(0.4) > at(0.95), "{c:?}");
}
