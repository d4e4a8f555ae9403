//! Invented measured data: inputs from a seeded random generator, indoor temperature from a
//! known parameter set stepped exactly, plus seeded Gaussian noise. For tests, the shipped
//! samples in `zones-examples/measured/` and the docs; never measured data.

use chrono::{DateTime, FixedOffset};
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use rand_distr::{Distribution, Normal};

use crate::data::MeasuredData;
use crate::error::CalibrateError;
use crate::predict::predict;
use crate::structure::RcParams;

/// How to invent the inputs.
#[derive(Clone, Debug)]
pub struct SynthSpec {
    /// Number of days.
    pub days: f64,
    /// Interval (s), 300 … 3600.
    pub step_s: f64,
    /// Mean outdoor temperature (°C).
    pub outdoor_mean_c: f64,
    /// Largest heating power (W); the heating steps between 0, ⅓, ⅔ and all of it at random
    /// times 1 … 8 h apart, like a pseudo-random co-heating test.
    pub heating_max_w: f64,
    /// Whether to invent solar irradiance (W/m², global horizontal).
    pub solar: bool,
    /// Standard deviation of the indoor measurement noise (K).
    pub noise_sd_k: f64,
    /// Fraction of indoor readings dropped at random (gaps), 0 … 0.5.
    pub missing_fraction: f64,
    /// Random seed.
    pub seed: u64,
}

impl Default for SynthSpec {
    fn default() -> Self {
        SynthSpec {
            days: 21.0,
            step_s: 1800.0,
            outdoor_mean_c: 5.0,
            heating_max_w: 4000.0,
            solar: true,
            noise_sd_k: 0.1,
            missing_fraction: 0.0,
            seed: 1,
        }
    }
}

/// Start of invented series: 2025-01-06 00:00 UTC (a Monday).
pub fn synth_start() -> DateTime<FixedOffset> {
    dwell_weather::parse_stamp("2025-01-06T00:00+00:00", None).expect("valid stamp")
}

/// Invented inputs (indoor all NaN) for `spec`.
pub fn synth_inputs(spec: &SynthSpec) -> MeasuredData {
    let mut rng = ChaCha8Rng::seed_from_u64(spec.seed);
    let n = (spec.days * 86_400.0 / spec.step_s).round() as usize + 1;
    let unit = Normal::new(0.0, 1.0).expect("valid");
    let mut anomaly = 0.0;
    // AR(1) weather anomaly with a persistence of ~2 days and a standard deviation of 3 K.
    let a = (-spec.step_s / (2.0 * 86_400.0)).exp();
    let mut outdoor = Vec::with_capacity(n);
    let mut heating = Vec::with_capacity(n);
    let mut solar = Vec::with_capacity(n);
    let mut level = 0.0;
    let mut next_switch = 0.0;
    let mut cloud = 0.5;
    for k in 0..n {
        let t = k as f64 * spec.step_s;
        let hour = (t / 3600.0) % 24.0;
        anomaly = a * anomaly + (1.0 - a * a).sqrt() * 3.0 * unit.sample(&mut rng);
        outdoor.push(
            spec.outdoor_mean_c + anomaly
                - 3.0 * (2.0 * std::f64::consts::PI * (hour - 3.0) / 24.0).cos(),
        );
        if t >= next_switch {
            level = [0.0, 1.0 / 3.0, 2.0 / 3.0, 1.0][rng.random_range(0..4)];
            next_switch = t + 3600.0 * rng.random_range(1..=8) as f64;
        }
        heating.push(level * spec.heating_max_w);
        if k % ((86_400.0 / spec.step_s) as usize).max(1) == 0 {
            cloud = rng.random_range(0.2..1.0);
        }
        let sun = (std::f64::consts::PI * (hour - 8.0) / 8.0).sin().max(0.0);
        solar.push(if (8.0..16.0).contains(&hour) {
            350.0 * cloud * sun
        } else {
            0.0
        });
    }
    MeasuredData {
        source: "invented data".into(),
        start: synth_start(),
        step_s: spec.step_s,
        indoor_c: vec![f64::NAN; n],
        outdoor_c: outdoor,
        heating_w: heating,
        solar_w_m2: spec.solar.then_some(solar),
        filled_inputs: 0,
        lines: vec![0; n],
    }
}

/// Invented measured data: inputs from [`synth_inputs`], indoor temperature from `truth`
/// starting at `indoor0_c` (and `truth.initial_c` for the masses), plus noise and gaps.
/// Returns the data and the noise-free indoor temperature.
pub fn synth_measured(
    truth: &RcParams,
    indoor0_c: f64,
    spec: &SynthSpec,
) -> Result<(MeasuredData, Vec<f64>), CalibrateError> {
    let mut d = synth_inputs(spec);
    d.indoor_c[0] = indoor0_c;
    let clean = predict(truth, &d)?;
    let mut rng = ChaCha8Rng::seed_from_u64(spec.seed.wrapping_add(0x5eed));
    let noise = Normal::new(0.0, spec.noise_sd_k.max(0.0))
        .map_err(|e| CalibrateError::Option(e.to_string()))?;
    for (k, (m, c)) in d.indoor_c.iter_mut().zip(clean.iter()).enumerate() {
        *m = c + noise.sample(&mut rng);
        if k > 0 && rng.random::<f64>() < spec.missing_fraction {
            *m = f64::NAN;
        }
    }
    Ok((d, clean))
}
