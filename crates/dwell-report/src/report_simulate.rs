//! The client-facing outputs of `dwell simulate`: `setpoints.csv` and `house.json` (so the
//! charts can be redrawn from the folder alone), `charts/*.svg|png` and `report.html`.

use std::path::PathBuf;

use chrono::NaiveDate;
use dwell_model::{House, ModelFile};
use dwell_studies::SimResult;
use serde_json::Value;

use crate::charts_simulate::{simulation_charts, window, NamedChart};
use crate::html::{esc, inline_svg, render, table, Report, Section};
use crate::outdir::{OutputDir, ReportError};
use crate::run_files::SimulationFiles;

/// `setpoints.csv`: `time` and `<zone>_setpoint_c` for every zone with a thermostat: the
/// highest setpoint of the zone's heaters in force at each stamp (local time of the stamp).
pub fn setpoints_csv(
    model: &ModelFile,
    house: &House,
    r: &SimResult,
) -> Result<String, ReportError> {
    use dwell_model::schedule::WeeklySchedule;
    let mut header = vec!["time".to_string()];
    let mut cols: Vec<Vec<WeeklySchedule>> = Vec::new();
    for z in &house.zones {
        let scheds: Vec<WeeklySchedule> = model
            .heaters
            .iter()
            .filter(|h| h.zone == z.id)
            .filter_map(|h| match (&h.setpoint_c, &h.setpoint_schedule) {
                (Some(t), _) => Some(WeeklySchedule::constant(*t)),
                (None, Some(id)) => model
                    .schedules
                    .iter()
                    .find(|s| &s.id == id)
                    .and_then(|s| WeeklySchedule::new(s).ok()),
                (None, None) => None,
            })
            .collect();
        if !scheds.is_empty() {
            header.push(format!("{}_setpoint_c", z.id));
            cols.push(scheds);
        }
    }
    let mut w = csv::Writer::from_writer(Vec::new());
    let fmt = |e: csv::Error| ReportError::Format {
        what: "setpoints.csv".into(),
        message: e.to_string(),
    };
    w.write_record(&header).map_err(fmt)?;
    for t in &r.times {
        let local = t.naive_local();
        let mut row = vec![t.format("%Y-%m-%dT%H:%M%:z").to_string()];
        for s in &cols {
            let v = s
                .iter()
                .map(|s| s.value_at(local))
                .fold(f64::NEG_INFINITY, f64::max);
            row.push(format!("{v:.2}"));
        }
        w.write_record(&row).map_err(fmt)?;
    }
    let bytes = w.into_inner().map_err(|e| ReportError::Format {
        what: "setpoints.csv".into(),
        message: e.to_string(),
    })?;
    Ok(String::from_utf8(bytes).expect("CSV of UTF-8 strings is UTF-8"))
}

/// Writes `setpoints.csv` and `house.json` (the check sheet of `house`) into `out`.
pub fn write_simulation_inputs(
    out: &OutputDir,
    model: &ModelFile,
    house: &House,
    r: &SimResult,
) -> Result<Vec<PathBuf>, ReportError> {
    let sp = setpoints_csv(model, house, r)?;
    let sheet =
        serde_json::to_string_pretty(&dwell_model::summary::check_summary(house)).map_err(|e| {
            ReportError::Format {
                what: "house.json".into(),
                message: e.to_string(),
            }
        })?;
    Ok(vec![
        out.write("setpoints.csv", sp.as_bytes())?,
        out.write("house.json", sheet.as_bytes())?,
    ])
}

/// A chart drawn: its data and its SVG text.
pub struct DrawnChart {
    /// The chart and its name.
    pub named: NamedChart,
    /// SVG document.
    pub svg: String,
}

/// Draws `charts` and writes `charts/<name>.svg` and `.png` under `out`.
pub fn write_charts(
    out: &OutputDir,
    charts: Vec<NamedChart>,
) -> Result<(Vec<DrawnChart>, Vec<PathBuf>), ReportError> {
    let dir = OutputDir::create(&out.path().join("charts"))?;
    let err = |name: &str, e: dwell_charts::ChartError| ReportError::Format {
        what: format!("chart {name}"),
        message: e.to_string(),
    };
    let mut drawn = Vec::new();
    let mut files = Vec::new();
    // Render everything first so a failure leaves no partial set.
    let mut rendered = Vec::new();
    for c in charts {
        let svg = dwell_charts::render_svg(&c.chart).map_err(|e| err(&c.name, e))?;
        let png = dwell_charts::render_png(&c.chart).map_err(|e| err(&c.name, e))?;
        rendered.push((c, svg, png));
    }
    for (c, svg, png) in rendered {
        files.push(dir.write(&format!("{}.svg", c.name), svg.as_bytes())?);
        files.push(dir.write(&format!("{}.png", c.name), &png)?);
        drawn.push(DrawnChart { named: c, svg });
    }
    Ok((drawn, files))
}

/// Draws the charts of the simulation whose files (read by [`SimulationFiles::read`]) are
/// in `out`, temperatures over the given local days or the default window, and writes them
/// and `report.html`.
pub fn write_simulation_report_for(
    out: &OutputDir,
    f: &SimulationFiles,
    from: Option<NaiveDate>,
    to: Option<NaiveDate>,
) -> Result<Vec<PathBuf>, ReportError> {
    let charts = simulation_charts(f, window(f, from, to));
    let (drawn, mut files) = write_charts(out, charts)?;
    let html = simulation_html(f, &drawn);
    files.push(out.write("report.html", html.as_bytes())?);
    Ok(files)
}

pub(crate) fn f1(v: &Value) -> String {
    v.as_f64()
        .map(|x| format!("{x:.1}"))
        .unwrap_or_else(|| "–".into())
}
pub(crate) fn f0(v: &Value) -> String {
    v.as_f64()
        .map(|x| format!("{x:.0}"))
        .unwrap_or_else(|| "–".into())
}
pub(crate) fn f2(v: &Value) -> String {
    v.as_f64()
        .map(|x| format!("{x:.2}"))
        .unwrap_or_else(|| "–".into())
}
pub(crate) fn s(v: &Value) -> String {
    v.as_str()
        .map(String::from)
        .unwrap_or_else(|| v.to_string())
}
pub(crate) fn arr(v: &Value) -> &[Value] {
    v.as_array().map(|a| a.as_slice()).unwrap_or(&[])
}

/// Plain words first: energy, peak, comfort, the biggest loss.
fn summary_words(f: &SimulationFiles) -> String {
    let m = &f.summary;
    let mut o = String::new();
    let days = m["hours"].as_f64().unwrap_or(0.0) / 24.0;
    o.push_str(&format!(
        "<p class=\"lead\">Over {:.0} days from {} to {}, the heating delivered <strong>{} kWh</strong> of heat",
        days,
        esc(&day(&m["from"])),
        esc(&day(&m["to"])),
        f0(&m["total_heating_kwh"])
    ));
    o.push_str(&format!(
        ", for which <strong>{} kWh</strong> of energy was bought",
        f0(&m["total_purchased_kwh"])
    ));
    if let Some(c) = m["total_cost"].as_f64() {
        o.push_str(&format!(
            " at a cost of <strong>{c:.2}</strong> (in the currency of the prices in the model)"
        ));
    }
    o.push_str(&format!(
        ". The most the heating had to give in any hour was <strong>{} W</strong>.</p>\n<ul>\n",
        f0(&m["total_peak_heating_w"])
    ));
    for z in arr(&m["zones"]) {
        let c = &z["comfort"];
        let name = esc(&s(&z["zone"]));
        match c["hours_below"].as_u64() {
            Some(0) => o.push_str(&format!(
                "<li>{name} stayed at or above {} °C whenever it was occupied.</li>\n",
                f1(&c["band_min_c"])
            )),
            Some(h) => o.push_str(&format!(
                "<li>{name} was below {} °C for <strong>{h} occupied hour{}</strong>; the coldest it got when occupied was {} °C.</li>\n",
                f1(&c["band_min_c"]),
                if h == 1 { "" } else { "s" },
                f1(&c["coldest_occupied_c"])
            )),
            None => o.push_str(&format!("<li>{name} ranged from {} to {} °C (no comfort band set).</li>\n", f1(&z["min_c"]), f1(&z["max_c"]))),
        }
    }
    if let Some(l) = m["energy_balance"]["losses_kwh"].as_object() {
        let total: f64 = l
            .values()
            .filter_map(|v| v.as_f64())
            .filter(|v| *v > 0.0)
            .sum();
        if let Some((k, v)) = l
            .iter()
            .filter_map(|(k, v)| v.as_f64().map(|v| (k, v)))
            .max_by(|a, b| a.1.total_cmp(&b.1))
        {
            if total > 0.0 {
                o.push_str(&format!(
                    "<li>Most heat leaves through the {} ({:.0} % of all losses).</li>\n",
                    esc(&k.replace('_', " ")),
                    100.0 * v / total
                ));
            }
        }
    }
    o.push_str("</ul>\n");
    o
}

pub(crate) fn day(v: &Value) -> String {
    let t = s(v);
    chrono::DateTime::parse_from_rfc3339(&t)
        .map(|d| d.format("%-d %B %Y").to_string())
        .unwrap_or(t)
}

/// The house section from a check sheet (`house.json`, [`dwell_model::summary::CheckSummary`]).
pub fn house_section(house: Option<&Value>) -> String {
    let Some(h) = house else {
        return "<p>The check sheet of the house (house.json) is not in this folder; run <code>dwell check</code> on the model to see it.</p>\n".into();
    };
    let mut o = String::from("<h3>Rooms and heat-loss coefficients</h3>\n<p>How many watts each zone loses for every degree it is warmer than outside (W/K), by element group.</p>\n");
    let mut rows: Vec<Vec<String>> = arr(&h["zones"])
        .iter()
        .map(|z| {
            vec![
                s(&z["zone"]),
                if z["heated"].as_bool() == Some(true) {
                    "yes".into()
                } else {
                    "no".into()
                },
                f1(&z["floor_area_m2"]),
                f1(&z["walls_w_k"]),
                f1(&z["roof_w_k"]),
                f1(&z["floor_ground_w_k"]),
                f1(&z["windows_w_k"]),
                f1(&z["doors_w_k"]),
                f1(&z["ventilation_w_k"]),
                f1(&z["total_w_k"]),
            ]
        })
        .collect();
    let t = &h["total"];
    rows.push(vec![
        "whole house".into(),
        String::new(),
        f1(&t["floor_area_m2"]),
        f1(&t["walls_w_k"]),
        f1(&t["roof_w_k"]),
        f1(&t["floor_ground_w_k"]),
        f1(&t["windows_w_k"]),
        f1(&t["doors_w_k"]),
        f1(&t["ventilation_w_k"]),
        f1(&t["total_w_k"]),
    ]);
    o.push_str(&table(
        &[
            "zone",
            "heated",
            "floor area (m²)",
            "walls (W/K)",
            "roof (W/K)",
            "floor/ground (W/K)",
            "windows (W/K)",
            "doors (W/K)",
            "ventilation (W/K)",
            "total (W/K)",
        ],
        &rows,
    ));
    o.push_str("<h3>Constructions</h3>\n");
    let rows: Vec<Vec<String>> = arr(&h["constructions"])
        .iter()
        .map(|c| {
            vec![
                s(&c["construction"]),
                s(&c["direction"]),
                f2(&c["u_value_w_m2k"]),
                f0(&c["areal_capacity_kj_m2k"]),
            ]
        })
        .collect();
    o.push_str(&table(
        &[
            "construction",
            "heat flow",
            "U-value (W/(m²·K))",
            "heat capacity (kJ/(m²·K))",
        ],
        &rows,
    ));
    o.push_str(&format!(
        "<p>The model has {} temperature nodes with heat capacity (total {} MJ/K); its slowest time constant is {} h and its fastest {} h.</p>\n",
        s(&h["states"]),
        f1(&h["heat_capacity_mj_k"]),
        f1(&h["longest_time_constant_h"]),
        f2(&h["shortest_time_constant_h"])
    ));
    o
}

fn results_section(f: &SimulationFiles) -> String {
    let m = &f.summary;
    let mut o = String::from("<h3>Zones</h3>\n");
    let rows: Vec<Vec<String>> = arr(&m["zones"])
        .iter()
        .map(|z| {
            let c = &z["comfort"];
            vec![
                s(&z["zone"]),
                f1(&z["heating_kwh"]),
                f0(&z["peak_heating_w"]),
                f1(&z["min_c"]),
                f1(&z["mean_c"]),
                f1(&z["max_c"]),
                c["hours_below"]
                    .as_u64()
                    .map(|h| h.to_string())
                    .unwrap_or_else(|| "–".into()),
                c["degree_hours_below_kh"]
                    .as_f64()
                    .map(|h| format!("{h:.0}"))
                    .unwrap_or_else(|| "–".into()),
            ]
        })
        .collect();
    o.push_str(&table(
        &[
            "zone",
            "heat (kWh)",
            "peak (W)",
            "lowest (°C)",
            "mean (°C)",
            "highest (°C)",
            "occupied hours below band",
            "degree-hours below (K·h)",
        ],
        &rows,
    ));
    o.push_str("<h3>Heaters</h3>\n");
    let rows: Vec<Vec<String>> = arr(&m["heaters"])
        .iter()
        .map(|h| {
            vec![
                s(&h["heater"]),
                s(&h["zone"]),
                f0(&h["capacity_w"]),
                f1(&h["heat_kwh"]),
                f1(&h["purchased_kwh"]),
                h["cost"]
                    .as_f64()
                    .map(|c| format!("{c:.2}"))
                    .unwrap_or_else(|| "–".into()),
                f0(&h["peak_hourly_w"]),
            ]
        })
        .collect();
    o.push_str(&table(
        &[
            "heater",
            "zone",
            "capacity (W)",
            "heat (kWh)",
            "energy bought (kWh)",
            "cost",
            "peak hourly (W)",
        ],
        &rows,
    ));
    o.push_str("<h3>Energy balance</h3>\n");
    let b = &m["energy_balance"];
    let mut rows = vec![
        vec!["heating".to_string(), f1(&b["heating_kwh"])],
        vec!["internal gains".into(), f1(&b["internal_gains_kwh"])],
        vec!["sun through glazing".into(), f1(&b["solar_kwh"])],
        vec!["other heat inputs".into(), f1(&b["other_heat_kwh"])],
    ];
    if let Some(l) = b["losses_kwh"].as_object() {
        for (k, v) in l {
            rows.push(vec![
                format!("lost through {}", k.replace('_', " ")),
                v.as_f64().map(|x| format!("−{x:.1}")).unwrap_or_default(),
            ]);
        }
    }
    rows.push(vec![
        "change in stored heat".into(),
        b["stored_change_kwh"]
            .as_f64()
            .map(|x| format!("{:.1}", -x))
            .unwrap_or_default(),
    ]);
    rows.push(vec![
        "residual (rounding)".into(),
        b["residual_kwh"]
            .as_f64()
            .map(|x| format!("{x:.2e}"))
            .unwrap_or_default(),
    ]);
    o.push_str(&table(&["term", "kWh"], &rows));
    o.push_str("<p>Sun absorbed on the outside of walls and roofs is netted against the losses of those elements.</p>\n");
    o
}

/// The figures of a chart section.
pub fn figures(drawn: &[DrawnChart]) -> String {
    let mut o = String::new();
    for d in drawn {
        o.push_str(&format!(
            "<figure id=\"chart-{}\">\n{}\n<figcaption>{}</figcaption>\n</figure>\n",
            esc(&d.named.name),
            inline_svg(&d.svg, d.named.chart.title()),
            esc(&d.named.caption)
        ));
    }
    o
}

/// The method section shared by every study report.
pub fn method_text(start: &str, step_min: f64, control: &str) -> String {
    format!(
        "<p>The house is modelled as a network of thermal resistances and heat capacities: each room's air, \
         each layer of each wall, roof and floor, and the ground beneath. Weather, heating, people, appliances \
         and sun drive it. The equations are solved exactly over each time step with the matrix exponential, so \
         the step length ({step_min:.0} min) does not limit the accuracy; the energy bookkeeping closes to rounding.</p>\n\
         <ul>\n<li>Control of the heaters: {}.</li>\n<li>Start of the run: {}.</li>\n\
         <li>Heating power is the mean over each hour; temperatures are at the end of each hour.</li>\n\
         <li>Comfort counts only occupied hours; an hour counts as below the band when the air is more than 0.01 K under it.</li>\n</ul>\n",
        esc(control),
        esc(start)
    )
}

/// The whole simulation report.
pub fn simulation_html(f: &SimulationFiles, drawn: &[DrawnChart]) -> String {
    let m = &f.summary;
    let out: Vec<f64> = f
        .outdoor_c
        .iter()
        .copied()
        .filter(|v| v.is_finite())
        .collect();
    let (lo, hi) = out
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| {
            (a.min(*v), b.max(*v))
        });
    let mean = out.iter().sum::<f64>() / out.len().max(1) as f64;
    let mut cautions = String::new();
    let warnings = arr(&m["warnings"]);
    if !warnings.is_empty() {
        cautions.push_str("<ul class=\"warnings\">\n");
        for w in warnings {
            cautions.push_str(&format!("<li>{}</li>\n", esc(&s(w))));
        }
        cautions.push_str("</ul>\n");
    }
    for c in arr(&m["cautions"]) {
        cautions.push_str(&format!("<p class=\"caution\">{}</p>\n", esc(&s(c))));
    }
    cautions.push_str("<p class=\"caution\">The house and weather in the shipped examples are invented; results for a real house are only as good as the model file describing it.</p>\n");
    let report = Report {
        title: format!("Heating and comfort: {}", s(&m["model"])),
        subtitle: format!("Simulation from {} to {}", day(&m["from"]), day(&m["to"])),
        sections: vec![
            Section { id: "summary".into(), heading: "In short".into(), body: summary_words(f) },
            Section { id: "house".into(), heading: "The house".into(), body: house_section(f.house.as_ref()) },
            Section { id: "results".into(), heading: "Results".into(), body: results_section(f) },
            Section { id: "charts".into(), heading: "Charts".into(), body: figures(drawn) },
            Section {
                id: "method".into(),
                heading: "Assumptions and method".into(),
                body: method_text(&s(&m["start"]), m["step_s"].as_f64().unwrap_or(3600.0) / 60.0, &s(&m["control"])),
            },
            Section {
                id: "weather".into(),
                heading: "Weather".into(),
                body: format!(
                    "<p>Weather: {}. Outdoor air over the period: lowest {lo:.1} °C, mean {mean:.1} °C, highest {hi:.1} °C ({} hourly values).</p>\n",
                    esc(&s(&m["weather"])),
                    out.len()
                ),
            },
            Section { id: "cautions".into(), heading: "Cautions".into(), body: cautions },
        ],
    };
    render(&report)
}
