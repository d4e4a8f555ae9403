//! The validated hourly weather series.

use chrono::{DateTime, Datelike, FixedOffset, TimeDelta};

use crate::WeatherError;

/// One year (or any run) of validated hourly weather.
///
/// ## Time convention
///
/// Row `i` carries the stamp `times[i]` (ISO 8601 with an explicit UTC offset, one offset for
/// the whole series, consecutive stamps exactly one hour apart).
/// - temperatures (`air_c`, `ground_c`) and wind speed are values **at the stamp**;
/// - irradiances (`ghi_w_m2`, `dhi_w_m2`, `dni_w_m2`) are **means over the hour ending at the
///   stamp** (W/m², numerically equal to Wh/m² in that hour); the sun for that hour is placed
///   at the middle of the hour, `stamp − 30 min` (see [`crate::SunTable`]).
///
/// A full year stamped 01:00 on 1 January to 00:00 on the next 1 January has 8760 rows, or
/// 8784 in a leap year ([`WeatherSeries::is_full_year`]).
///
/// Every vector has [`WeatherSeries::len`] entries; values are finite and within the physical
/// bounds checked by the reader (air and ground −90 … +60 °C, irradiance 0 … 1400 W/m², diffuse
/// not above global, wind 0 … 100 m/s).
#[derive(Debug, Clone, PartialEq)]
pub struct WeatherSeries {
    /// Time stamps, hourly, one UTC offset.
    pub times: Vec<DateTime<FixedOffset>>,
    /// Outdoor dry-bulb air temperature at the stamp (°C).
    pub air_c: Vec<f64>,
    /// Global horizontal irradiance, mean over the hour ending at the stamp (W/m²).
    pub ghi_w_m2: Option<Vec<f64>>,
    /// Diffuse horizontal irradiance, mean over the hour ending at the stamp (W/m²).
    pub dhi_w_m2: Option<Vec<f64>>,
    /// Direct (beam) normal irradiance, mean over the hour ending at the stamp (W/m²).
    pub dni_w_m2: Option<Vec<f64>>,
    /// Ground temperature at the stamp (°C), depth as stated by the file's author.
    pub ground_c: Option<Vec<f64>>,
    /// Wind speed at the stamp (m/s).
    pub wind_m_s: Option<Vec<f64>>,
    /// Where the data came from: the file path, or a description such as
    /// `"built-in default weather (invented)"`.
    pub source: String,
    /// Number of hours in which at least one value was filled by linear interpolation
    /// (see [`crate::ReadOptions::fill_gaps_max_h`]); 0 when nothing was filled.
    pub filled_hours: usize,
    /// `# key: value` lines found at the top of the file, in order (e.g. `latitude_deg`).
    pub metadata: Vec<(String, String)>,
}

impl WeatherSeries {
    /// Number of hourly rows.
    pub fn len(&self) -> usize {
        self.times.len()
    }

    /// True when the series has no rows (a validated series never is).
    pub fn is_empty(&self) -> bool {
        self.times.is_empty()
    }

    /// The series' UTC offset (all stamps share it).
    pub fn offset(&self) -> FixedOffset {
        *self
            .times
            .first()
            .expect("a validated series is not empty")
            .offset()
    }

    /// Arithmetic mean of the hourly air temperatures (°C).
    pub fn annual_mean_air_c(&self) -> f64 {
        self.air_c.iter().sum::<f64>() / self.air_c.len() as f64
    }

    /// The middle of the hour that ends at stamp `i` (`times[i] − 30 min`): where irradiance
    /// means are centred and where [`crate::SunTable`] places the sun.
    pub fn hour_middle(&self, i: usize) -> DateTime<FixedOffset> {
        self.times[i] - TimeDelta::minutes(30)
    }

    /// True when the series is one calendar year of hours in its own offset: 8760 rows, or 8784
    /// in a leap year, whose hour middles all fall in the same year.
    pub fn is_full_year(&self) -> bool {
        if self.is_empty() {
            return false;
        }
        let y0 = self.hour_middle(0).year();
        let y1 = self.hour_middle(self.len() - 1).year();
        let leap = chrono::NaiveDate::from_ymd_opt(y0, 2, 29).is_some();
        y0 == y1 && self.len() == if leap { 8784 } else { 8760 }
    }

    /// `Ok` if [`WeatherSeries::is_full_year`], else [`WeatherError::NotAYear`].
    pub fn require_full_year(&self) -> Result<(), WeatherError> {
        if self.is_full_year() {
            Ok(())
        } else {
            Err(WeatherError::NotAYear {
                source_name: self.source.clone(),
                rows: self.len(),
            })
        }
    }

    /// The value of a `# key: value` metadata line, if present.
    pub fn metadata_value(&self, key: &str) -> Option<&str> {
        self.metadata
            .iter()
            .find(|(k, _)| k == key)
            .map(|(_, v)| v.as_str())
    }

    /// Checks a series built in code (lengths, hourly stamps with one offset, bounds) with the
    /// same rules as the reader; line numbers in errors are `row index + 2` (as if written by
    /// [`crate::write_weather`] without metadata).
    pub fn validate(&self) -> Result<(), WeatherError> {
        crate::validate::check_series(self)
    }
}
