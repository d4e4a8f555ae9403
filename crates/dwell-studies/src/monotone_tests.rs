//! Monotone physics as property tests (seeded, few cases, one week of weather each).
//!
//! The network is a positive system: `K` is an M-matrix, so `e^{tA}` and the input maps are
//! entrywise non-negative and more heat or a warmer boundary never cools any node. Hence:
//! more insulation never raises heating, and a deeper setback (a lower night setpoint) never
//! raises heating. "A shorter recovery time never lowers the required capacity" is checked
//! in `size::tests`.

use proptest::prelude::*;
use proptest::test_runner::{Config, RngAlgorithm, TestRng, TestRunner};

use crate::simulate::{simulate, SimOptions};

fn box_model(wool_m: f64, night_c: f64) -> String {
    format!(
        r#"{{
      "materials": [
        {{"id": "brick", "conductivity_w_mk": 0.77, "density_kg_m3": 1700, "specific_heat_j_kgk": 800}},
        {{"id": "wool", "conductivity_w_mk": 0.04, "density_kg_m3": 25, "specific_heat_j_kgk": 1030}}
      ],
      "constructions": [{{"id": "wall", "layers": [{{"material": "brick", "thickness_m": 0.1}}, {{"material": "wool", "thickness_m": {wool_m}}}, {{"material": "brick", "thickness_m": 0.1}}]}}],
      "zones": [{{"id": "room", "floor_area_m2": 30, "volume_m3": 75}}],
      "opaque": [{{"id": "walls", "construction": "wall", "zone": "room", "other_side": "outdoor", "area_m2": 60}}],
      "openings": [{{"id": "win", "zone": "room", "area_m2": 5, "u_value_w_m2k": 1.4, "g_value": 0.6}}],
      "airflows": [{{"id": "air", "zone": "room", "air_changes_per_h": 0.5}}],
      "schedules": [{{"id": "sp", "base": {night_c}, "periods": [{{"days": ["daily"], "from": "07:00", "to": "23:00", "value": 20}}]}}],
      "heaters": [{{"id": "h", "zone": "room", "capacity_w": 4000, "setpoint_schedule": "sp"}}]
    }}"#
    )
}

fn heating_kwh(wool_m: f64, night_c: f64) -> f64 {
    let text = box_model(wool_m, night_c);
    let m = dwell_model::parse_model(&text, "box.json").unwrap();
    let h = dwell_model::compile(&m, "box.json").unwrap();
    let w = dwell_weather::default_weather();
    let opts = SimOptions {
        from: chrono::NaiveDate::from_ymd_opt(2025, 1, 6),
        to: chrono::NaiveDate::from_ymd_opt(2025, 1, 12),
        warmup_days: 3,
        ..SimOptions::default()
    };
    simulate(&m, &h, &w, &opts)
        .unwrap()
        .summary
        .total_heating_kwh
}

fn runner() -> TestRunner {
    TestRunner::new_with_rng(
        Config {
            cases: 6,
            failure_persistence: None,
            ..Config::default()
        },
        TestRng::from_seed(RngAlgorithm::ChaCha, &[7; 32]),
    )
}

#[test]
fn more_insulation_never_raises_heating() {
    runner()
        .run(&(0.0f64..0.2, 0.001f64..0.1), |(t, extra)| {
            let thin = heating_kwh(t, 16.0);
            let thick = heating_kwh(t + extra, 16.0);
            prop_assert!(
                thick <= thin + 1e-9 * thin.max(1.0),
                "{t} m: {thin} kWh; {} m: {thick} kWh",
                t + extra
            );
            Ok(())
        })
        .unwrap();
}

#[test]
fn deeper_setback_never_raises_heating() {
    runner()
        .run(&(10.0f64..20.0, 0.1f64..5.0), |(night, deeper)| {
            let shallow = heating_kwh(0.05, night);
            let deep = heating_kwh(0.05, night - deeper);
            prop_assert!(
                deep <= shallow + 1e-9 * shallow.max(1.0),
                "night {night}: {shallow} kWh; night {}: {deep} kWh",
                night - deeper
            );
            Ok(())
        })
        .unwrap();
}
