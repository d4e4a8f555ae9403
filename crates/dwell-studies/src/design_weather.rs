//! A design cold spell built in code: the weather a heater must cope with.
//!
//! Outdoor air follows a daily cosine between the design temperature θ_e (°C, the minimum, at
//! 05:00 local standard time) and θ_e + swing (at 17:00):
//!
//! ```text
//! θ(t) = θ_e + (swing / 2) · (1 − cos(2π (h − 5) / 24)),   h = local hour of day
//! ```
//!
//! There is no sun (irradiance columns absent, so every solar input is zero) and the ground
//! column holds a fixed temperature (the model's `deep_ground_c` still wins, see
//! [`crate::forcing`]). The spell starts at 00:00 local standard time on **Monday
//! 8 January 2024** (a Monday clear of the usual Christmas "away" ranges), so weekday
//! schedules apply from the first day; stamps carry the site's UTC offset.

use chrono::{Duration, FixedOffset, NaiveDate, TimeZone};
use dwell_weather::WeatherSeries;

use crate::StudyError;

/// First local day of every design spell: Monday 8 January 2024.
pub fn spell_start_day() -> NaiveDate {
    NaiveDate::from_ymd_opt(2024, 1, 8).expect("valid date")
}

/// A design spell.
#[derive(Clone, Debug, PartialEq)]
pub struct DesignSpell {
    /// Design outdoor temperature θ_e (°C): the daily minimum.
    pub design_c: f64,
    /// Daily swing above the minimum (K), ≥ 0.
    pub swing_k: f64,
    /// Length (days), 1 … 60.
    pub days: usize,
    /// Ground temperature (°C) written into the ground column.
    pub ground_c: f64,
    /// Site offset from UTC (h), for the stamps.
    pub utc_offset_h: f64,
}

impl DesignSpell {
    /// Outdoor air (°C) at local hour of day `h` (0 … 24).
    pub fn air_at(&self, h: f64) -> f64 {
        self.design_c
            + 0.5 * self.swing_k * (1.0 - (2.0 * std::f64::consts::PI * (h - 5.0) / 24.0).cos())
    }

    /// Builds the hourly series: `days·24 + 1` stamps from 00:00 on the start day.
    pub fn weather(&self) -> Result<WeatherSeries, StudyError> {
        if !(-60.0..=30.0).contains(&self.design_c) {
            return Err(StudyError::Option(format!(
                "design outdoor temperature {} °C is outside -60…30 °C; give --design-temp in °C",
                self.design_c
            )));
        }
        if !(0.0..=30.0).contains(&self.swing_k) {
            return Err(StudyError::Option(format!(
                "daily swing {} K is outside 0…30 K; give --swing in K",
                self.swing_k
            )));
        }
        if !(1..=60).contains(&self.days) {
            return Err(StudyError::Option(format!(
                "a design spell of {} days is outside 1…60 days; change --days",
                self.days
            )));
        }
        let secs = (self.utc_offset_h * 3600.0).round() as i32;
        let tz = FixedOffset::east_opt(secs).ok_or_else(|| {
            StudyError::Option(format!(
                "site UTC offset {} h is not a valid offset",
                self.utc_offset_h
            ))
        })?;
        let t0 = tz
            .from_local_datetime(&spell_start_day().and_hms_opt(0, 0, 0).expect("midnight"))
            .single()
            .expect("a fixed offset has one local time");
        let n = self.days * 24 + 1;
        let times: Vec<_> = (0..n).map(|i| t0 + Duration::hours(i as i64)).collect();
        let air_c: Vec<f64> = (0..n).map(|i| self.air_at((i % 24) as f64)).collect();
        let w = WeatherSeries {
            times,
            air_c,
            ghi_w_m2: None,
            dhi_w_m2: None,
            dni_w_m2: None,
            ground_c: Some(vec![self.ground_c; n]),
            wind_m_s: None,
            source: format!(
                "design spell (built in code): {} days, minimum {} °C, daily swing {} K, no sun, ground {} °C",
                self.days, self.design_c, self.swing_k, self.ground_c
            ),
            filled_hours: 0,
            metadata: Vec::new(),
        };
        w.validate()
            .map_err(|e| StudyError::Option(format!("design spell: {e}")))?;
        Ok(w)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use chrono::{Datelike, Weekday};

    #[test]
    fn spell_shape() {
        let s = DesignSpell {
            design_c: -5.0,
            swing_k: 6.0,
            days: 3,
            ground_c: 9.0,
            utc_offset_h: 1.0,
        };
        let w = s.weather().unwrap();
        assert_eq!(w.len(), 73);
        assert_eq!(w.times[0].weekday(), Weekday::Mon);
        assert_eq!(w.times[0].offset().local_minus_utc(), 3600);
        // minimum at 05:00, maximum at 17:00 (analytic cosine)
        assert!((w.air_c[5] + 5.0).abs() < 1e-12);
        assert!((w.air_c[17] - 1.0).abs() < 1e-12);
        assert!(w.air_c.iter().all(|&t| (-5.0..=1.0 + 1e-12).contains(&t)));
    }

    #[test]
    fn bad_values_are_refused() {
        let mut s = DesignSpell {
            design_c: -95.0,
            swing_k: 0.0,
            days: 3,
            ground_c: 9.0,
            utc_offset_h: 0.0,
        };
        assert!(s
            .weather()
            .unwrap_err()
            .to_string()
            .contains("--design-temp"));
        s.design_c = -5.0;
        s.days = 0;
        assert!(s.weather().unwrap_err().to_string().contains("--days"));
    }
}
