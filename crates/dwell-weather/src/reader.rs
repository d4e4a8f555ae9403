//! Reading and writing dwell weather files (CSV).
//!
//! ## The format
//!
//! ```text
//! # name: Harrowmere (invented mild maritime climate)
//! # latitude_deg: 51.2
//! # longitude_deg: -3.4
//! time,air_c,ghi_w_m2,dhi_w_m2,dni_w_m2,ground_c,wind_m_s
//! 2025-01-01T01:00+00:00,6.1,0.0,0.0,0.0,8.2,4.0
//! ```
//!
//! Lines starting with `#` are comments; those of the form `# key: value` before the header
//! are kept as metadata. `time` and `air_c` are required, the others optional. See
//! [`crate::WeatherSeries`] for the time convention, and `docs/weather.md`.
//!
//! Any other CSV can be read with a [`ColumnMap`] and unit options ([`ReadOptions`]).

use std::io::Write;
use std::path::Path;
use std::str::FromStr;

use chrono::{DateTime, FixedOffset, NaiveDateTime, TimeZone};

use crate::validate::{self, Column, RawRow, COLUMNS};
use crate::{WeatherError, WeatherSeries};

/// Unit of the temperature columns (air and ground) in the file being read.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum TemperatureUnit {
    /// Degrees Celsius (the default).
    #[default]
    Celsius,
    /// Degrees Fahrenheit: °C = (°F − 32) / 1.8.
    Fahrenheit,
    /// Kelvin: °C = K − 273.15.
    Kelvin,
}

impl TemperatureUnit {
    /// Converts a value in this unit to °C.
    pub fn to_celsius(self, v: f64) -> f64 {
        match self {
            TemperatureUnit::Celsius => v,
            TemperatureUnit::Fahrenheit => (v - 32.0) / 1.8,
            TemperatureUnit::Kelvin => v - 273.15,
        }
    }
}

impl FromStr for TemperatureUnit {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, String> {
        match s.trim().to_ascii_lowercase().as_str() {
            "c" | "°c" | "degc" | "celsius" => Ok(Self::Celsius),
            "f" | "°f" | "degf" | "fahrenheit" => Ok(Self::Fahrenheit),
            "k" | "kelvin" => Ok(Self::Kelvin),
            _ => Err(format!("unknown temperature unit `{s}`; use C, F or K")),
        }
    }
}

/// Unit of the irradiance columns in the file being read.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum IrradianceUnit {
    /// Mean irradiance over the hour (W/m²), the default; also what Wh/m² per hour is.
    #[default]
    WattPerM2,
    /// Irradiation per hour (kJ/m² in the hour): W/m² = kJ/m² / 3.6.
    KilojoulePerM2Hour,
}

impl IrradianceUnit {
    /// Converts a value in this unit to a mean irradiance (W/m²).
    pub fn to_w_m2(self, v: f64) -> f64 {
        match self {
            IrradianceUnit::WattPerM2 => v,
            IrradianceUnit::KilojoulePerM2Hour => v / 3.6,
        }
    }
}

impl FromStr for IrradianceUnit {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, String> {
        let k = s.trim().to_ascii_lowercase().replace(['²', ' '], "2");
        match k.as_str() {
            "w/m2" | "w-m2" | "wm2" | "wh/m2" | "wh-m2" => Ok(Self::WattPerM2),
            "kj/m2" | "kj-m2" | "kjm2" | "kj/m2/h" | "kj-m2-h" => Ok(Self::KilojoulePerM2Hour),
            _ => Err(format!(
                "unknown irradiance unit `{s}`; use W/m2 (or Wh/m2) or kJ/m2"
            )),
        }
    }
}

/// Names of the file's columns for each quantity; `None` means the dwell name
/// (`time`, `air_c`, `ghi_w_m2`, `dhi_w_m2`, `dni_w_m2`, `ground_c`, `wind_m_s`).
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct ColumnMap {
    /// Time stamp column.
    pub time: Option<String>,
    /// Outdoor air temperature column.
    pub air: Option<String>,
    /// Global horizontal irradiance column.
    pub ghi: Option<String>,
    /// Diffuse horizontal irradiance column.
    pub dhi: Option<String>,
    /// Direct normal irradiance column.
    pub dni: Option<String>,
    /// Ground temperature column.
    pub ground: Option<String>,
    /// Wind speed column.
    pub wind: Option<String>,
}

impl ColumnMap {
    /// True when no column is renamed.
    pub fn is_identity(&self) -> bool {
        *self == ColumnMap::default()
    }

    pub(crate) fn name(&self, c: Column) -> &str {
        let o = match c {
            Column::Air => &self.air,
            Column::Ghi => &self.ghi,
            Column::Dhi => &self.dhi,
            Column::Dni => &self.dni,
            Column::Ground => &self.ground,
            Column::Wind => &self.wind,
        };
        o.as_deref().unwrap_or(c.default_name())
    }
}

/// How to read a weather file.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ReadOptions {
    /// Column names of a foreign file. When any is set, columns not named are ignored;
    /// otherwise an unknown column is an error ([`WeatherError::UnknownColumn`]).
    pub columns: ColumnMap,
    /// Ignore unknown columns even without a mapping (default false).
    pub ignore_unknown_columns: bool,
    /// Unit of air and ground temperature (default °C).
    pub temperature_unit: TemperatureUnit,
    /// Unit of irradiance (default W/m²).
    pub irradiance_unit: IrradianceUnit,
    /// Offset assumed for stamps written without one (default `None`: such stamps are errors).
    pub assume_offset: Option<FixedOffset>,
    /// Fill runs of up to this many missing hours (absent rows, empty or NaN cells) by linear
    /// interpolation between the neighbouring values (default `None`: no filling, every gap
    /// is an error). The count of filled hours is [`WeatherSeries::filled_hours`].
    pub fill_gaps_max_h: Option<usize>,
    /// Field delimiter (default `b','`).
    pub delimiter: u8,
}

impl Default for ReadOptions {
    fn default() -> Self {
        ReadOptions {
            columns: ColumnMap::default(),
            ignore_unknown_columns: false,
            temperature_unit: TemperatureUnit::Celsius,
            irradiance_unit: IrradianceUnit::WattPerM2,
            assume_offset: None,
            fill_gaps_max_h: None,
            delimiter: b',',
        }
    }
}

/// Reads and validates a weather file. Errors name the file and line.
pub fn read_weather(path: &Path, opts: &ReadOptions) -> Result<WeatherSeries, WeatherError> {
    let bytes = std::fs::read(path).map_err(|source| WeatherError::Io {
        path: path.to_path_buf(),
        action: "read",
        source,
    })?;
    let name = path.display().to_string();
    let text = String::from_utf8(bytes).map_err(|e| WeatherError::Csv {
        source_name: name.clone(),
        line: 1 + e.as_bytes()[..e.utf8_error().valid_up_to()]
            .iter()
            .filter(|&&b| b == b'\n')
            .count(),
        message: "the file is not UTF-8 text".to_string(),
    })?;
    parse_weather(&text, &name, opts)
}

/// Parses and validates weather CSV text; `source_name` is used in error messages and stored
/// as [`WeatherSeries::source`].
pub fn parse_weather(
    text: &str,
    source_name: &str,
    opts: &ReadOptions,
) -> Result<WeatherSeries, WeatherError> {
    let metadata = leading_metadata(text);
    let mut rdr = csv::ReaderBuilder::new()
        .has_headers(true)
        .comment(Some(b'#'))
        .delimiter(opts.delimiter)
        .trim(csv::Trim::All)
        .from_reader(text.as_bytes());
    let csv_err = |e: csv::Error| {
        let line = e.position().map(|p| p.line() as usize).unwrap_or(1);
        let message = match e.kind() {
            csv::ErrorKind::UnequalLengths {
                expected_len, len, ..
            } => {
                format!("{len} fields where the header has {expected_len}")
            }
            _ => e.to_string(),
        };
        WeatherError::Csv {
            source_name: source_name.to_string(),
            line,
            message,
        }
    };
    let header_line = text
        .lines()
        .position(|l| !l.trim_start().starts_with('#') && !l.trim().is_empty())
        .map(|i| i + 1)
        .unwrap_or(1);
    let headers: Vec<String> = rdr
        .headers()
        .map_err(csv_err)?
        .iter()
        .map(|h| h.trim_start_matches('\u{feff}').to_string())
        .collect();

    // Map quantities to column indices.
    let find = |name: &str| headers.iter().position(|h| h == name);
    let time_name = opts.columns.time.as_deref().unwrap_or("time");
    let mut errors = Vec::new();
    let time_idx = find(time_name);
    if time_idx.is_none() {
        errors.push(WeatherError::MissingColumn {
            source_name: source_name.to_string(),
            line: header_line,
            column: time_name.to_string(),
            found: headers.join(", "),
            hint: "name the time column `time` or map it with --time-col".to_string(),
        });
    }
    let mut idx = [None; 6];
    for (k, c) in COLUMNS.iter().enumerate() {
        let name = opts.columns.name(*c);
        idx[k] = find(name);
        let explicitly_mapped = opts.columns.name(*c) != c.default_name();
        if idx[k].is_none() && (*c == Column::Air || explicitly_mapped) {
            errors.push(WeatherError::MissingColumn {
                source_name: source_name.to_string(),
                line: header_line,
                column: name.to_string(),
                found: headers.join(", "),
                hint: format!("name it `{}` or map it with {}", c.default_name(), c.flag()),
            });
        }
    }
    if opts.columns.is_identity() && !opts.ignore_unknown_columns {
        let known: Vec<&str> = std::iter::once("time")
            .chain(COLUMNS.iter().map(|c| c.default_name()))
            .collect();
        for h in &headers {
            if !known.contains(&h.as_str()) {
                let best = known
                    .iter()
                    .map(|k| (strsim::jaro_winkler(&h.to_ascii_lowercase(), k), *k))
                    .fold((0.0, ""), |a, b| if b.0 > a.0 { b } else { a });
                let suggestion = if best.0 > 0.8 {
                    format!(", did you mean `{}`?", best.1)
                } else {
                    String::new()
                };
                errors.push(WeatherError::UnknownColumn {
                    source_name: source_name.to_string(),
                    line: header_line,
                    column: h.clone(),
                    suggestion,
                });
            }
        }
    }
    WeatherError::collect(source_name, errors)?;
    let time_idx = time_idx.expect("checked above");

    let mut rows = Vec::new();
    let mut errors = Vec::new();
    for rec in rdr.records() {
        let rec = rec.map_err(csv_err)?;
        let line = rec.position().map(|p| p.line() as usize).unwrap_or(0);
        if rec.iter().all(|f| f.is_empty()) {
            continue;
        }
        let stamp = &rec[time_idx];
        let time = match parse_stamp(stamp, opts.assume_offset) {
            Ok(t) => t,
            Err(reason) => {
                errors.push(WeatherError::BadTimestamp {
                    source_name: source_name.to_string(),
                    line,
                    column: time_name.to_string(),
                    value: stamp.to_string(),
                    reason,
                });
                if errors.len() >= crate::error::MAX_REPORTED {
                    break;
                }
                continue;
            }
        };
        let mut values = [validate::Cell::Absent; 6];
        for (k, c) in COLUMNS.iter().enumerate() {
            let Some(j) = idx[k] else { continue };
            let s = &rec[j];
            values[k] = if s.is_empty() {
                validate::Cell::Missing("empty")
            } else if s.eq_ignore_ascii_case("nan") || s.eq_ignore_ascii_case("na") {
                validate::Cell::Missing("NaN")
            } else {
                match s.parse::<f64>() {
                    Ok(v) if v.is_nan() => validate::Cell::Missing("NaN"),
                    Ok(v) => validate::Cell::Value(if c.is_temperature() {
                        opts.temperature_unit.to_celsius(v)
                    } else if c.is_irradiance() {
                        opts.irradiance_unit.to_w_m2(v)
                    } else {
                        v
                    }),
                    Err(_) => {
                        errors.push(WeatherError::BadNumber {
                            source_name: source_name.to_string(),
                            line,
                            column: opts.columns.name(*c).to_string(),
                            value: s.to_string(),
                        });
                        validate::Cell::Missing("bad")
                    }
                }
            };
        }
        rows.push(RawRow { line, time, values });
        if errors.len() >= crate::error::MAX_REPORTED {
            break;
        }
    }
    WeatherError::collect(source_name, errors)?;
    if rows.is_empty() {
        return Err(WeatherError::Empty {
            source_name: source_name.to_string(),
        });
    }
    let present: [bool; 6] = std::array::from_fn(|k| idx[k].is_some());
    let names: [String; 6] = std::array::from_fn(|k| opts.columns.name(COLUMNS[k]).to_string());
    let mut series = validate::build_series(source_name, rows, present, &names, opts)?;
    series.metadata = metadata;
    Ok(series)
}

/// `# key: value` lines before the header.
pub(crate) fn leading_metadata(text: &str) -> Vec<(String, String)> {
    let mut out = Vec::new();
    for l in text.lines() {
        let t = l.trim();
        if t.is_empty() {
            continue;
        }
        let Some(rest) = t.strip_prefix('#') else {
            break;
        };
        if let Some((k, v)) = rest.split_once(':') {
            let k = k.trim();
            if !k.is_empty() && !k.contains(' ') {
                out.push((k.to_string(), v.trim().to_string()));
            }
        }
    }
    out
}

/// Parses an ISO 8601 stamp: `YYYY-MM-DDTHH:MM[:SS]` followed by `Z`, `±HH:MM` or `±HHMM`
/// (a space may replace the `T`). Without an offset, `assume` is used if given.
pub fn parse_stamp(s: &str, assume: Option<FixedOffset>) -> Result<DateTime<FixedOffset>, String> {
    let t = s.trim();
    let t = match t.strip_suffix('Z').or_else(|| t.strip_suffix('z')) {
        Some(x) => format!("{x}+00:00"),
        None => t.to_string(),
    };
    let t = t.replacen(' ', "T", 1);
    if t.contains("T24:") {
        return Err("hour 24 is not allowed: write 00:00 of the next day".to_string());
    }
    for f in [
        "%Y-%m-%dT%H:%M%:z",
        "%Y-%m-%dT%H:%M:%S%:z",
        "%Y-%m-%dT%H:%M%z",
        "%Y-%m-%dT%H:%M:%S%z",
    ] {
        if let Ok(d) = DateTime::parse_from_str(&t, f) {
            return Ok(d);
        }
    }
    for f in ["%Y-%m-%dT%H:%M", "%Y-%m-%dT%H:%M:%S"] {
        if let Ok(n) = NaiveDateTime::parse_from_str(&t, f) {
            return match assume {
                Some(off) => Ok(off.from_local_datetime(&n).single().expect("fixed offset")),
                None => {
                    Err("no UTC offset (declare one with --assume-offset, e.g. +01:00)".to_string())
                }
            };
        }
    }
    Err("not an ISO 8601 date and time".to_string())
}

/// Formats a stamp as dwell writes it: `2025-01-01T01:00+01:00`.
pub fn format_stamp(t: &DateTime<FixedOffset>) -> String {
    t.format("%Y-%m-%dT%H:%M%:z").to_string()
}

/// Writes a series as a dwell weather file (text). `comments` are written first as `# ` lines;
/// the series' metadata follow as `# key: value`.
pub fn weather_to_csv(series: &WeatherSeries, comments: &[String]) -> String {
    let mut s = String::new();
    for c in comments {
        s.push_str("# ");
        s.push_str(c);
        s.push('\n');
    }
    for (k, v) in &series.metadata {
        s.push_str(&format!("# {k}: {v}\n"));
    }
    let cols: Vec<(&str, Option<&Vec<f64>>)> = vec![
        ("air_c", Some(&series.air_c)),
        ("ghi_w_m2", series.ghi_w_m2.as_ref()),
        ("dhi_w_m2", series.dhi_w_m2.as_ref()),
        ("dni_w_m2", series.dni_w_m2.as_ref()),
        ("ground_c", series.ground_c.as_ref()),
        ("wind_m_s", series.wind_m_s.as_ref()),
    ];
    let cols: Vec<(&str, &Vec<f64>)> = cols
        .into_iter()
        .filter_map(|(n, v)| v.map(|v| (n, v)))
        .collect();
    s.push_str("time");
    for (n, _) in &cols {
        s.push(',');
        s.push_str(n);
    }
    s.push('\n');
    for i in 0..series.len() {
        s.push_str(&format_stamp(&series.times[i]));
        for (_, v) in &cols {
            s.push_str(&format!(",{:.1}", v[i] + 0.0));
        }
        s.push('\n');
    }
    s
}

/// Writes `contents` to `path` through a temporary file in the same directory and a rename,
/// so that a failed write never leaves a half-written file.
pub fn write_atomic(path: &Path, contents: &[u8]) -> Result<(), WeatherError> {
    let io = |source| WeatherError::Io {
        path: path.to_path_buf(),
        action: "write",
        source,
    };
    let dir = match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => std::path::PathBuf::from("."),
    };
    let file_name = path
        .file_name()
        .map(|f| f.to_string_lossy().into_owned())
        .unwrap_or_default();
    let tmp = dir.join(format!(".{file_name}.tmp-{}", std::process::id()));
    let result = (|| {
        let mut f = std::fs::File::create(&tmp)?;
        f.write_all(contents)?;
        f.sync_all()?;
        std::fs::rename(&tmp, path)
    })();
    if let Err(e) = result {
        let _ = std::fs::remove_file(&tmp);
        return Err(io(e));
    }
    Ok(())
}

/// Writes a series to `path` as a dwell weather file, atomically ([`write_atomic`]).
pub fn write_weather(
    path: &Path,
    series: &WeatherSeries,
    comments: &[String],
) -> Result<(), WeatherError> {
    write_atomic(path, weather_to_csv(series, comments).as_bytes())
}
