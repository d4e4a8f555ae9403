//! Night setback: what each night does to each zone, against a continuous setpoint.
//!
//! Two runs of the exact stepper over the same weather at a fine step (default 10 min), both
//! warmed up the same way: the model as written (setbacks in its schedules) and a
//! **continuous** run where every thermostat holds the highest value its schedule takes. Each
//! "night" is the 24 h from local noon to the next noon. Per night and thermostat zone:
//!
//! * the setback: the lowest setpoint in the window — the spell of it that holds 03:00, so an
//!   afternoon setback does not stand in for the night — when it starts, and when the air
//!   reaches it (within 0.05 K), or that it does not before the setpoint rises;
//! * the lowest air temperature and when;
//! * the recovery time from the morning rise until the air is within 0.05 K of the new
//!   setpoint, at the installed capacity (to the step);
//! * heat over the window (kWh) in both runs and the saving (kWh and % of continuous); the
//!   windows tile the period, so the nightly savings add up to the period's saving;
//! * occupied hours in the window below `min(comfort minimum, setpoint) − 0.05 K`;
//! * the latest start: the latest step from which raising this zone's setpoint to the morning
//!   value still brings the air within 0.05 K of it by the ready-by time (default: the
//!   scheduled rise). Found by bisection on the start step, each trial an exact rerun from the
//!   recorded state; the house is a positive system, so an earlier start is never colder.

use chrono::{NaiveDate, NaiveTime};
use dwell_model::{House, ModelFile};
use dwell_weather::WeatherSeries;
use serde::{Deserialize, Serialize};

use crate::simulate::StudyError;
use crate::trace::{period_stamps, Runner, Trace};
use crate::zone_schedules::{heater_setpoint_max, ZoneSchedules};

/// Margin (K) within which a temperature counts as at its setpoint.
pub const AT_SETPOINT_K: f64 = 0.05;

/// Options of [`setback`].
#[derive(Clone, Debug)]
pub struct SetbackOptions {
    /// First local day (default: the weather's first).
    pub from: Option<NaiveDate>,
    /// Last local day, inclusive (default: the weather's last).
    pub to: Option<NaiveDate>,
    /// Step (s), a divisor of one hour; default 600.
    pub step_s: f64,
    /// Time by which each zone must be at its morning setpoint (local standard time); default
    /// the scheduled rise.
    pub ready_by: Option<NaiveTime>,
    /// Warm-up window (days), repeated until settled; default 7.
    pub warmup_days: usize,
}

impl Default for SetbackOptions {
    fn default() -> Self {
        SetbackOptions {
            from: None,
            to: None,
            step_s: 600.0,
            ready_by: None,
            warmup_days: 7,
        }
    }
}

/// One zone on one night.
#[derive(Clone, Debug, Serialize, Deserialize)]
pub struct NightZone {
    /// Zone id.
    pub zone: String,
    /// Lowest setpoint in the window (°C), None if the setpoint does not drop.
    pub setback_c: Option<f64>,
    /// When the setback starts (local standard time).
    pub setback_from: Option<String>,
    /// When the air reaches the setback (None: it does not before the rise).
    pub setback_reached_at: Option<String>,
    /// Hours from the start of the setback until the air reaches it (h).
    pub hours_to_setback_h: Option<f64>,
    /// Lowest air temperature in the window (°C).
    pub lowest_c: f64,
    /// When (local standard time).
    pub lowest_at: String,
    /// When the setpoint rises in the morning.
    pub rise_at: Option<String>,
    /// The setpoint after the rise (°C).
    pub morning_setpoint_c: Option<f64>,
    /// Recovery time at installed capacity (h), None if not within the window.
    pub recovery_h: Option<f64>,
    /// Heat in the window with setback (kWh).
    pub heat_kwh: f64,
    /// Heat in the window with a continuous setpoint (kWh).
    pub continuous_kwh: f64,
    /// continuous − setback (kWh).
    pub saving_kwh: f64,
    /// Saving as a share of continuous (%).
    pub saving_pct: Option<f64>,
    /// Occupied hours below target in the window (h).
    pub occupied_hours_below_h: f64,
    /// Ready-by instant used for the latest start.
    pub ready_by: Option<String>,
    /// Latest start of heating that is ready by then (None: not reachable even from the
    /// start of the setback).
    pub latest_start: Option<String>,
    /// Ready-by minus latest start (h).
    pub lead_h: Option<f64>,
}

/// One night.
#[derive(Clone, Debug, Serialize, Deserialize)]
pub struct Night {
    /// Local date of the evening.
    pub night: String,
    /// Per thermostat zone.
    pub zones: Vec<NightZone>,
}

/// Totals per zone over all nights.
#[derive(Clone, Debug, Serialize, Deserialize)]
pub struct SetbackTotal {
    /// Zone id.
    pub zone: String,
    /// With setback (kWh).
    pub heat_kwh: f64,
    /// Continuous (kWh).
    pub continuous_kwh: f64,
    /// Saving (kWh).
    pub saving_kwh: f64,
    /// Saving (%).
    pub saving_pct: Option<f64>,
    /// Occupied hours below target (h).
    pub occupied_hours_below_h: f64,
    /// Longest recovery (h).
    pub longest_recovery_h: Option<f64>,
}

/// The setback study.
#[derive(Clone, Debug, Serialize, Deserialize)]
pub struct SetbackStudy {
    /// House name.
    pub model: String,
    /// Weather source.
    pub weather: String,
    /// Step (s).
    pub step_s: f64,
    /// Nights.
    pub nights: Vec<Night>,
    /// Per zone over all nights.
    pub totals: Vec<SetbackTotal>,
    /// Whole house: saving (kWh).
    pub total_saving_kwh: f64,
    /// Whole house: saving (%).
    pub total_saving_pct: Option<f64>,
    /// Cautions.
    pub cautions: Vec<String>,
    /// The run with setback (not serialised: `setback_path.csv` holds it, and `dwell-report`
    /// reads it back from there).
    #[serde(skip)]
    pub trace: Option<Trace>,
}

fn fmt(t: chrono::NaiveDateTime) -> String {
    t.format("%Y-%m-%dT%H:%M").to_string()
}

fn hours(a: chrono::NaiveDateTime, b: chrono::NaiveDateTime) -> f64 {
    (b - a).num_milliseconds() as f64 / 3.6e6
}

/// Runs the setback study.
pub fn setback(
    model: &ModelFile,
    house: &House,
    weather: &WeatherSeries,
    opts: &SetbackOptions,
) -> Result<SetbackStudy, StudyError> {
    let mut run = Runner::new(model, house, weather, opts.step_s)?;
    let (start, end) = period_stamps(&run.forcing, opts.from, opts.to)?;
    let sph = run.forcing.steps_per_hour;
    let steps = (end - start) * sph;
    let step_h = opts.step_s / 3600.0;
    run.warm_up(start, opts.warmup_days, |_, _, _| {});
    let a = run.run(start, 0, steps, true, |_, _, _| {});
    // continuous: every channel at its heaters' highest setpoint
    let hold: Vec<f64> = run
        .channel_zone
        .iter()
        .map(|&zi| {
            model
                .heaters
                .iter()
                .filter(|h| h.zone == house.zones[zi].id)
                .filter_map(|h| heater_setpoint_max(model, h))
                .fold(f64::NEG_INFINITY, f64::max)
        })
        .collect();
    let hold_adj = |_: usize, sp: &mut [f64], _: &mut [bool]| sp.copy_from_slice(&hold);
    run.warm_up(start, opts.warmup_days, hold_adj);
    let b = run.run(start, 0, steps, false, hold_adj);
    let sch = ZoneSchedules::new(model);
    let channel_zone = run.channel_zone.clone();

    let mut nights = Vec::new();
    let first_day = a.local[0].date();
    let last = *a.local.last().expect("steps");
    let mut d = first_day;
    while let Some(next) = d.succ_opt() {
        let noon = d.and_hms_opt(12, 0, 0).expect("noon");
        let next_noon = next.and_hms_opt(12, 0, 0).expect("noon");
        if next_noon > last {
            break;
        }
        d = next;
        if noon < a.local[0] {
            continue;
        }
        let k0 = a.local.iter().position(|t| *t >= noon).expect("in range");
        let k1 = a
            .local
            .iter()
            .position(|t| *t >= next_noon)
            .expect("in range");
        let mut zones = Vec::new();
        for (c, &zi) in channel_zone.iter().enumerate() {
            let z = &house.zones[zi];
            let t = &a.zone_c[zi];
            let sp = &a.setpoint_c[zi];
            let win = k0 + 1..=k1;
            let sp_min = win.clone().map(|k| sp[k]).fold(f64::INFINITY, f64::min);
            let sp_max = win.clone().map(|k| sp[k]).fold(f64::NEG_INFINITY, f64::max);
            let (lo_k, lo) = (k0..=k1)
                .map(|k| (k, t[k]))
                .fold(
                    (k0, f64::INFINITY),
                    |acc, x| if x.1 < acc.1 { x } else { acc },
                );
            let heat: f64 = win.clone().map(|k| a.heat_w[zi][k]).sum::<f64>() * step_h / 1000.0;
            let cont: f64 = win.clone().map(|k| b.heat_w[zi][k]).sum::<f64>() * step_h / 1000.0;
            let below = win
                .clone()
                .filter(|&k| {
                    sch.occupied(zi, a.local[k]) && {
                        let target = z.comfort.map(|(lo, _)| lo.min(sp[k])).unwrap_or(sp[k]);
                        t[k] < target - AT_SETPOINT_K
                    }
                })
                .count() as f64
                * step_h;
            let mut nz = NightZone {
                zone: z.id.clone(),
                setback_c: None,
                setback_from: None,
                setback_reached_at: None,
                hours_to_setback_h: None,
                lowest_c: lo,
                lowest_at: fmt(a.local[lo_k]),
                rise_at: None,
                morning_setpoint_c: None,
                recovery_h: None,
                heat_kwh: heat,
                continuous_kwh: cont,
                saving_kwh: cont - heat,
                saving_pct: (cont > 1e-9).then(|| 100.0 * (cont - heat) / cont),
                occupied_hours_below_h: below,
                ready_by: None,
                latest_start: None,
                lead_h: None,
            };
            if sp_max - sp_min >= 0.1 {
                // the night's setback: the run of steps at the lowest setpoint holding 03:00
                // of the next morning, else the first such run in the window
                let three = next_noon.date().and_hms_opt(3, 0, 0).expect("03:00");
                let k3 = (k0 + 1..=k1).find(|&k| a.local[k] > three).unwrap_or(k1);
                let at_min = |k: usize| sp[k] <= sp_min + 1e-9;
                let k_drop = if at_min(k3) {
                    let mut k = k3;
                    while k > k0 + 1 && at_min(k - 1) {
                        k -= 1;
                    }
                    k
                } else {
                    win.clone()
                        .find(|&k| at_min(k))
                        .expect("minimum is attained")
                };
                nz.setback_c = Some(sp_min);
                nz.setback_from = Some(fmt(a.local[k_drop - 1]));
                let k_rise = (k_drop..=k1).find(|&k| sp[k] > sp_min + 0.1);
                let until = k_rise.unwrap_or(k1);
                if let Some(k) = (k_drop..=until).find(|&k| t[k] <= sp_min + AT_SETPOINT_K) {
                    nz.setback_reached_at = Some(fmt(a.local[k]));
                    nz.hours_to_setback_h = Some(hours(a.local[k_drop - 1], a.local[k]));
                }
                if let Some(kr) = k_rise {
                    let target = sp[kr];
                    nz.rise_at = Some(fmt(a.local[kr - 1]));
                    nz.morning_setpoint_c = Some(target);
                    if let Some(k) = (kr..=k1).find(|&k| t[k] >= sp[k] - AT_SETPOINT_K) {
                        nz.recovery_h = Some(hours(a.local[kr - 1], a.local[k]));
                    }
                    // latest start
                    let by = match opts.ready_by {
                        Some(time) => {
                            let day = if time >= NaiveTime::from_hms_opt(12, 0, 0).expect("noon") {
                                noon.date()
                            } else {
                                next_noon.date()
                            };
                            day.and_time(time)
                        }
                        None => a.local[kr - 1],
                    };
                    if let Some(k_by) = (k0..=k1).find(|&k| a.local[k] >= by) {
                        nz.ready_by = Some(fmt(a.local[k_by]));
                        let lo_s = (k_drop - 1).min(k_by);
                        let mut ok = |s: usize| -> bool {
                            if s >= k_by {
                                return t[k_by] >= target - AT_SETPOINT_K;
                            }
                            run.set_state(a.state(s));
                            let tr = run.run(
                                start,
                                s,
                                k_by - s,
                                false,
                                |_, spc: &mut [f64], _: &mut [bool]| {
                                    spc[c] = spc[c].max(target);
                                },
                            );
                            tr.zone_c[zi][k_by - s] >= target - AT_SETPOINT_K
                        };
                        let latest = if ok(k_by) {
                            Some(k_by)
                        } else if !ok(lo_s) {
                            None
                        } else {
                            let (mut good, mut bad) = (lo_s, k_by);
                            while bad - good > 1 {
                                let mid = (good + bad) / 2;
                                if ok(mid) {
                                    good = mid;
                                } else {
                                    bad = mid;
                                }
                            }
                            Some(good)
                        };
                        if let Some(s) = latest {
                            nz.latest_start = Some(fmt(a.local[s]));
                            nz.lead_h = Some(hours(a.local[s], a.local[k_by]));
                        }
                    }
                }
            }
            zones.push(nz);
        }
        nights.push(Night {
            night: noon.date().to_string(),
            zones,
        });
    }
    let totals: Vec<SetbackTotal> = channel_zone
        .iter()
        .map(|&zi| {
            let id = &house.zones[zi].id;
            let rows: Vec<&NightZone> = nights
                .iter()
                .flat_map(|n| n.zones.iter().filter(|z| &z.zone == id))
                .collect();
            let heat: f64 = rows.iter().map(|r| r.heat_kwh).sum();
            let cont: f64 = rows.iter().map(|r| r.continuous_kwh).sum();
            SetbackTotal {
                zone: id.clone(),
                heat_kwh: heat,
                continuous_kwh: cont,
                saving_kwh: cont - heat,
                saving_pct: (cont > 1e-9).then(|| 100.0 * (cont - heat) / cont),
                occupied_hours_below_h: rows.iter().map(|r| r.occupied_hours_below_h).sum(),
                longest_recovery_h: rows.iter().filter_map(|r| r.recovery_h).reduce(f64::max),
            }
        })
        .collect();
    let th: f64 = totals.iter().map(|t| t.heat_kwh).sum();
    let tc: f64 = totals.iter().map(|t| t.continuous_kwh).sum();
    if nights.is_empty() {
        return Err(StudyError::Option(
            "the period holds no night from noon to noon; give at least two days with --from/--to"
                .into(),
        ));
    }
    Ok(SetbackStudy {
        model: house.name.clone(),
        weather: weather.source.clone(),
        step_s: opts.step_s,
        nights,
        totals,
        total_saving_kwh: tc - th,
        total_saving_pct: (tc > 1e-9).then(|| 100.0 * (tc - th) / tc),
        cautions: vec![crate::CAUTION.to_string()],
        trace: Some(a),
    })
}
