//! Invented climates: a reproducible year of hourly weather from a few numbers.
//!
//! ## The model
//!
//! Air temperature at stamp t (local standard time, solar hour h_s):
//!
//! `T = T̄ − (S_y/2) cos(2π (d − d_c)/365.25) − (S_d/2) cos(2π (h_s − 3)/24) + a(t)`
//!
//! - `T̄` annual mean, `S_y` annual swing (peak to peak of the seasonal cycle, coldest on day
//!   `d_c` = 20 in the northern hemisphere, 203 in the southern), `S_d` daily swing (peak to
//!   peak of the mean daily cycle, coldest at 03:00 and warmest at 15:00 solar time);
//! - `a` a first-order autoregressive anomaly (spells of cold and warm weather), hourly
//!   `a_{k+1} = φ a_k + σ √(1 − φ²) ε_k`, ε standard normal, `φ = exp(−1/(24 τ))`, τ the
//!   persistence (days), σ the anomaly's standard deviation. The realised anomaly is shifted to
//!   zero mean over the year, so the annual mean is `T̄` to rounding.
//!
//! Sun: the clear-sky global horizontal irradiance of Haurwitz (1945),
//! `GHI_cs = 1098 cos z · exp(−0.059 / cos z)` (W/m²) with the sun at the middle of each hour
//! (NREL SPA), reduced by cloud cover N (0 … 1) with Kasten & Czeplak (1980),
//! `GHI = GHI_cs · (1 − 0.75 N^3.4)`. Cloud cover is `N = Φ(c + μ)` with c a unit AR(1) process of
//! persistence [`CLOUD_PERSISTENCE_DAYS`] and `μ = √2 · Φ⁻¹(cloudiness)`, so the mean cover is
//! `cloudiness`. GHI is split into diffuse and direct normal with Erbs et al. (1982).
//!
//! Ground temperature at 1 m depth: Kusuda & Achenbach (1965), the seasonal cycle damped by
//! `exp(−d/δ)` and delayed by `d/δ` radians, damping depth `δ = √(α P / π)`, soil diffusivity
//! α = [`SOIL_DIFFUSIVITY_M2_S`], P one year.
//!
//! The generator uses ChaCha8 seeded with `seed`: the same parameters give the same file,
//! byte for byte. Limits: no wind (constant [`ClimateParams::wind_m_s`]), no humidity, no
//! coupling between cloud and temperature; Haurwitz ignores elevation and turbidity, so a
//! mountain site is a little darker than it would be.
//!
//! ## References
//! - B. Haurwitz, *Insolation in relation to cloudiness and cloud density*, Journal of
//!   Meteorology 2, 154–166, 1945 (coefficients as in Reno, Hansen & Stein, SAND2012-2389).
//! - F. Kasten and G. Czeplak, *Solar and terrestrial radiation dependent on the amount and
//!   type of cloud*, Solar Energy 24(2), 177–189, 1980.
//! - T. Kusuda and P. R. Achenbach, *Earth temperature and thermal diffusivity at selected
//!   stations in the United States*, ASHRAE Transactions 71(1), 1965.

use std::f64::consts::PI;

use chrono::{Datelike, FixedOffset, TimeDelta, TimeZone, Timelike};
use rand::SeedableRng;
use rand_chacha::ChaCha8Rng;
use rand_distr::{Distribution, StandardNormal};

use crate::solar_position::{solar_position, Observer};
use crate::split::{erbs, extraterrestrial_normal_w_m2};
use crate::{WeatherError, WeatherSeries};

/// Persistence of the cloud-cover process (days).
pub const CLOUD_PERSISTENCE_DAYS: f64 = 1.0;
/// Soil thermal diffusivity for the ground temperature (m²/s).
pub const SOIL_DIFFUSIVITY_M2_S: f64 = 0.5e-6;
/// Depth of the ground temperature written (m).
pub const GROUND_DEPTH_M: f64 = 1.0;

/// The numbers that describe an invented climate. Ranges are checked by
/// [`ClimateParams::validate`].
#[derive(Debug, Clone, PartialEq)]
pub struct ClimateParams {
    /// Name written in the file's metadata.
    pub name: String,
    /// Annual mean air temperature (°C, −40 … 35).
    pub annual_mean_c: f64,
    /// Seasonal swing, peak to peak (K, 0 … 60).
    pub annual_swing_k: f64,
    /// Mean daily swing, peak to peak (K, 0 … 30).
    pub daily_swing_k: f64,
    /// Standard deviation of the weather anomaly (K, 0 … 15).
    pub anomaly_sd_k: f64,
    /// Persistence of warm and cold spells: e-folding time of the anomaly (days, 0.05 … 60).
    pub persistence_days: f64,
    /// Mean cloud cover (fraction of sky, 0.01 … 0.99).
    pub cloudiness: f64,
    /// Latitude, north positive (degrees, −66 … 66: the generator needs a daily sunrise).
    pub latitude_deg: f64,
    /// Longitude, east positive (degrees, −180 … 180).
    pub longitude_deg: f64,
    /// Elevation (m, −500 … 6000), for the sun's refraction and the metadata.
    pub elevation_m: f64,
    /// Offset of local standard time from UTC (hours, −12 … 14, whole quarter hours).
    pub utc_offset_h: f64,
    /// Calendar year (1901 … 2099).
    pub year: i32,
    /// Constant wind speed written in the file (m/s, 0 … 40).
    pub wind_m_s: f64,
    /// Seed of the random generator.
    pub seed: u64,
}

impl Default for ClimateParams {
    fn default() -> Self {
        ClimateParams {
            name: "unnamed invented climate".to_string(),
            annual_mean_c: 10.0,
            annual_swing_k: 12.0,
            daily_swing_k: 7.0,
            anomaly_sd_k: 2.5,
            persistence_days: 3.0,
            cloudiness: 0.6,
            latitude_deg: 52.0,
            longitude_deg: 0.0,
            elevation_m: 50.0,
            utc_offset_h: 0.0,
            year: 2025,
            wind_m_s: 4.0,
            seed: 1,
        }
    }
}

impl ClimateParams {
    /// Checks every parameter against its range; the error names the option.
    pub fn validate(&self) -> Result<(), WeatherError> {
        let c = WeatherError::check_range;
        c("--mean", self.annual_mean_c, -40.0, 35.0, "°C")?;
        c("--annual-swing", self.annual_swing_k, 0.0, 60.0, "K")?;
        c("--daily-swing", self.daily_swing_k, 0.0, 30.0, "K")?;
        c("--anomaly-sd", self.anomaly_sd_k, 0.0, 15.0, "K")?;
        c("--persistence", self.persistence_days, 0.05, 60.0, "days")?;
        c("--cloudiness", self.cloudiness, 0.01, 0.99, "")?;
        c("--lat", self.latitude_deg, -66.0, 66.0, "degrees")?;
        c("--lon", self.longitude_deg, -180.0, 180.0, "degrees")?;
        c("--elevation", self.elevation_m, -500.0, 6000.0, "m")?;
        c("--utc-offset", self.utc_offset_h, -12.0, 14.0, "hours")?;
        c("--wind", self.wind_m_s, 0.0, 40.0, "m/s")?;
        c("--year", self.year as f64, 1901.0, 2099.0, "")?;
        if (self.utc_offset_h * 4.0).fract() != 0.0 {
            return Err(WeatherError::BadParameter {
                name: "--utc-offset".into(),
                value: self.utc_offset_h.to_string(),
                range: "whole quarter hours".into(),
                hint: String::new(),
            });
        }
        Ok(())
    }

    /// The `dwell weather synth` command that makes this climate.
    pub fn command(&self) -> String {
        format!(
            "dwell weather synth --name \"{}\" --mean {} --annual-swing {} --daily-swing {} \
             --anomaly-sd {} --persistence {} --cloudiness {} --lat {} --lon {} --elevation {} \
             --utc-offset {} --year {} --wind {} --seed {}",
            self.name,
            self.annual_mean_c,
            self.annual_swing_k,
            self.daily_swing_k,
            self.anomaly_sd_k,
            self.persistence_days,
            self.cloudiness,
            self.latitude_deg,
            self.longitude_deg,
            self.elevation_m,
            self.utc_offset_h,
            self.year,
            self.wind_m_s,
            self.seed
        )
    }

    /// Day of year of the coldest point of the seasonal cycle.
    pub fn coldest_day(&self) -> f64 {
        if self.latitude_deg >= 0.0 {
            20.0
        } else {
            20.0 + 365.25 / 2.0
        }
    }

    /// The seasonal cycle alone at fractional day of year `d` (°C).
    pub fn seasonal_c(&self, d: f64) -> f64 {
        self.annual_mean_c
            - 0.5 * self.annual_swing_k * (2.0 * PI * (d - self.coldest_day()) / 365.25).cos()
    }
}

/// Haurwitz (1945) clear-sky global horizontal irradiance (W/m²) at apparent zenith `z`
/// (degrees): `1098 cos z · exp(−0.059/cos z)`, 0 when the sun is down (as pvlib
/// `clearsky.haurwitz`).
pub fn haurwitz_ghi_w_m2(apparent_zenith_deg: f64) -> f64 {
    let c = apparent_zenith_deg.to_radians().cos();
    if c > 0.0 {
        1098.0 * c * (-0.059 / c).exp()
    } else {
        0.0
    }
}

/// Kasten & Czeplak (1980) ratio of global to clear-sky global irradiance for cloud cover `n`
/// (0 … 1): `1 − 0.75 n^3.4`.
pub fn kasten_czeplak_factor(n: f64) -> f64 {
    1.0 - 0.75 * n.clamp(0.0, 1.0).powf(3.4)
}

/// Standard normal cumulative distribution Φ(x), from the complementary error function
/// (W. J. Cody's rational approximation as in Numerical Recipes `erfc`, |error| < 1.2e-7).
pub fn normal_cdf(x: f64) -> f64 {
    0.5 * erfc(-x / std::f64::consts::SQRT_2)
}

fn erfc(x: f64) -> f64 {
    let z = x.abs();
    let t = 1.0 / (1.0 + 0.5 * z);
    let r = t
        * (-z * z - 1.26551223
            + t * (1.00002368
                + t * (0.37409196
                    + t * (0.09678418
                        + t * (-0.18628806
                            + t * (0.27886807
                                + t * (-1.13520398
                                    + t * (1.48851587 + t * (-0.82215223 + t * 0.17087277)))))))))
            .exp();
    if x >= 0.0 {
        r
    } else {
        2.0 - r
    }
}

/// Inverse of [`normal_cdf`] by bisection (to 1e-12), for p in (0, 1).
pub fn normal_quantile(p: f64) -> f64 {
    let (mut lo, mut hi) = (-10.0, 10.0);
    for _ in 0..100 {
        let mid = 0.5 * (lo + hi);
        if normal_cdf(mid) < p {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    0.5 * (lo + hi)
}

/// Expected Kasten–Czeplak factor `E[1 − 0.75 N^3.4]` for the cloud model with mean cover
/// `cloudiness`, by quadrature over the normal latent variable (Simpson, 2001 points on ±8σ).
pub fn expected_cloud_factor(cloudiness: f64) -> f64 {
    let mu = std::f64::consts::SQRT_2 * normal_quantile(cloudiness);
    let n = 2000;
    let (a, b) = (-8.0, 8.0);
    let h = (b - a) / n as f64;
    let f = |x: f64| {
        (-0.5 * x * x).exp() / (2.0 * PI).sqrt() * kasten_czeplak_factor(normal_cdf(x + mu))
    };
    let mut s = f(a) + f(b);
    for i in 1..n {
        s += f(a + i as f64 * h) * if i % 2 == 1 { 4.0 } else { 2.0 };
    }
    s * h / 3.0
}

/// Generates one calendar year of hourly weather (stamps 01:00 on 1 January to 00:00 on the
/// next 1 January, local standard time). Metadata: name, a line saying the climate is
/// invented, the command, latitude, longitude and elevation.
pub fn synthesize(p: &ClimateParams) -> Result<WeatherSeries, WeatherError> {
    p.validate()?;
    let offset =
        FixedOffset::east_opt((p.utc_offset_h * 3600.0).round() as i32).expect("checked range");
    let start = offset
        .with_ymd_and_hms(p.year, 1, 1, 0, 0, 0)
        .single()
        .expect("valid date");
    let leap = chrono::NaiveDate::from_ymd_opt(p.year, 2, 29).is_some();
    let n = if leap { 8784 } else { 8760 };
    let obs = Observer::standard(p.latitude_deg, p.longitude_deg, p.elevation_m);
    let mut rng = ChaCha8Rng::seed_from_u64(p.seed);
    let mut normal = || -> f64 { StandardNormal.sample(&mut rng) };

    // Anomaly and cloud latent processes, drawn in a fixed order.
    let phi_t = (-1.0 / (24.0 * p.persistence_days)).exp();
    let phi_c = (-1.0 / (24.0 * CLOUD_PERSISTENCE_DAYS)).exp();
    let mut anomaly = Vec::with_capacity(n);
    let mut latent = Vec::with_capacity(n);
    let (mut a, mut c) = (p.anomaly_sd_k * normal(), normal());
    for _ in 0..n {
        anomaly.push(a);
        latent.push(c);
        a = phi_t * a + p.anomaly_sd_k * (1.0 - phi_t * phi_t).sqrt() * normal();
        c = phi_c * c + (1.0 - phi_c * phi_c).sqrt() * normal();
    }
    let mean_a = anomaly.iter().sum::<f64>() / n as f64;
    let mu = std::f64::consts::SQRT_2 * normal_quantile(p.cloudiness);

    // Ground: damping depth and phase at GROUND_DEPTH_M.
    let period_s = 365.25 * 86400.0;
    let delta = (SOIL_DIFFUSIVITY_M2_S * period_s / PI).sqrt();
    let damp = (-GROUND_DEPTH_M / delta).exp();
    let lag_days = GROUND_DEPTH_M / delta * 365.25 / (2.0 * PI);

    let solar_shift_h = (p.longitude_deg - 15.0 * p.utc_offset_h) / 15.0;
    let r1 = |x: f64| (x * 10.0).round() / 10.0;
    let mut s = WeatherSeries {
        times: Vec::with_capacity(n),
        air_c: Vec::with_capacity(n),
        ghi_w_m2: Some(Vec::with_capacity(n)),
        dhi_w_m2: Some(Vec::with_capacity(n)),
        dni_w_m2: Some(Vec::with_capacity(n)),
        ground_c: Some(Vec::with_capacity(n)),
        wind_m_s: Some(vec![p.wind_m_s; n]),
        source: format!("synthetic: {}", p.name),
        filled_hours: 0,
        metadata: vec![
            ("name".into(), p.name.clone()),
            (
                "invented".into(),
                "yes; an invented climate, not measured data".into(),
            ),
            ("command".into(), p.command()),
            ("latitude_deg".into(), p.latitude_deg.to_string()),
            ("longitude_deg".into(), p.longitude_deg.to_string()),
            ("elevation_m".into(), p.elevation_m.to_string()),
        ],
    };
    for k in 0..n {
        let stamp = start + TimeDelta::hours(k as i64 + 1);
        // Temperature at the stamp.
        let d =
            stamp.ordinal0() as f64 + (stamp.hour() as f64 + stamp.minute() as f64 / 60.0) / 24.0;
        let d = if stamp.year() > p.year {
            d + if leap { 366.0 } else { 365.0 }
        } else {
            d
        };
        let hs = stamp.hour() as f64 + stamp.minute() as f64 / 60.0 + solar_shift_h;
        let t = p.seasonal_c(d) - 0.5 * p.daily_swing_k * (2.0 * PI * (hs - 3.0) / 24.0).cos()
            + anomaly[k]
            - mean_a;
        let tg = p.annual_mean_c
            - 0.5
                * p.annual_swing_k
                * damp
                * (2.0 * PI * (d - p.coldest_day() - lag_days) / 365.25).cos();
        // Sun at the middle of the hour ending at the stamp.
        let mid = stamp - TimeDelta::minutes(30);
        let z = solar_position(&mid, &obs).apparent_zenith_deg;
        let cover = normal_cdf(latent[k] + mu);
        let ghi = haurwitz_ghi_w_m2(z) * kasten_czeplak_factor(cover);
        let comp = erbs(ghi, z, extraterrestrial_normal_w_m2(mid.ordinal()));
        let (g, dh) = (r1(ghi), r1(comp.dhi_w_m2).min(r1(ghi)));
        s.times.push(stamp);
        s.air_c.push(r1(t));
        s.ghi_w_m2.as_mut().expect("set").push(g);
        s.dhi_w_m2.as_mut().expect("set").push(dh);
        s.dni_w_m2
            .as_mut()
            .expect("set")
            .push(r1(comp.dni_w_m2).min(1400.0));
        s.ground_c.as_mut().expect("set").push(r1(tg));
    }
    s.validate()?;
    Ok(s)
}

/// The weather file text of a synthesised series: two comment lines saying the climate is
/// invented and stating the time convention, then the metadata and the data
/// ([`crate::weather_to_csv`]).
pub fn file_text(w: &WeatherSeries) -> String {
    crate::weather_to_csv(
        w,
        &[
            "dwell weather file: INVENTED climate (synthetic, not measured data)".to_string(),
            "time: ISO 8601 with offset; air_c, ground_c (1 m deep), wind_m_s at the stamp; \
             irradiance W/m2, mean over the hour ending at the stamp"
                .to_string(),
        ],
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn normal_cdf_and_quantile() {
        // Φ(1) = 0.8413447461, Φ(−1.96) = 0.0249978951 (Abramowitz & Stegun Table 26.1).
        assert!((normal_cdf(1.0) - 0.8413447461).abs() < 2e-7);
        assert!((normal_cdf(-1.96) - 0.0249978951).abs() < 2e-7);
        assert!((normal_quantile(0.8413447461) - 1.0).abs() < 1e-6);
    }

    #[test]
    fn haurwitz_at_zenith_zero() {
        // Haurwitz (1945) formula at z = 0: 1098·exp(−0.059) = 1035.09203 W/m² (by hand).
        assert!((haurwitz_ghi_w_m2(0.0) - 1035.09203).abs() < 1e-5);
        assert_eq!(haurwitz_ghi_w_m2(90.5), 0.0);
    }

    #[test]
    fn parameters_are_checked_at_both_ends() {
        let ok = ClimateParams::default();
        assert!(ok.validate().is_ok());
        for (p, name) in [
            (
                ClimateParams {
                    cloudiness: 1.0,
                    ..ok.clone()
                },
                "--cloudiness",
            ),
            (
                ClimateParams {
                    cloudiness: 0.0,
                    ..ok.clone()
                },
                "--cloudiness",
            ),
            (
                ClimateParams {
                    latitude_deg: 70.0,
                    ..ok.clone()
                },
                "--lat",
            ),
            (
                ClimateParams {
                    persistence_days: 0.0,
                    ..ok.clone()
                },
                "--persistence",
            ),
            (
                ClimateParams {
                    utc_offset_h: 1.3,
                    ..ok.clone()
                },
                "--utc-offset",
            ),
        ] {
            let e = p.validate().unwrap_err().to_string();
            assert!(e.starts_with(name), "{e}");
        }
        let edge = ClimateParams {
            cloudiness: 0.99,
            latitude_deg: -66.0,
            persistence_days: 0.05,
            ..ok
        };
        assert!(edge.validate().is_ok());
    }
}
