//! `dwell calibrate` on the shipped invented data.

use crate::util::{dwell, stderr, stdout};

#[test]
fn calibrate_recovers_the_invented_terrace_and_writes_a_model_simulate_accepts() {
    let tmp = tempfile::tempdir().unwrap();
    let out = tmp.path().join("fit");
    let o = dwell(&[
        "calibrate",
        "zones-examples/measured/invented-terrace-30min.csv",
        "--order",
        "2",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let rep: serde_json::Value =
        serde_json::from_slice(&std::fs::read(out.join("calibration.json")).unwrap()).unwrap();
    // Truth written in the data file's header (invented): HLC 180 W/K; acceptance 5 % (issue 7).
    let hlc = rep["hlc_w_k"]["value"].as_f64().unwrap();
    assert!((hlc / 180.0 - 1.0).abs() < 0.05, "{hlc}");
    assert!(
        rep["hlc_w_k"]["lo95"].as_f64().unwrap() < hlc
            && hlc < rep["hlc_w_k"]["hi95"].as_f64().unwrap()
    );
    assert!(stdout(&o).contains("heat-loss coefficient"));
    for f in ["model.json", "fitted.csv", "fit.svg"] {
        assert!(out.join(f).exists(), "{f}");
    }
    let model = out.join("model.json");
    let o = dwell(&["check", model.to_str().unwrap()]);
    assert!(o.status.success(), "{}", stderr(&o));
    let sim = tmp.path().join("sim");
    let o = dwell(&[
        "simulate",
        model.to_str().unwrap(),
        "--from",
        "2025-01-06",
        "--to",
        "2025-01-12",
        "--out",
        sim.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
}

#[test]
fn bad_measured_data_names_file_and_line_and_leaves_no_output() {
    let tmp = tempfile::tempdir().unwrap();
    let data = tmp.path().join("m.csv");
    std::fs::write(&data, "time,indoor_c,outdoor_c,heating_w\n2025-01-06T00:00+00:00,20,5,1\n2025-01-06T00:30+00:00,20,five,1\n").unwrap();
    let out = tmp.path().join("fit");
    let o = dwell(&[
        "calibrate",
        data.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("m.csv:3: outdoor_c: `five` is not a number"),
        "{}",
        stderr(&o)
    );
    assert!(!out.exists());
}
