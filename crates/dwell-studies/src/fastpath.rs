//! Summary-only runs for sweeps: the figures of [`simulate`](crate::simulate::simulate)'s
//! summary that a sweep row reports, computed without hourly results, without chrono in the
//! stepping loop and with everything that does not depend on the variant computed once per
//! sweep and shared read-only between threads.
//!
//! A [`SweepContext`] holds one weather and one set of [`SimOptions`]. It caches, each under
//! the identity of what it depends on, and computes each entry once even when several
//! threads ask at the same moment:
//!
//! * the period `[start, end]` per site time zone (`site.utc_offset_h`);
//! * the sun table (NREL SPA sun position and horizontal components per weather hour) per
//!   site (latitude, longitude, elevation, albedo);
//! * the irradiance on each plane (W/m², hour means) per site, tilt and azimuth;
//! * the step means (gains, raw heat, prescribed power) and end-of-step values (setpoints)
//!   of each schedule per step of the period, per schedule content (its parsed form, so two
//!   schedules with the same periods share one table) and time zone.
//!
//! Per variant, [`SweepContext::run`] then only discretises the variant's network, builds its
//! stepper and thermostat channels, looks up its tables, warms up by the same rule as
//! `simulate` and steps the period, reducing as it goes to a [`RunSummary`]. The stepping loop
//! reads inputs from the tables and allocates nothing.
//!
//! Same results as `simulate`: every input, setpoint and sum is computed by the same
//! functions ([`crate::forcing`]) in the same order, so the figures agree with
//! `simulate`'s summary to rounding (tested on every shipped example and variants, relative
//! difference below 1e-9). The one difference in the arithmetic: this stepper has no mean
//! readout of the boundary flows (no energy ledger), which does not enter the state or the
//! zone temperatures.

use std::collections::HashMap;
use std::hash::Hash;
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::{Arc, Mutex, OnceLock};

use chrono::Duration;
use dwell_model::schedule::WeeklySchedule;
use dwell_model::{House, InputRole, ModelFile};
use dwell_solver::{Discretization, OnOffThermostat, Readout, Stepper};
use dwell_weather::{Site, SunTable, WeatherSeries};

use crate::forcing::{
    model_schedule, schedule_before, schedule_step_mean, site_offset, step_instant,
};
use crate::simulate::{
    cop_at, thermostat_channels, Control, SimOptions, StudyError, ThermostatChannels,
    ALLOWED_STEPS_MIN,
};

/// The figures of one run that a sweep reports (all equal to the same-named figures of
/// [`Summary`](crate::simulate::Summary)).
#[derive(Clone, Debug, PartialEq)]
pub struct RunSummary {
    /// Number of states of the network.
    pub states: usize,
    /// Hours simulated.
    pub hours: usize,
    /// Heat delivered by all heaters (kWh).
    pub heating_kwh: f64,
    /// Highest hourly mean heating power of the whole house (W).
    pub peak_heating_w: f64,
    /// Purchased energy: heat / efficiency or / COP (kWh).
    pub purchased_kwh: f64,
    /// Money, if every heater has a price.
    pub cost: Option<f64>,
    /// Lowest air temperature over zones at the hourly stamps, the start included (°C).
    pub min_air_c: f64,
    /// Repeats of the warm-up window (0 with a fixed start temperature).
    pub warmup_cycles: usize,
}

/// A map whose entries are computed once, on first demand, even under concurrent demand:
/// the map lock is held only to find or insert the entry's cell; the value is computed
/// outside it, and threads asking for the same key wait on that key's cell alone.
struct Cache<K, V> {
    map: Mutex<HashMap<K, Arc<OnceLock<Arc<V>>>>>,
}

impl<K: Eq + Hash, V> Cache<K, V> {
    fn new() -> Self {
        Cache {
            map: Mutex::new(HashMap::new()),
        }
    }

    fn get(&self, key: K, make: impl FnOnce() -> V) -> Arc<V> {
        let cell = {
            let mut map = self.map.lock().unwrap_or_else(|e| e.into_inner());
            map.entry(key).or_default().clone()
        };
        cell.get_or_init(|| Arc::new(make())).clone()
    }

    fn contains(&self, key: &K) -> bool {
        self.map
            .lock()
            .unwrap_or_else(|e| e.into_inner())
            .contains_key(key)
    }

    fn len(&self) -> usize {
        self.map.lock().unwrap_or_else(|e| e.into_inner()).len()
    }
}

/// Most bytes of per-step input matrices a context keeps (256 MiB: a year of 5-minute steps
/// with 20 inputs is 17 MiB; of hourly steps, 1.4 MiB).
pub const MATRIX_BUDGET_BYTES: usize = 256 << 20;

/// Identity of a site for the sun: the bits of latitude, longitude, elevation and albedo.
type SiteKey = [u64; 4];

/// Identity of a schedule table: the schedule's parsed form (its `Debug` text, which prints
/// every number exactly) and the time zone (s).
type ScheduleKey = (String, i64);

/// Everything of a sweep that does not depend on the variant, shared by all threads.
pub struct SweepContext<'w> {
    weather: &'w WeatherSeries,
    opts: SimOptions,
    steps_per_hour: usize,
    /// Why no variant can run (bad step, too little weather), if so.
    setup_error: Option<String>,
    /// Ground temperature when the site gives none (°C).
    weather_ground_c: f64,
    periods: Cache<i64, Result<(usize, usize), String>>,
    suns: Cache<SiteKey, SunTable>,
    planes: Cache<(SiteKey, u64, u64), Vec<f64>>,
    plane_steps: Cache<(SiteKey, u64, u64, i64), Vec<f64>>,
    outdoor: Cache<i64, Vec<f64>>,
    matrices: Cache<Vec<u64>, Vec<f64>>,
    /// Bytes of input matrices kept (or refused) so far.
    matrix_bytes: AtomicUsize,
    means: Cache<ScheduleKey, Vec<f64>>,
    ends: Cache<ScheduleKey, Vec<f64>>,
}

/// Sizes of a context's caches, to check sharing.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct CacheCounts {
    /// Periods (one per time zone).
    pub periods: usize,
    /// Sun tables (one per site).
    pub suns: usize,
    /// Plane irradiance series.
    pub planes: usize,
    /// Schedule step-mean tables.
    pub means: usize,
    /// Setpoint tables.
    pub ends: usize,
    /// Input matrices (one per input layout).
    pub input_layouts: usize,
}

/// A heat-flow input fed by scheduled terms: `(input, [(power (W), fraction table or None
/// for always 1)])`.
type ScheduledInput = (usize, Vec<(f64, Option<Arc<Vec<f64>>>)>);

/// The inputs of one variant, as references into the shared tables.
/// Every table is indexed by the step `k` counted from the period's start, so filling needs
/// no division and no clock.
struct Inputs {
    /// Outdoor air at each step (°C).
    air_c: Arc<Vec<f64>>,
    outdoor: Vec<usize>,
    heaters: Vec<usize>,
    fixed: Vec<(usize, f64)>,
    /// Irradiance at each step (W/m²).
    planes: Vec<(usize, Arc<Vec<f64>>)>,
    scheduled: Vec<ScheduledInput>,
}

impl Inputs {
    /// As [`Forcing::fill`](crate::forcing::Forcing::fill), from the tables: step `k` from
    /// the period's start, heaters at 0.
    #[inline]
    fn fill(&self, k: usize, u: &mut [f64]) {
        // Every input has one role, so setting each role's entries sets all of `u`.
        for &j in &self.heaters {
            u[j] = 0.0;
        }
        let t_out = self.air_c[k];
        for &j in &self.outdoor {
            u[j] = t_out;
        }
        for &(j, t) in &self.fixed {
            u[j] = t;
        }
        for (j, irr) in &self.planes {
            u[*j] = irr[k];
        }
        for (j, terms) in &self.scheduled {
            let mut w = 0.0;
            for (p, table) in terms {
                let frac = match table {
                    Some(t) => t[k],
                    None => 1.0,
                };
                w += p * frac;
            }
            u[*j] = w;
        }
    }

    /// Identity of the input layout: roles by index and the tables they read (tables live as
    /// long as the context, so their addresses identify them).
    fn key(&self, m: usize) -> Vec<u64> {
        let ptr = |t: &Arc<Vec<f64>>| Arc::as_ptr(t) as usize as u64;
        let mut k = vec![m as u64, ptr(&self.air_c), self.outdoor.len() as u64];
        k.extend(self.outdoor.iter().map(|&j| j as u64));
        k.push(self.heaters.len() as u64);
        k.extend(self.heaters.iter().map(|&j| j as u64));
        k.push(self.fixed.len() as u64);
        k.extend(
            self.fixed
                .iter()
                .flat_map(|&(j, t)| [j as u64, t.to_bits()]),
        );
        k.push(self.planes.len() as u64);
        k.extend(self.planes.iter().flat_map(|(j, t)| [*j as u64, ptr(t)]));
        k.push(self.scheduled.len() as u64);
        for (j, terms) in &self.scheduled {
            k.extend([*j as u64, terms.len() as u64]);
            k.extend(
                terms
                    .iter()
                    .flat_map(|(p, t)| [p.to_bits(), t.as_ref().map_or(0, ptr)]),
            );
        }
        k
    }
}

fn site_key(model: &ModelFile) -> SiteKey {
    let s = &model.site;
    [
        s.latitude_deg.to_bits(),
        s.longitude_deg.to_bits(),
        s.elevation_m.to_bits(),
        s.ground_albedo.to_bits(),
    ]
}

impl<'w> SweepContext<'w> {
    /// A context for runs over `weather` with `opts` (the options of `simulate`; `from`/`to`
    /// select the period in each variant's local time as there).
    pub fn new(weather: &'w WeatherSeries, opts: &SimOptions) -> Self {
        let step_min = opts.step_s / 60.0;
        let setup_error = if !ALLOWED_STEPS_MIN
            .iter()
            .any(|&m| (m as f64 - step_min).abs() < 1e-9)
        {
            Some(format!(
                "a step of {step_min} minutes is not allowed; use one of {ALLOWED_STEPS_MIN:?} (it must divide one hour)"
            ))
        } else if weather.len() < 2 {
            Some("the weather has fewer than two hours".into())
        } else {
            None
        };
        let weather_ground_c = match &weather.ground_c {
            Some(g) => g.iter().sum::<f64>() / g.len() as f64,
            None if weather.is_empty() => f64::NAN,
            None => weather.annual_mean_air_c(),
        };
        SweepContext {
            weather,
            opts: opts.clone(),
            steps_per_hour: (3600.0 / opts.step_s).round() as usize,
            setup_error,
            weather_ground_c,
            periods: Cache::new(),
            suns: Cache::new(),
            planes: Cache::new(),
            plane_steps: Cache::new(),
            outdoor: Cache::new(),
            matrices: Cache::new(),
            matrix_bytes: AtomicUsize::new(0),
            means: Cache::new(),
            ends: Cache::new(),
        }
    }

    /// The options of the runs.
    pub fn options(&self) -> &SimOptions {
        &self.opts
    }

    /// How many tables the context holds.
    pub fn cache_counts(&self) -> CacheCounts {
        CacheCounts {
            periods: self.periods.len(),
            suns: self.suns.len(),
            planes: self.planes.len(),
            means: self.means.len(),
            ends: self.ends.len(),
            input_layouts: self.matrices.len(),
        }
    }

    fn period(&self, offset: Duration) -> Result<(usize, usize), StudyError> {
        let p = self.periods.get(offset.num_seconds(), || {
            crate::trace::period_stamps_in(
                &self.weather.times,
                offset,
                self.opts.from,
                self.opts.to,
            )
            .map_err(|e| e.to_string())
        });
        p.as_ref().clone().map_err(StudyError::Option)
    }

    fn plane(&self, model: &ModelFile, tilt_deg: f64, azimuth_deg: f64) -> Arc<Vec<f64>> {
        let key = site_key(model);
        self.planes
            .get((key, tilt_deg.to_bits(), azimuth_deg.to_bits()), || {
                let sun = self.suns.get(key, || {
                    let site = Site {
                        latitude_deg: model.site.latitude_deg,
                        longitude_deg: model.site.longitude_deg,
                        elevation_m: model.site.elevation_m,
                        albedo: model.site.ground_albedo,
                    };
                    SunTable::new(self.weather, &site)
                });
                sun.plane(tilt_deg, azimuth_deg, self.opts.sky)
            })
    }

    /// The stamp index of step `k` from stamp `start` and the step's position in its hour.
    fn stamp_of(&self, start: usize, k: usize) -> (usize, usize) {
        (start + k / self.steps_per_hour, k % self.steps_per_hour)
    }

    /// Outdoor air (°C) at steps `0 ..= steps` from stamp `start`, as
    /// [`Forcing::outdoor_at`](crate::forcing::Forcing::outdoor_at).
    fn outdoor_table(&self, offset: Duration, start: usize, steps: usize) -> Arc<Vec<f64>> {
        self.outdoor.get(offset.num_seconds(), || {
            let air = &self.weather.air_c;
            let sph = self.steps_per_hour;
            (0..=steps)
                .map(|k| {
                    let (i, r) = self.stamp_of(start, k);
                    if r == 0 || i + 1 >= air.len() {
                        air[i.min(air.len() - 1)]
                    } else {
                        let w = r as f64 / sph as f64;
                        air[i] * (1.0 - w) + air[i + 1] * w
                    }
                })
                .collect()
        })
    }

    /// Irradiance on a plane (W/m²) at steps `0 ..= steps` from stamp `start`: the mean of
    /// the hour holding the step, as [`Forcing::fill`](crate::forcing::Forcing::fill).
    fn plane_table(
        &self,
        model: &ModelFile,
        tilt_deg: f64,
        azimuth_deg: f64,
        offset: Duration,
        start: usize,
        steps: usize,
    ) -> Arc<Vec<f64>> {
        let key = (
            site_key(model),
            tilt_deg.to_bits(),
            azimuth_deg.to_bits(),
            offset.num_seconds(),
        );
        self.plane_steps.get(key, || {
            let hourly = self.plane(model, tilt_deg, azimuth_deg);
            (0..=steps)
                .map(|k| hourly[(self.stamp_of(start, k).0 + 1).min(hourly.len() - 1)])
                .collect()
        })
    }

    /// Step means of `s` for steps `0 ..= steps` from stamp `start` (the steps of a run and the
    /// one after its last, which `simulate` also evaluates).
    fn mean_table(
        &self,
        s: &WeeklySchedule,
        offset: Duration,
        start: usize,
        steps: usize,
    ) -> Arc<Vec<f64>> {
        let t0 = self.weather.times[start];
        let h = self.opts.step_s;
        self.means
            .get((format!("{s:?}"), offset.num_seconds()), || {
                (0..=steps)
                    .map(|k| schedule_step_mean(s, step_instant(t0, h, k).naive_utc() + offset, h))
                    .collect()
            })
    }

    /// Values of `s` in force just before the end of steps `0 .. steps` from stamp `start`.
    fn end_table(
        &self,
        s: &WeeklySchedule,
        offset: Duration,
        start: usize,
        steps: usize,
    ) -> Arc<Vec<f64>> {
        let t0 = self.weather.times[start];
        let h = self.opts.step_s;
        self.ends.get((format!("{s:?}"), offset.num_seconds()), || {
            (0..steps)
                .map(|k| schedule_before(s, step_instant(t0, h, k + 1).naive_utc() + offset))
                .collect()
        })
    }

    /// Runs `house` (compiled from `model`) over the context's weather and options and
    /// returns the summary figures; the same figures as
    /// [`simulate`](crate::simulate::simulate)`(model, house, weather, opts)` gives, to
    /// rounding. Errors as there.
    pub fn run(&self, model: &ModelFile, house: &House) -> Result<RunSummary, StudyError> {
        if let Some(e) = &self.setup_error {
            return Err(StudyError::Option(e.clone()));
        }
        let opts = &self.opts;
        let offset = site_offset(model);
        let (start, end) = self.period(offset)?;
        let sph = self.steps_per_hour;
        let hours = end - start;
        let steps = hours * sph;
        let net = &house.network;
        let (n, m) = (net.states.len(), net.inputs.len());
        let disc = Discretization::new(&net.system, opts.step_s, opts.route)?;
        let zone_rows = Readout::nodes(
            &house.zones.iter().map(|z| z.air_state).collect::<Vec<_>>(),
            n,
            m,
        );
        let mut stepper = Stepper::new(&disc, &zone_rows, &Readout::empty(n, m))?;

        // Schedules by heater, as `Forcing::new` reads them.
        let setpoints: Vec<Option<WeeklySchedule>> = model
            .heaters
            .iter()
            .map(|h| match (h.setpoint_c, &h.setpoint_schedule) {
                (Some(t), _) => Some(WeeklySchedule::constant(t)),
                (None, s) => model_schedule(model, s),
            })
            .collect();
        let ThermostatChannels {
            channels,
            heaters: channel_heaters,
            ..
        } = thermostat_channels(model, house, &|hi| setpoints[hi].is_some());
        let q = channels.len();
        let use_channels = matches!(opts.control, Control::Thermostat | Control::OnOff) && q > 0;
        if use_channels {
            stepper = stepper.with_control(&channels)?;
        }
        let channel_tables: Vec<Vec<Arc<Vec<f64>>>> = if use_channels {
            channel_heaters
                .iter()
                .map(|hs| {
                    hs.iter()
                        .map(|&hi| {
                            self.end_table(
                                setpoints[hi].as_ref().expect("setpoint heater"),
                                offset,
                                start,
                                steps,
                            )
                        })
                        .collect()
                })
                .collect()
        } else {
            vec![]
        };
        let power_tables: Vec<(usize, f64, Arc<Vec<f64>>)> = if opts.control == Control::Schedule {
            model
                .heaters
                .iter()
                .enumerate()
                .filter_map(|(hi, h)| {
                    model_schedule(model, &h.power_schedule).map(|s| {
                        (
                            house.heater_inputs[hi],
                            h.capacity_w,
                            self.mean_table(&s, offset, start, steps),
                        )
                    })
                })
                .collect()
        } else {
            vec![]
        };
        let dead_band = model
            .heaters
            .iter()
            .map(|h| h.dead_band_k)
            .fold(0.0, f64::max)
            .max(0.1);
        let mut onoff = OnOffThermostat::new(q.max(1), dead_band)?;

        // Inputs, as `Forcing::new` assigns them.
        let ground_c = model.site.deep_ground_c.unwrap_or(self.weather_ground_c);
        let mut inputs = Inputs {
            air_c: self.outdoor_table(offset, start, steps),
            outdoor: vec![],
            heaters: vec![],
            fixed: vec![],
            planes: vec![],
            scheduled: vec![],
        };
        let mut heater_list: Vec<(usize, usize)> = Vec::new();
        let table = |id: &Option<String>| {
            model_schedule(model, id).map(|s| self.mean_table(&s, offset, start, steps))
        };
        for (j, role) in house.inputs.iter().enumerate() {
            match role {
                InputRole::OutdoorAir => inputs.outdoor.push(j),
                InputRole::Ground => inputs.fixed.push((j, ground_c)),
                InputRole::Boundary { temperature_c } => inputs.fixed.push((j, *temperature_c)),
                InputRole::SolarPlane {
                    tilt_deg,
                    azimuth_deg,
                } => inputs.planes.push((
                    j,
                    self.plane_table(model, *tilt_deg, *azimuth_deg, offset, start, steps),
                )),
                InputRole::Gains { zone } => {
                    let zid = &house.zones[*zone].id;
                    let area = house.zones[*zone].floor_area_m2;
                    let terms = model
                        .gains
                        .iter()
                        .filter(|g| &g.zone == zid)
                        .map(|g| {
                            (
                                g.power_w.unwrap_or(0.0) + g.w_per_m2.unwrap_or(0.0) * area,
                                table(&g.schedule),
                            )
                        })
                        .collect();
                    inputs.scheduled.push((j, terms));
                }
                InputRole::RawHeat { power_w, schedule } => inputs
                    .scheduled
                    .push((j, vec![(*power_w, table(schedule))])),
                InputRole::Heater { heater } => {
                    inputs.heaters.push(j);
                    heater_list.push((j, *heater))
                }
            }
        }
        // The inputs of every step, row after row, shared by all variants of one layout (most
        // variants of a sweep change constructions or equipment, not the inputs).
        // Kept for the sweep up to `MATRIX_BUDGET_BYTES` in all; past that (a sweep whose
        // every variant has its own inputs, at short steps) each variant builds its own.
        let build = || {
            let mut rows = vec![0.0; (steps + 1) * m];
            for (k, row) in rows.chunks_exact_mut(m.max(1)).enumerate() {
                inputs.fill(k, row);
            }
            rows
        };
        let bytes = (steps + 1) * m * std::mem::size_of::<f64>();
        let key = inputs.key(m);
        let u_all = if self.matrices.contains(&key)
            || self.matrix_bytes.fetch_add(bytes, Ordering::Relaxed) + bytes <= MATRIX_BUDGET_BYTES
        {
            self.matrices.get(key, build)
        } else {
            Arc::new(build())
        };
        // The inputs as run: prescribed heater powers written into a copy for the schedule
        // control (the shared table keeps heaters at 0).
        let u_run: std::borrow::Cow<[f64]> = if power_tables.is_empty() {
            std::borrow::Cow::Borrowed(&u_all[..])
        } else {
            let mut own = u_all.to_vec();
            for k in 0..=steps {
                for (j, cap, t) in &power_tables {
                    own[k * m + j] = t[k].clamp(0.0, *cap);
                }
            }
            std::borrow::Cow::Owned(own)
        };
        let row = |k: usize| &u_run[k * m..(k + 1) * m];
        // Each channel's setpoint at each step: the highest of its heaters' schedules.
        let mut sets = vec![f64::NEG_INFINITY; if use_channels { steps * q } else { 0 }];
        for (c, tables) in channel_tables.iter().enumerate() {
            for t in tables {
                for (k, set) in sets.iter_mut().skip(c).step_by(q.max(1)).enumerate() {
                    *set = set.max(t[k]);
                }
            }
        }
        // The thermostats' share of each heater input: (input, channel, full power (W)).
        let shares: Vec<(usize, usize, f64)> = channels
            .iter()
            .enumerate()
            .flat_map(|(c, ch)| ch.weights.iter().map(move |&(j, w)| (j, c, w)))
            .collect();

        // Buffers: nothing below allocates until the figures are reduced.
        let p_i = house.zones.len();
        let enabled = vec![true; q];
        let mut fractions = vec![0.0; if use_channels { steps * q } else { 0 }];
        let mut air = vec![0.0; steps * p_i];
        let mut u_k = vec![0.0; m];
        let mut x = vec![0.0; n];
        // Steps `0 .. count` from the state the stepper holds: known inputs and the
        // capacity-limited thermostat run as block runs over the tables (`Stepper::run_known`,
        // `Stepper::run_thermostat`); the on/off thermostat, whose switching depends on the
        // state at each step's start, step by step. Zone air temperatures at step ends go to
        // `air`, the thermostats' fractions to `fractions`.
        let mut run = |stepper: &mut Stepper, count: usize| {
            let u = &u_run[..(count + 1) * m];
            let air_out = &mut air[..count * p_i];
            match opts.control {
                Control::Thermostat if use_channels => stepper.run_thermostat(
                    u,
                    &sets[..count * q],
                    &enabled,
                    &mut fractions[..count * q],
                    air_out,
                    &mut [],
                ),
                Control::OnOff if use_channels => {
                    for k in 0..count {
                        u_k.copy_from_slice(row(k));
                        stepper.step_on_off(
                            &mut onoff,
                            &mut u_k,
                            row(k + 1),
                            &sets[k * q..(k + 1) * q],
                            &enabled,
                            &mut fractions[k * q..(k + 1) * q],
                        );
                        air_out[k * p_i..(k + 1) * p_i].copy_from_slice(stepper.instant());
                    }
                }
                _ => stepper.run_known(u, air_out, &mut []),
            }
        };

        // Start: the same rule as `simulate`.
        let mut warmup_cycles = 0;
        match opts.initial_c {
            Some(t) => stepper.set_state(&vec![t; n]),
            None => {
                let first = house
                    .zones
                    .first()
                    .map(|z| z.design_indoor_c)
                    .unwrap_or(20.0);
                stepper.set_state(&vec![first; n]);
                let window = (opts.warmup_days * 24).min(end - start) * sph;
                let mut prev = vec![first; n];
                let mut change = f64::INFINITY;
                while warmup_cycles < 30 && change > 0.01 {
                    run(&mut stepper, window);
                    stepper.state_into(&mut x);
                    change = x
                        .iter()
                        .zip(&prev)
                        .map(|(a, b)| (a - b).abs())
                        .fold(0.0, f64::max);
                    prev.copy_from_slice(&x);
                    warmup_cycles += 1;
                }
            }
        }
        stepper.state_into(&mut x);
        let mut min_air = house
            .zones
            .iter()
            .map(|z| x[z.air_state])
            .fold(f64::INFINITY, f64::min);
        run(&mut stepper, steps);

        // The period, reduced from the run's tables.
        let nh = model.heaters.len();
        let mut heater_j = vec![0.0; nh];
        let mut purchased_j = vec![0.0; nh];
        let zone_heaters: Vec<Vec<usize>> = house
            .zones
            .iter()
            .map(|z| {
                model
                    .heaters
                    .iter()
                    .enumerate()
                    .filter(|(_, h)| h.zone == z.id)
                    .map(|(hi, _)| hi)
                    .collect()
            })
            .collect();
        // Each heater's power at each step as the step applied it (W): the table's value
        // plus the thermostats' heat; then its energy, purchased energy and the hourly
        // total of the heaters that belong to a zone.
        let in_zone: Vec<bool> = (0..nh)
            .map(|hi| zone_heaters.iter().any(|hs| hs.contains(&hi)))
            .collect();
        let mut hourly = vec![0.0; hours];
        let mut power = vec![0.0; steps];
        let h = opts.step_s;
        for &(j, hi) in &heater_list {
            for (k, pk) in power.iter_mut().enumerate() {
                *pk = u_run[k * m + j];
            }
            if use_channels {
                for &(sj, c, w) in &shares {
                    if sj == j {
                        for (k, pk) in power.iter_mut().enumerate() {
                            *pk += fractions[k * q + c] * w;
                        }
                    }
                }
            }
            let heater = &model.heaters[hi];
            let per_w = net.injected[j] * h;
            let delivered: f64 = power.iter().sum::<f64>() * per_w;
            heater_j[hi] += delivered;
            purchased_j[hi] += if heater.cop_curve.is_empty() {
                delivered / heater.efficiency
            } else {
                // The outdoor air over each step (the mean of its two ends), as input 0.
                let first = if use_channels {
                    shares.iter().filter(|s| s.0 == 0).collect::<Vec<_>>()
                } else {
                    vec![]
                };
                power
                    .iter()
                    .enumerate()
                    .filter(|(_, &pk)| pk != 0.0)
                    .map(|(k, &pk)| {
                        let mut u0 = row(k).first().copied().unwrap_or(f64::NAN);
                        for &&(_, c, w) in &first {
                            u0 += fractions[k * q + c] * w;
                        }
                        let t_out = 0.5 * (u0 + row(k + 1).first().copied().unwrap_or(f64::NAN));
                        pk * per_w / cop_at(heater, t_out)
                    })
                    .sum::<f64>()
            };
            if in_zone[hi] {
                for (hour, chunk) in hourly.iter_mut().zip(power.chunks_exact(sph)) {
                    *hour += chunk.iter().sum::<f64>() / sph as f64;
                }
            }
        }
        let peak = hourly.iter().copied().fold(0.0f64, f64::max);
        for hour in 0..hours {
            let k_end = hour * sph + sph - 1;
            min_air = air[k_end * p_i..(k_end + 1) * p_i]
                .iter()
                .copied()
                .fold(min_air, f64::min);
        }
        let kwh = |j: f64| j / 3.6e6;
        let heating_kwh: f64 = zone_heaters
            .iter()
            .map(|hs| kwh(hs.iter().map(|&hi| heater_j[hi]).sum::<f64>()) + 0.0)
            .sum();
        let purchased_kwh: f64 = purchased_j.iter().map(|j| kwh(*j)).sum();
        let cost = model
            .heaters
            .iter()
            .zip(&purchased_j)
            .map(|(hh, j)| hh.price_per_kwh.map(|p| p * kwh(*j)))
            .sum::<Option<f64>>();
        Ok(RunSummary {
            states: n,
            hours,
            heating_kwh,
            peak_heating_w: peak,
            purchased_kwh,
            cost,
            min_air_c: min_air,
            warmup_cycles,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::simulate::simulate;
    use chrono::NaiveDate;
    use dwell_solver::Route;
    use serde_json::{json, Value};

    fn examples_dir() -> std::path::PathBuf {
        std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../../zones-examples")
    }

    fn load(name: &str) -> Value {
        let text = std::fs::read_to_string(examples_dir().join(name)).unwrap();
        serde_json::from_str(&text).unwrap()
    }

    /// Relative difference, against at least 1 (kWh, W, °C).
    fn rel(a: f64, b: f64) -> f64 {
        (a - b).abs() / a.abs().max(b.abs()).max(1.0)
    }

    /// The fast path's figures equal `simulate`'s summary (the reference: the full path of
    /// this crate, which the end-to-end tests check against analytic solutions) within
    /// 1e-9 relative; both runs share one context per options, as a sweep does.
    fn check(label: &str, v: Value, ctx: &SweepContext) {
        let m = dwell_model::from_value(v, label).unwrap();
        let h = dwell_model::compile(&m, label).unwrap();
        let fast = ctx.run(&m, &h).unwrap();
        let full = simulate(&m, &h, ctx.weather, ctx.options()).unwrap();
        let s = &full.summary;
        let min_air = s
            .zones
            .iter()
            .map(|z| z.min_c)
            .fold(f64::INFINITY, f64::min);
        assert_eq!(fast.hours, s.hours, "{label}");
        assert_eq!(fast.states, h.network.states.len(), "{label}");
        for (what, a, b) in [
            ("heating_kwh", fast.heating_kwh, s.total_heating_kwh),
            (
                "peak_heating_w",
                fast.peak_heating_w,
                s.total_peak_heating_w,
            ),
            ("purchased_kwh", fast.purchased_kwh, s.total_purchased_kwh),
            ("min_air_c", fast.min_air_c, min_air),
            (
                "cost",
                fast.cost.unwrap_or(0.0),
                s.total_cost.unwrap_or(0.0),
            ),
        ] {
            assert!(
                rel(a, b) < 1e-9,
                "{label}: {what} fast {a} vs simulate {b} (rel {:e})",
                rel(a, b)
            );
        }
        assert_eq!(fast.cost.is_some(), s.total_cost.is_some(), "{label}");
    }

    #[test]
    fn every_example_and_variant_matches_simulate_over_a_year() {
        let weather = dwell_weather::default_weather();
        let ctx = SweepContext::new(&weather, &SimOptions::default());
        let mut names: Vec<String> = std::fs::read_dir(examples_dir())
            .unwrap()
            .filter_map(|e| e.ok()?.file_name().into_string().ok())
            .filter(|n| n.ends_with(".json"))
            .collect();
        names.sort();
        assert!(names.len() >= 4, "{names:?}");
        for name in &names {
            check(name, load(name), &ctx);
        }
        let base = load("brickworth-house.json");
        for p in std::fs::read_dir(examples_dir().join("variants")).unwrap() {
            let p = p.unwrap().path();
            if p.extension().is_some_and(|x| x == "json") {
                let mut v = base.clone();
                let patch: Value =
                    serde_json::from_str(&std::fs::read_to_string(&p).unwrap()).unwrap();
                dwell_model::patch::merge_patch(&mut v, &patch);
                check(&p.display().to_string(), v, &ctx);
            }
        }
        // A heater too small for the cold spells: the capacity limit binds. The variant
        // changes no input, so it reuses the base cabin's input matrix.
        let layouts = ctx.cache_counts().input_layouts;
        let mut v = load("fernhollow-cabin.json");
        v["heaters"][0]["capacity_w"] = json!(900.0);
        v["airflows"][0]["air_changes_per_h"] = json!(1.5);
        check("fernhollow, 900 W heater, leaky", v, &ctx);
        assert_eq!(ctx.cache_counts().input_layouts, layouts);
        // Tables are shared: one period (one time zone), one sun table per distinct site of
        // the houses that have sunlit surfaces.
        let sites: std::collections::HashSet<SiteKey> = names
            .iter()
            .filter_map(|n| {
                let m = dwell_model::from_value(load(n), n).unwrap();
                let h = dwell_model::compile(&m, n).unwrap();
                let sunlit = h
                    .inputs
                    .iter()
                    .any(|r| matches!(r, InputRole::SolarPlane { .. }));
                sunlit.then(|| site_key(&m))
            })
            .collect();
        let c = ctx.cache_counts();
        assert_eq!(c.periods, 1);
        assert_eq!(c.suns, sites.len());
    }

    #[test]
    fn other_controls_steps_periods_and_time_zones_match_simulate() {
        let weather = dwell_weather::default_weather();
        let jan = |control, step_s| SimOptions {
            control,
            step_s,
            from: NaiveDate::from_ymd_opt(2025, 1, 1),
            to: NaiveDate::from_ymd_opt(2025, 1, 21),
            ..SimOptions::default()
        };
        let cabin = load("fernhollow-cabin.json");
        let mut east = cabin.clone();
        east["site"]["utc_offset_h"] = json!(2.0);
        let mut scheduled = cabin.clone();
        scheduled["heaters"][0]["power_schedule"] = json!("cabin_setpoint");
        scheduled["schedules"][0]["base"] = json!(800.0);
        scheduled["schedules"][0]["periods"][0]["value"] = json!(2500.0);
        let cases: Vec<(&str, SimOptions, Value)> = vec![
            (
                "free, 1 h",
                jan(Control::Free, 3600.0),
                load("brickworth-house.json"),
            ),
            ("on/off, 10 min", jan(Control::OnOff, 600.0), cabin.clone()),
            (
                "thermostat, 15 min",
                jan(Control::Thermostat, 900.0),
                load("sunbank-bungalow.json"),
            ),
            ("thermostat, UTC+2", jan(Control::Thermostat, 3600.0), east),
            ("schedule, 5 min", jan(Control::Schedule, 300.0), scheduled),
            (
                "fixed start, block route",
                SimOptions {
                    initial_c: Some(15.0),
                    route: Route::Block,
                    ..jan(Control::Thermostat, 1800.0)
                },
                load("raw-two-mass.json"),
            ),
        ];
        for (label, opts, v) in cases {
            let ctx = SweepContext::new(&weather, &opts);
            check(label, v, &ctx);
        }
    }

    #[test]
    fn bad_options_fail_every_run_with_simulate_s_message() {
        let weather = dwell_weather::default_weather();
        let opts = SimOptions {
            step_s: 700.0,
            ..SimOptions::default()
        };
        let ctx = SweepContext::new(&weather, &opts);
        let label = "raw-two-mass.json";
        let m = dwell_model::from_value(load(label), label).unwrap();
        let h = dwell_model::compile(&m, label).unwrap();
        let fast = ctx.run(&m, &h).unwrap_err().to_string();
        let full = simulate(&m, &h, &weather, &opts).unwrap_err().to_string();
        assert_eq!(fast, full);
        let late = SimOptions {
            from: NaiveDate::from_ymd_opt(2031, 1, 1),
            ..SimOptions::default()
        };
        let ctx = SweepContext::new(&weather, &late);
        let fast = ctx.run(&m, &h).unwrap_err().to_string();
        let full = simulate(&m, &h, &weather, &late).unwrap_err().to_string();
        assert_eq!(fast, full);
    }
}
