//! End-to-end runs of `size`, `setback`, `outage` and `compare` on the shipped examples, and
//! their bad-input errors.

use crate::util::{dwell, stderr, stdout};

fn tmp() -> tempfile::TempDir {
    tempfile::tempdir().unwrap()
}

#[test]
fn size_writes_sizing_json_with_units_and_the_caution() {
    let d = tmp();
    let out = d.path().join("s");
    let o = dwell(&[
        "size",
        "zones-examples/brickworth-house.json",
        "--design-temp",
        "-4",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(stdout(&o).contains("licensed professional"));
    let j: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("sizing.json")).unwrap()).unwrap();
    let z = &j["zones"][0];
    for k in ["steady_w", "dynamic_w", "recommended_w", "breakdown"] {
        assert!(!z[k].is_null(), "{k}");
    }
    assert!(
        j["total"]["recommended_w"].as_f64().unwrap() >= j["total"]["steady_w"].as_f64().unwrap()
    );
    assert!(std::fs::read_to_string(out.join("sizing.csv"))
        .unwrap()
        .starts_with("zone,heated,steady_w"));
}

#[test]
fn setback_and_outage_run_on_the_examples() {
    let d = tmp();
    let out = d.path().join("sb");
    let o = dwell(&[
        "setback",
        "zones-examples/brickworth-house.json",
        "--from",
        "2025-01-13",
        "--to",
        "2025-01-15",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let j: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("setback.json")).unwrap()).unwrap();
    assert_eq!(j["nights"].as_array().unwrap().len(), 2);
    assert!(j["total_saving_kwh"].as_f64().unwrap() > 0.0);
    let out = d.path().join("o");
    let o = dwell(&[
        "outage",
        "zones-examples/sunbank-bungalow.json",
        "--design-temp",
        "-5",
        "--start",
        "18:00",
        "--hours",
        "12",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(stdout(&o).contains("common practice"));
    assert!(out.join("outage_path.csv").exists());
}

#[test]
fn compare_runs_variants_and_a_grid_base_first() {
    let d = tmp();
    let out = d.path().join("c");
    let v = "zones-examples/variants/";
    let o = dwell(&[
        "compare",
        "zones-examples/brickworth-house.json",
        "--variant",
        &format!("draught={v}brickworth-draught-proofing.json"),
        "--grid",
        &format!("loft=-,{v}brickworth-loft-300mm.json"),
        "--cost",
        "draught=600",
        "--from",
        "2025-01-06",
        "--to",
        "2025-01-12",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let csv = std::fs::read_to_string(out.join("compare.csv")).unwrap();
    let rows: Vec<&str> = csv.lines().collect();
    assert_eq!(rows.len(), 1 + 4);
    assert!(rows[1].starts_with("base,"));
    let j: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("compare.json")).unwrap()).unwrap();
    let heat: Vec<f64> = j["rows"].as_array().unwrap()[1..]
        .iter()
        .map(|r| r["heating_kwh"].as_f64().unwrap())
        .collect();
    assert!(heat.windows(2).all(|w| w[0] <= w[1]), "{heat:?}");
}

#[test]
fn bad_inputs_exit_2_and_name_the_place() {
    let d = tmp();
    let out = d.path().join("x");
    let o = dwell(&[
        "compare",
        "zones-examples/brickworth-house.json",
        "--variant",
        "a=no/such.json",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("variant a: cannot read no/such.json"),
        "{}",
        stderr(&o)
    );
    let bad = d.path().join("bad.json");
    std::fs::write(
        &bad,
        r#"{"zones": [{"id": "downstairs", "floor_area_m2": -5, "volume_m3": 10}]}"#,
    )
    .unwrap();
    let o = dwell(&[
        "compare",
        "zones-examples/brickworth-house.json",
        "--variant",
        &format!("broken={}", bad.display()),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("variant broken: zones-examples/brickworth-house.json + "),
        "{}",
        stderr(&o)
    );
    let o = dwell(&[
        "outage",
        "zones-examples/brickworth-house.json",
        "--design-temp",
        "-4",
        "--start",
        "18:00",
        "--hours",
        "6",
        "--frost-below",
        "14",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("--frost-below 14"), "{}", stderr(&o));
    let o = dwell(&[
        "size",
        "zones-examples/brickworth-house.json",
        "--design-temp",
        "-4",
        "--recovery",
        "0",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("--recovery 0 h is outside"),
        "{}",
        stderr(&o)
    );
    assert!(!out.exists(), "no output folder for failed runs");
}
