//! One test per kind of bad weather input, with the message the user sees; plus the unit
//! options and gap filling that turn some of them into good input.

use dwell_weather::{
    parse_weather, read_weather, ColumnMap, IrradianceUnit, ReadOptions, TemperatureUnit,
    WeatherError,
};

const HEAD: &str = "time,air_c,ghi_w_m2,dhi_w_m2\n";

fn rows(lines: &[&str]) -> String {
    let mut s = HEAD.to_string();
    for l in lines {
        s.push_str(l);
        s.push('\n');
    }
    s
}

fn err(text: &str) -> WeatherError {
    err_with(text, &ReadOptions::default())
}

fn err_with(text: &str, opts: &ReadOptions) -> WeatherError {
    parse_weather(text, "w.csv", opts).expect_err("the input is bad")
}

#[test]
fn good_file_reads() {
    let w = parse_weather(
        &rows(&[
            "2025-01-01T01:00+01:00,1.5,0,0",
            "2025-01-01T02:00+01:00,1.0,0,0",
        ]),
        "w.csv",
        &ReadOptions::default(),
    )
    .unwrap();
    assert_eq!(w.len(), 2);
    assert_eq!(w.filled_hours, 0);
    assert!(w.dni_w_m2.is_none());
    assert_eq!(w.air_c, vec![1.5, 1.0]);
}

#[test]
fn missing_hours() {
    let t = rows(&[
        "2025-01-01T01:00+00:00,1,0,0",
        "2025-01-01T04:00+00:00,4,0,0",
    ]);
    let e = err(&t);
    assert!(
        matches!(
            e,
            WeatherError::MissingHours {
                line: 3,
                missing: 2,
                ..
            }
        ),
        "{e:?}"
    );
    assert_eq!(
        e.to_string(),
        "w.csv:3: 2 hour(s) missing between 2025-01-01T01:00+00:00 and 2025-01-01T04:00+00:00; \
         add the rows, or fill gaps linearly with --fill-gaps 2"
    );
}

#[test]
fn missing_hours_filled_when_asked_and_counted() {
    let t = rows(&[
        "2025-01-01T01:00+00:00,1,0,0",
        "2025-01-01T04:00+00:00,4,30,30",
    ]);
    let w = parse_weather(
        &t,
        "w.csv",
        &ReadOptions {
            fill_gaps_max_h: Some(2),
            ..Default::default()
        },
    )
    .unwrap();
    assert_eq!(w.len(), 4);
    assert_eq!(w.filled_hours, 2);
    assert_eq!(w.air_c, vec![1.0, 2.0, 3.0, 4.0]);
    assert_eq!(w.ghi_w_m2.unwrap(), vec![0.0, 10.0, 20.0, 30.0]);
}

#[test]
fn gap_longer_than_the_fill_limit() {
    let t = rows(&[
        "2025-01-01T01:00+00:00,1,0,0",
        "2025-01-01T05:00+00:00,4,0,0",
    ]);
    let e = err_with(
        &t,
        &ReadOptions {
            fill_gaps_max_h: Some(2),
            ..Default::default()
        },
    );
    assert!(
        e.to_string()
            .ends_with("the gap is longer than --fill-gaps 2 allows: add the rows"),
        "{e}"
    );
}

#[test]
fn duplicated_stamp() {
    let t = rows(&[
        "2025-01-01T01:00+00:00,1,0,0",
        "2025-01-01T01:00+00:00,1,0,0",
    ]);
    let e = err(&t);
    assert!(
        matches!(
            e,
            WeatherError::Duplicate {
                line: 3,
                first_line: 2,
                ..
            }
        ),
        "{e:?}"
    );
    assert_eq!(
        e.to_string(),
        "w.csv:3: time stamp 2025-01-01T01:00+00:00 duplicates line 2; remove one of the two rows"
    );
}

#[test]
fn out_of_order_stamp() {
    let t = rows(&[
        "2025-01-01T02:00+00:00,1,0,0",
        "2025-01-01T01:00+00:00,1,0,0",
    ]);
    let e = err(&t);
    assert!(
        matches!(e, WeatherError::OutOfOrder { line: 3, .. }),
        "{e:?}"
    );
}

#[test]
fn daylight_saving_jump() {
    // 2025-03-30 01:00 UTC: clocks in central Europe go from +01:00 to +02:00.
    let t = rows(&[
        "2025-03-30T01:00+01:00,1,0,0",
        "2025-03-30T03:00+02:00,1,0,0",
    ]);
    let e = err(&t);
    assert!(
        matches!(e, WeatherError::OffsetChange { line: 3, .. }),
        "{e:?}"
    );
    assert_eq!(
        e.to_string(),
        "w.csv:3: the UTC offset changes from +01:00 to +02:00 (a daylight-saving jump?); a \
         weather file keeps one offset all year: write every stamp in standard time"
    );
}

#[test]
fn nan_cell() {
    let t = rows(&[
        "2025-01-01T01:00+00:00,1,0,0",
        "2025-01-01T02:00+00:00,NaN,0,0",
        "2025-01-01T03:00+00:00,3,0,0",
    ]);
    let e = err(&t);
    assert_eq!(
        e.to_string(),
        "w.csv:3: column `air_c` is NaN; give a value, or fill gaps linearly with --fill-gaps 1"
    );
    // …and filled when asked.
    let w = parse_weather(
        &t,
        "w.csv",
        &ReadOptions {
            fill_gaps_max_h: Some(1),
            ..Default::default()
        },
    )
    .unwrap();
    assert_eq!(w.air_c, vec![1.0, 2.0, 3.0]);
    assert_eq!(w.filled_hours, 1);
}

#[test]
fn empty_cell() {
    let t = rows(&["2025-01-01T01:00+00:00,1,,0"]);
    let e = err(&t);
    assert!(
        matches!(&e, WeatherError::MissingValue { line: 2, column, what, .. } if column == "ghi_w_m2" && what == "empty"),
        "{e:?}"
    );
    assert!(
        e.to_string()
            .contains("gaps at the start or end of the file cannot be filled"),
        "{e}"
    );
}

#[test]
fn not_a_number() {
    let e = err(&rows(&["2025-01-01T01:00+00:00,warm,0,0"]));
    assert_eq!(
        e.to_string(),
        "w.csv:2: column `air_c` holds `warm`, which is not a number"
    );
}

#[test]
fn air_temperature_out_of_bounds_suggests_kelvin() {
    let e = err(&rows(&["2025-01-01T01:00+00:00,275.2,0,0"]));
    assert!(
        matches!(e, WeatherError::OutOfBounds { line: 2, .. }),
        "{e:?}"
    );
    assert_eq!(
        e.to_string(),
        "w.csv:2: column `air_c` = 275.2 °C is outside the physical bounds -90 … 60 °C; is the \
         file in kelvin? read it with --temp-unit K"
    );
    let e = err(&rows(&["2025-01-01T01:00+00:00,-95,0,0"]));
    assert!(matches!(e, WeatherError::OutOfBounds { .. }), "{e:?}");
}

#[test]
fn irradiance_out_of_bounds() {
    let e = err(&rows(&["2025-01-01T12:00+00:00,1,1500,100"]));
    assert!(e.to_string().contains("`ghi_w_m2` = 1500 W/m² is outside the physical bounds 0 … 1400 W/m²; is the file in kJ/m² per hour?"), "{e}");
    let e = err(&rows(&["2025-01-01T12:00+00:00,1,-2,0"]));
    assert!(matches!(e, WeatherError::OutOfBounds { .. }), "{e:?}");
}

#[test]
fn diffuse_above_global() {
    let e = err(&rows(&["2025-01-01T12:00+00:00,1,100,150"]));
    assert_eq!(
        e.to_string(),
        "w.csv:2: diffuse horizontal 150 W/m² is above global horizontal 100 W/m² (by more than \
         1 W/m²); check that the two columns are not swapped"
    );
    // Within the rounding tolerance (1 W/m²) it is accepted.
    assert!(parse_weather(
        &rows(&["2025-01-01T12:00+00:00,1,100,101"]),
        "w.csv",
        &ReadOptions::default()
    )
    .is_ok());
}

#[test]
fn unknown_column_with_suggestion() {
    let e = err("time,air_c,gh_w_m2\n2025-01-01T01:00+00:00,1,0\n");
    assert!(
        matches!(&e, WeatherError::UnknownColumn { line: 1, column, .. } if column == "gh_w_m2"),
        "{e:?}"
    );
    assert!(
        e.to_string()
            .starts_with("w.csv:1: unknown column `gh_w_m2`, did you mean `ghi_w_m2`?"),
        "{e}"
    );
}

#[test]
fn missing_air_column() {
    let e = err("time,ghi_w_m2\n2025-01-01T01:00+00:00,0\n");
    assert_eq!(
        e.to_string(),
        "w.csv:1: no column `air_c` in the header (found: time, ghi_w_m2); name it `air_c` or map it with --air-col"
    );
}

#[test]
fn bad_time_stamps() {
    let e = err(&rows(&["2025-01-01T01:00,1,0,0"]));
    assert_eq!(
        e.to_string(),
        "w.csv:2: bad time stamp `2025-01-01T01:00` in column `time`: no UTC offset (declare one \
         with --assume-offset, e.g. +01:00); write ISO 8601 with an explicit offset, e.g. \
         2025-01-01T01:00+01:00"
    );
    let e = err(&rows(&["01/01/2025 01:00,1,0,0"]));
    assert!(
        matches!(e, WeatherError::BadTimestamp { line: 2, .. }),
        "{e:?}"
    );
    let e = err(&rows(&["2025-01-01T24:00+00:00,1,0,0"]));
    assert!(e.to_string().contains("hour 24 is not allowed"), "{e}");
    // A declared offset makes naive stamps good.
    let off = chrono::FixedOffset::east_opt(3600);
    assert!(parse_weather(
        &rows(&["2025-01-01T01:00,1,0,0"]),
        "w.csv",
        &ReadOptions {
            assume_offset: off,
            ..Default::default()
        }
    )
    .is_ok());
}

#[test]
fn sub_hourly_step() {
    let e = err(&rows(&[
        "2025-01-01T01:00+00:00,1,0,0",
        "2025-01-01T01:30+00:00,1,0,0",
    ]));
    assert!(
        matches!(
            e,
            WeatherError::NotHourly {
                line: 3,
                minutes: 30,
                ..
            }
        ),
        "{e:?}"
    );
}

#[test]
fn wrong_number_of_fields() {
    let e = err(&rows(&["2025-01-01T01:00+00:00,1,0"]));
    assert_eq!(
        e.to_string(),
        "w.csv:2: 3 fields where the header has 4; every row must have one field per header column"
    );
}

#[test]
fn empty_file() {
    let e = err("time,air_c\n");
    assert!(matches!(e, WeatherError::Empty { .. }), "{e:?}");
}

#[test]
fn missing_file() {
    let e = read_weather(
        std::path::Path::new("/nonexistent/w.csv"),
        &ReadOptions::default(),
    )
    .unwrap_err();
    assert!(
        matches!(e, WeatherError::Io { action: "read", .. }),
        "{e:?}"
    );
}

#[test]
fn every_problem_is_reported_with_its_line() {
    let t = rows(&[
        "2025-01-01T01:00+00:00,99,0,0",
        "2025-01-01T02:00+00:00,1,50,80",
        "2025-01-01T03:00+00:00,1,-5,0",
    ]);
    let e = err(&t);
    let lines: Vec<String> = e
        .problems()
        .iter()
        .map(|p| p.to_string()[..7].to_string())
        .collect();
    assert_eq!(lines, vec!["w.csv:2", "w.csv:3", "w.csv:4"], "{e}");
    assert!(
        e.to_string()
            .starts_with("w.csv: 3 problems (fix them all, then read again):\n  w.csv:2:"),
        "{e}"
    );
}

#[test]
fn comment_lines_keep_line_numbers_and_metadata() {
    let t = format!(
        "# latitude_deg: 50.1\n# a note\n{}",
        rows(&[
            "2025-01-01T01:00+00:00,1,0,0",
            "2025-01-01T02:00+00:00,NaN,0,0"
        ])
    );
    let e = err(&t);
    assert!(
        e.to_string().starts_with("w.csv:5: column `air_c` is NaN"),
        "{e}"
    );
    let w = parse_weather(&t.replace("NaN", "2"), "w.csv", &ReadOptions::default()).unwrap();
    assert_eq!(w.metadata_value("latitude_deg"), Some("50.1"));
}

#[test]
fn foreign_columns_and_units() {
    // °F → °C: (50 − 32)/1.8 = 10; kJ/m² per hour → W/m²: 360/3.6 = 100. Other columns ignored.
    let t = "Date,Temp,GHI,RH\n2025-06-01 13:00+02:00,50,360,60\n2025-06-01 14:00+02:00,41,0,60\n";
    let opts = ReadOptions {
        columns: ColumnMap {
            time: Some("Date".into()),
            air: Some("Temp".into()),
            ghi: Some("GHI".into()),
            ..Default::default()
        },
        temperature_unit: TemperatureUnit::Fahrenheit,
        irradiance_unit: IrradianceUnit::KilojoulePerM2Hour,
        ..Default::default()
    };
    let w = parse_weather(t, "f.csv", &opts).unwrap();
    assert!((w.air_c[0] - 10.0).abs() < 1e-12 && (w.air_c[1] - 5.0).abs() < 1e-12);
    assert!((w.ghi_w_m2.as_ref().unwrap()[0] - 100.0).abs() < 1e-12);
    // Kelvin: 283.15 K = 10 °C.
    let k = parse_weather(
        "time,air_c\n2025-01-01T01:00Z,283.15\n",
        "k.csv",
        &ReadOptions {
            temperature_unit: TemperatureUnit::Kelvin,
            ..Default::default()
        },
    )
    .unwrap();
    assert!((k.air_c[0] - 10.0).abs() < 1e-9);
    // A mapped column that is absent is named.
    let e = err_with(
        "Date,Temp\n2025-01-01T01:00Z,1\n",
        &ReadOptions {
            columns: ColumnMap {
                time: Some("Date".into()),
                air: Some("T".into()),
                ..Default::default()
            },
            ..Default::default()
        },
    );
    assert!(
        e.to_string()
            .starts_with("w.csv:1: no column `T` in the header (found: Date, Temp)"),
        "{e}"
    );
}

#[test]
fn full_year_detection() {
    let w = dwell_weather::default_weather();
    assert!(w.is_full_year());
    assert_eq!(w.len(), 8760);
    let mut short = w.clone();
    short.times.pop();
    short.air_c.pop();
    assert!(matches!(
        short.require_full_year(),
        Err(WeatherError::NotAYear { rows: 8759, .. })
    ));
}
