//! Charts and `report.html` for the studies `setback`, `outage`, `size` and `compare`, drawn
//! from the files the study wrote ([`StudyFiles`]) so `dwell chart DIR` redraws them exactly.

use std::path::PathBuf;

use dwell_studies::compare::Comparison;
use dwell_studies::outage::OutageStudy;
use dwell_studies::setback::SetbackStudy;
use dwell_studies::size::Sizing;

use crate::charts_simulate::NamedChart;
use crate::charts_studies::{compare_charts, outage_chart, setback_chart, sizing_charts};
use crate::html::{esc, render, table, Report, Section};
use crate::outdir::{OutputDir, ReportError};
use crate::report_simulate::{figures, house_section, method_text, write_charts};
use crate::study_files::{Study, StudyFiles};
use serde_json::Value;

fn o(v: Option<f64>, d: usize) -> String {
    v.map(|x| format!("{x:.d$}")).unwrap_or_else(|| "–".into())
}

fn cautions(warnings: &[String], cautions: &[String]) -> String {
    let mut c = String::new();
    if !warnings.is_empty() {
        c.push_str("<ul class=\"warnings\">\n");
        for w in warnings {
            c.push_str(&format!("<li>{}</li>\n", esc(w)));
        }
        c.push_str("</ul>\n");
    }
    for x in cautions {
        c.push_str(&format!("<p class=\"caution\">{}</p>\n", esc(x)));
    }
    c.push_str("<p class=\"caution\">The house and weather in the shipped examples are invented; results for a real house are only as good as the model file describing it.</p>\n");
    c
}

struct Parts {
    title: String,
    subtitle: String,
    summary: String,
    results: String,
    method: String,
    weather: String,
    cautions: String,
}

fn write(
    out: &OutputDir,
    house: &Value,
    charts: Vec<NamedChart>,
    p: Parts,
) -> Result<Vec<PathBuf>, ReportError> {
    let (drawn, mut files) = write_charts(out, charts)?;
    let report = Report {
        title: p.title,
        subtitle: p.subtitle,
        sections: vec![
            Section {
                id: "summary".into(),
                heading: "In short".into(),
                body: p.summary,
            },
            Section {
                id: "house".into(),
                heading: "The house".into(),
                body: house_section(Some(house)),
            },
            Section {
                id: "results".into(),
                heading: "Results".into(),
                body: p.results,
            },
            Section {
                id: "charts".into(),
                heading: "Charts".into(),
                body: figures(&drawn),
            },
            Section {
                id: "method".into(),
                heading: "Assumptions and method".into(),
                body: p.method,
            },
            Section {
                id: "weather".into(),
                heading: "Weather".into(),
                body: format!("<p>{}</p>\n", esc(&p.weather)),
            },
            Section {
                id: "cautions".into(),
                heading: "Cautions".into(),
                body: p.cautions,
            },
        ],
    };
    files.push(out.write("report.html", render(&report).as_bytes())?);
    Ok(files)
}

/// Charts and report of a study read back from its folder.
pub fn write_study_report(out: &OutputDir, f: &StudyFiles) -> Result<Vec<PathBuf>, ReportError> {
    match &f.study {
        Study::Size(s) => write_sizing_report(out, s, &f.house),
        Study::Setback { study, zones } => write_setback_report(out, study, &f.house, zones),
        Study::Outage { study, zones } => write_outage_report(out, study, &f.house, zones),
        Study::Compare(c) => write_compare_report(out, c, &f.house),
    }
}

/// Charts and report of `dwell setback`; `house` is the check sheet (`house.json`), `zones`
/// the house's zone ids in order.
pub fn write_setback_report(
    out: &OutputDir,
    s: &SetbackStudy,
    house: &Value,
    zones: &[String],
) -> Result<Vec<PathBuf>, ReportError> {
    let summary = format!(
        "<p class=\"lead\">Turning the thermostats down at night saves <strong>{:.0} kWh</strong>{} of heat over the period studied, compared with holding the daytime setpoint all night.</p>\n<ul>\n{}</ul>\n",
        s.total_saving_kwh,
        s.total_saving_pct.map(|p| format!(" ({p:.0} %)")).unwrap_or_default(),
        s.totals
            .iter()
            .map(|t| format!(
                "<li>{}: saves {:.1} kWh; {}; slowest morning recovery {}.</li>\n",
                esc(&t.zone),
                t.saving_kwh,
                if t.occupied_hours_below_h > 0.0 { format!("{:.1} occupied hours below the comfort band", t.occupied_hours_below_h) } else { "no occupied hour below the comfort band".into() },
                t.longest_recovery_h.map(|h| format!("{h:.1} h")).unwrap_or_else(|| "not needed".into())
            ))
            .collect::<String>()
    );
    let mut results = String::from("<h3>Totals per zone</h3>\n");
    let rows: Vec<Vec<String>> = s
        .totals
        .iter()
        .map(|t| {
            vec![
                t.zone.clone(),
                format!("{:.1}", t.heat_kwh),
                format!("{:.1}", t.continuous_kwh),
                format!("{:.1}", t.saving_kwh),
                o(t.saving_pct, 1),
                format!("{:.1}", t.occupied_hours_below_h),
                o(t.longest_recovery_h, 1),
            ]
        })
        .collect();
    results.push_str(&table(
        &[
            "zone",
            "heat with setback (kWh)",
            "heat held all night (kWh)",
            "saving (kWh)",
            "saving (%)",
            "occupied hours below band (h)",
            "longest recovery (h)",
        ],
        &rows,
    ));
    results.push_str("<h3>Night by night</h3>\n");
    let rows: Vec<Vec<String>> = s
        .nights
        .iter()
        .flat_map(|n| {
            n.zones.iter().map(move |z| {
                vec![
                    n.night.clone(),
                    z.zone.clone(),
                    o(z.setback_c, 1),
                    format!("{:.1}", z.lowest_c),
                    o(z.recovery_h, 1),
                    format!("{:.2}", z.saving_kwh),
                    z.latest_start.clone().unwrap_or_else(|| "–".into()),
                ]
            })
        })
        .collect();
    results.push_str(&table(
        &[
            "night",
            "zone",
            "setback (°C)",
            "lowest (°C)",
            "recovery (h)",
            "saving (kWh)",
            "latest start",
        ],
        &rows,
    ));
    let charts = setback_chart(s, zones).into_iter().collect();
    write(
        out,
        house,
        charts,
        Parts {
            title: format!("Night setback: {}", s.model),
            subtitle: format!("{} night(s), step {:.0} min", s.nights.len(), s.step_s / 60.0),
            summary,
            results,
            method: method_text("each night is run twice from the same state: with the setback schedule and with the daytime setpoint held", s.step_s / 60.0, "capacity-limited thermostats"),
            weather: s.weather.clone(),
            cautions: cautions(&[], &s.cautions),
        },
    )
}

/// Charts and report of `dwell outage`; `house` is the check sheet (`house.json`).
pub fn write_outage_report(
    out: &OutputDir,
    s: &OutageStudy,
    house: &Value,
    zones: &[String],
) -> Result<Vec<PathBuf>, ReportError> {
    let mut summary = format!(
        "<p class=\"lead\">With the heating off for {:.0} hours from {}, this is how cold each room gets and how soon.</p>\n<ul>\n",
        s.hours,
        esc(&s.start)
    );
    for z in &s.zones {
        let when = |h: Option<f64>, what: &str| {
            h.map(|h| format!("{what} after {h:.1} h"))
                .unwrap_or_else(|| format!("never {what}"))
        };
        summary.push_str(&format!(
            "<li>{} falls from {:.1} °C to {:.1} °C at its coldest: {}; {}; {}.</li>\n",
            esc(&z.zone),
            z.start_c,
            z.lowest_c,
            when(z.hours_to_below_comfort_h, "below comfort"),
            when(z.hours_to_damp_risk_h, "into damp risk"),
            when(z.hours_to_frost_risk_h, "into frost risk")
        ));
    }
    summary.push_str("</ul>\n");
    let rows: Vec<Vec<String>> = s
        .zones
        .iter()
        .map(|z| {
            vec![
                z.zone.clone(),
                format!("{:.1}", z.start_c),
                format!("{:.1}", z.lowest_c),
                format!("{:.1}", z.end_c),
                o(z.hours_to_below_comfort_h, 1),
                o(z.hours_to_damp_risk_h, 1),
                o(z.hours_to_frost_risk_h, 1),
                o(z.recovered_after_h, 1),
            ]
        })
        .collect();
    let results = table(
        &[
            "zone",
            "at start (°C)",
            "lowest (°C)",
            "at end (°C)",
            "below comfort after (h)",
            "damp risk after (h)",
            "frost risk after (h)",
            "recovered after (h)",
        ],
        &rows,
    ) + &format!("<p>{}</p>\n", esc(&s.thresholds_note));
    write(
        out,
        house,
        outage_chart(s, zones).into_iter().collect(),
        Parts {
            title: format!("Heating outage: {}", s.model),
            subtitle: format!("From {} to {}", s.start, s.end),
            summary,
            results,
            method: method_text("the house is first run with its heating until it settles, then every heater is switched off", 60.0, "none during the outage; thermostats after it"),
            weather: s.weather.clone(),
            cautions: cautions(&[], &s.cautions),
        },
    )
}

/// Charts and report of `dwell size`; `house` is the check sheet (`house.json`).
pub fn write_sizing_report(
    out: &OutputDir,
    s: &Sizing,
    house: &Value,
) -> Result<Vec<PathBuf>, ReportError> {
    let summary = format!(
        "<p class=\"lead\">For {} °C outside, the house needs about <strong>{:.0} W</strong> of heating in total (recommended, with a {:.0} % margin), against a steady heat loss of {:.0} W and {:.0} W installed now.</p>\n",
        s.design_outdoor_c,
        s.total.recommended_w,
        100.0 * (s.margin - 1.0),
        s.total.steady_w,
        s.total.installed_w
    );
    let rows: Vec<Vec<String>> = s
        .zones
        .iter()
        .map(|z| {
            vec![
                z.zone.clone(),
                format!("{:.0}", z.steady_w),
                o(z.dynamic_w, 0),
                o(z.hold_w, 0),
                format!("{:.0}", z.recommended_w),
                o(z.installed_w, 0),
                o(z.oversizing_ratio, 2),
            ]
        })
        .collect();
    let results = table(
        &[
            "zone",
            "steady loss (W)",
            "dynamic need (W)",
            "to hold the setpoint (W)",
            "recommended (W)",
            "installed (W)",
            "installed / recommended",
        ],
        &rows,
    );
    write(
        out,
        house,
        sizing_charts(s),
        Parts {
            title: format!("Heater sizing: {}", s.model),
            subtitle: format!(
                "Design outdoor temperature {} °C, recovery within {} h",
                s.design_outdoor_c, s.recovery_h
            ),
            summary,
            results,
            method: method_text(
                &format!("a design spell: {}", s.design_spell),
                60.0,
                "capacity-limited thermostats, capacities searched in steps",
            ),
            weather: s.design_spell.clone(),
            cautions: cautions(&s.warnings, &s.cautions),
        },
    )
}

/// Charts and report of `dwell compare`; `house` is the check sheet of the base variant.
pub fn write_compare_report(
    out: &OutputDir,
    c: &Comparison,
    house: &Value,
) -> Result<Vec<PathBuf>, ReportError> {
    let best = c
        .rows
        .iter()
        .min_by(|a, b| a.heating_kwh.total_cmp(&b.heating_kwh));
    let mut summary = String::new();
    if let (Some(base), Some(best)) = (c.rows.first(), best) {
        summary.push_str(&format!(
            "<p class=\"lead\">Of {} options, <strong>{}</strong> needs the least heat: {:.0} kWh against {:.0} kWh for {}, a saving of {:.0} kWh{}.</p>\n",
            c.rows.len(),
            esc(&best.variant),
            best.heating_kwh,
            base.heating_kwh,
            esc(&base.variant),
            -best.change_kwh,
            best.simple_payback_years.map(|y| format!(", paying back in about {y:.0} years")).unwrap_or_default()
        ));
    }
    let rows: Vec<Vec<String>> = c
        .rows
        .iter()
        .map(|r| {
            vec![
                r.variant.clone(),
                format!("{:.0}", r.heating_kwh),
                format!("{:.0}", r.change_kwh),
                o(r.change_pct, 1),
                format!("{:.0}", r.peak_w),
                o(r.lowest_occupied_c, 1),
                r.hours_outside_band_h.to_string(),
                o(r.money, 0),
                o(r.simple_payback_years, 1),
            ]
        })
        .collect();
    let results = table(
        &[
            "variant",
            "heat (kWh)",
            "change (kWh)",
            "change (%)",
            "peak (W)",
            "lowest occupied (°C)",
            "occupied hours outside band",
            "money",
            "payback (years)",
        ],
        &rows,
    ) + &c
        .notes
        .iter()
        .map(|n| format!("<p>{}</p>\n", esc(n)))
        .collect::<String>();
    write(
        out,
        house,
        compare_charts(c),
        Parts {
            title: format!("Options compared: {}", c.model),
            subtitle: format!("From {} to {}", c.from, c.to),
            summary,
            results,
            method: method_text(
                "each variant warmed up the same way as the base",
                60.0,
                "capacity-limited thermostats",
            ),
            weather: c.weather.clone(),
            cautions: cautions(&[], &c.cautions),
        },
    )
}
