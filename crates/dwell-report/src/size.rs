//! Outputs of `dwell size`: `sizing.json`, `sizing.csv`, `capacity_curve.csv`, with a weather
//! year `load_duration.csv`, and for the charts `house.json` and `run.json`
//! ([`crate::study_files`]).

use dwell_model::House;
use dwell_studies::size::Sizing;

use crate::csvtext::{csv_text, json, num};
use crate::outdir::{OutputDir, ReportError};
use crate::run_marker::{RunCommand, RunMarker, RUN_FILE};
use crate::study_files::{house_json, HOUSE_FILE};

/// `sizing.csv`: one row per zone and a `total` row; watts, breakdown by group.
pub fn sizing_csv(s: &Sizing) -> Result<String, ReportError> {
    let groups = [
        "walls",
        "roof",
        "floor_ground",
        "windows",
        "doors",
        "ventilation",
        "links",
    ];
    let mut header = vec![
        "zone",
        "heated",
        "steady_w",
        "dynamic_w",
        "hold_w",
        "reheat_share",
        "recommended_w",
        "installed_w",
        "oversizing_ratio",
    ];
    let gcols: Vec<String> = groups.iter().map(|g| format!("{g}_w")).collect();
    header.extend(gcols.iter().map(|s| s.as_str()));
    header.extend(["to_other_zones_w", "other_w"]);
    let mut rows: Vec<Vec<String>> = s
        .zones
        .iter()
        .map(|z| {
            let mut r = vec![
                z.zone.clone(),
                z.heated.to_string(),
                num(Some(z.steady_w), 1),
                num(z.dynamic_w, 1),
                num(z.hold_w, 1),
                num(z.reheat_share, 3),
                num(Some(z.recommended_w), 0),
                num(z.installed_w, 0),
                num(z.oversizing_ratio, 3),
            ];
            r.extend(
                groups
                    .iter()
                    .map(|g| num(z.breakdown.by_group_w.get(*g).copied(), 1)),
            );
            r.push(num(Some(z.breakdown.to_zones_w.values().sum()), 1));
            r.push(num(Some(z.breakdown.other_w), 1));
            r
        })
        .collect();
    let t = &s.total;
    let mut r = vec![
        "total".into(),
        String::new(),
        num(Some(t.steady_w), 1),
        num(Some(t.dynamic_w), 1),
        String::new(),
        String::new(),
        num(Some(t.recommended_w), 0),
        num(Some(t.installed_w), 0),
        String::new(),
    ];
    r.extend(groups.iter().map(|g| num(t.by_group_w.get(*g).copied(), 1)));
    r.extend([String::new(), String::new()]);
    rows.push(r);
    csv_text(&header, rows.into_iter())
}

/// `load_duration.csv`: `hours_at_or_above_h`, `load_w`, one row per hour of the year.
pub fn load_duration_csv(s: &Sizing) -> Result<Option<String>, ReportError> {
    let Some(l) = &s.load_duration else {
        return Ok(None);
    };
    csv_text(
        &["hours_at_or_above_h", "load_w"],
        l.sorted_w
            .iter()
            .enumerate()
            .map(|(i, w)| vec![(i + 1).to_string(), num(Some(*w), 1)]),
    )
    .map(Some)
}

/// `capacity_curve.csv`: capacity against occupied hours below the comfort band.
pub fn capacity_curve_csv(s: &Sizing) -> Result<Option<String>, ReportError> {
    if s.capacity_curve.is_empty() {
        return Ok(None);
    }
    csv_text(
        &[
            "fraction_of_dynamic",
            "total_capacity_w",
            "occupied_hours_below_h",
        ],
        s.capacity_curve.iter().map(|p| {
            vec![
                format!("{:.2}", p.fraction),
                num(Some(p.total_capacity_w), 1),
                p.occupied_hours_below_h.to_string(),
            ]
        }),
    )
    .map(Some)
}

/// Writes the outputs of a sizing of `house`, `run.json` last; everything is formatted before
/// anything is written.
pub fn write_sizing(
    out: &OutputDir,
    s: &Sizing,
    house: &House,
) -> Result<Vec<std::path::PathBuf>, ReportError> {
    let j = json(s, "sizing.json")?;
    let c = sizing_csv(s)?;
    let l = load_duration_csv(s)?;
    let k = capacity_curve_csv(s)?;
    let sheet = house_json(house)?;
    let marker = RunMarker::new(RunCommand::Size).to_json()?;
    let mut w = vec![
        out.write("sizing.json", j.as_bytes())?,
        out.write("sizing.csv", c.as_bytes())?,
    ];
    if let Some(l) = l {
        w.push(out.write("load_duration.csv", l.as_bytes())?);
    }
    if let Some(k) = k {
        w.push(out.write("capacity_curve.csv", k.as_bytes())?);
    }
    w.push(out.write(HOUSE_FILE, sheet.as_bytes())?);
    w.push(out.write(RUN_FILE, marker.as_bytes())?);
    Ok(w)
}
