//! The files of a finished `size`, `setback`, `outage` or `compare` run, written for its
//! charts and report and read back to draw them.
//!
//! A study draws its charts and `report.html` from these files, not from the results in
//! memory, as `simulate` does: so `dwell chart DIR` redraws exactly what the run drew, byte
//! for byte. What each study keeps beside its main JSON:
//!
//! | command | read back |
//! |---|---|
//! | `size` | `sizing.json`; `load_duration.csv` (the sorted hourly loads) when it ran with a weather year |
//! | `setback` | `setback.json`; `setback_path.csv` (every step of the run with setback, with each zone's setpoint) |
//! | `outage` | `outage.json`; `outage_path.csv` (every step) |
//! | `compare` | `compare.json` |
//!
//! and, for all four, `house.json` (the check sheet of the house; of the base for `compare`)
//! and `run.json` ([`RunMarker`]; it also holds the offset of local standard time, which the
//! path files, written in local time for a spreadsheet, do not). The traces are drawn from the
//! path files as written, rounded to 0.001 °C and 0.1 W.

use std::path::Path;

use chrono::{FixedOffset, NaiveDateTime, TimeZone};
use dwell_model::House;
use dwell_studies::compare::Comparison;
use dwell_studies::outage::OutageStudy;
use dwell_studies::setback::SetbackStudy;
use dwell_studies::size::Sizing;
use dwell_studies::trace::Trace;
use serde_json::Value;

use crate::outdir::ReportError;
use crate::read_error::{numbers, read_csv, read_text, ReadError};
use crate::run_marker::{RunCommand, RunMarker, RUN_FILE};

/// Name of the check sheet of the house in an output folder.
pub const HOUSE_FILE: &str = "house.json";

/// The results of one study, as read back.
#[derive(Clone, Debug)]
pub enum Study {
    /// `dwell size`, with `load_duration.sorted_w` from `load_duration.csv`.
    Size(Sizing),
    /// `dwell setback`, with the trace from `setback_path.csv`.
    Setback {
        /// The study.
        study: SetbackStudy,
        /// Zone ids in the order of the path's columns (the house's order).
        zones: Vec<String>,
    },
    /// `dwell outage`, with the trace from `outage_path.csv`.
    Outage {
        /// The study.
        study: OutageStudy,
        /// Zone ids in the order of the path's columns (the house's order).
        zones: Vec<String>,
    },
    /// `dwell compare`.
    Compare(Comparison),
}

/// Everything a study's charts and report are drawn from.
#[derive(Clone, Debug)]
pub struct StudyFiles {
    /// `run.json`.
    pub marker: RunMarker,
    /// The study's results.
    pub study: Study,
    /// `house.json`, the check sheet of the house ([`dwell_model::summary::CheckSummary`]).
    pub house: Value,
}

/// Pretty JSON of the check sheet of `house`, as `house.json`.
pub fn house_json(house: &House) -> Result<String, ReportError> {
    serde_json::to_string_pretty(&dwell_model::summary::check_summary(house)).map_err(|e| {
        ReportError::Format {
            what: HOUSE_FILE.into(),
            message: e.to_string(),
        }
    })
}

fn json<T: serde::de::DeserializeOwned>(dir: &Path, name: &str) -> Result<T, ReadError> {
    let path = dir.join(name);
    serde_json::from_str(&read_text(&path)?).map_err(|e| ReadError::content(&path, e.to_string()))
}

/// Reads a path file (`setback_path.csv`, `outage_path.csv`): `local_time`, `outdoor_c`, then
/// `<zone>_c` and `<zone>_heating_w` per zone, then any `<zone>_setpoint_c`. Returns the zone
/// ids and the trace, stamped with `offset` (no states are kept).
pub fn read_path(path: &Path, offset: FixedOffset) -> Result<(Vec<String>, Trace), ReadError> {
    let (header, cols) = read_csv(path)?;
    if header.len() < 2 || header[0] != "local_time" || header[1] != "outdoor_c" {
        return Err(ReadError::content(
            path,
            "expected columns local_time, outdoor_c, then <zone>_c and <zone>_heating_w per zone",
        ));
    }
    let local = cols[0]
        .iter()
        .enumerate()
        .map(|(i, s)| {
            NaiveDateTime::parse_from_str(s, "%Y-%m-%dT%H:%M").map_err(|_| {
                ReadError::content(
                    path,
                    format!("row {}: local_time {s:?} is not YYYY-MM-DDTHH:MM", i + 2),
                )
            })
        })
        .collect::<Result<Vec<_>, _>>()?;
    let outdoor_c = numbers(path, "outdoor_c", &cols[1])?;
    let (mut zones, mut zone_c, mut heat_w) = (Vec::new(), Vec::new(), Vec::new());
    let mut c = 2;
    while c + 1 < header.len() {
        let (a, b) = (&header[c], &header[c + 1]);
        match a
            .strip_suffix("_c")
            .filter(|z| b == &format!("{z}_heating_w"))
        {
            Some(z) => {
                zones.push(z.to_string());
                zone_c.push(numbers(path, a, &cols[c])?);
                heat_w.push(numbers(path, b, &cols[c + 1])?);
                c += 2;
            }
            None => break,
        }
    }
    let mut setpoint_c = vec![vec![f64::NAN; local.len()]; zones.len()];
    for (name, col) in header.iter().zip(&cols).skip(c) {
        let z = name
            .strip_suffix("_setpoint_c")
            .and_then(|z| zones.iter().position(|x| x == z))
            .ok_or_else(|| {
                ReadError::content(
                    path,
                    format!("column {name:?}: expected <zone>_c, <zone>_heating_w or <zone>_setpoint_c of a zone"),
                )
            })?;
        setpoint_c[z] = numbers(path, name, col)?;
    }
    let times = local
        .iter()
        .map(|l| {
            offset
                .from_local_datetime(l)
                .single()
                .expect("a fixed offset maps every local time to one instant")
        })
        .collect();
    Ok((
        zones,
        Trace {
            times,
            local,
            zone_c,
            heat_w,
            setpoint_c,
            outdoor_c,
            states: Vec::new(),
            n: 0,
        },
    ))
}

/// The offset of local standard time in `run.json`, required by the path files.
fn offset(dir: &Path, marker: &RunMarker) -> Result<FixedOffset, ReadError> {
    marker.offset(dir)?.ok_or_else(|| {
        ReadError::content(
            &dir.join(RUN_FILE),
            format!(
                "no utc_offset, which the {} chart needs to place its local times",
                marker.command
            ),
        )
    })
}

impl StudyFiles {
    /// Reads the files of the study `marker` names from `dir`.
    pub fn read(dir: &Path, marker: RunMarker) -> Result<StudyFiles, ReadError> {
        let study = match marker.command {
            RunCommand::Simulate => {
                return Err(ReadError::content(
                    &dir.join(RUN_FILE),
                    "names a `simulate` run, whose files are read as SimulationFiles",
                ))
            }
            RunCommand::Size => {
                let mut s: Sizing = json(dir, "sizing.json")?;
                if let Some(ld) = &mut s.load_duration {
                    let p = dir.join("load_duration.csv");
                    let (h, cols) = read_csv(&p)?;
                    if h.len() != 2 || h[1] != "load_w" {
                        return Err(ReadError::content(
                            &p,
                            "expected columns hours_at_or_above_h, load_w",
                        ));
                    }
                    ld.sorted_w = numbers(&p, "load_w", &cols[1])?;
                }
                Study::Size(s)
            }
            RunCommand::Setback => {
                let mut study: SetbackStudy = json(dir, "setback.json")?;
                let (zones, trace) =
                    read_path(&dir.join("setback_path.csv"), offset(dir, &marker)?)?;
                study.trace = Some(trace);
                Study::Setback { study, zones }
            }
            RunCommand::Outage => {
                let mut study: OutageStudy = json(dir, "outage.json")?;
                let p = dir.join("outage_path.csv");
                let (zones, trace) = read_path(&p, offset(dir, &marker)?)?;
                let named: Vec<&String> = study.zones.iter().map(|z| &z.zone).collect();
                if zones.iter().collect::<Vec<_>>() != named {
                    return Err(ReadError::content(
                        &p,
                        format!(
                            "its zones {zones:?} are not those of outage.json ({named:?}); the two come from different runs"
                        ),
                    ));
                }
                study.trace = trace;
                Study::Outage { study, zones }
            }
            RunCommand::Compare => Study::Compare(json(dir, "compare.json")?),
        };
        let house = json(dir, HOUSE_FILE)?;
        Ok(StudyFiles {
            marker,
            study,
            house,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_path_file_reads_back_with_setpoints_and_empty_cells() {
        let d = tempfile::tempdir().unwrap();
        let p = d.path().join("setback_path.csv");
        std::fs::write(
            &p,
            "local_time,outdoor_c,a_c,a_heating_w,b_c,b_heating_w,b_setpoint_c\n\
             2025-01-13T12:00,1.50,20.000,0.0,18.500,0.0,\n\
             2025-01-13T12:10,1.40,19.990,120.5,18.490,0.0,21.00\n",
        )
        .unwrap();
        let off = FixedOffset::east_opt(3600).unwrap();
        let (zones, t) = read_path(&p, off).unwrap();
        assert_eq!(zones, ["a", "b"]);
        assert_eq!(t.local.len(), 2);
        assert_eq!(t.times[1].to_rfc3339(), "2025-01-13T12:10:00+01:00");
        assert_eq!(t.outdoor_c, [1.5, 1.4]);
        assert_eq!(t.zone_c[1], [18.5, 18.49]);
        assert_eq!(t.heat_w[0], [0.0, 120.5]);
        assert!(
            t.setpoint_c[0].iter().all(|v| v.is_nan()),
            "no column: no setpoint"
        );
        assert!(t.setpoint_c[1][0].is_nan() && t.setpoint_c[1][1] == 21.0);
    }

    #[test]
    fn a_damaged_path_file_names_the_file_row_and_column() {
        let d = tempfile::tempdir().unwrap();
        let p = d.path().join("outage_path.csv");
        let off = FixedOffset::east_opt(0).unwrap();
        std::fs::write(
            &p,
            "local_time,outdoor_c,a_c,a_heating_w\n2025-01-13T12:00,1,20,x\n",
        )
        .unwrap();
        let e = read_path(&p, off).unwrap_err().to_string();
        assert!(
            e.contains("outage_path.csv: row 2, column a_heating_w: \"x\" is not a number"),
            "{e}"
        );
        std::fs::write(&p, "local_time,outdoor_c,a_c,a_heating_w,c_setpoint_c\n").unwrap();
        let e = read_path(&p, off).unwrap_err().to_string();
        assert!(e.contains("column \"c_setpoint_c\""), "{e}");
        std::fs::write(&p, "time,outdoor_c\n").unwrap();
        let e = read_path(&p, off).unwrap_err().to_string();
        assert!(e.contains("expected columns local_time, outdoor_c"), "{e}");
        std::fs::write(&p, "local_time,outdoor_c\n13 Jan,1\n").unwrap();
        let e = read_path(&p, off).unwrap_err().to_string();
        assert!(e.contains("row 2: local_time \"13 Jan\""), "{e}");
        let e = read_path(&d.path().join("none.csv"), off)
            .unwrap_err()
            .to_string();
        assert!(
            e.starts_with("cannot read ") && e.contains("none.csv"),
            "{e}"
        );
    }
}
