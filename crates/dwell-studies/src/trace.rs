//! A fine-grained run of the exact stepper that records every step and can start from any
//! state: the engine of the setback and outage studies, where a recovery time or a crossing of
//! a threshold is wanted to the step, not to the hour.
//!
//! Conventions follow [`crate::simulate`]: inputs from [`Forcing`]; capacity-limited
//! thermostats, one channel per zone with thermostat heaters, aiming at the setpoint in force
//! just before each step ends. The caller may override each channel's setpoint and switch
//! channels off (an outage) step by step.

use chrono::{DateTime, FixedOffset, NaiveDateTime};
use dwell_model::{House, ModelFile};
use dwell_solver::{Discretization, Readout, Route, Stepper};
use dwell_weather::{SkyModel, WeatherSeries};

use crate::forcing::Forcing;
use crate::simulate::{StudyError, ALLOWED_STEPS_MIN};
use crate::zone_schedules::heater_setpoint;

/// Everything recorded by [`Runner::run`]: index 0 is the start instant, index `k` the end of
/// step `k`.
#[derive(Clone, Debug)]
pub struct Trace {
    /// Instants (UTC-aware).
    pub times: Vec<DateTime<FixedOffset>>,
    /// Local standard times.
    pub local: Vec<NaiveDateTime>,
    /// Air temperature per zone (°C), `[zone][k]`.
    pub zone_c: Vec<Vec<f64>>,
    /// Heat per zone over step `k` (W), `[zone][k]`; 0 at index 0.
    pub heat_w: Vec<Vec<f64>>,
    /// Setpoint each thermostat zone aimed at over step `k` (°C), `[zone][k]`; NaN for zones
    /// without a thermostat and at index 0.
    pub setpoint_c: Vec<Vec<f64>>,
    /// Outdoor air (°C) at each instant.
    pub outdoor_c: Vec<f64>,
    /// Full state at each instant (°C), if asked: `n` values per instant, one after another
    /// (see [`Trace::state`]).
    pub states: Vec<f64>,
    /// Number of states `n`.
    pub n: usize,
}

impl Trace {
    /// The full state (°C) at instant `k`, if states were kept.
    pub fn state(&self, k: usize) -> &[f64] {
        &self.states[k * self.n..(k + 1) * self.n]
    }
}

/// A reusable run of one house over one weather.
pub struct Runner<'a> {
    model: &'a ModelFile,
    house: &'a House,
    /// The forcing (public for callers that need stamps).
    pub forcing: Forcing,
    stepper: Stepper,
    /// Zone index of each channel.
    pub channel_zone: Vec<usize>,
    channel_heaters: Vec<Vec<usize>>,
    setpoint_sched: Vec<Option<dwell_model::schedule::WeeklySchedule>>,
    u_k: Vec<f64>,
    u_next: Vec<f64>,
    setpoint: Vec<f64>,
    enabled: Vec<bool>,
    fraction: Vec<f64>,
}

impl<'a> Runner<'a> {
    /// Prepares a run at step `step_s` (s), a divisor of one hour.
    pub fn new(
        model: &'a ModelFile,
        house: &'a House,
        weather: &WeatherSeries,
        step_s: f64,
    ) -> Result<Runner<'a>, StudyError> {
        let step_min = step_s / 60.0;
        if !ALLOWED_STEPS_MIN
            .iter()
            .any(|&m| (m as f64 - step_min).abs() < 1e-9)
        {
            return Err(StudyError::Option(format!(
                "a step of {step_min} minutes is not allowed; use one of {ALLOWED_STEPS_MIN:?}"
            )));
        }
        let forcing = Forcing::new(model, house, weather, step_s, SkyModel::HayDavies);
        let net = &house.network;
        let (n, m) = (net.states.len(), net.inputs.len());
        let disc = Discretization::new(&net.system, step_s, Route::Modal)?;
        let rows = Readout::nodes(
            &house.zones.iter().map(|z| z.air_state).collect::<Vec<_>>(),
            n,
            m,
        );
        let mut stepper = Stepper::new(&disc, &rows, &Readout::empty(n, m))?;
        let crate::simulate::ThermostatChannels {
            channels,
            heaters: channel_heaters,
            zones: channel_zone,
        } = crate::simulate::thermostat_channels(model, house, &|hi| {
            heater_setpoint(model, &model.heaters[hi]).is_some()
        });
        let q = channels.len();
        if q > 0 {
            stepper = stepper.with_control(&channels)?;
        }
        Ok(Runner {
            model,
            house,
            setpoint_sched: model
                .heaters
                .iter()
                .map(|h| heater_setpoint(model, h))
                .collect(),
            forcing,
            stepper,
            channel_zone,
            channel_heaters,
            u_k: vec![0.0; m],
            u_next: vec![0.0; m],
            setpoint: vec![0.0; q],
            enabled: vec![true; q],
            fraction: vec![0.0; q],
        })
    }

    /// Sets every node temperature (°C).
    pub fn set_state(&mut self, x: &[f64]) {
        self.stepper.set_state(x);
    }

    /// The current node temperatures (°C).
    pub fn state(&self) -> Vec<f64> {
        let mut x = vec![0.0; self.house.network.states.len()];
        self.stepper.state_into(&mut x);
        x
    }

    /// One step `k` from stamp `start`; `adjust(k, setpoints, enabled)` may change the
    /// scheduled setpoints and switch channels off. Leaves heater inputs in `u_k`.
    fn advance(
        &mut self,
        start: usize,
        k: usize,
        adjust: &mut impl FnMut(usize, &mut [f64], &mut [bool]),
    ) {
        self.forcing.fill(start, k, &mut self.u_k);
        self.forcing.fill(start, k + 1, &mut self.u_next);
        if self.setpoint.is_empty() {
            self.stepper.step(&self.u_k, &self.u_next);
            return;
        }
        for (c, hs) in self.channel_heaters.iter().enumerate() {
            self.setpoint[c] = hs
                .iter()
                .map(|&hi| {
                    self.forcing.at_step_end(
                        self.setpoint_sched[hi].as_ref().expect("thermostat"),
                        start,
                        k,
                    )
                })
                .fold(f64::NEG_INFINITY, f64::max);
            self.enabled[c] = true;
        }
        adjust(k, &mut self.setpoint, &mut self.enabled);
        self.stepper.step_thermostat(
            &mut self.u_k,
            &self.u_next,
            &self.setpoint,
            &self.enabled,
            &mut self.fraction,
        );
    }

    /// Repeats the first `days` days from stamp `start` (default schedules) until no node
    /// moves by more than 0.01 K over a repeat (at most 30 repeats), starting from every node
    /// at the first zone's design temperature.
    /// `adjust` as in [`Runner::run`].
    pub fn warm_up(
        &mut self,
        start: usize,
        days: usize,
        mut adjust: impl FnMut(usize, &mut [f64], &mut [bool]),
    ) {
        let n = self.house.network.states.len();
        let first = self
            .house
            .zones
            .first()
            .map(|z| z.design_indoor_c)
            .unwrap_or(20.0);
        self.stepper.set_state(&vec![first; n]);
        let avail = self.forcing.hours() - 1 - start;
        let window = (days * 24).min(avail) * self.forcing.steps_per_hour;
        let mut prev = vec![first; n];
        let mut x = vec![0.0; n];
        for _ in 0..30 {
            for k in 0..window {
                self.advance(start, k, &mut adjust);
            }
            self.stepper.state_into(&mut x);
            let change = x
                .iter()
                .zip(&prev)
                .map(|(a, b)| (a - b).abs())
                .fold(0.0, f64::max);
            prev.copy_from_slice(&x);
            if change < 0.01 {
                break;
            }
        }
    }

    /// Runs `steps` steps from stamp `start` plus `offset` steps, from the current state.
    /// `adjust(k, setpoints, enabled)` sees `k` counted from `start`. Records states if
    /// `keep_states`.
    pub fn run(
        &mut self,
        start: usize,
        offset: usize,
        steps: usize,
        keep_states: bool,
        mut adjust: impl FnMut(usize, &mut [f64], &mut [bool]),
    ) -> Trace {
        let nz = self.house.zones.len();
        let cap = steps + 1;
        let mut t = Trace {
            times: Vec::with_capacity(cap),
            local: Vec::with_capacity(cap),
            zone_c: vec![Vec::with_capacity(cap); nz],
            heat_w: vec![Vec::with_capacity(cap); nz],
            setpoint_c: vec![Vec::with_capacity(cap); nz],
            outdoor_c: Vec::with_capacity(cap),
            states: Vec::with_capacity(if keep_states {
                cap * self.house.network.states.len()
            } else {
                0
            }),
            n: self.house.network.states.len(),
        };
        let x0 = self.state();
        let heater_zone: Vec<usize> = self
            .model
            .heaters
            .iter()
            .map(|h| {
                self.house
                    .zones
                    .iter()
                    .position(|z| z.id == h.zone)
                    .expect("validated")
            })
            .collect();
        let mut temps = vec![0.0; nz];
        let mut x = x0.clone();
        let record =
            |t: &mut Trace, f: &Forcing, k: usize, temps: &[f64], heat: &[f64], sp: &[f64]| {
                let at = f.instant(start, k);
                t.times.push(at);
                t.local.push(f.local(at));
                t.outdoor_c.push(f.outdoor_at(start, k));
                for z in 0..temps.len() {
                    t.zone_c[z].push(temps[z]);
                    t.heat_w[z].push(heat[z]);
                    t.setpoint_c[z].push(sp[z]);
                }
            };
        let temps0: Vec<f64> = self.house.zones.iter().map(|z| x0[z.air_state]).collect();
        let mut heat = vec![0.0; nz];
        let mut sp = vec![f64::NAN; nz];
        record(&mut t, &self.forcing, offset, &temps0, &heat, &sp);
        if keep_states {
            t.states.extend_from_slice(&x0);
        }
        for k in offset..offset + steps {
            self.advance(start, k, &mut adjust);
            heat.iter_mut().for_each(|v| *v = 0.0);
            for (hi, &zi) in heater_zone.iter().enumerate() {
                heat[zi] += self.u_k[self.house.heater_inputs[hi]];
            }
            for (c, &zi) in self.channel_zone.iter().enumerate() {
                sp[zi] = if self.enabled[c] {
                    self.setpoint[c]
                } else {
                    f64::NAN
                };
            }
            temps.copy_from_slice(self.stepper.instant());
            record(&mut t, &self.forcing, k + 1, &temps, &heat, &sp);
            if keep_states {
                self.stepper.state_into(&mut x);
                t.states.extend_from_slice(&x);
            }
        }
        t
    }
}

/// The stamps `[start, end]` of the weather within local days `from` … `to` (inclusive).
pub fn period_stamps(
    f: &Forcing,
    from: Option<chrono::NaiveDate>,
    to: Option<chrono::NaiveDate>,
) -> Result<(usize, usize), StudyError> {
    period_stamps_in(&f.times, f.local_offset(), from, to)
}

/// [`period_stamps`] for stamps `times` whose local standard time is UTC + `offset`.
pub fn period_stamps_in(
    times: &[DateTime<FixedOffset>],
    offset: chrono::Duration,
    from: Option<chrono::NaiveDate>,
    to: Option<chrono::NaiveDate>,
) -> Result<(usize, usize), StudyError> {
    let n = times.len();
    let local = |i: usize| times[i].naive_utc() + offset;
    let mut start = 0;
    let mut end = n - 1;
    if let Some(d) = from {
        let t0 = d.and_hms_opt(0, 0, 0).expect("midnight");
        start = (0..n).find(|&i| local(i) >= t0).ok_or_else(|| {
            StudyError::Option(format!(
                "--from {d} is after the end of the weather ({})",
                times[n - 1]
            ))
        })?;
    }
    if let Some(d) = to {
        let t1 = d
            .succ_opt()
            .unwrap_or(d)
            .and_hms_opt(0, 0, 0)
            .expect("midnight");
        end = (0..n).rev().find(|&i| local(i) <= t1).ok_or_else(|| {
            StudyError::Option(format!(
                "--to {d} is before the start of the weather ({})",
                times[0]
            ))
        })?;
    }
    if end <= start {
        return Err(StudyError::Option(format!(
            "the period from {} to {} holds no whole hour of weather; widen --from/--to",
            times[start], times[end]
        )));
    }
    Ok((start, end))
}

/// First time (h after `times[from]`) the series `v` crosses below `threshold` at or after
/// index `from`, by linear interpolation between instants; None if it never does.
pub fn hours_until_below(
    local: &[NaiveDateTime],
    v: &[f64],
    from: usize,
    until: usize,
    threshold: f64,
) -> Option<f64> {
    if v[from] < threshold {
        return Some(0.0);
    }
    for k in from + 1..=until.min(v.len() - 1) {
        if v[k] < threshold {
            let f = (v[k - 1] - threshold) / (v[k - 1] - v[k]);
            let dt = (local[k] - local[k - 1]).num_milliseconds() as f64 / 3.6e6;
            let t_prev = (local[k - 1] - local[from]).num_milliseconds() as f64 / 3.6e6;
            return Some(t_prev + f * dt);
        }
    }
    None
}
