//! An on/off thermostat with a dead band.

use crate::SolverError;

/// On/off thermostats with hysteresis, one per control channel.
///
/// A channel switches on when its temperature is below `setpoint − dead_band/2` and off
/// when it is above `setpoint + dead_band/2`; in between it keeps its state. When on it runs
/// at full power. Switch-ons are counted so a caller can report cycles per hour.
#[derive(Clone, Debug)]
pub struct OnOffThermostat {
    dead_band_k: f64,
    on: Vec<bool>,
    switch_ons: Vec<u64>,
}

impl OnOffThermostat {
    /// `channels` thermostats, all off, with a dead band (K, temperature difference) that
    /// must be finite and within 0 ..= 10 K.
    pub fn new(channels: usize, dead_band_k: f64) -> Result<Self, SolverError> {
        if !(dead_band_k.is_finite() && (0.0..=10.0).contains(&dead_band_k)) {
            return Err(SolverError::Control(format!(
                "dead_band_k = {dead_band_k} K must be finite and within 0 ..= 10 K"
            )));
        }
        Ok(OnOffThermostat {
            dead_band_k,
            on: vec![false; channels],
            switch_ons: vec![0; channels],
        })
    }

    /// The dead band (K).
    pub fn dead_band_k(&self) -> f64 {
        self.dead_band_k
    }

    /// Whether each channel is on.
    pub fn is_on(&self) -> &[bool] {
        &self.on
    }

    /// Number of off→on switches per channel since construction or [`Self::reset_counts`].
    pub fn switch_ons(&self) -> &[u64] {
        &self.switch_ons
    }

    /// Zeroes the switch-on counters.
    pub fn reset_counts(&mut self) {
        self.switch_ons.iter_mut().for_each(|c| *c = 0);
    }

    /// Updates each channel from its temperature `temp_c` and `setpoint_c` (°C); disabled
    /// channels are switched off. Writes 1 or 0 into `fraction_out`.
    ///
    /// # Panics
    /// If a slice's length differs from the number of channels.
    pub fn decide(
        &mut self,
        temp_c: &[f64],
        setpoint_c: &[f64],
        enabled: &[bool],
        fraction_out: &mut [f64],
    ) {
        let q = self.on.len();
        assert!(
            temp_c.len() == q
                && setpoint_c.len() == q
                && enabled.len() == q
                && fraction_out.len() == q
        );
        let half = 0.5 * self.dead_band_k;
        for c in 0..q {
            let was = self.on[c];
            let now = if !enabled[c] {
                false
            } else if temp_c[c] < setpoint_c[c] - half {
                true
            } else if temp_c[c] > setpoint_c[c] + half {
                false
            } else {
                was
            };
            if now && !was {
                self.switch_ons[c] += 1;
            }
            self.on[c] = now;
            fraction_out[c] = if now { 1.0 } else { 0.0 };
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn hysteresis_keeps_state_inside_the_band_and_counts_switch_ons() {
        let mut t = OnOffThermostat::new(1, 1.0).unwrap();
        let mut f = [0.0];
        let seq = [
            (19.0, 1.0),
            (19.8, 1.0),
            (20.4, 1.0),
            (20.6, 0.0),
            (20.0, 0.0),
            (19.4, 1.0),
        ];
        for (temp, want) in seq {
            t.decide(&[temp], &[20.0], &[true], &mut f);
            assert_eq!(f[0], want, "at {temp} °C");
        }
        assert_eq!(t.switch_ons(), &[2]);
        t.decide(&[10.0], &[20.0], &[false], &mut f);
        assert_eq!(f[0], 0.0);
    }

    #[test]
    fn dead_band_range_is_validated_at_both_ends() {
        assert!(OnOffThermostat::new(1, 0.0).is_ok());
        assert!(OnOffThermostat::new(1, 10.0).is_ok());
        assert!(OnOffThermostat::new(1, -0.1).is_err());
        assert!(OnOffThermostat::new(1, f64::NAN).is_err());
    }
}
