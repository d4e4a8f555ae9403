//! Each zone's thermostat setpoint and occupancy over time, read from the model's schedules.

use chrono::{DateTime, Duration, FixedOffset, NaiveDateTime};
use dwell_model::schedule::WeeklySchedule;
use dwell_model::ModelFile;

/// Setpoints and occupancy per zone, in local standard time of the site.
#[derive(Clone, Debug)]
pub struct ZoneSchedules {
    /// Per zone: the setpoint schedules of its thermostat heaters (empty: no thermostat).
    setpoints: Vec<Vec<WeeklySchedule>>,
    /// Per zone: occupancy (value > 0 means occupied); None: always occupied.
    occupancy: Vec<Option<WeeklySchedule>>,
    offset: Duration,
}

fn schedule(m: &ModelFile, id: &Option<String>) -> Option<WeeklySchedule> {
    let id = id.as_ref()?;
    m.schedules
        .iter()
        .find(|s| &s.id == id)
        .and_then(|s| WeeklySchedule::new(s).ok())
}

/// The setpoint schedule of a heater (°C), if it has a thermostat.
pub fn heater_setpoint(m: &ModelFile, h: &dwell_model::file::Heater) -> Option<WeeklySchedule> {
    match (h.setpoint_c, &h.setpoint_schedule) {
        (Some(t), _) => Some(WeeklySchedule::constant(t)),
        (None, s) => schedule(m, s),
    }
}

/// The highest value a heater's setpoint takes over the week (°C), ignoring "away" ranges.
pub fn heater_setpoint_max(m: &ModelFile, h: &dwell_model::file::Heater) -> Option<f64> {
    if let Some(t) = h.setpoint_c {
        return Some(t);
    }
    let id = h.setpoint_schedule.as_ref()?;
    let s = m.schedules.iter().find(|s| &s.id == id)?;
    Some(s.periods.iter().map(|p| p.value).fold(s.base, f64::max))
}

impl ZoneSchedules {
    /// Reads the schedules of `model`.
    pub fn new(model: &ModelFile) -> ZoneSchedules {
        ZoneSchedules {
            setpoints: model
                .zones
                .iter()
                .map(|z| {
                    model
                        .heaters
                        .iter()
                        .filter(|h| h.zone == z.id)
                        .filter_map(|h| heater_setpoint(model, h))
                        .collect()
                })
                .collect(),
            occupancy: model
                .zones
                .iter()
                .map(|z| schedule(model, &z.occupancy))
                .collect(),
            offset: Duration::seconds((model.site.utc_offset_h * 3600.0).round() as i64),
        }
    }

    /// Local standard time of an instant.
    pub fn local(&self, t: DateTime<FixedOffset>) -> NaiveDateTime {
        t.naive_utc() + self.offset
    }

    /// Whether zone `zi` has a thermostat.
    pub fn has_thermostat(&self, zi: usize) -> bool {
        !self.setpoints[zi].is_empty()
    }

    /// Setpoint of zone `zi` in force just before `local` (°C): the highest of its heaters'.
    pub fn setpoint(&self, zi: usize, local: NaiveDateTime) -> Option<f64> {
        let t = local - Duration::seconds(1);
        self.setpoints[zi]
            .iter()
            .map(|s| s.value_at(t))
            .reduce(f64::max)
    }

    /// Whether zone `zi` is occupied at `local`.
    pub fn occupied(&self, zi: usize, local: NaiveDateTime) -> bool {
        match &self.occupancy[zi] {
            Some(s) => s.value_at(local) > 0.0,
            None => true,
        }
    }

    /// True if the setpoint of zone `zi` was at least 0.1 K lower at some moment in the
    /// `window_h` hours before `local` (sampled every 5 minutes): a recovery may be under way.
    pub fn recovering(&self, zi: usize, local: NaiveDateTime, window_h: f64) -> bool {
        let Some(now) = self.setpoint(zi, local) else {
            return false;
        };
        let n = (window_h * 12.0).round() as i64;
        (1..=n).any(|k| {
            self.setpoint(zi, local - Duration::minutes(5 * k))
                .is_some_and(|v| v < now - 0.1)
        })
    }
}
