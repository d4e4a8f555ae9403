//! Outputs of `dwell compare`: `compare.json` and `compare.csv`, base first, and for the
//! charts `house.json` (of the base) and `run.json` ([`crate::study_files`]).

use dwell_model::House;
use dwell_studies::compare::Comparison;

use crate::csvtext::{csv_text, json, num};
use crate::outdir::{OutputDir, ReportError};
use crate::run_marker::{RunCommand, RunMarker, RUN_FILE};
use crate::study_files::{house_json, HOUSE_FILE};

/// `compare.csv`.
pub fn compare_csv(c: &Comparison) -> Result<String, ReportError> {
    let header = [
        "variant",
        "patches",
        "heating_kwh",
        "change_kwh",
        "change_pct",
        "peak_w",
        "lowest_occupied_c",
        "hours_outside_band_h",
        "purchased_kwh",
        "money",
        "money_saved",
        "upgrade_cost",
        "simple_payback_years",
    ];
    let rows = c.rows.iter().map(|r| {
        vec![
            r.variant.clone(),
            r.patches.join(" + "),
            num(Some(r.heating_kwh), 1),
            num(Some(r.change_kwh), 1),
            num(r.change_pct, 1),
            num(Some(r.peak_w), 0),
            num(r.lowest_occupied_c, 2),
            r.hours_outside_band_h.to_string(),
            num(Some(r.purchased_kwh), 1),
            num(r.money, 2),
            num(r.money_saved, 2),
            num(r.upgrade_cost, 2),
            num(r.simple_payback_years, 1),
        ]
    });
    csv_text(&header, rows)
}

/// Writes the outputs of a comparison whose base is `base`, `run.json` last; everything is
/// formatted before anything is written.
pub fn write_compare(
    out: &OutputDir,
    c: &Comparison,
    base: &House,
) -> Result<Vec<std::path::PathBuf>, ReportError> {
    let j = json(c, "compare.json")?;
    let s = compare_csv(c)?;
    let sheet = house_json(base)?;
    let marker = RunMarker::new(RunCommand::Compare).to_json()?;
    Ok(vec![
        out.write("compare.json", j.as_bytes())?,
        out.write("compare.csv", s.as_bytes())?,
        out.write(HOUSE_FILE, sheet.as_bytes())?,
        out.write(RUN_FILE, marker.as_bytes())?,
    ])
}
