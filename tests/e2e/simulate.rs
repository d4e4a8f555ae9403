//! `dwell simulate` end to end.

use crate::util::*;

const EXAMPLES: [&str; 4] = [
    "zones-examples/fernhollow-cabin.json",
    "zones-examples/brickworth-house.json",
    "zones-examples/sunbank-bungalow.json",
    "zones-examples/raw-two-mass.json",
];

fn read_csv(path: &std::path::Path) -> (Vec<String>, Vec<Vec<String>>) {
    let mut r = csv::ReaderBuilder::new()
        .comment(Some(b'#'))
        .from_path(path)
        .unwrap();
    let header = r.headers().unwrap().iter().map(String::from).collect();
    let rows = r
        .records()
        .map(|x| x.unwrap().iter().map(String::from).collect())
        .collect();
    (header, rows)
}

#[test]
fn simulate_writes_the_three_files_for_every_example() {
    for ex in EXAMPLES {
        let dir = tempfile::tempdir().unwrap();
        let out = dir.path().join("run");
        let o = dwell(&[
            "simulate",
            ex,
            "--from",
            "2025-02-01",
            "--to",
            "2025-02-07",
            "--out",
            out.to_str().unwrap(),
        ]);
        assert!(o.status.success(), "{ex}: {}", stderr(&o));
        assert!(stdout(&o).contains("energy balance"), "{}", stdout(&o));
        assert!(stdout(&o).contains("caution:"), "{}", stdout(&o));
        // the network's inputs, in order, head inputs.csv
        let net: serde_json::Value =
            serde_json::from_slice(&dwell(&["network", ex, "--json"]).stdout).unwrap();
        let zones: Vec<String> = net["zone_states"]
            .as_object()
            .unwrap()
            .keys()
            .cloned()
            .collect();
        let (h, rows) = read_csv(&out.join("hourly.csv"));
        assert_eq!(h[0], "time");
        assert_eq!(h[1], "outdoor_c");
        assert_eq!(h.len(), 2 + 2 * zones.len());
        for z in &zones {
            assert!(
                h.contains(&format!("{z}_c")) && h.contains(&format!("{z}_heating_w")),
                "{ex}: {z} missing in {h:?}"
            );
        }
        assert_eq!(
            rows.len(),
            7 * 24 + 1,
            "{ex}: a row per hour plus the start instant"
        );
        assert_eq!(rows[0][0], "2025-02-01T00:00+00:00");
        assert_eq!(
            rows[0][3], "",
            "the first row has no heating (no hour ends there)"
        );
        let (hi, irows) = read_csv(&out.join("inputs.csv"));
        let names: Vec<String> = net["inputs"]
            .as_array()
            .unwrap()
            .iter()
            .map(|v| v.as_str().unwrap().to_string())
            .collect();
        assert_eq!(hi[1..], names[..]);
        assert_eq!(irows.len(), rows.len());
        let s: serde_json::Value =
            serde_json::from_slice(&std::fs::read(out.join("summary.json")).unwrap()).unwrap();
        assert!(
            s["energy_balance"]["residual_relative"]
                .as_f64()
                .unwrap()
                .abs()
                < 1e-9
        );
        assert_eq!(s["zones"].as_array().unwrap().len(), zones.len());
        assert!(s["cautions"][0]
            .as_str()
            .unwrap()
            .contains("licensed professional"));
        // no temporary files left behind
        for e in std::fs::read_dir(&out).unwrap() {
            let n = e.unwrap().file_name().into_string().unwrap();
            assert!(!n.contains(".tmp-"), "{n}");
        }
    }
}

#[test]
fn hourly_outdoor_matches_the_weather_and_inputs() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("run");
    let o = dwell(&[
        "simulate",
        EXAMPLES[0],
        "--from",
        "2025-03-01",
        "--to",
        "2025-03-02",
        "--step",
        "15",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let (_, rows) = read_csv(&out.join("hourly.csv"));
    let (_, inputs) = read_csv(&out.join("inputs.csv"));
    let text = std::fs::read_to_string(root().join("weather-samples/harrowmere.csv")).unwrap();
    for (r, i) in rows.iter().zip(&inputs) {
        let line = text
            .lines()
            .find(|l| l.starts_with(&r[0]))
            .unwrap_or_else(|| panic!("{} not in weather", r[0]));
        let air: f64 = line.split(',').nth(1).unwrap().parse().unwrap();
        assert!((r[1].parse::<f64>().unwrap() - air).abs() < 0.006);
        assert!((i[1].parse::<f64>().unwrap() - air).abs() < 0.0006);
    }
}

#[test]
fn simulate_runs_on_real_weather_with_a_plausible_annual_heating() {
    // A public-domain typical-year file shipped with pvlib (NREL TMY3 703165), converted by
    // scripts/ref_sun.py. Plausible band (common practice, degree-hour method): the annual
    // heating of the heated zones within ±30 % of H_heated × Σ max(0, 15.5 °C − θ_e)·1 h, the
    // 15.5 °C base allowing for gains. The file is generated, not committed; `.ci/run` makes
    // it and sets DWELL_REQUIRE_GENERATED=1 so this test cannot pass by skipping there.
    let path = root().join("tests/generated/tmy3_703165_2025.csv");
    if !path.exists() {
        assert!(
            std::env::var("DWELL_REQUIRE_GENERATED").is_err(),
            "missing {}; run scripts/ref_sun.py",
            path.display()
        );
        eprintln!(
            "SKIPPED: {} missing (run scripts/ref_sun.py)",
            path.display()
        );
        return;
    }
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("run");
    let o = dwell(&[
        "simulate",
        "zones-examples/brickworth-house.json",
        "--weather",
        path.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s: serde_json::Value =
        serde_json::from_slice(&std::fs::read(out.join("summary.json")).unwrap()).unwrap();
    let kwh = s["total_heating_kwh"].as_f64().unwrap();
    let check: serde_json::Value = serde_json::from_slice(
        &dwell(&["check", "zones-examples/brickworth-house.json", "--json"]).stdout,
    )
    .unwrap();
    let h_heated: f64 = check["zones"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|z| z["heated"] == true)
        .map(|z| z["total_w_k"].as_f64().unwrap())
        .sum();
    let text = std::fs::read_to_string(&path).unwrap();
    let dh: f64 = text
        .lines()
        .filter(|l| !l.starts_with('#') && !l.starts_with("time"))
        .map(|l| (15.5 - l.split(',').nth(1).unwrap().parse::<f64>().unwrap()).max(0.0))
        .sum();
    let estimate = h_heated * dh / 1000.0;
    assert!(
        kwh > 0.7 * estimate && kwh < 1.3 * estimate,
        "{kwh} kWh vs degree-hour estimate {estimate}"
    );
    // the weather is for another place: the run says so
    assert!(stdout(&o).contains("weather file is for"), "{}", stdout(&o));
}

#[test]
fn bad_options_exit_2_and_write_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("run");
    let o = dwell(&[
        "simulate",
        EXAMPLES[0],
        "--step",
        "7",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("7 minutes is not allowed"),
        "{}",
        stderr(&o)
    );
    assert!(!out.exists(), "nothing written on bad input");
    let o = dwell(&[
        "simulate",
        EXAMPLES[0],
        "--from",
        "2030-01-01",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2));
    let bad = dir.path().join("bad.csv");
    std::fs::write(
        &bad,
        "time,air_c\n2025-01-01T00:00+00:00,1\n2025-01-01T02:00+00:00,2\n",
    )
    .unwrap();
    let o = dwell(&[
        "simulate",
        EXAMPLES[0],
        "--weather",
        bad.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    assert!(stderr(&o).contains("bad.csv"), "{}", stderr(&o));
    assert!(!out.exists(), "nothing written on bad input");
}

#[test]
fn weather_sun_takes_the_site_from_a_model() {
    // The irradiance `dwell weather sun --model` prints for the south wall of a model is what
    // the model receives: inputs.csv of a simulation holds the same plane irradiance.
    let dir = tempfile::tempdir().unwrap();
    let sun = dir.path().join("sun.csv");
    let o = dwell(&[
        "weather",
        "sun",
        "--model",
        EXAMPLES[0],
        "--tilt",
        "90",
        "--azimuth",
        "180",
        "--out",
        sun.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let out = dir.path().join("run");
    let o = dwell(&[
        "simulate",
        EXAMPLES[0],
        "--from",
        "2025-06-01",
        "--to",
        "2025-06-02",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let (h, rows) = read_csv(&out.join("inputs.csv"));
    let col = h
        .iter()
        .position(|c| c == "sun_tilt90_az180_w_m2")
        .expect("south wall input");
    let (sh, srows) = read_csv(&sun);
    let total = sh
        .iter()
        .position(|c| c == "plane_w_m2")
        .expect("a plane irradiance column");
    // inputs.csv: heat flows over the hour starting at the stamp = irradiance of the hour
    // ending at the next stamp
    let mut compared = 0;
    for w in rows.windows(2) {
        let next = &w[1][0];
        if let Some(s) = srows.iter().find(|r| &r[0] == next) {
            let a: f64 = w[0][col].parse().unwrap();
            let b: f64 = s[total].parse().unwrap();
            // the sun CSV prints one decimal, inputs.csv three
            assert!((a - b).abs() <= 0.0505, "{next}: {a} vs {b}");
            compared += 1;
        }
    }
    assert!(compared >= 47, "{compared}");
    let o = dwell(&[
        "weather",
        "sun",
        "--model",
        "no-such.json",
        "--tilt",
        "90",
        "--azimuth",
        "180",
    ]);
    assert_eq!(o.status.code(), Some(2));
}
