//! Heating outage: every heater off for a number of hours from a moment, and how fast each
//! zone cools.
//!
//! The house is warmed up under its own schedules, then run at a fine step (default 10 min)
//! from up to a day before the outage to `after_h` hours after it, every thermostat channel
//! switched off during the outage. Per zone: the temperature path, the lowest temperature, and
//! the hours from the start of the outage until the air falls below (by linear interpolation
//! between steps):
//!
//! * the zone's comfort minimum;
//! * a **damp-risk** threshold, default 12 °C — *common practice*: below about 12 °C sustained,
//!   inside surfaces of ordinary walls approach the dew point of indoor air at usual moisture
//!   loads and mould risk rises (a rule of thumb, not a standard's figure);
//! * a **pipe-freeze** threshold, default 5 °C — *common practice*: water pipes in the heated
//!   envelope are usually protected by keeping the air above about 5 °C (frost-protection
//!   settings of thermostats are commonly 5 °C), leaving margin for colder spots near the
//!   outside walls.
//!
//! The crossing is searched during the outage only.

use chrono::NaiveDateTime;
use dwell_model::{House, ModelFile};
use dwell_weather::WeatherSeries;
use serde::{Deserialize, Serialize};

use crate::simulate::StudyError;
use crate::trace::{hours_until_below, Runner, Trace};

/// Options of [`outage`].
#[derive(Clone, Debug)]
pub struct OutageOptions {
    /// Start of the outage (local standard time of the site).
    pub start: NaiveDateTime,
    /// Length (h), 0 < h ≤ 720.
    pub hours: f64,
    /// Hours shown after power returns (h), default 24.
    pub after_h: f64,
    /// Step (s), default 600.
    pub step_s: f64,
    /// Damp-risk threshold (°C), default 12 (common practice).
    pub damp_below_c: f64,
    /// Pipe-freeze threshold (°C), default 5 (common practice).
    pub frost_below_c: f64,
    /// Warm-up window (days), default 7.
    pub warmup_days: usize,
}

impl OutageOptions {
    /// Defaults for an outage of `hours` from `start`.
    pub fn new(start: NaiveDateTime, hours: f64) -> OutageOptions {
        OutageOptions {
            start,
            hours,
            after_h: 24.0,
            step_s: 600.0,
            damp_below_c: 12.0,
            frost_below_c: 5.0,
            warmup_days: 7,
        }
    }

    /// Checks ranges; messages name the flag.
    pub fn validate(&self) -> Result<(), StudyError> {
        let bad = |m: String| Err(StudyError::Option(m));
        if !(self.hours > 0.0 && self.hours <= 720.0) {
            return bad(format!("--hours {} is outside 0…720 h", self.hours));
        }
        if !(-20.0..=25.0).contains(&self.damp_below_c)
            || !(-20.0..=25.0).contains(&self.frost_below_c)
        {
            return bad(format!(
                "thresholds --damp-below {} °C and --frost-below {} °C must lie within -20…25 °C",
                self.damp_below_c, self.frost_below_c
            ));
        }
        if self.frost_below_c >= self.damp_below_c {
            return bad(format!(
                "--frost-below {} °C must be below --damp-below {} °C (freezing comes after damp as a room cools)",
                self.frost_below_c, self.damp_below_c
            ));
        }
        if !(0.0..=240.0).contains(&self.after_h) {
            return bad(format!("--after {} h is outside 0…240 h", self.after_h));
        }
        Ok(())
    }
}

/// One zone through the outage.
#[derive(Clone, Debug, Serialize, Deserialize)]
pub struct OutageZone {
    /// Zone id.
    pub zone: String,
    /// Air at the start of the outage (°C).
    pub start_c: f64,
    /// Air when power returns (°C).
    pub end_c: f64,
    /// Lowest air temperature in the run (°C).
    pub lowest_c: f64,
    /// Comfort minimum (°C), if the zone has a band.
    pub comfort_min_c: Option<f64>,
    /// Hours until below the comfort minimum (h).
    pub hours_to_below_comfort_h: Option<f64>,
    /// Hours until below the damp-risk threshold (h).
    pub hours_to_damp_risk_h: Option<f64>,
    /// Hours until below the pipe-freeze threshold (h).
    pub hours_to_frost_risk_h: Option<f64>,
    /// Hours after power returns until the air is back within 0.05 K of its setpoint (h).
    pub recovered_after_h: Option<f64>,
}

/// The outage study.
#[derive(Clone, Debug, Serialize, Deserialize)]
pub struct OutageStudy {
    /// House name.
    pub model: String,
    /// Weather source.
    pub weather: String,
    /// Start (local standard time).
    pub start: String,
    /// End (local standard time).
    pub end: String,
    /// Length (h).
    pub hours: f64,
    /// Damp-risk threshold (°C, common practice).
    pub damp_below_c: f64,
    /// Pipe-freeze threshold (°C, common practice).
    pub frost_below_c: f64,
    /// Where the thresholds come from.
    pub thresholds_note: String,
    /// Per zone.
    pub zones: Vec<OutageZone>,
    /// Cautions.
    pub cautions: Vec<String>,
    /// The path (not serialised: `outage_path.csv` holds it, and `dwell-report` reads it back
    /// from there; empty when deserialised).
    #[serde(skip, default = "no_trace")]
    pub trace: Trace,
}

/// An empty trace, for [`OutageStudy`] read back from JSON.
fn no_trace() -> Trace {
    Trace {
        times: Vec::new(),
        local: Vec::new(),
        zone_c: Vec::new(),
        heat_w: Vec::new(),
        setpoint_c: Vec::new(),
        outdoor_c: Vec::new(),
        states: Vec::new(),
        n: 0,
    }
}

/// Runs the outage study.
pub fn outage(
    model: &ModelFile,
    house: &House,
    weather: &WeatherSeries,
    opts: &OutageOptions,
) -> Result<OutageStudy, StudyError> {
    opts.validate()?;
    let mut run = Runner::new(model, house, weather, opts.step_s)?;
    let f = &run.forcing;
    let n = f.hours();
    let lead = opts.start - chrono::Duration::hours(24);
    let (first, last) = (f.local(f.times[0]), f.local(f.times[n - 1]));
    let end = opts.start + chrono::Duration::milliseconds((opts.hours * 3.6e6).round() as i64);
    if opts.start < first || end > last {
        return Err(StudyError::Option(format!(
            "the outage {} … {} (local standard time) is not inside the weather ({} … {}); move --start or shorten --hours",
            opts.start.format("%Y-%m-%dT%H:%M"),
            end.format("%Y-%m-%dT%H:%M"),
            first.format("%Y-%m-%dT%H:%M"),
            last.format("%Y-%m-%dT%H:%M")
        )));
    }
    let i0 = (0..n)
        .rev()
        .find(|&i| f.local(f.times[i]) <= lead)
        .unwrap_or(0);
    let t0 = f.local(f.times[i0]);
    let step_ms = (opts.step_s * 1000.0) as i64;
    let k_a = ((opts.start - t0).num_milliseconds() as f64 / step_ms as f64).round() as usize;
    let k_b = ((end - t0).num_milliseconds() as f64 / step_ms as f64).round() as usize;
    let max_steps = (n - 1 - i0) * f.steps_per_hour;
    let k_end = (k_b + (opts.after_h * 3600.0 / opts.step_s).round() as usize).min(max_steps);
    run.warm_up(i0, opts.warmup_days, |_, _, _| {});
    let tr = run.run(i0, 0, k_end, false, |k, _, en: &mut [bool]| {
        if k >= k_a && k < k_b {
            en.iter_mut().for_each(|e| *e = false);
        }
    });
    let mut zones = Vec::new();
    for (zi, z) in house.zones.iter().enumerate() {
        let t = &tr.zone_c[zi];
        let comfort_min_c = z.comfort.map(|c| c.0);
        let recovered_after_h = (k_b + 1..=k_end)
            .find(|&k| tr.setpoint_c[zi][k].is_finite() && t[k] >= tr.setpoint_c[zi][k] - 0.05)
            .map(|k| (tr.local[k] - tr.local[k_b]).num_milliseconds() as f64 / 3.6e6);
        zones.push(OutageZone {
            zone: z.id.clone(),
            start_c: t[k_a],
            end_c: t[k_b],
            lowest_c: t.iter().copied().fold(f64::INFINITY, f64::min),
            comfort_min_c,
            hours_to_below_comfort_h: comfort_min_c
                .and_then(|c| hours_until_below(&tr.local, t, k_a, k_b, c)),
            hours_to_damp_risk_h: hours_until_below(&tr.local, t, k_a, k_b, opts.damp_below_c),
            hours_to_frost_risk_h: hours_until_below(&tr.local, t, k_a, k_b, opts.frost_below_c),
            recovered_after_h: if run.channel_zone.contains(&zi) {
                recovered_after_h
            } else {
                None
            },
        });
    }
    Ok(OutageStudy {
        model: house.name.clone(),
        weather: weather.source.clone(),
        start: opts.start.format("%Y-%m-%dT%H:%M").to_string(),
        end: end.format("%Y-%m-%dT%H:%M").to_string(),
        hours: opts.hours,
        damp_below_c: opts.damp_below_c,
        frost_below_c: opts.frost_below_c,
        thresholds_note: "damp-risk and pipe-freeze thresholds are common practice (rules of thumb), not values from a standard".into(),
        zones,
        cautions: vec![crate::CAUTION.to_string()],
        trace: tr,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::design_weather::{spell_start_day, DesignSpell};

    #[test]
    fn cooldown_of_one_node_follows_the_analytic_exponential() {
        // One air node: C = 1200 J/(m³K) · 100 m³ = 120 000 J/K (no furnishing), H = U·A =
        // 2 · 5 = 10 W/K, τ = C/H = 12 000 s. Outdoor held at 0 °C, heated to 20 °C, then off:
        // T(t) = 20·e^(−t/τ) (first-order RC, analytic). Time to fall below θ:
        // τ·ln(20/θ): 12 °C → 1.70275 h, 5 °C → 4.62098 h.
        let text = r#"{
          "zones": [{"id": "box", "floor_area_m2": 40, "volume_m3": 100, "furnishing_kj_m2k": 0, "comfort": {"min_c": 18, "max_c": 25}}],
          "openings": [{"id": "w", "zone": "box", "area_m2": 5, "u_value_w_m2k": 2.0}],
          "heaters": [{"id": "h", "zone": "box", "capacity_w": 5000, "setpoint_c": 20}]
        }"#;
        let m = dwell_model::parse_model(text, "t.json").unwrap();
        let h = dwell_model::compile(&m, "t.json").unwrap();
        let w = DesignSpell {
            design_c: 0.0,
            swing_k: 0.0,
            days: 3,
            ground_c: 0.0,
            utc_offset_h: 0.0,
        }
        .weather()
        .unwrap();
        let start = spell_start_day().and_hms_opt(6, 0, 0).unwrap();
        let o = outage(&m, &h, &w, &OutageOptions::new(start, 10.0)).unwrap();
        let tau_h = 12000.0 / 3600.0;
        let tr = &o.trace;
        let k_a = tr.local.iter().position(|t| *t == start).unwrap();
        for k in k_a..k_a + 60 {
            let t_h = (k - k_a) as f64 / 6.0;
            let want = 20.0 * (-t_h / tau_h).exp();
            assert!(
                (tr.zone_c[0][k] - want).abs() < 1e-9,
                "t {t_h} h: {} vs {want}",
                tr.zone_c[0][k]
            );
        }
        let z = &o.zones[0];
        // crossings by linear interpolation between 10-min steps: error ≤ Δt²/(8τ) ≈ 0.001 h
        assert!((z.hours_to_damp_risk_h.unwrap() - tau_h * (20.0f64 / 12.0).ln()).abs() < 0.002);
        assert!((z.hours_to_frost_risk_h.unwrap() - tau_h * (20.0f64 / 5.0).ln()).abs() < 0.002);
        assert!(
            (z.hours_to_below_comfort_h.unwrap() - tau_h * (20.0f64 / 18.0).ln()).abs() < 0.002
        );
        // power back after 10 h: capacity 5000 W ≫ 200 W loss, so back within one step
        assert!(z.recovered_after_h.unwrap() <= 1.0 / 6.0 + 1e-9);
    }

    #[test]
    fn bad_thresholds_are_refused() {
        let start = spell_start_day().and_hms_opt(6, 0, 0).unwrap();
        let mut o = OutageOptions::new(start, 10.0);
        o.frost_below_c = 14.0;
        assert!(o
            .validate()
            .unwrap_err()
            .to_string()
            .contains("--frost-below 14"));
        o.frost_below_c = 5.0;
        o.hours = 0.0;
        assert!(o.validate().unwrap_err().to_string().contains("--hours"));
    }
}
