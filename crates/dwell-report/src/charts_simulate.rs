//! The charts of a simulation, as data built from the files the run wrote.

use chrono::{Datelike, NaiveDate};
use dwell_charts::{Band, BarChart, BarSeries, Chart, LineChart, SecondaryAxis, Series, Stroke};

use crate::run_files::SimulationFiles;

/// A chart with the file stem it is written under (`charts/<name>.svg` and `.png`).
#[derive(Clone, Debug, PartialEq)]
pub struct NamedChart {
    /// File stem.
    pub name: String,
    /// One sentence for the report saying what the chart shows.
    pub caption: String,
    /// The chart.
    pub chart: Chart,
}

/// The window of the temperature chart: rows `[first, last]`.
///
/// Given days (local, inclusive) select the rows in them; otherwise a period of up to 14 days
/// is shown whole, and a longer one shows the 7 days around the coldest outdoor stamp (3 days
/// before it, 4 after), where heating is hardest.
pub fn window(
    f: &SimulationFiles,
    from: Option<NaiveDate>,
    to: Option<NaiveDate>,
) -> (usize, usize) {
    let n = f.times.len();
    if from.is_some() || to.is_some() {
        let first = from
            .map(|d| {
                f.times
                    .iter()
                    .position(|t| t.naive_local().date() >= d)
                    .unwrap_or(n - 1)
            })
            .unwrap_or(0);
        let last = to
            .map(|d| {
                f.times
                    .iter()
                    .rposition(|t| t.naive_local().date() <= d)
                    .unwrap_or(0)
            })
            .unwrap_or(n - 1);
        return (first.min(last), last.max(first));
    }
    if n <= 14 * 24 + 1 {
        return (0, n - 1);
    }
    let cold = (0..n)
        .filter(|&i| f.outdoor_c[i].is_finite())
        .min_by(|&a, &b| f.outdoor_c[a].total_cmp(&f.outdoor_c[b]))
        .unwrap_or(0);
    let first = cold.saturating_sub(72);
    let last = (first + 168).min(n - 1);
    (last.saturating_sub(168), last)
}

fn slice(v: &[f64], a: usize, b: usize) -> Vec<f64> {
    v[a..=b].to_vec()
}

/// Zone temperatures over rows `[a, b]` with comfort bands, setpoints and outdoor air.
pub fn temperatures(f: &SimulationFiles, (a, b): (usize, usize)) -> Chart {
    let hours = f.hours();
    let x: Vec<f64> = hours[a..=b].iter().map(|h| h - hours[a]).collect();
    let mut series = Vec::new();
    for (z, name) in f.zones.iter().enumerate() {
        series.push(Series {
            label: format!("{name} air"),
            x: x.clone(),
            y: slice(&f.zone_c[z], a, b),
            stroke: Stroke::Solid,
            colour: Some(z),
        });
    }
    for (name, sp) in &f.setpoints {
        let z = f.zones.iter().position(|n| n == name).unwrap_or(0);
        series.push(Series {
            label: format!("{name} setpoint"),
            x: x.clone(),
            y: slice(sp, a, b),
            stroke: Stroke::DashedStep,
            colour: Some(z),
        });
    }
    series.push(Series {
        label: "outdoor air".into(),
        x: x.clone(),
        y: slice(&f.outdoor_c, a, b),
        stroke: Stroke::Solid,
        colour: None,
    });
    let mut bands: Vec<Band> = Vec::new();
    if let Some(zs) = f.summary["zones"].as_array() {
        for z in zs {
            let c = &z["comfort"];
            if let (Some(lo), Some(hi)) = (c["band_min_c"].as_f64(), c["band_max_c"].as_f64()) {
                let zone = z["zone"].as_str().unwrap_or("?");
                let zi = f.zones.iter().position(|n| n == zone);
                match bands.iter_mut().find(|bd| bd.lo == lo && bd.hi == hi) {
                    Some(bd) => {
                        bd.label = bd.label.replacen(" (", &format!(", {zone} ("), 1);
                        bd.colour = None; // shared by several zones: the neutral comfort fill
                    }
                    None => bands.push(Band {
                        label: format!("comfort {zone} ({lo}–{hi} °C)"),
                        lo,
                        hi,
                        colour: zi,
                    }),
                }
            }
        }
    }
    let origin = f.times[a].naive_local();
    Chart::Line(LineChart {
        title: format!("Room temperatures from {}", origin.format("%-d %B %Y")),
        x_label: format!("local time (UTC{})", f.times[a].offset()),
        y_label: "temperature (°C)".into(),
        time_origin: Some(origin),
        series,
        bands,
        thresholds: vec![],
        secondary: None,
        y_from_zero: false,
    })
}

/// Whole-house heating power and cumulative heat (kWh) over the period. Up to 14 days the power
/// is the hourly mean; beyond, the mean over each local day (an hour counts in the day where
/// it begins), drawn at the day's start, so a year stays readable.
pub fn heating(f: &SimulationFiles) -> Chart {
    let x = f.hours();
    let p = f.total_heating_w();
    let mut acc = 0.0;
    let cumulative: Vec<f64> = p
        .iter()
        .map(|w| {
            if w.is_finite() {
                acc += w / 1000.0; // one hour at the mean power (W) → kWh
            }
            acc
        })
        .collect();
    let (power, label) = if f.times.len() <= 14 * 24 + 1 {
        (
            Series {
                label: "heating power (hourly mean)".into(),
                x: x.clone(),
                y: p,
                stroke: Stroke::Step,
                colour: Some(0),
            },
            "hourly",
        )
    } else {
        let (dx, dy) = daily_means(f, &p);
        (
            Series {
                label: "heating power (daily mean)".into(),
                x: dx,
                y: dy,
                stroke: Stroke::Step,
                colour: Some(0),
            },
            "daily",
        )
    };
    Chart::Line(LineChart {
        title: "Heating power and heat delivered".into(),
        x_label: format!("local time (UTC{})", f.times[0].offset()),
        y_label: format!("heating power, {label} mean (W)"),
        time_origin: Some(f.origin()),
        series: vec![power],
        bands: vec![],
        thresholds: vec![],
        secondary: Some(SecondaryAxis {
            y_label: "heat delivered since the start (kWh)".into(),
            series: vec![Series {
                label: "heat delivered since the start".into(),
                x,
                y: cumulative,
                stroke: Stroke::Solid,
                colour: Some(1),
            }],
        }),
        y_from_zero: true,
    })
}

/// Mean of the hourly powers `p` (row i: the hour ending at stamp i) over each local day, at the
/// hour (from the first stamp) where the day's first hour begins.
pub fn daily_means(f: &SimulationFiles, p: &[f64]) -> (Vec<f64>, Vec<f64>) {
    let hours = f.hours();
    let (mut xs, mut ys) = (Vec::new(), Vec::new());
    let mut cur: Option<(NaiveDate, f64, f64, usize)> = None;
    for i in 1..f.times.len() {
        let day = f.times[i - 1].naive_local().date();
        if !p[i].is_finite() {
            continue;
        }
        match &mut cur {
            Some((d, _, sum, n)) if *d == day => {
                *sum += p[i];
                *n += 1;
            }
            _ => {
                if let Some((_, x, sum, n)) = cur.take() {
                    xs.push(x);
                    ys.push(sum / n as f64);
                }
                cur = Some((day, hours[i - 1], p[i], 1));
            }
        }
    }
    if let Some((_, x, sum, n)) = cur {
        xs.push(x);
        ys.push(sum / n as f64);
    }
    (xs, ys)
}

/// Heat (kWh) per calendar month, from the hourly means; an hour counts in the month where it
/// begins.
pub fn monthly(f: &SimulationFiles) -> Chart {
    let p = f.total_heating_w();
    let mut months: Vec<((i32, u32), f64)> = Vec::new();
    for (t, w) in f.times.iter().zip(&p[1..]) {
        let begin = t.naive_local();
        let key = (begin.year(), begin.month());
        let kwh = if w.is_finite() { w / 1000.0 } else { 0.0 };
        match months.last_mut() {
            Some((k, v)) if *k == key => *v += kwh,
            _ => months.push((key, kwh)),
        }
    }
    let names = months
        .iter()
        .map(|((y, m), _)| {
            NaiveDate::from_ymd_opt(*y, *m, 1)
                .map(|d| d.format("%b %Y").to_string())
                .unwrap_or_default()
        })
        .collect();
    Chart::Bar(BarChart {
        title: "Heat delivered by month".into(),
        x_label: "month".into(),
        y_label: "heat delivered (kWh)".into(),
        categories: names,
        series: vec![BarSeries {
            label: "heat delivered".into(),
            values: months.iter().map(|(_, v)| *v).collect(),
            colour: 0,
        }],
        stacked: false,
    })
}

/// Load duration curve: hourly whole-house heating power sorted from highest to lowest.
pub fn duration(f: &SimulationFiles) -> Chart {
    let mut p: Vec<f64> = f
        .total_heating_w()
        .into_iter()
        .filter(|v| v.is_finite())
        .collect();
    p.sort_by(|a, b| b.total_cmp(a));
    let x = (1..=p.len()).map(|h| h as f64).collect();
    Chart::Line(LineChart {
        title: "How many hours the heating needs each power".into(),
        x_label: "hours at or above the power (h)".into(),
        y_label: "heating power, hourly mean (W)".into(),
        time_origin: None,
        series: vec![Series {
            label: "whole house".into(),
            x,
            y: p,
            stroke: Stroke::Solid,
            colour: Some(0),
        }],
        bands: vec![],
        thresholds: vec![],
        secondary: None,
        y_from_zero: true,
    })
}

/// Where the heat goes: heat in (heating, gains, sun, released storage, groups that gained
/// heat) against heat out (losses by element group, stored heat), from `energy_balance`.
pub fn balance(f: &SimulationFiles) -> Chart {
    let b = &f.summary["energy_balance"];
    let g = |k: &str| b[k].as_f64().unwrap_or(0.0);
    let mut items: Vec<(String, f64, f64)> = vec![
        ("heating".into(), g("heating_kwh"), f64::NAN),
        ("internal gains".into(), g("internal_gains_kwh"), f64::NAN),
        ("sun through glazing".into(), g("solar_kwh"), f64::NAN),
    ];
    if g("other_heat_kwh") != 0.0 {
        items.push(("other heat inputs".into(), g("other_heat_kwh"), f64::NAN));
    }
    if let Some(l) = b["losses_kwh"].as_object() {
        for (k, v) in l {
            let v = v.as_f64().unwrap_or(0.0);
            if v >= 0.0 {
                items.push((k.replace('_', " "), f64::NAN, v));
            } else {
                items.push((format!("{} (gained)", k.replace('_', " ")), -v, f64::NAN));
            }
        }
    }
    let stored = g("stored_change_kwh");
    if stored >= 0.0 {
        items.push(("stored in the building".into(), f64::NAN, stored));
    } else {
        items.push(("released from storage".into(), -stored, f64::NAN));
    }
    Chart::Bar(BarChart {
        title: "Where the heat comes from and where it goes".into(),
        x_label: "".into(),
        y_label: "heat over the period (kWh)".into(),
        categories: vec!["heat in".into(), "heat out".into()],
        series: items
            .into_iter()
            .map(|(label, a, o)| BarSeries {
                colour: balance_colour(&label),
                label,
                values: vec![a, o],
            })
            .collect(),
        stacked: true,
    })
}

/// Fill of a balance term: warm colours for heat in, cool ones for heat out, tints (8…15) for
/// the rest, so no two terms of one bar share a colour.
fn balance_colour(label: &str) -> usize {
    match label {
        "heating" => 1,                // vermillion
        "internal gains" => 4,         // orange
        "sun through glazing" => 7,    // yellow
        "other heat inputs" => 3,      // reddish purple
        "released from storage" => 14, // grey (tint of black)
        "walls" => 0,                  // blue
        "windows" => 5,                // sky blue
        "ventilation" => 2,            // bluish green
        "roof" => 11,                  // tint of reddish purple
        "doors" => 3,                  // reddish purple
        "floor ground" => 6,           // black
        "stored in the building" => 14,
        "links" => 8,                           // tint of blue
        _ if label.ends_with("(gained)") => 12, // tint of orange
        _ => 10,                                // tint of bluish green
    }
}

/// Every simulation chart: temperatures over `window`, heating, monthly, duration, balance.
pub fn simulation_charts(f: &SimulationFiles, window: (usize, usize)) -> Vec<NamedChart> {
    vec![
        NamedChart {
            name: "temperatures".into(),
            caption: "Room air temperatures against the comfort band (shaded), the thermostat setpoints (dashed) and the outdoor air."
                .into(),
            chart: temperatures(f, window),
        },
        NamedChart {
            name: "heating".into(),
            caption: "Heating power, hour by hour (left scale), and the heat delivered since the start (right scale).".into(),
            chart: heating(f),
        },
        NamedChart {
            name: "monthly".into(),
            caption: "Heat delivered in each month.".into(),
            chart: monthly(f),
        },
        NamedChart {
            name: "duration".into(),
            caption: "Load duration: how many hours of the period the heating ran at or above each power.".into(),
            chart: duration(f),
        },
        NamedChart {
            name: "balance".into(),
            caption: "Where the heat comes from (left bar) and where it goes (right bar) over the whole period.".into(),
            chart: balance(f),
        },
    ]
}
