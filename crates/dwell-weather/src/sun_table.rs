//! The sun for every hour of a weather series, and irradiance on any plane.

use chrono::{DateTime, Datelike, FixedOffset};

use crate::solar_position::{solar_position, Observer};
use crate::split::{self, extraterrestrial_normal_w_m2};
use crate::transposition::{transpose, PlaneIrradiance, SkyModel, SunHour};
use crate::{Site, WeatherSeries};

/// Which irradiance columns the weather had, and so how beam and diffuse were obtained.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum IrradianceSource {
    /// GHI, DHI and DNI were all given and are used as they are.
    AllThree,
    /// GHI and DHI given; DNI = (GHI − DHI)/cos z ([`split::from_global_and_diffuse`]).
    GlobalAndDiffuse,
    /// GHI and DNI given; DHI = max(GHI − DNI·cos z, 0).
    GlobalAndDirect,
    /// DHI and DNI given; GHI = DHI + DNI·cos z.
    DiffuseAndDirect,
    /// Only GHI given; Erbs split ([`split::erbs`]).
    GlobalOnly,
    /// No irradiance columns (or only one of DHI/DNI): the sun is computed, irradiance is 0.
    None,
}

/// Sun position and horizontal irradiance components for each hour of a [`WeatherSeries`].
///
/// For the hour ending at stamp `times[i]` the sun is placed at the middle of the hour,
/// `times[i] − 30 min` (NREL SPA, [`crate::solar_position`], refraction at the standard
/// pressure of the site's elevation and 12 °C). When the sun is below the horizon at that
/// instant (apparent zenith ≥ 90°) but the hour still has light (the sunrise and sunset hours),
/// the hour's global horizontal irradiance is all treated as diffuse (DNI = 0, DHI = GHI), so
/// the horizontal energy is kept and no beam strikes a plane from below the horizon.
#[derive(Debug, Clone)]
pub struct SunTable {
    /// Time stamps, as in the weather (end of each hour).
    pub times: Vec<DateTime<FixedOffset>>,
    /// Apparent (refracted) solar zenith at the middle of each hour (degrees).
    pub zenith_deg: Vec<f64>,
    /// Solar azimuth clockwise from north at the middle of each hour (degrees).
    pub azimuth_deg: Vec<f64>,
    /// Global horizontal irradiance (W/m², hour means).
    pub ghi_w_m2: Vec<f64>,
    /// Diffuse horizontal irradiance (W/m², hour means).
    pub dhi_w_m2: Vec<f64>,
    /// Direct normal irradiance (W/m², hour means).
    pub dni_w_m2: Vec<f64>,
    /// Extraterrestrial normal irradiance for the day (W/m²).
    pub dni_extra_w_m2: Vec<f64>,
    /// The site.
    pub site: Site,
    /// How beam and diffuse were obtained.
    pub irradiance_source: IrradianceSource,
}

impl SunTable {
    /// Computes the sun and the horizontal components for every hour of `weather` at `site`.
    pub fn new(weather: &WeatherSeries, site: &Site) -> SunTable {
        let n = weather.len();
        let obs = Observer::standard(site.latitude_deg, site.longitude_deg, site.elevation_m);
        let source = match (&weather.ghi_w_m2, &weather.dhi_w_m2, &weather.dni_w_m2) {
            (Some(_), Some(_), Some(_)) => IrradianceSource::AllThree,
            (Some(_), Some(_), None) => IrradianceSource::GlobalAndDiffuse,
            (Some(_), None, Some(_)) => IrradianceSource::GlobalAndDirect,
            (None, Some(_), Some(_)) => IrradianceSource::DiffuseAndDirect,
            (Some(_), None, None) => IrradianceSource::GlobalOnly,
            _ => IrradianceSource::None,
        };
        let mut t = SunTable {
            times: weather.times.clone(),
            zenith_deg: Vec::with_capacity(n),
            azimuth_deg: Vec::with_capacity(n),
            ghi_w_m2: Vec::with_capacity(n),
            dhi_w_m2: Vec::with_capacity(n),
            dni_w_m2: Vec::with_capacity(n),
            dni_extra_w_m2: Vec::with_capacity(n),
            site: *site,
            irradiance_source: source,
        };
        let at = |v: &Option<Vec<f64>>, i: usize| v.as_ref().map(|v| v[i]).unwrap_or(0.0);
        for i in 0..n {
            let mid = weather.hour_middle(i);
            let p = solar_position(&mid, &obs);
            let z = p.apparent_zenith_deg;
            let e0 = extraterrestrial_normal_w_m2(mid.ordinal());
            let cz = z.to_radians().cos();
            let (g, d, b) = (
                at(&weather.ghi_w_m2, i),
                at(&weather.dhi_w_m2, i),
                at(&weather.dni_w_m2, i),
            );
            let c = match source {
                IrradianceSource::AllThree => split::Components {
                    ghi_w_m2: g,
                    dhi_w_m2: d,
                    dni_w_m2: b,
                },
                IrradianceSource::GlobalAndDiffuse => split::from_global_and_diffuse(g, d, z),
                IrradianceSource::GlobalAndDirect => split::Components {
                    ghi_w_m2: g,
                    dhi_w_m2: (g - b * cz.max(0.0)).max(0.0),
                    dni_w_m2: b,
                },
                IrradianceSource::DiffuseAndDirect => split::Components {
                    ghi_w_m2: d + b * cz.max(0.0),
                    dhi_w_m2: d,
                    dni_w_m2: b,
                },
                IrradianceSource::GlobalOnly => split::erbs(g, z, e0),
                IrradianceSource::None => split::Components {
                    ghi_w_m2: 0.0,
                    dhi_w_m2: 0.0,
                    dni_w_m2: 0.0,
                },
            };
            let c = if z >= 90.0 {
                split::Components {
                    ghi_w_m2: c.ghi_w_m2,
                    dhi_w_m2: c.ghi_w_m2,
                    dni_w_m2: 0.0,
                }
            } else {
                c
            };
            t.zenith_deg.push(z);
            t.azimuth_deg.push(p.azimuth_deg);
            t.ghi_w_m2.push(c.ghi_w_m2);
            t.dhi_w_m2.push(c.dhi_w_m2);
            t.dni_w_m2.push(c.dni_w_m2);
            t.dni_extra_w_m2.push(e0);
        }
        t
    }

    /// Number of hours.
    pub fn len(&self) -> usize {
        self.times.len()
    }

    /// True when there are no hours.
    pub fn is_empty(&self) -> bool {
        self.times.is_empty()
    }

    /// The inputs of [`transpose`] for hour `i`.
    pub fn hour(&self, i: usize) -> SunHour {
        SunHour {
            zenith_deg: self.zenith_deg[i],
            azimuth_deg: self.azimuth_deg[i],
            dni_w_m2: self.dni_w_m2[i],
            ghi_w_m2: self.ghi_w_m2[i],
            dhi_w_m2: self.dhi_w_m2[i],
            dni_extra_w_m2: self.dni_extra_w_m2[i],
        }
    }

    /// Irradiance components on a plane for every hour (W/m², hour means) and the beam's angle
    /// of incidence. Tilt 0 … 180° from horizontal, azimuth clockwise from north (180 = south);
    /// see [`crate::transposition`].
    pub fn plane_components(
        &self,
        tilt_deg: f64,
        azimuth_deg: f64,
        sky: SkyModel,
    ) -> Vec<PlaneIrradiance> {
        (0..self.len())
            .map(|i| transpose(sky, tilt_deg, azimuth_deg, self.site.albedo, &self.hour(i)))
            .collect()
    }

    /// Total irradiance on a plane for every hour (W/m², hour means); see
    /// [`SunTable::plane_components`].
    pub fn plane(&self, tilt_deg: f64, azimuth_deg: f64, sky: SkyModel) -> Vec<f64> {
        (0..self.len())
            .map(|i| {
                transpose(sky, tilt_deg, azimuth_deg, self.site.albedo, &self.hour(i)).total_w_m2()
            })
            .collect()
    }
}
