//! Reading back the files of a finished `simulate` run, so charts and the report are drawn
//! from exactly what was written (and `dwell chart DIR` can redraw them later). The studies'
//! folders are read by [`crate::study_files`].

use std::path::Path;

use chrono::{DateTime, FixedOffset, NaiveDateTime};

use crate::read_error::{numbers, read_csv, read_text, ReadError};

/// The hourly results and summaries of one simulation, as read from its output folder.
#[derive(Clone, Debug)]
pub struct SimulationFiles {
    /// Stamps of `hourly.csv`.
    pub times: Vec<DateTime<FixedOffset>>,
    /// Outdoor air (°C), column `outdoor_c`.
    pub outdoor_c: Vec<f64>,
    /// Zone ids, in column order.
    pub zones: Vec<String>,
    /// Air temperature per zone (°C), columns `<zone>_c`, `[zone][row]`.
    pub zone_c: Vec<Vec<f64>>,
    /// Mean heating power per zone over the hour ending at the stamp (W), columns
    /// `<zone>_heating_w` (NaN where empty).
    pub zone_heating_w: Vec<Vec<f64>>,
    /// Setpoint per zone (°C) from `setpoints.csv`, if that file exists: (zone, values).
    pub setpoints: Vec<(String, Vec<f64>)>,
    /// `summary.json`.
    pub summary: serde_json::Value,
    /// `house.json` (the check sheet of the house), if it exists.
    pub house: Option<serde_json::Value>,
}

/// Parses a stamp written by the report (`%Y-%m-%dT%H:%M%:z`).
pub fn parse_stamp(s: &str) -> Option<DateTime<FixedOffset>> {
    DateTime::parse_from_str(s, "%Y-%m-%dT%H:%M%:z").ok()
}

impl SimulationFiles {
    /// Reads `hourly.csv`, `summary.json` and, if present, `setpoints.csv` and `house.json`
    /// from `dir`.
    pub fn read(dir: &Path) -> Result<SimulationFiles, ReadError> {
        let hp = dir.join("hourly.csv");
        let (header, cols) = read_csv(&hp)?;
        if header.len() < 2 || header[0] != "time" || header[1] != "outdoor_c" {
            return Err(ReadError::content(&hp, "expected columns time, outdoor_c, then <zone>_c and <zone>_heating_w; is this the folder of a `dwell simulate` run?"));
        }
        let times = cols[0]
            .iter()
            .enumerate()
            .map(|(i, s)| {
                parse_stamp(s).ok_or_else(|| {
                    ReadError::content(
                        &hp,
                        format!("row {}: time {s:?} is not YYYY-MM-DDTHH:MM+hh:mm", i + 2),
                    )
                })
            })
            .collect::<Result<Vec<_>, _>>()?;
        if times.len() < 2 {
            return Err(ReadError::content(&hp, "fewer than two rows"));
        }
        let outdoor_c = numbers(&hp, "outdoor_c", &cols[1])?;
        let mut zones = Vec::new();
        let mut zone_c = Vec::new();
        let mut zone_heating_w = Vec::new();
        let mut c = 2;
        while c + 1 < header.len() {
            let (a, b) = (&header[c], &header[c + 1]);
            let zone = a
                .strip_suffix("_c")
                .filter(|z| b == &format!("{z}_heating_w"));
            let Some(zone) = zone else {
                return Err(ReadError::content(
                    &hp,
                    format!("columns {a:?}, {b:?}: expected <zone>_c then <zone>_heating_w"),
                ));
            };
            zones.push(zone.to_string());
            zone_c.push(numbers(&hp, a, &cols[c])?);
            zone_heating_w.push(numbers(&hp, b, &cols[c + 1])?);
            c += 2;
        }
        let sp = dir.join("setpoints.csv");
        let mut setpoints = Vec::new();
        if sp.exists() {
            let (h, cols) = read_csv(&sp)?;
            for (name, col) in h.iter().zip(&cols).skip(1) {
                let zone = name.strip_suffix("_setpoint_c").unwrap_or(name);
                setpoints.push((zone.to_string(), numbers(&sp, name, col)?));
            }
        }
        let summary_path = dir.join("summary.json");
        let summary = serde_json::from_str(&read_text(&summary_path)?)
            .map_err(|e| ReadError::content(&summary_path, e.to_string()))?;
        let house_path = dir.join("house.json");
        let house = if house_path.exists() {
            Some(
                serde_json::from_str(&read_text(&house_path)?)
                    .map_err(|e| ReadError::content(&house_path, e.to_string()))?,
            )
        } else {
            None
        };
        Ok(SimulationFiles {
            times,
            outdoor_c,
            zones,
            zone_c,
            zone_heating_w,
            setpoints,
            summary,
            house,
        })
    }

    /// Local time of the first stamp.
    pub fn origin(&self) -> NaiveDateTime {
        self.times[0].naive_local()
    }

    /// Hours of each stamp from the first.
    pub fn hours(&self) -> Vec<f64> {
        self.times
            .iter()
            .map(|t| (*t - self.times[0]).num_seconds() as f64 / 3600.0)
            .collect()
    }

    /// Whole-house heating power per row (W): the sum over zones (NaN on the first row).
    pub fn total_heating_w(&self) -> Vec<f64> {
        (0..self.times.len())
            .map(|i| {
                if self.zone_heating_w.is_empty() {
                    f64::NAN
                } else {
                    self.zone_heating_w.iter().map(|z| z[i]).sum()
                }
            })
            .collect()
    }
}
