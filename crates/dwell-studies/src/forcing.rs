//! The inputs of the network over time: weather, sun, schedules.
//!
//! Conventions (see docs/weather.md): the weather gives temperatures at hourly stamps and
//! irradiances as means over the hour ending at each stamp. A step `[t_k, t_k + h)` (h divides
//! one hour) gets
//! * temperatures at `t_k`, interpolated linearly between stamps (the solver holds them linear
//!   between steps, so this is exact for piecewise-linear weather);
//! * irradiance of the hour containing the step (the stamp that ends it);
//! * schedules (gains, raw heat, prescribed power) averaged over the step, sampled every
//!   5 minutes (exact for schedules whose changes fall on 5-minute marks);
//! * setpoints in force just before the step ends (the thermostat aims for them at the end).
//!
//! Schedules run on the site's local standard time (`site.utc_offset_h`).

use chrono::{DateTime, Duration, FixedOffset, NaiveDateTime};
use dwell_model::schedule::WeeklySchedule;
use dwell_model::{House, InputRole, ModelFile};
use dwell_weather::{SkyModel, SunTable, WeatherSeries};

/// A scheduled power: peak (W) times an optional fraction schedule.
#[derive(Clone, Debug)]
struct Scheduled {
    power_w: f64,
    schedule: Option<WeeklySchedule>,
}

/// Evaluates every network input at any step.
#[derive(Clone, Debug)]
pub struct Forcing {
    /// Hourly weather stamps (end of each hour).
    pub times: Vec<DateTime<FixedOffset>>,
    /// Outdoor air temperature at each stamp (°C).
    pub air_c: Vec<f64>,
    /// Deep-ground temperature (°C).
    pub ground_c: f64,
    /// Steps per hour.
    pub steps_per_hour: usize,
    /// Step (s).
    pub step_s: f64,
    inputs: usize,
    outdoor: Vec<usize>,
    ground: Vec<usize>,
    fixed: Vec<(usize, f64)>,
    /// (input, irradiance per weather hour).
    planes: Vec<(usize, Vec<f64>)>,
    /// (input, terms).
    scheduled: Vec<(usize, Vec<Scheduled>)>,
    local_offset: Duration,
    /// Per heater: setpoint schedule (None: no thermostat).
    pub setpoints: Vec<Option<WeeklySchedule>>,
    /// Per heater: prescribed power schedule (W).
    pub power: Vec<Option<WeeklySchedule>>,
    /// Per zone: occupancy schedule (None: always occupied).
    pub occupancy: Vec<Option<WeeklySchedule>>,
}

/// Local standard time minus UTC of the model's site (`site.utc_offset_h`, rounded to 1 s).
pub fn site_offset(model: &ModelFile) -> Duration {
    Duration::seconds((model.site.utc_offset_h * 3600.0).round() as i64)
}

/// The instant `k` steps of `step_s` (s) after `t0`, rounded to 1 ms.
pub fn step_instant(t0: DateTime<FixedOffset>, step_s: f64, k: usize) -> DateTime<FixedOffset> {
    t0 + Duration::milliseconds((k as f64 * step_s * 1000.0).round() as i64)
}

/// Mean of a schedule over the step of `step_s` (s) that starts at local time `t0`, sampled
/// at the middles of 5-minute slices (one sample for steps under 7.5 minutes): exact for
/// schedules whose changes fall on 5-minute marks.
pub fn schedule_step_mean(s: &WeeklySchedule, t0: NaiveDateTime, step_s: f64) -> f64 {
    let n = ((step_s / 300.0).round() as usize).max(1);
    let dt = step_s / n as f64;
    let mut sum = 0.0;
    for i in 0..n {
        let t = t0 + Duration::milliseconds(((i as f64 + 0.5) * dt * 1000.0) as i64);
        sum += s.value_at(t);
    }
    sum / n as f64
}

/// Value of a schedule one second before local time `t` (a setpoint in force at the end of a
/// step that ends at `t`).
pub fn schedule_before(s: &WeeklySchedule, t: NaiveDateTime) -> f64 {
    s.value_at(t - Duration::seconds(1))
}

/// The deep-ground temperature of a run (°C): the site's `deep_ground_c`, else the mean of the
/// weather's ground column, else the weather's mean air temperature.
pub fn ground_temperature(model: &ModelFile, weather: &WeatherSeries) -> f64 {
    model
        .site
        .deep_ground_c
        .unwrap_or_else(|| match &weather.ground_c {
            Some(g) => g.iter().sum::<f64>() / g.len() as f64,
            None => weather.annual_mean_air_c(),
        })
}

/// The model's schedule `id`, ready to evaluate (None: no id, unknown id or invalid schedule,
/// which validation has already reported).
pub fn model_schedule(m: &ModelFile, id: &Option<String>) -> Option<WeeklySchedule> {
    let id = id.as_ref()?;
    let s = m.schedules.iter().find(|s| &s.id == id)?;
    WeeklySchedule::new(s).ok()
}

impl Forcing {
    /// Prepares the forcing of `house` (compiled from `model`) by `weather`.
    pub fn new(
        model: &ModelFile,
        house: &House,
        weather: &WeatherSeries,
        step_s: f64,
        sky: SkyModel,
    ) -> Forcing {
        let site = dwell_weather::Site {
            latitude_deg: model.site.latitude_deg,
            longitude_deg: model.site.longitude_deg,
            elevation_m: model.site.elevation_m,
            albedo: model.site.ground_albedo,
        };
        let needs_sun = house
            .inputs
            .iter()
            .any(|r| matches!(r, InputRole::SolarPlane { .. }));
        let sun = needs_sun.then(|| SunTable::new(weather, &site));
        let ground_c = ground_temperature(model, weather);
        let mut f = Forcing {
            times: weather.times.clone(),
            air_c: weather.air_c.clone(),
            ground_c,
            steps_per_hour: (3600.0 / step_s).round() as usize,
            step_s,
            inputs: house.inputs.len(),
            outdoor: vec![],
            ground: vec![],
            fixed: vec![],
            planes: vec![],
            scheduled: vec![],
            local_offset: site_offset(model),
            setpoints: model
                .heaters
                .iter()
                .map(|h| match (h.setpoint_c, &h.setpoint_schedule) {
                    (Some(t), _) => Some(WeeklySchedule::constant(t)),
                    (None, s) => model_schedule(model, s),
                })
                .collect(),
            power: model
                .heaters
                .iter()
                .map(|h| model_schedule(model, &h.power_schedule))
                .collect(),
            occupancy: model
                .zones
                .iter()
                .map(|z| model_schedule(model, &z.occupancy))
                .collect(),
        };
        for (j, role) in house.inputs.iter().enumerate() {
            match role {
                InputRole::OutdoorAir => f.outdoor.push(j),
                InputRole::Ground => f.ground.push(j),
                InputRole::Boundary { temperature_c } => f.fixed.push((j, *temperature_c)),
                InputRole::SolarPlane {
                    tilt_deg,
                    azimuth_deg,
                } => {
                    let s = sun.as_ref().expect("sun table computed when planes exist");
                    f.planes.push((j, s.plane(*tilt_deg, *azimuth_deg, sky)));
                }
                InputRole::Gains { zone } => {
                    let zid = &house.zones[*zone].id;
                    let area = house.zones[*zone].floor_area_m2;
                    let terms = model
                        .gains
                        .iter()
                        .filter(|g| &g.zone == zid)
                        .map(|g| Scheduled {
                            power_w: g.power_w.unwrap_or(0.0) + g.w_per_m2.unwrap_or(0.0) * area,
                            schedule: model_schedule(model, &g.schedule),
                        })
                        .collect();
                    f.scheduled.push((j, terms));
                }
                InputRole::RawHeat {
                    power_w,
                    schedule: s,
                } => {
                    f.scheduled.push((
                        j,
                        vec![Scheduled {
                            power_w: *power_w,
                            schedule: model_schedule(model, s),
                        }],
                    ));
                }
                InputRole::Heater { .. } => {}
            }
        }
        f
    }

    /// Number of weather stamps.
    pub fn hours(&self) -> usize {
        self.times.len()
    }

    /// Instant of step `k` counted from stamp `start` (UTC-aware).
    pub fn instant(&self, start: usize, k: usize) -> DateTime<FixedOffset> {
        step_instant(self.times[start], self.step_s, k)
    }

    /// Local standard time of an instant.
    pub fn local(&self, t: DateTime<FixedOffset>) -> NaiveDateTime {
        t.naive_utc() + self.local_offset
    }

    /// Outdoor air (°C) at step `k` from stamp `start`.
    pub fn outdoor_at(&self, start: usize, k: usize) -> f64 {
        let sph = self.steps_per_hour;
        let i = start + k / sph;
        let r = k % sph;
        if r == 0 || i + 1 >= self.air_c.len() {
            self.air_c[i.min(self.air_c.len() - 1)]
        } else {
            let w = r as f64 / sph as f64;
            self.air_c[i] * (1.0 - w) + self.air_c[i + 1] * w
        }
    }

    /// Mean over step `k` of a schedule's value, sampled every 5 minutes (or once a step).
    pub fn step_mean(&self, s: &WeeklySchedule, start: usize, k: usize) -> f64 {
        schedule_step_mean(s, self.local(self.instant(start, k)), self.step_s)
    }

    /// Value of a schedule just before the end of step `k` (setpoints).
    pub fn at_step_end(&self, s: &WeeklySchedule, start: usize, k: usize) -> f64 {
        schedule_before(s, self.local(self.instant(start, k + 1)))
    }

    /// Local standard time minus UTC of the site.
    pub fn local_offset(&self) -> Duration {
        self.local_offset
    }

    /// Fills `u` (length = number of inputs) for step `k` from stamp `start`, heaters at 0.
    pub fn fill(&self, start: usize, k: usize, u: &mut [f64]) {
        debug_assert_eq!(u.len(), self.inputs);
        u.iter_mut().for_each(|v| *v = 0.0);
        let t_out = self.outdoor_at(start, k);
        for &j in &self.outdoor {
            u[j] = t_out;
        }
        for &j in &self.ground {
            u[j] = self.ground_c;
        }
        for &(j, t) in &self.fixed {
            u[j] = t;
        }
        let hour = (start + k / self.steps_per_hour + 1).min(self.times.len() - 1);
        for (j, irr) in &self.planes {
            u[*j] = irr[hour];
        }
        for (j, terms) in &self.scheduled {
            let mut w = 0.0;
            for t in terms {
                let frac = match &t.schedule {
                    Some(s) => self.step_mean(s, start, k),
                    None => 1.0,
                };
                w += t.power_w * frac;
            }
            u[*j] = w;
        }
    }
}
