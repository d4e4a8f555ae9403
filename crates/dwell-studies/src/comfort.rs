//! Comfort figures per zone over occupied hours, and warnings in plain words.

use chrono::{DateTime, Datelike, FixedOffset};
use serde::Serialize;

/// Below this margin (K) under the band a temperature counts as below it: the thermostat holds
/// setpoints to rounding, so a hair below must not count as an unmet hour.
pub const TOLERANCE_K: f64 = 0.01;

/// Comfort of one zone over occupied hourly stamps.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct Comfort {
    /// Lower edge of the band (°C).
    pub band_min_c: f64,
    /// Upper edge of the band (°C).
    pub band_max_c: f64,
    /// Occupied hourly stamps in the period.
    pub occupied_hours: usize,
    /// Occupied hours below the band.
    pub hours_below: usize,
    /// Occupied hours above the band.
    pub hours_above: usize,
    /// Σ max(0, band_min − T) over occupied hours (K·h).
    pub degree_hours_below_kh: f64,
    /// Σ max(0, T − band_max) over occupied hours (K·h).
    pub degree_hours_above_kh: f64,
    /// Longest run of consecutive occupied hours below the band (h).
    pub longest_spell_below_h: usize,
    /// Lowest occupied temperature (°C), if any hour was occupied.
    pub coldest_occupied_c: Option<f64>,
    /// When it happened (ISO 8601).
    pub coldest_occupied_time: Option<String>,
    /// Occupied hours below the band per calendar month (Jan … Dec).
    #[serde(skip)]
    pub below_by_month: [usize; 12],
    /// Lowest occupied temperature per month and its time.
    #[serde(skip)]
    pub coldest_by_month: [Option<(f64, DateTime<FixedOffset>)>; 12],
}

impl Comfort {
    /// Evaluates hourly temperatures `temp_c` at `times`, occupied where `occupied` is true.
    pub fn evaluate(
        band: (f64, f64),
        times: &[DateTime<FixedOffset>],
        temp_c: &[f64],
        occupied: &[bool],
    ) -> Comfort {
        let (lo, hi) = band;
        let mut c = Comfort {
            band_min_c: lo,
            band_max_c: hi,
            occupied_hours: 0,
            hours_below: 0,
            hours_above: 0,
            degree_hours_below_kh: 0.0,
            degree_hours_above_kh: 0.0,
            longest_spell_below_h: 0,
            coldest_occupied_c: None,
            coldest_occupied_time: None,
            below_by_month: [0; 12],
            coldest_by_month: [None; 12],
        };
        let mut spell = 0;
        let mut coldest: Option<(f64, DateTime<FixedOffset>)> = None;
        for ((t, &temp), &occ) in times.iter().zip(temp_c).zip(occupied) {
            if !occ {
                continue; // an unoccupied hour neither extends nor breaks a spell
            }
            c.occupied_hours += 1;
            let month = t.month0() as usize;
            if coldest.is_none_or(|(v, _)| temp < v) {
                coldest = Some((temp, *t));
            }
            if c.coldest_by_month[month].is_none_or(|(v, _)| temp < v) {
                c.coldest_by_month[month] = Some((temp, *t));
            }
            if temp < lo - TOLERANCE_K {
                c.hours_below += 1;
                c.below_by_month[month] += 1;
                c.degree_hours_below_kh += lo - temp;
                spell += 1;
                c.longest_spell_below_h = c.longest_spell_below_h.max(spell);
            } else {
                spell = 0;
            }
            if temp > hi + TOLERANCE_K {
                c.hours_above += 1;
                c.degree_hours_above_kh += temp - hi;
            }
        }
        c.coldest_occupied_c = coldest.map(|(v, _)| v);
        c.coldest_occupied_time = coldest.map(|(_, t)| t.format("%Y-%m-%dT%H:%M%:z").to_string());
        c
    }

    /// Plain-words warnings for `zone`: the (up to three) months with most hours below the
    /// band, and hours above it.
    pub fn warnings(&self, zone: &str) -> Vec<String> {
        const MONTHS: [&str; 12] = [
            "January",
            "February",
            "March",
            "April",
            "May",
            "June",
            "July",
            "August",
            "September",
            "October",
            "November",
            "December",
        ];
        let mut out = Vec::new();
        let mut months: Vec<usize> = (0..12).filter(|&m| self.below_by_month[m] > 0).collect();
        months.sort_by_key(|&m| std::cmp::Reverse(self.below_by_month[m]));
        for &m in months.iter().take(3) {
            let (v, t) =
                self.coldest_by_month[m].expect("a month with hours below has a coldest hour");
            out.push(format!(
                "{zone} falls below {:.1} °C for {} occupied hour{} in {}; coldest {:.1} °C on {}",
                self.band_min_c,
                self.below_by_month[m],
                if self.below_by_month[m] == 1 { "" } else { "s" },
                MONTHS[m],
                v,
                t.format("%Y-%m-%d %H:%M")
            ));
        }
        if self.hours_above > 0 {
            out.push(format!(
                "{zone} rises above {:.1} °C for {} occupied hour{} ({:.0} K·h)",
                self.band_max_c,
                self.hours_above,
                if self.hours_above == 1 { "" } else { "s" },
                self.degree_hours_above_kh
            ));
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use chrono::TimeZone;

    #[test]
    fn counts_spells_and_degree_hours() {
        let tz = FixedOffset::east_opt(0).unwrap();
        let times: Vec<_> = (0..8)
            .map(|h| tz.with_ymd_and_hms(2025, 1, 6, h, 0, 0).unwrap())
            .collect();
        let temp = [21.0, 19.0, 18.0, 19.995, 17.0, 16.0, 26.5, 20.0];
        let occ = [true, true, true, true, false, true, true, true];
        let c = Comfort::evaluate((20.0, 25.0), &times, &temp, &occ);
        assert_eq!(c.occupied_hours, 7);
        assert_eq!(c.hours_below, 3); // 19, 18, 16 (19.995 is within the tolerance)
        assert_eq!(c.longest_spell_below_h, 2);
        assert!((c.degree_hours_below_kh - (1.0 + 2.0 + 4.0)).abs() < 1e-12);
        assert_eq!(c.hours_above, 1);
        assert_eq!(c.coldest_occupied_c, Some(16.0));
        assert_eq!(
            c.coldest_occupied_time.as_deref(),
            Some("2025-01-06T05:00+00:00")
        );
        let w = c.warnings("bedroom");
        assert_eq!(w[0], "bedroom falls below 20.0 °C for 3 occupied hours in January; coldest 16.0 °C on 2025-01-06 05:00");
    }
}
