//! Outputs of `dwell simulate`: `hourly.csv`, `inputs.csv`, `summary.json`.

use dwell_studies::SimResult;

use crate::outdir::{OutputDir, ReportError};

fn num(v: f64, decimals: usize) -> String {
    if v.is_finite() {
        format!("{v:.decimals$}")
    } else {
        String::new()
    }
}

fn stamp(t: &chrono::DateTime<chrono::FixedOffset>) -> String {
    t.format("%Y-%m-%dT%H:%M%:z").to_string()
}

fn csv_text(
    header: &[String],
    rows: impl Iterator<Item = Vec<String>>,
) -> Result<String, ReportError> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let fmt = |e: csv::Error| ReportError::Format {
        what: "CSV".into(),
        message: e.to_string(),
    };
    w.write_record(header).map_err(fmt)?;
    for r in rows {
        w.write_record(&r).map_err(fmt)?;
    }
    let bytes = w.into_inner().map_err(|e| ReportError::Format {
        what: "CSV".into(),
        message: e.to_string(),
    })?;
    Ok(String::from_utf8(bytes).expect("CSV of UTF-8 strings is UTF-8"))
}

/// `hourly.csv`: `time`, `outdoor_c`, then `<zone>_c` (at the stamp) and `<zone>_heating_w`
/// (mean over the hour ending at the stamp; empty on the first row, the start instant).
pub fn hourly_csv(r: &SimResult) -> Result<String, ReportError> {
    let mut header = vec!["time".to_string(), "outdoor_c".to_string()];
    for z in &r.zones {
        header.push(format!("{z}_c"));
        header.push(format!("{z}_heating_w"));
    }
    let rows = (0..r.times.len()).map(|i| {
        let mut row = vec![stamp(&r.times[i]), num(r.outdoor_c[i], 2)];
        for z in 0..r.zones.len() {
            row.push(num(r.zone_c[z][i], 3));
            row.push(num(r.zone_heating_w[z][i], 1));
        }
        row
    });
    csv_text(&header, rows)
}

/// `inputs.csv`: `time` and one column per network input, as applied (temperatures at the
/// stamp, heat flows and irradiances as means over the hour starting at the stamp).
pub fn inputs_csv(r: &SimResult) -> Result<String, ReportError> {
    let mut header = vec!["time".to_string()];
    header.extend(r.input_names.iter().cloned());
    let m = r.input_names.len();
    let rows = (0..r.times.len()).map(|i| {
        let mut row = vec![stamp(&r.times[i])];
        row.extend(r.inputs[i * m..(i + 1) * m].iter().map(|v| num(*v, 3)));
        row
    });
    csv_text(&header, rows)
}

/// Writes the three files of a simulation into `out`.
pub fn write_simulation(
    out: &OutputDir,
    r: &SimResult,
) -> Result<Vec<std::path::PathBuf>, ReportError> {
    // Format everything first so nothing is written when formatting fails.
    let hourly = hourly_csv(r)?;
    let inputs = inputs_csv(r)?;
    let summary = serde_json::to_string_pretty(&r.summary).map_err(|e| ReportError::Format {
        what: "summary.json".into(),
        message: e.to_string(),
    })?;
    Ok(vec![
        out.write("hourly.csv", hourly.as_bytes())?,
        out.write("inputs.csv", inputs.as_bytes())?,
        out.write("summary.json", summary.as_bytes())?,
    ])
}
