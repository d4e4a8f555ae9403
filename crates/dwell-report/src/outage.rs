//! Outputs of `dwell outage`: `outage.json`, `outage_path.csv` (every step), and for the
//! charts `house.json` and `run.json` ([`crate::study_files`]).

use dwell_model::House;
use dwell_studies::outage::OutageStudy;

use crate::csvtext::{csv_text, json, num};
use crate::outdir::{OutputDir, ReportError};
use crate::run_marker::{RunCommand, RunMarker, RUN_FILE};
use crate::study_files::{house_json, HOUSE_FILE};

/// `outage_path.csv`: local time, outdoor, heating on or off, then per zone air and heat.
pub fn outage_path_csv(s: &OutageStudy) -> Result<String, ReportError> {
    let t = &s.trace;
    let mut header = vec!["local_time".to_string(), "outdoor_c".to_string()];
    for z in &s.zones {
        header.push(format!("{}_c", z.zone));
        header.push(format!("{}_heating_w", z.zone));
    }
    let h: Vec<&str> = header.iter().map(|s| s.as_str()).collect();
    let rows = (0..t.local.len()).map(|k| {
        let mut r = vec![
            t.local[k].format("%Y-%m-%dT%H:%M").to_string(),
            num(Some(t.outdoor_c[k]), 2),
        ];
        for z in 0..s.zones.len() {
            r.push(num(Some(t.zone_c[z][k]), 3));
            r.push(num(Some(t.heat_w[z][k]), 1));
        }
        r
    });
    csv_text(&h, rows)
}

/// Writes the outputs of an outage study of `house`, `run.json` last; everything is formatted
/// before anything is written.
pub fn write_outage(
    out: &OutputDir,
    s: &OutageStudy,
    house: &House,
) -> Result<Vec<std::path::PathBuf>, ReportError> {
    let j = json(s, "outage.json")?;
    let p = outage_path_csv(s)?;
    let sheet = house_json(house)?;
    let mut marker = RunMarker::new(RunCommand::Outage);
    if let Some(t) = s.trace.times.first() {
        marker = marker.with_offset(*t.offset());
    }
    let marker = marker.to_json()?;
    Ok(vec![
        out.write("outage.json", j.as_bytes())?,
        out.write("outage_path.csv", p.as_bytes())?,
        out.write(HOUSE_FILE, sheet.as_bytes())?,
        out.write(RUN_FILE, marker.as_bytes())?,
    ])
}
