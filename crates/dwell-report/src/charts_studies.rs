//! Charts of the studies `setback`, `outage`, `size` and `compare`, as data built from their
//! results.

use dwell_charts::{BarChart, BarSeries, Chart, LineChart, Series, Stroke, Threshold};
use dwell_studies::compare::Comparison;
use dwell_studies::outage::OutageStudy;
use dwell_studies::setback::SetbackStudy;
use dwell_studies::size::Sizing;
use dwell_studies::trace::Trace;

use crate::charts_simulate::NamedChart;

/// Rows `[0, last]` of a trace to show: all of it up to 7 days, else the first 3 days.
fn trace_end(t: &Trace) -> usize {
    let n = t.local.len();
    let hours = |k: usize| (t.local[k] - t.local[0]).num_seconds() as f64 / 3600.0;
    if n == 0 || hours(n - 1) <= 168.0 {
        return n.saturating_sub(1);
    }
    (0..n).rposition(|k| hours(k) <= 72.0).unwrap_or(n - 1)
}

/// Zone air, setpoints and outdoor air of a trace over rows `[0, last]` (x in hours from the
/// trace's first local time).
pub fn trace_series(t: &Trace, zones: &[String], last: usize) -> Vec<Series> {
    let x: Vec<f64> = t.local[..=last]
        .iter()
        .map(|l| (*l - t.local[0]).num_seconds() as f64 / 3600.0)
        .collect();
    let mut out = Vec::new();
    for (z, name) in zones.iter().enumerate().take(t.zone_c.len()) {
        out.push(Series {
            label: format!("{name} air"),
            x: x.clone(),
            y: t.zone_c[z][..=last].to_vec(),
            stroke: Stroke::Solid,
            colour: Some(z),
        });
    }
    for (z, name) in zones.iter().enumerate().take(t.setpoint_c.len()) {
        if t.setpoint_c[z][..=last].iter().any(|v| v.is_finite()) {
            out.push(Series {
                label: format!("{name} setpoint"),
                x: x.clone(),
                y: t.setpoint_c[z][..=last].to_vec(),
                stroke: Stroke::DashedStep,
                colour: Some(z),
            });
        }
    }
    out.push(Series {
        label: "outdoor air".into(),
        x,
        y: t.outdoor_c[..=last].to_vec(),
        stroke: Stroke::Solid,
        colour: None,
    });
    out
}

/// The setback night(s): cooldown, setback level and recovery per zone.
pub fn setback_chart(s: &SetbackStudy, zones: &[String]) -> Option<NamedChart> {
    let t = s.trace.as_ref()?;
    if t.local.len() < 2 {
        return None;
    }
    let last = trace_end(t);
    Some(NamedChart {
        name: "setback".into(),
        caption: "Room air through the setback: the cooldown after the setpoint (dashed) drops, the setback level, and the recovery in the morning.".into(),
        chart: Chart::Line(LineChart {
            title: format!("Night setback from {}", t.local[0].format("%-d %B %Y")),
            x_label: format!("local standard time (UTC{})", t.times[0].offset()),
            y_label: "temperature (°C)".into(),
            time_origin: Some(t.local[0]),
            series: trace_series(t, zones, last),
            bands: vec![],
            thresholds: vec![],
            secondary: None,
            y_from_zero: false,
        }),
    })
}

/// The outage: temperature paths against the comfort, damp and frost thresholds.
pub fn outage_chart(s: &OutageStudy, zones: &[String]) -> Option<NamedChart> {
    let t = &s.trace;
    if t.local.len() < 2 {
        return None;
    }
    let last = t.local.len() - 1;
    let mut thresholds = Vec::new();
    // Each zone's comfort minimum in the zone's colour; zones sharing a level share a line.
    for z in &s.zones {
        if let Some(c) = z.comfort_min_c {
            match thresholds.iter_mut().find(|t: &&mut Threshold| t.y == c) {
                Some(t) => {
                    t.label = t
                        .label
                        .replacen(" comfort", &format!(", {} comfort", z.zone), 1)
                }
                None => thresholds.push(Threshold {
                    label: format!("{} comfort minimum {c} °C", z.zone),
                    y: c,
                    colour: zones.iter().position(|n| n == &z.zone).unwrap_or(0),
                }),
            }
        }
    }
    thresholds.push(Threshold {
        label: format!("damp risk below {} °C", s.damp_below_c),
        y: s.damp_below_c,
        colour: 4,
    });
    thresholds.push(Threshold {
        label: format!("frost risk below {} °C", s.frost_below_c),
        y: s.frost_below_c,
        colour: 5,
    });
    let series = trace_series(t, zones, last)
        .into_iter()
        .filter(|s| !s.label.ends_with(" setpoint"))
        .collect();
    Some(NamedChart {
        name: "outage".into(),
        caption: "Room air during and after the loss of heating, against the comfort minimum and the damp and frost thresholds (dashed).".into(),
        chart: Chart::Line(LineChart {
            title: format!("Heating outage from {}", t.local[0].format("%-d %B %Y %H:%M")),
            x_label: format!("local standard time (UTC{})", t.times[0].offset()),
            y_label: "temperature (°C)".into(),
            time_origin: Some(t.local[0]),
            series,
            bands: vec![],
            thresholds,
            secondary: None,
            y_from_zero: false,
        }),
    })
}

/// Sizing: per zone the steady design loss, the dynamic requirement, the recommendation and
/// the installed capacity; and, if computed, the year's load duration curve.
pub fn sizing_charts(s: &Sizing) -> Vec<NamedChart> {
    let zones: Vec<_> = s.zones.iter().filter(|z| z.heated).collect();
    let opt = |v: Option<f64>| v.unwrap_or(f64::NAN);
    let mut out = vec![NamedChart {
        name: "sizing".into(),
        caption: "Heater capacity per zone: the steady heat loss at the design temperature, the capacity the dynamic test needs, the recommendation, and what is installed now.".into(),
        chart: Chart::Bar(BarChart {
            title: format!("Heater capacity per zone at {} °C outside", s.design_outdoor_c),
            x_label: "zone".into(),
            y_label: "heat output (W)".into(),
            categories: zones.iter().map(|z| z.zone.clone()).collect(),
            series: vec![
                BarSeries { label: "steady loss".into(), values: zones.iter().map(|z| z.steady_w).collect(), colour: 5 },
                BarSeries { label: "dynamic need".into(), values: zones.iter().map(|z| opt(z.dynamic_w)).collect(), colour: 0 },
                BarSeries { label: "recommended".into(), values: zones.iter().map(|z| z.recommended_w).collect(), colour: 1 },
                BarSeries { label: "installed".into(), values: zones.iter().map(|z| opt(z.installed_w)).collect(), colour: 6 },
            ],
            stacked: false,
        }),
    }];
    if !s.capacity_curve.is_empty() {
        let c = &s.capacity_curve;
        out.push(NamedChart {
            name: "capacity-curve".into(),
            caption: "Occupied hours below the comfort band over the design cold spell, for heaters scaled from the dynamic requirement: the hours rise steeply once the capacity falls short.".into(),
            chart: Chart::Line(LineChart {
                title: "Capacity against occupied hours below the comfort band".into(),
                x_label: "total heater capacity (W)".into(),
                y_label: "occupied zone-hours below the band (h)".into(),
                time_origin: None,
                series: vec![Series {
                    label: format!("design spell at {} °C", s.design_outdoor_c),
                    x: c.iter().map(|p| p.total_capacity_w).collect(),
                    y: c.iter().map(|p| p.occupied_hours_below_h as f64).collect(),
                    stroke: Stroke::Solid,
                    colour: Some(0),
                }],
                bands: vec![],
                thresholds: vec![],
                secondary: None,
                y_from_zero: true,
            }),
        });
    }
    if let Some(ld) = &s.load_duration {
        out.push(NamedChart {
            name: "load-duration".into(),
            caption: format!("Load duration over the year ({}): hours the whole house needs each heat output or more.", ld.weather),
            chart: Chart::Line(LineChart {
                title: "How many hours the heating needs each power".into(),
                x_label: "hours at or above the power (h)".into(),
                y_label: "heat output (W)".into(),
                time_origin: None,
                series: vec![Series {
                    label: "whole house".into(),
                    x: (1..=ld.sorted_w.len()).map(|h| h as f64).collect(),
                    y: ld.sorted_w.clone(),
                    stroke: Stroke::Solid,
                    colour: Some(0),
                }],
                bands: vec![],
                thresholds: vec![Threshold { label: format!("recommended total {:.0} W", s.total.recommended_w), y: s.total.recommended_w, colour: 1 }],
                secondary: None,
                y_from_zero: true,
            }),
        });
    }
    out
}

/// Option comparison: heat per variant and the saving against the first (the base).
pub fn compare_charts(c: &Comparison) -> Vec<NamedChart> {
    vec![NamedChart {
        name: "compare".into(),
        caption: "Heat delivered by each variant over the period, and the saving against the base (the first).".into(),
        chart: Chart::Bar(BarChart {
            title: if c.full_year { "Yearly heat and saving per option".into() } else { "Heat and saving per option".into() },
            x_label: "variant".into(),
            y_label: "heat over the period (kWh)".into(),
            categories: c.rows.iter().map(|r| r.variant.clone()).collect(),
            series: vec![
                BarSeries { label: "heat delivered".into(), values: c.rows.iter().map(|r| r.heating_kwh).collect(), colour: 0 },
                BarSeries { label: "saving against the base".into(), values: c.rows.iter().map(|r| -r.change_kwh).collect(), colour: 2 },
            ],
            stacked: false,
        }),
    }]
}
