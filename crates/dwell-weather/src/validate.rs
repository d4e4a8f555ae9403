//! Validation of weather rows: the hourly time grid, gap filling and physical bounds.
//!
//! Rules (each breach is its own [`WeatherError`] variant naming the line):
//! - one UTC offset in the whole file (a change is a daylight-saving jump);
//! - stamps strictly increasing, exactly one hour apart (duplicates, out-of-order stamps,
//!   sub-hourly steps and missing hours are errors);
//! - missing hours and empty/NaN cells may be filled linearly when
//!   [`crate::ReadOptions::fill_gaps_max_h`] allows a run that long and both neighbours exist;
//! - bounds: air and ground −90 … +60 °C, irradiance 0 … 1400 W/m², wind 0 … 100 m/s, diffuse
//!   horizontal not above global horizontal by more than [`DIFFUSE_TOLERANCE_W_M2`].

use chrono::{DateTime, FixedOffset, TimeDelta};

use crate::error::MAX_REPORTED;
use crate::reader::format_stamp;
use crate::{ReadOptions, WeatherError, WeatherSeries};

/// Allowed excess of diffuse over global horizontal irradiance (W/m²), for rounding in files
/// that store the two separately.
pub const DIFFUSE_TOLERANCE_W_M2: f64 = 1.0;

/// The value columns, in storage order.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Column {
    Air,
    Ghi,
    Dhi,
    Dni,
    Ground,
    Wind,
}

/// The value columns in storage order.
pub(crate) const COLUMNS: [Column; 6] = [
    Column::Air,
    Column::Ghi,
    Column::Dhi,
    Column::Dni,
    Column::Ground,
    Column::Wind,
];

impl Column {
    pub(crate) fn default_name(self) -> &'static str {
        match self {
            Column::Air => "air_c",
            Column::Ghi => "ghi_w_m2",
            Column::Dhi => "dhi_w_m2",
            Column::Dni => "dni_w_m2",
            Column::Ground => "ground_c",
            Column::Wind => "wind_m_s",
        }
    }
    pub(crate) fn flag(self) -> &'static str {
        match self {
            Column::Air => "--air-col",
            Column::Ghi => "--ghi-col",
            Column::Dhi => "--dhi-col",
            Column::Dni => "--dni-col",
            Column::Ground => "--ground-col",
            Column::Wind => "--wind-col",
        }
    }
    pub(crate) fn is_temperature(self) -> bool {
        matches!(self, Column::Air | Column::Ground)
    }
    pub(crate) fn is_irradiance(self) -> bool {
        matches!(self, Column::Ghi | Column::Dhi | Column::Dni)
    }
    /// (min, max, unit) physical bounds.
    fn bounds(self) -> (f64, f64, &'static str) {
        match self {
            Column::Air | Column::Ground => (-90.0, 60.0, "°C"),
            Column::Ghi | Column::Dhi | Column::Dni => (0.0, 1400.0, "W/m²"),
            Column::Wind => (0.0, 100.0, "m/s"),
        }
    }
}

/// One cell as read.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) enum Cell {
    /// The column is not in the file.
    Absent,
    /// Empty, NaN, unparsable, or an inserted row; the text says which.
    Missing(&'static str),
    /// A value in SI units / °C.
    Value(f64),
}

/// One data row as read.
#[derive(Debug, Clone)]
pub(crate) struct RawRow {
    pub line: usize,
    pub time: DateTime<FixedOffset>,
    pub values: [Cell; 6],
}

/// Checks the time grid, fills allowed gaps, checks bounds and builds the series.
pub(crate) fn build_series(
    source_name: &str,
    rows: Vec<RawRow>,
    present: [bool; 6],
    names: &[String; 6],
    opts: &ReadOptions,
) -> Result<WeatherSeries, WeatherError> {
    let src = || source_name.to_string();
    let max_fill = opts.fill_gaps_max_h.unwrap_or(0);
    let mut errors = Vec::new();
    let mut grid: Vec<RawRow> = Vec::with_capacity(rows.len());
    let offset0 = *rows[0].time.offset();
    for row in rows {
        if errors.len() >= MAX_REPORTED {
            break;
        }
        if *row.time.offset() != offset0 {
            errors.push(WeatherError::OffsetChange {
                source_name: src(),
                line: row.line,
                from: offset0.to_string(),
                to: row.time.offset().to_string(),
            });
            // Report the jump once, not on every later row.
            break;
        }
        let Some(prev) = grid.last() else {
            grid.push(row);
            continue;
        };
        let dt = row.time - prev.time;
        let hour = TimeDelta::hours(1);
        if dt == TimeDelta::zero() {
            let first_line = grid
                .iter()
                .rev()
                .find(|r| r.time == row.time)
                .map(|r| r.line)
                .unwrap_or(prev.line);
            errors.push(WeatherError::Duplicate {
                source_name: src(),
                line: row.line,
                stamp: format_stamp(&row.time),
                first_line,
            });
            continue;
        }
        if dt < TimeDelta::zero() {
            errors.push(WeatherError::OutOfOrder {
                source_name: src(),
                line: row.line,
                stamp: format_stamp(&row.time),
                previous: format_stamp(&prev.time),
            });
            continue;
        }
        if dt.num_seconds() % 3600 != 0 {
            errors.push(WeatherError::NotHourly {
                source_name: src(),
                line: row.line,
                stamp: format_stamp(&row.time),
                previous: format_stamp(&prev.time),
                minutes: dt.num_minutes(),
            });
            continue;
        }
        let missing = (dt.num_hours() - 1) as usize;
        if missing > 0 {
            if missing > max_fill {
                let hint = match opts.fill_gaps_max_h {
                    _ if missing > 24 * 366 => {
                        "; the gap is longer than a year: is the date on this line mistyped?"
                            .to_string()
                    }
                    None => {
                        format!("; add the rows, or fill gaps linearly with --fill-gaps {missing}")
                    }
                    Some(n) => {
                        format!("; the gap is longer than --fill-gaps {n} allows: add the rows")
                    }
                };
                errors.push(WeatherError::MissingHours {
                    source_name: src(),
                    line: row.line,
                    missing,
                    previous: format_stamp(&prev.time),
                    stamp: format_stamp(&row.time),
                    hint,
                });
                // No placeholder rows for a gap that is an error anyway: a mistyped year
                // (2025 → 6025) would otherwise ask for 35 million of them (found by fuzzing).
                grid.push(row);
                continue;
            }
            let start = prev.time;
            for h in 1..=missing {
                let mut values = [Cell::Absent; 6];
                for k in 0..6 {
                    if present[k] {
                        values[k] = Cell::Missing("inserted");
                    }
                }
                grid.push(RawRow {
                    line: row.line,
                    time: start + hour * h as i32,
                    values,
                });
            }
        }
        grid.push(row);
    }
    WeatherError::collect(source_name, std::mem::take(&mut errors))?;

    // Fill and extract each column.
    let n = grid.len();
    let mut filled = vec![false; n];
    let mut cols: [Option<Vec<f64>>; 6] = Default::default();
    for k in 0..6 {
        if !present[k] {
            continue;
        }
        let mut v = vec![f64::NAN; n];
        let mut i = 0;
        while i < n {
            match grid[i].values[k] {
                Cell::Value(x) => {
                    v[i] = x;
                    i += 1;
                }
                _ => {
                    let j0 = i;
                    while i < n && !matches!(grid[i].values[k], Cell::Value(_)) {
                        i += 1;
                    }
                    let run = i - j0;
                    let inside = j0 > 0 && i < n;
                    if inside && run <= max_fill {
                        let (a, b) = (
                            v[j0 - 1],
                            match grid[i].values[k] {
                                Cell::Value(x) => x,
                                _ => unreachable!(),
                            },
                        );
                        for (m, j) in (j0..i).enumerate() {
                            let f = (m + 1) as f64 / (run + 1) as f64;
                            v[j] = a + (b - a) * f;
                            filled[j] = true;
                        }
                    } else if errors.len() < MAX_REPORTED {
                        // Point at the first real row of the run.
                        let first = (j0..i)
                            .find(|&j| !matches!(grid[j].values[k], Cell::Missing("inserted")));
                        if let Some(j) = first {
                            let what = match grid[j].values[k] {
                                Cell::Missing(w) => w,
                                _ => "empty",
                            };
                            if what == "bad" {
                                continue; // already reported as BadNumber
                            }
                            let hint = if !inside {
                                "gaps at the start or end of the file cannot be filled: give a value".to_string()
                            } else if opts.fill_gaps_max_h.is_none() {
                                format!(
                                    "give a value, or fill gaps linearly with --fill-gaps {run}"
                                )
                            } else {
                                format!("the gap of {run} h is longer than --fill-gaps {max_fill} allows: give values")
                            };
                            errors.push(WeatherError::MissingValue {
                                source_name: src(),
                                line: grid[j].line,
                                column: names[k].clone(),
                                what: what.to_string(),
                                hint,
                            });
                        }
                    }
                }
            }
        }
        cols[k] = Some(v);
    }
    WeatherError::collect(source_name, errors)?;

    let lines: Vec<usize> = grid.iter().map(|r| r.line).collect();
    let times: Vec<DateTime<FixedOffset>> = grid.into_iter().map(|r| r.time).collect();
    check_values(source_name, &cols, names, &lines, opts)?;
    let [air, ghi, dhi, dni, ground, wind] = cols;
    Ok(WeatherSeries {
        times,
        air_c: air.expect("air column is required"),
        ghi_w_m2: ghi,
        dhi_w_m2: dhi,
        dni_w_m2: dni,
        ground_c: ground,
        wind_m_s: wind,
        source: source_name.to_string(),
        filled_hours: filled.iter().filter(|&&f| f).count(),
        metadata: Vec::new(),
    })
}

/// Bounds and diffuse ≤ global.
fn check_values(
    source_name: &str,
    cols: &[Option<Vec<f64>>; 6],
    names: &[String; 6],
    lines: &[usize],
    opts: &ReadOptions,
) -> Result<(), WeatherError> {
    let mut errors = Vec::new();
    'outer: for (k, c) in COLUMNS.iter().enumerate() {
        let Some(v) = &cols[k] else { continue };
        let (min, max, unit) = c.bounds();
        for (i, &x) in v.iter().enumerate() {
            if !x.is_finite() || x < min || x > max {
                let hint = unit_hint(*c, x, opts);
                errors.push(WeatherError::OutOfBounds {
                    source_name: source_name.to_string(),
                    line: lines[i],
                    column: names[k].clone(),
                    value: (x * 100.0).round() / 100.0,
                    min,
                    max,
                    unit,
                    hint,
                });
                if errors.len() >= MAX_REPORTED {
                    break 'outer;
                }
            }
        }
    }
    if let (Some(g), Some(d)) = (&cols[1], &cols[2]) {
        for i in 0..g.len() {
            if errors.len() >= MAX_REPORTED {
                break;
            }
            let in_bounds = (0.0..=1400.0).contains(&g[i]) && (0.0..=1400.0).contains(&d[i]);
            if in_bounds && d[i] > g[i] + DIFFUSE_TOLERANCE_W_M2 {
                errors.push(WeatherError::DiffuseAboveGlobal {
                    source_name: source_name.to_string(),
                    line: lines[i],
                    dhi: (d[i] * 100.0).round() / 100.0,
                    ghi: (g[i] * 100.0).round() / 100.0,
                    tolerance: DIFFUSE_TOLERANCE_W_M2,
                });
            }
        }
    }
    errors.sort_by_key(|e| e.line().unwrap_or(0));
    WeatherError::collect(source_name, errors)
}

fn unit_hint(c: Column, x: f64, opts: &ReadOptions) -> String {
    use crate::{IrradianceUnit, TemperatureUnit};
    if c.is_temperature() && opts.temperature_unit == TemperatureUnit::Celsius {
        if (180.0..=340.0).contains(&x) {
            return "; is the file in kelvin? read it with --temp-unit K".to_string();
        }
        if (60.0..=140.0).contains(&x) {
            return "; is the file in °F? read it with --temp-unit F".to_string();
        }
    }
    if c.is_irradiance()
        && opts.irradiance_unit == IrradianceUnit::WattPerM2
        && x > 1400.0
        && x <= 5040.0
    {
        return "; is the file in kJ/m² per hour? read it with --irradiance-unit kJ/m2".to_string();
    }
    String::new()
}

/// Validation of a series built in code.
pub(crate) fn check_series(s: &WeatherSeries) -> Result<(), WeatherError> {
    let n = s.len();
    let src = s.source.as_str();
    if n == 0 {
        return Err(WeatherError::Empty {
            source_name: src.to_string(),
        });
    }
    let cols: [Option<&Vec<f64>>; 6] = [
        Some(&s.air_c),
        s.ghi_w_m2.as_ref(),
        s.dhi_w_m2.as_ref(),
        s.dni_w_m2.as_ref(),
        s.ground_c.as_ref(),
        s.wind_m_s.as_ref(),
    ];
    for (k, c) in cols.iter().enumerate() {
        if let Some(v) = c {
            if v.len() != n {
                return Err(WeatherError::BadParameter {
                    name: COLUMNS[k].default_name().to_string(),
                    value: format!("{} values", v.len()),
                    range: format!("{n} values (one per time stamp)"),
                    hint: String::new(),
                });
            }
        }
    }
    let rows = (0..n)
        .map(|i| RawRow {
            line: i + 2,
            time: s.times[i],
            values: std::array::from_fn(|k| match cols[k] {
                Some(v) if v[i].is_nan() => Cell::Missing("NaN"),
                Some(v) => Cell::Value(v[i]),
                None => Cell::Absent,
            }),
        })
        .collect();
    let present = std::array::from_fn(|k| cols[k].is_some());
    let names = std::array::from_fn(|k| COLUMNS[k].default_name().to_string());
    build_series(src, rows, present, &names, &ReadOptions::default()).map(|_| ())
}
