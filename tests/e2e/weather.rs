//! `dwell weather …` end to end.

use crate::util::{dwell, dwell_in, root, stderr, stdout};

/// Splits a command line on spaces, keeping "double-quoted" words together.
fn split_command(s: &str) -> Vec<String> {
    let mut out = Vec::new();
    let mut cur = String::new();
    let mut quoted = false;
    for c in s.chars() {
        match c {
            '"' => quoted = !quoted,
            ' ' if !quoted => {
                if !cur.is_empty() {
                    out.push(std::mem::take(&mut cur));
                }
            }
            c => cur.push(c),
        }
    }
    if !cur.is_empty() {
        out.push(cur);
    }
    out
}

#[test]
fn summary_of_the_default_weather() {
    let o = dwell(&["weather", "summary"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s = stdout(&o);
    assert!(
        s.starts_with("weather: built-in default weather harrowmere.csv (invented climate)\n"),
        "{s}"
    );
    assert!(s.contains("hours: 8760 (one full year)\n"), "{s}");
    assert!(s.contains("design temperature (99.6 % annual"), "{s}");
    assert_eq!(
        s.lines()
            .filter(|l| l.ends_with(" 2025") || l.contains(" 2025 "))
            .count(),
        12,
        "{s}"
    );
}

#[test]
fn summary_json_of_each_sample() {
    for f in ["harrowmere.csv", "kolvask.csv", "brightcol.csv"] {
        let o = dwell(&[
            "weather",
            "summary",
            &format!("weather-samples/{f}"),
            "--json",
        ]);
        assert!(o.status.success(), "{}", stderr(&o));
        let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
        assert_eq!(v["hours"], 8760);
        assert_eq!(v["months"].as_array().unwrap().len(), 12);
        assert_eq!(v["hdd_base_c"], 15.5);
    }
}

#[test]
fn bad_weather_exits_2_and_names_the_line() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("bad.csv"),
        "time,air_c\n2025-01-01T01:00+00:00,1\n2025-01-01T01:00+00:00,2\n",
    )
    .unwrap();
    let o = dwell_in(dir.path(), &["weather", "summary", "bad.csv"]);
    assert_eq!(o.status.code(), Some(2));
    assert_eq!(
        stderr(&o),
        "error: bad.csv:3: time stamp 2025-01-01T01:00+00:00 duplicates line 2; remove one of the two rows\n"
    );
}

#[test]
fn foreign_file_with_column_mapping_and_units() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("f.csv"),
        "stamp,T_F,G_kJ,other\n2025-06-01T13:00,50,360,x\n2025-06-01T14:00,41,0,y\n",
    )
    .unwrap();
    let o = dwell_in(
        dir.path(),
        &[
            "weather",
            "summary",
            "f.csv",
            "--time-col",
            "stamp",
            "--air-col",
            "T_F",
            "--ghi-col",
            "G_kJ",
            "--temp-unit",
            "F",
            "--irradiance-unit",
            "kJ/m2",
            "--assume-offset",
            "+02:00",
            "--json",
        ],
    );
    assert!(o.status.success(), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    // (50 − 32)/1.8 = 10 °C and (41 − 32)/1.8 = 5 °C → mean 7.5; 360 kJ/m² = 0.1 kWh/m².
    assert!((v["mean_air_c"].as_f64().unwrap() - 7.5).abs() < 1e-9);
    assert!((v["ghi_kwh_m2"].as_f64().unwrap() - 0.1).abs() < 1e-9);
}

#[test]
fn sun_csv_for_a_south_wall() {
    let o = dwell(&[
        "weather",
        "sun",
        "weather-samples/kolvask.csv",
        "--tilt",
        "90",
        "--azimuth",
        "180",
        "--sky",
        "isotropic",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s = stdout(&o);
    let data: Vec<&str> = s.lines().filter(|l| !l.starts_with('#')).collect();
    assert_eq!(data[0], "time,zenith_deg,azimuth_deg,plane_w_m2,beam_w_m2,sky_diffuse_w_m2,ground_reflected_w_m2,incidence_deg");
    assert_eq!(data.len(), 8761);
    assert!(
        s.lines()
            .next()
            .unwrap()
            .contains("latitude 56 longitude 38"),
        "site from the file's metadata"
    );
    // Every hour: plane = beam + sky + ground (to the printed rounding, 0.15 W/m²).
    for l in &data[1..] {
        let f: Vec<f64> = l.split(',').skip(1).map(|x| x.parse().unwrap()).collect();
        assert!((f[2] - f[3] - f[4] - f[5]).abs() < 0.15, "{l}");
    }
}

#[test]
fn sun_needs_a_site() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("w.csv"),
        "time,air_c\n2025-01-01T01:00+00:00,1\n",
    )
    .unwrap();
    let o = dwell_in(
        dir.path(),
        &[
            "weather",
            "sun",
            "w.csv",
            "--tilt",
            "90",
            "--azimuth",
            "180",
        ],
    );
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).starts_with("error: w.csv: no site; give --lat and --lon"),
        "{}",
        stderr(&o)
    );
    let o = dwell_in(
        dir.path(),
        &[
            "weather",
            "sun",
            "w.csv",
            "--lat",
            "95",
            "--lon",
            "0",
            "--tilt",
            "90",
            "--azimuth",
            "180",
        ],
    );
    assert_eq!(o.status.code(), Some(2));
    assert_eq!(
        stderr(&o),
        "error: latitude = 95 is outside -90 … 90 degrees\n"
    );
    let o = dwell_in(
        dir.path(),
        &[
            "weather",
            "sun",
            "w.csv",
            "--lat",
            "-33.9",
            "--lon",
            "18.4",
            "--tilt",
            "90",
            "--azimuth",
            "0",
        ],
    );
    assert!(o.status.success(), "{}", stderr(&o));
}

#[test]
fn synth_reproduces_each_shipped_sample_from_its_header_command() {
    let dir = tempfile::tempdir().unwrap();
    for f in ["harrowmere.csv", "kolvask.csv", "brightcol.csv"] {
        let shipped = std::fs::read_to_string(root().join("weather-samples").join(f)).unwrap();
        let cmd = shipped
            .lines()
            .find_map(|l| l.strip_prefix("# command: "))
            .expect("command line");
        let mut args = split_command(cmd);
        assert_eq!(&args[..3], &["dwell", "weather", "synth"]);
        args.remove(0);
        args.push("--out".into());
        args.push("out.csv".into());
        let args: Vec<&str> = args.iter().map(String::as_str).collect();
        let o = dwell_in(dir.path(), &args);
        assert!(o.status.success(), "{}", stderr(&o));
        let made = std::fs::read_to_string(dir.path().join("out.csv")).unwrap();
        assert!(
            made == shipped,
            "{f}: the command in its header does not reproduce it"
        );
    }
    // Nothing but the output is left in the folder (the write goes through a temporary file).
    let names: Vec<_> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name())
        .collect();
    assert_eq!(names, vec![std::ffi::OsString::from("out.csv")]);
}

#[test]
fn synth_rejects_bad_parameters_and_writes_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let o = dwell_in(
        dir.path(),
        &["weather", "synth", "--cloudiness", "1.5", "--out", "x.csv"],
    );
    assert_eq!(o.status.code(), Some(2));
    assert_eq!(
        stderr(&o),
        "error: --cloudiness = 1.5 is outside 0.01 … 0.99\n"
    );
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 0);
}

#[test]
fn real_tmy3_weather_summary() {
    // pvlib's public-domain TMY3 sample 703165TY, converted by scripts/ref_sun.py (git-ignored;
    // CI runs the script first and sets DWELL_REQUIRE_GENERATED=1).
    let path = root().join("tests/generated/tmy3_703165_2025.csv");
    if !path.exists() {
        assert!(
            std::env::var_os("DWELL_REQUIRE_GENERATED").is_none(),
            "run scripts/ref_sun.py"
        );
        eprintln!("SKIPPED: {} not found", path.display());
        return;
    }
    let o = dwell(&["weather", "summary", path.to_str().unwrap(), "--json"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    assert_eq!(v["hours"], 8760);
    // pandas: data.temp_air.mean() = 4.420651 °C for this file.
    assert!((v["mean_air_c"].as_f64().unwrap() - 4.420651).abs() < 1e-5);
}
