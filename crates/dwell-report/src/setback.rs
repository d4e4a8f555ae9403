//! Outputs of `dwell setback`: `setback.json`, `setback.csv` (one row per night and zone),
//! `setback_path.csv` (every step of the run with setback), and for the charts `house.json` and
//! `run.json` ([`crate::study_files`]).

use dwell_model::House;
use dwell_studies::setback::SetbackStudy;

use crate::csvtext::{csv_text, json, num};
use crate::outdir::{OutputDir, ReportError};
use crate::run_marker::{RunCommand, RunMarker, RUN_FILE};
use crate::study_files::{house_json, HOUSE_FILE};

/// `setback.csv`.
pub fn setback_csv(s: &SetbackStudy) -> Result<String, ReportError> {
    let header = [
        "night",
        "zone",
        "setback_c",
        "setback_from",
        "setback_reached_at",
        "hours_to_setback_h",
        "lowest_c",
        "lowest_at",
        "rise_at",
        "morning_setpoint_c",
        "recovery_h",
        "heat_kwh",
        "continuous_kwh",
        "saving_kwh",
        "saving_pct",
        "occupied_hours_below_h",
        "ready_by",
        "latest_start",
        "lead_h",
    ];
    let o = |v: &Option<String>| v.clone().unwrap_or_default();
    let rows = s.nights.iter().flat_map(|n| {
        n.zones.iter().map(move |z| {
            vec![
                n.night.clone(),
                z.zone.clone(),
                num(z.setback_c, 2),
                o(&z.setback_from),
                o(&z.setback_reached_at),
                num(z.hours_to_setback_h, 2),
                num(Some(z.lowest_c), 2),
                z.lowest_at.clone(),
                o(&z.rise_at),
                num(z.morning_setpoint_c, 2),
                num(z.recovery_h, 2),
                num(Some(z.heat_kwh), 3),
                num(Some(z.continuous_kwh), 3),
                num(Some(z.saving_kwh), 3),
                num(z.saving_pct, 1),
                num(Some(z.occupied_hours_below_h), 2),
                o(&z.ready_by),
                o(&z.latest_start),
                num(z.lead_h, 2),
            ]
        })
    });
    csv_text(&header, rows)
}

/// `setback_path.csv`: local time, outdoor, then per zone air and heat, then the setpoint
/// (°C) of each zone whose thermostat had one (empty on the first row, before any step).
pub fn setback_path_csv(s: &SetbackStudy, zones: &[String]) -> Result<Option<String>, ReportError> {
    let Some(t) = &s.trace else { return Ok(None) };
    let mut header = vec!["local_time".to_string(), "outdoor_c".to_string()];
    for z in zones {
        header.push(format!("{z}_c"));
        header.push(format!("{z}_heating_w"));
    }
    let with_setpoint: Vec<usize> = (0..zones.len())
        .filter(|&z| {
            t.setpoint_c
                .get(z)
                .is_some_and(|s| s.iter().any(|v| v.is_finite()))
        })
        .collect();
    for &z in &with_setpoint {
        header.push(format!("{}_setpoint_c", zones[z]));
    }
    let h: Vec<&str> = header.iter().map(|s| s.as_str()).collect();
    let rows = (0..t.local.len()).map(|k| {
        let mut r = vec![
            t.local[k].format("%Y-%m-%dT%H:%M").to_string(),
            num(Some(t.outdoor_c[k]), 2),
        ];
        for z in 0..zones.len() {
            r.push(num(Some(t.zone_c[z][k]), 3));
            r.push(num(Some(t.heat_w[z][k]), 1));
        }
        for &z in &with_setpoint {
            r.push(num(Some(t.setpoint_c[z][k]), 3));
        }
        r
    });
    csv_text(&h, rows).map(Some)
}

/// Writes the outputs of a setback study of `house`, `run.json` last; everything is formatted
/// before anything is written.
pub fn write_setback(
    out: &OutputDir,
    s: &SetbackStudy,
    house: &House,
) -> Result<Vec<std::path::PathBuf>, ReportError> {
    let zones: Vec<String> = house.zones.iter().map(|z| z.id.clone()).collect();
    let j = json(s, "setback.json")?;
    let c = setback_csv(s)?;
    let p = setback_path_csv(s, &zones)?;
    let sheet = house_json(house)?;
    let mut marker = RunMarker::new(RunCommand::Setback);
    if let Some(t) = s.trace.as_ref().and_then(|t| t.times.first()) {
        marker = marker.with_offset(*t.offset());
    }
    let marker = marker.to_json()?;
    let mut w = vec![
        out.write("setback.json", j.as_bytes())?,
        out.write("setback.csv", c.as_bytes())?,
    ];
    if let Some(p) = p {
        w.push(out.write("setback_path.csv", p.as_bytes())?);
    }
    w.push(out.write(HOUSE_FILE, sheet.as_bytes())?);
    w.push(out.write(RUN_FILE, marker.as_bytes())?);
    Ok(w)
}
