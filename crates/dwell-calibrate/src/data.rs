//! Measured data: a CSV of indoor temperature, outdoor temperature, heating power and,
//! optionally, solar irradiance at a regular interval between 5 min and 1 h.
//!
//! ```text
//! # any comment lines
//! time,indoor_c,outdoor_c,heating_w,solar_w_m2
//! 2025-01-06T00:30+00:00,19.8,3.1,1200,0
//! ```
//!
//! * `time`: ISO 8601 with an explicit offset, read by [`dwell_weather::parse_stamp`] (the same
//!   rules as weather files), strictly increasing;
//! * `indoor_c`, `outdoor_c` (°C): instantaneous readings at the stamp;
//! * `heating_w` (W, ≥ 0) and `solar_w_m2` (W/m², global horizontal, optional column): means
//!   over the interval *ending* at the stamp (what a meter read at the stamp divided by the
//!   interval gives).
//!
//! The interval is the smallest difference between stamps; every difference must be a whole
//! multiple of it. A missing row or an empty field is a gap. Gaps in indoor temperature are
//! left out of the fit; gaps in the inputs up to [`MAX_INPUT_GAP_S`] are filled linearly and
//! counted; longer input gaps are an error (split the file). Every problem names the file and
//! line; up to [`MAX_REPORTED`](crate::error::MAX_REPORTED) are collected.

use std::path::Path;

use chrono::{DateTime, FixedOffset};

use crate::error::{CalibrateError, MAX_REPORTED};

/// Shortest accepted interval (s): 5 min.
pub const MIN_INTERVAL_S: f64 = 300.0;
/// Longest accepted interval (s): 1 h.
pub const MAX_INTERVAL_S: f64 = 3600.0;
/// Longest gap in an input column that is filled by linear interpolation (s): 12 h.
pub const MAX_INPUT_GAP_S: f64 = 12.0 * 3600.0;

/// Measured data on a regular grid of `len()` instants `start + k·step_s`.
#[derive(Clone, Debug)]
pub struct MeasuredData {
    /// File name or description, for messages.
    pub source: String,
    /// First stamp.
    pub start: DateTime<FixedOffset>,
    /// Interval (s), 300 … 3600.
    pub step_s: f64,
    /// Indoor air temperature at each stamp (°C); NaN where missing.
    pub indoor_c: Vec<f64>,
    /// Outdoor air temperature at each stamp (°C), gaps filled.
    pub outdoor_c: Vec<f64>,
    /// Mean heating power over the interval ending at each stamp (W), gaps filled.
    pub heating_w: Vec<f64>,
    /// Mean global horizontal irradiance over the interval ending at each stamp (W/m²), if
    /// the file has the column; gaps filled.
    pub solar_w_m2: Option<Vec<f64>>,
    /// Input values filled by interpolation (count over all input columns).
    pub filled_inputs: usize,
    /// 1-based file line of each grid instant (0 for a missing row).
    pub lines: Vec<usize>,
}

impl MeasuredData {
    /// Number of grid instants.
    pub fn len(&self) -> usize {
        self.indoor_c.len()
    }

    /// True if there are no instants.
    pub fn is_empty(&self) -> bool {
        self.indoor_c.is_empty()
    }

    /// Stamp of instant `k`.
    pub fn time(&self, k: usize) -> DateTime<FixedOffset> {
        self.start
            + chrono::Duration::milliseconds((k as f64 * self.step_s * 1000.0).round() as i64)
    }

    /// Duration covered (s).
    pub fn duration_s(&self) -> f64 {
        self.len().saturating_sub(1) as f64 * self.step_s
    }

    /// A copy of instants `from..to`.
    pub fn slice(&self, from: usize, to: usize) -> MeasuredData {
        MeasuredData {
            source: self.source.clone(),
            start: self.time(from),
            step_s: self.step_s,
            indoor_c: self.indoor_c[from..to].to_vec(),
            outdoor_c: self.outdoor_c[from..to].to_vec(),
            heating_w: self.heating_w[from..to].to_vec(),
            solar_w_m2: self.solar_w_m2.as_ref().map(|s| s[from..to].to_vec()),
            filled_inputs: 0,
            lines: self.lines[from..to].to_vec(),
        }
    }

    /// Writes the data as a measured-data CSV (missing indoor values as empty fields).
    pub fn to_csv(&self, comments: &[String]) -> String {
        let mut s = String::new();
        for c in comments {
            s.push_str("# ");
            s.push_str(c);
            s.push('\n');
        }
        s.push_str("time,indoor_c,outdoor_c,heating_w");
        if self.solar_w_m2.is_some() {
            s.push_str(",solar_w_m2");
        }
        s.push('\n');
        for k in 0..self.len() {
            let ti = if self.indoor_c[k].is_nan() {
                String::new()
            } else {
                format!("{:.2}", self.indoor_c[k])
            };
            s.push_str(&format!(
                "{},{ti},{:.2},{:.1}",
                dwell_weather::format_stamp(&self.time(k)),
                self.outdoor_c[k],
                self.heating_w[k]
            ));
            if let Some(sol) = &self.solar_w_m2 {
                s.push_str(&format!(",{:.1}", sol[k]));
            }
            s.push('\n');
        }
        s
    }
}

/// Reads a measured-data file (see the module docs).
pub fn read_measured(path: &Path) -> Result<MeasuredData, CalibrateError> {
    let text = std::fs::read_to_string(path).map_err(|source| CalibrateError::Io {
        path: path.display().to_string(),
        source,
    })?;
    parse_measured(&text, &path.display().to_string())
}

struct Row {
    line: usize,
    t: DateTime<FixedOffset>,
    v: [Option<f64>; 4],
}

const COLS: [(&str, f64, f64, &str); 4] = [
    ("indoor_c", -30.0, 50.0, "°C"),
    ("outdoor_c", -60.0, 60.0, "°C"),
    ("heating_w", 0.0, 1.0e6, "W"),
    ("solar_w_m2", 0.0, 1500.0, "W/m²"),
];

/// Parses measured data from text; `source_name` names the file in messages.
pub fn parse_measured(text: &str, source_name: &str) -> Result<MeasuredData, CalibrateError> {
    let at = |line: usize, message: String| CalibrateError::At {
        source_name: source_name.to_string(),
        line,
        message,
    };
    let header_line = text
        .lines()
        .position(|l| !l.trim_start().starts_with('#') && !l.trim().is_empty())
        .map(|i| i + 1)
        .ok_or_else(|| CalibrateError::Data {
            source_name: source_name.to_string(),
            message: "no header and no data; the first line that is not a `#` comment must be \
                      `time,indoor_c,outdoor_c,heating_w[,solar_w_m2]`"
                .into(),
        })?;
    let mut rdr = csv::ReaderBuilder::new()
        .has_headers(true)
        .comment(Some(b'#'))
        .trim(csv::Trim::All)
        .from_reader(text.as_bytes());
    let headers: Vec<String> = rdr
        .headers()
        .map_err(|e| at(header_line, e.to_string()))?
        .iter()
        .map(|h| h.trim_start_matches('\u{feff}').to_string())
        .collect();
    let mut errors = Vec::new();
    let find = |n: &str| headers.iter().position(|h| h == n);
    let time_idx = find("time");
    let mut idx = [None; 4];
    for (k, (name, ..)) in COLS.iter().enumerate() {
        idx[k] = find(name);
        if idx[k].is_none() && k < 3 {
            errors.push(at(header_line, format!("no column `{name}` in the header (found: {}); the columns are time, indoor_c, outdoor_c, heating_w and optionally solar_w_m2", headers.join(", "))));
        }
    }
    if time_idx.is_none() {
        errors.push(at(
            header_line,
            format!(
                "no column `time` in the header (found: {})",
                headers.join(", ")
            ),
        ));
    }
    for h in &headers {
        if h != "time" && !COLS.iter().any(|c| c.0 == h) {
            errors.push(at(header_line, format!("unknown column `{h}`; the columns are time, indoor_c, outdoor_c, heating_w and optionally solar_w_m2 (remove or rename it)")));
        }
    }
    CalibrateError::collect(source_name, errors)?;
    let time_idx = time_idx.expect("checked");

    let mut rows: Vec<Row> = Vec::new();
    let mut errors = Vec::new();
    for rec in rdr.records() {
        if errors.len() >= MAX_REPORTED {
            break;
        }
        let rec = match rec {
            Ok(r) => r,
            Err(e) => {
                let line = e.position().map(|p| p.line() as usize).unwrap_or(0);
                errors.push(at(
                    line,
                    format!("{e}; every row needs one field per header column"),
                ));
                continue;
            }
        };
        let line = rec.position().map(|p| p.line() as usize).unwrap_or(0);
        let stamp = rec.get(time_idx).unwrap_or("");
        let t = match dwell_weather::parse_stamp(stamp, None) {
            Ok(t) => t,
            Err(reason) => {
                errors.push(at(line, format!("bad time stamp `{stamp}`: {reason}; write ISO 8601 with an explicit offset, e.g. 2025-01-06T00:30+00:00")));
                continue;
            }
        };
        let mut v = [None; 4];
        for (k, (name, lo, hi, unit)) in COLS.iter().enumerate() {
            let Some(i) = idx[k] else { continue };
            let f = rec.get(i).unwrap_or("");
            if f.is_empty() {
                continue;
            }
            match f.parse::<f64>() {
                Ok(x) if x.is_finite() && x >= *lo && x <= *hi => v[k] = Some(x),
                Ok(x) if x.is_finite() => errors.push(at(line, format!("{name} = {x} is outside {lo} … {hi} {unit}; fix the reading or leave the field empty to mark it missing"))),
                _ => errors.push(at(line, format!("{name}: `{f}` is not a number; write a number or leave the field empty to mark it missing"))),
            }
        }
        if let Some(prev) = rows.last() {
            if t <= prev.t {
                errors.push(at(line, format!("time {stamp} is not after the previous row's (line {}); sort the rows and remove duplicates", prev.line)));
                continue;
            }
        }
        rows.push(Row { line, t, v });
    }
    CalibrateError::collect(source_name, errors)?;
    let data_err = |message: String| CalibrateError::Data {
        source_name: source_name.to_string(),
        message,
    };
    if rows.len() < 3 {
        return Err(data_err(format!(
            "{} data rows; a fit needs at least days of data at 5 min … 1 h intervals",
            rows.len()
        )));
    }
    let diffs: Vec<i64> = rows
        .windows(2)
        .map(|w| (w[1].t - w[0].t).num_seconds())
        .collect();
    let step = *diffs.iter().min().expect("two rows");
    if (step as f64) < MIN_INTERVAL_S || (step as f64) > MAX_INTERVAL_S {
        let k = diffs.iter().position(|d| *d == step).expect("min");
        return Err(at(rows[k + 1].line, format!("interval of {step} s between this row and the one before; the interval must be 300 s (5 min) … 3600 s (1 h): resample the data")));
    }
    let mut errors = Vec::new();
    for (k, d) in diffs.iter().enumerate() {
        if d % step != 0 && errors.len() < MAX_REPORTED {
            errors.push(at(rows[k + 1].line, format!("{d} s after the previous row, not a whole multiple of the interval {step} s; the data must be on a regular grid")));
        }
    }
    CalibrateError::collect(source_name, errors)?;

    let n = ((rows.last().expect("rows").t - rows[0].t).num_seconds() / step) as usize + 1;
    let mut grid: Vec<[Option<f64>; 4]> = vec![[None; 4]; n];
    let mut lines = vec![0usize; n];
    for r in &rows {
        let k = ((r.t - rows[0].t).num_seconds() / step) as usize;
        grid[k] = r.v;
        lines[k] = r.line;
    }
    let has_solar = idx[3].is_some();
    let mut filled = 0;
    let mut series: Vec<Vec<f64>> = Vec::new();
    let mut errors = Vec::new();
    let max_gap = (MAX_INPUT_GAP_S / step as f64).floor() as usize;
    for c in 1..4 {
        if c == 3 && !has_solar {
            continue;
        }
        let known: Vec<usize> = (0..n).filter(|&k| grid[k][c].is_some()).collect();
        if known.is_empty() {
            return Err(data_err(format!(
                "column `{}` has no values; a fit needs it",
                COLS[c].0
            )));
        }
        let mut s = vec![f64::NAN; n];
        for &k in &known {
            s[k] = grid[k][c].expect("known");
        }
        // Leading and trailing gaps: hold the nearest value, within the same limit.
        let first = known[0];
        let last = *known.last().expect("known");
        if first > max_gap || n - 1 - last > max_gap {
            errors.push(data_err(format!(
                "column `{}` is missing for more than {} h at the start or end; trim those rows",
                COLS[c].0,
                MAX_INPUT_GAP_S / 3600.0
            )));
            continue;
        }
        for k in 0..first {
            s[k] = s[first];
            filled += 1;
        }
        for k in last + 1..n {
            s[k] = s[last];
            filled += 1;
        }
        for w in known.windows(2) {
            let (a, b) = (w[0], w[1]);
            if b - a > 1 {
                if b - a - 1 > max_gap && errors.len() < MAX_REPORTED {
                    let la = lines[a];
                    let lb = lines[b];
                    errors.push(at(lb, format!("column `{}` is missing for {:.1} h (since line {la}); gaps in inputs longer than {} h cannot be filled: split the file there and fit each part", COLS[c].0, (b - a - 1) as f64 * step as f64 / 3600.0, MAX_INPUT_GAP_S / 3600.0)));
                }
                for k in a + 1..b {
                    let f = (k - a) as f64 / (b - a) as f64;
                    s[k] = s[a] + f * (s[b] - s[a]);
                    filled += 1;
                }
            }
        }
        series.push(s);
    }
    CalibrateError::collect(source_name, errors)?;
    let indoor: Vec<f64> = grid.iter().map(|g| g[0].unwrap_or(f64::NAN)).collect();
    if indoor[0].is_nan() {
        return Err(at(lines[0], "the first row has no indoor_c; the fit starts from the first indoor reading: remove the leading rows without one".into()));
    }
    let solar = if has_solar { series.pop() } else { None };
    let heating = series.pop().expect("heating");
    let outdoor = series.pop().expect("outdoor");
    Ok(MeasuredData {
        source: source_name.to_string(),
        start: rows[0].t,
        step_s: step as f64,
        indoor_c: indoor,
        outdoor_c: outdoor,
        heating_w: heating,
        solar_w_m2: solar,
        filled_inputs: filled,
        lines,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    const OK: &str = "# invented\ntime,indoor_c,outdoor_c,heating_w\n\
        2025-01-06T00:00+00:00,20,5,100\n\
        2025-01-06T00:30+00:00,,5,200\n\
        2025-01-06T02:00+00:00,19,6,300\n";

    #[test]
    fn gaps_are_filled_and_indoor_gaps_kept_missing() {
        let d = parse_measured(OK, "m.csv").unwrap();
        assert_eq!(d.step_s, 1800.0);
        assert_eq!(d.len(), 5);
        assert!(d.indoor_c[1].is_nan() && d.indoor_c[2].is_nan());
        // Linear fill between 00:30 (200 W) and 02:00 (300 W).
        assert!((d.heating_w[2] - 200.0 - 100.0 / 3.0).abs() < 1e-9);
        assert_eq!(d.filled_inputs, 4);
        assert!(d.solar_w_m2.is_none());
        assert_eq!(d.lines, vec![3, 4, 0, 0, 5]);
    }

    #[test]
    fn errors_name_file_and_line() {
        let bad = "time,indoor_c,outdoor_c,heating_w\n2025-01-06T00:00+00:00,20,5,-3\n2025-01-06T00:00,20,5,1\n";
        let e = parse_measured(bad, "m.csv").unwrap_err().to_string();
        assert!(e.contains("m.csv:2: heating_w = -3 is outside 0"), "{e}");
        assert!(e.contains("m.csv:3: bad time stamp"), "{e}");
    }

    #[test]
    fn interval_limits_both_ends() {
        let fast = "time,indoor_c,outdoor_c,heating_w\n2025-01-06T00:00+00:00,20,5,1\n2025-01-06T00:04+00:00,20,5,1\n2025-01-06T00:08+00:00,20,5,1\n";
        let e = parse_measured(fast, "f.csv").unwrap_err().to_string();
        assert!(e.contains("f.csv:3: interval of 240 s"), "{e}");
        let ok5 = fast.replace(":04", ":05").replace(":08", ":10");
        assert_eq!(parse_measured(&ok5, "f.csv").unwrap().step_s, 300.0);
        let slow = "time,indoor_c,outdoor_c,heating_w\n2025-01-06T00:00+00:00,20,5,1\n2025-01-06T02:00+00:00,20,5,1\n2025-01-06T04:00+00:00,20,5,1\n";
        assert!(parse_measured(slow, "s.csv")
            .unwrap_err()
            .to_string()
            .contains("interval of 7200 s"));
        let ok60 = slow.replace("T02", "T01").replace("T04", "T02");
        assert_eq!(parse_measured(&ok60, "s.csv").unwrap().step_s, 3600.0);
    }

    #[test]
    fn unknown_and_missing_columns() {
        let e = parse_measured("time,indoor,outdoor_c\n", "h.csv")
            .unwrap_err()
            .to_string();
        assert!(e.contains("h.csv:1: no column `indoor_c`"), "{e}");
        assert!(e.contains("unknown column `indoor`"), "{e}");
    }

    #[test]
    fn long_input_gap_is_an_error() {
        let t = "time,indoor_c,outdoor_c,heating_w\n2025-01-06T00:00+00:00,20,5,1\n2025-01-06T01:00+00:00,20,,1\n2025-01-07T01:00+00:00,20,5,1\n";
        let e = parse_measured(t, "g.csv").unwrap_err().to_string();
        assert!(
            e.contains("g.csv:4: column `outdoor_c` is missing for 24.0 h (since line 2)"),
            "{e}"
        );
    }
}
