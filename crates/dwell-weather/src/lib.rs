//! Weather and sun for dwell: hourly weather files, invented climates, and the irradiance on
//! every surface of a building.
//!
//! - [`WeatherSeries`] — a validated hourly series (air temperature, optional irradiance,
//!   ground temperature and wind), read by [`read_weather`] / [`parse_weather`] from dwell's
//!   CSV format or any CSV with a [`ColumnMap`] and units ([`ReadOptions`]). Errors
//!   ([`WeatherError`]) name the file, line and column and say what to do.
//! - [`SunTable`] — for a [`Site`], the sun (NREL SPA, ±0.0003°) at the middle of each hour,
//!   beam and diffuse components (Erbs split when only global is known), and plane irradiance
//!   for any tilt and azimuth with the isotropic, Hay–Davies or Perez sky ([`SkyModel`]).
//! - [`synth`] — a reproducible year of invented weather from a few climate numbers.
//! - [`summary`] — monthly means, degree-days, design temperature and solar totals.
//!
//! Conventions: temperatures in °C at the stamp; irradiances (W/m²) are means over the hour
//! ending at the stamp; azimuth clockwise from north (180 = south); tilt 0 = horizontal,
//! 90 = vertical. See `docs/weather.md`.
//!
//! ```
//! use dwell_weather::{default_site, default_weather, SkyModel, SunTable};
//! let w = default_weather();
//! assert!(w.is_full_year());
//! let sun = SunTable::new(&w, &default_site());
//! let south = sun.plane(90.0, 180.0, SkyModel::HayDavies);
//! let kwh_m2: f64 = south.iter().sum::<f64>() / 1000.0;
//! assert!(kwh_m2 > 300.0 && kwh_m2 < 1500.0);
//! ```
#![deny(missing_docs)]

mod error;
mod reader;
mod series;
mod site;
pub mod solar_position;
mod spa_tables;
pub mod split;
pub mod summary;
mod sun_table;
pub mod synth;
pub mod transposition;
mod validate;

pub use error::WeatherError;
pub use reader::{
    format_stamp, parse_stamp, parse_weather, read_weather, weather_to_csv, write_atomic,
    write_weather, ColumnMap, IrradianceUnit, ReadOptions, TemperatureUnit,
};
pub use series::WeatherSeries;
pub use site::{Site, DEFAULT_ALBEDO};
pub use sun_table::{IrradianceSource, SunTable};
pub use transposition::{PlaneIrradiance, SkyModel};
pub use validate::DIFFUSE_TOLERANCE_W_M2;

/// File name of the default weather (in `weather-samples/`), used when a user gives none.
pub const DEFAULT_WEATHER_NAME: &str = "harrowmere.csv";

const DEFAULT_WEATHER_TEXT: &str = include_str!("../../../weather-samples/harrowmere.csv");

/// The default weather: Harrowmere, an **invented** mild maritime climate made by
/// `dwell weather synth` (the command is in its header and in `weather-samples/README.md`).
pub fn default_weather() -> WeatherSeries {
    let mut w = parse_weather(
        DEFAULT_WEATHER_TEXT,
        &format!("built-in default weather {DEFAULT_WEATHER_NAME} (invented climate)"),
        &ReadOptions::default(),
    )
    .expect("the embedded default weather is valid (checked by a test)");
    w.source = format!("built-in default weather {DEFAULT_WEATHER_NAME} (invented climate)");
    w
}

/// The site of the default weather (read from its metadata lines).
pub fn default_site() -> Site {
    let w = WeatherSeries {
        times: Vec::new(),
        air_c: Vec::new(),
        ghi_w_m2: None,
        dhi_w_m2: None,
        dni_w_m2: None,
        ground_c: None,
        wind_m_s: None,
        source: DEFAULT_WEATHER_NAME.to_string(),
        filled_hours: 0,
        metadata: reader::leading_metadata(DEFAULT_WEATHER_TEXT),
    };
    Site::from_metadata(&w)
        .expect("the default weather has a site")
        .expect("valid site")
}
