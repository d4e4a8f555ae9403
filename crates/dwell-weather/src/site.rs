//! Where the building stands.

use crate::{WeatherError, WeatherSeries};

/// A building's site: position and ground reflectance.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Site {
    /// Latitude, north positive (degrees, −90 … 90).
    pub latitude_deg: f64,
    /// Longitude, east positive (degrees, −180 … 180).
    pub longitude_deg: f64,
    /// Elevation above sea level (m, −500 … 9000); sets the pressure for refraction.
    pub elevation_m: f64,
    /// Ground reflectance for the ground-reflected irradiance (0 … 1; 0.2 is grass, ~0.6–0.8
    /// fresh snow).
    pub albedo: f64,
}

/// Ground reflectance used when none is given.
pub const DEFAULT_ALBEDO: f64 = 0.2;

impl Site {
    /// A validated site; the error names the parameter and its allowed range.
    pub fn new(
        latitude_deg: f64,
        longitude_deg: f64,
        elevation_m: f64,
        albedo: f64,
    ) -> Result<Site, WeatherError> {
        Ok(Site {
            latitude_deg: WeatherError::check_range(
                "latitude",
                latitude_deg,
                -90.0,
                90.0,
                "degrees",
            )?,
            longitude_deg: WeatherError::check_range(
                "longitude",
                longitude_deg,
                -180.0,
                180.0,
                "degrees",
            )?,
            elevation_m: WeatherError::check_range("elevation", elevation_m, -500.0, 9000.0, "m")?,
            albedo: WeatherError::check_range("albedo", albedo, 0.0, 1.0, "")?,
        })
    }

    /// The site written in a weather file's metadata (`# latitude_deg: …`,
    /// `# longitude_deg: …`, optional `# elevation_m: …`, `# albedo: …`), if it has one.
    pub fn from_metadata(series: &WeatherSeries) -> Option<Result<Site, WeatherError>> {
        let get = |k: &'static str| series.metadata_value(k).map(|v| (k, v));
        let num = |(k, v): (&str, &str)| {
            v.parse::<f64>().map_err(|_| WeatherError::BadParameter {
                name: format!("{}: # {k}", series.source),
                value: v.to_string(),
                range: "a number".to_string(),
                hint: String::new(),
            })
        };
        let lat = get("latitude_deg")?;
        let lon = get("longitude_deg")?;
        Some((|| {
            let elev = get("elevation_m").map(num).transpose()?.unwrap_or(0.0);
            let alb = get("albedo")
                .map(num)
                .transpose()?
                .unwrap_or(DEFAULT_ALBEDO);
            Site::new(num(lat)?, num(lon)?, elev, alb)
        })())
    }
}
