//! Monthly summary of a weather series: mean temperatures, heating degree-days, a design
//! temperature and solar totals.

use chrono::{Datelike, NaiveDate};
use serde::Serialize;

use crate::WeatherSeries;

/// Base temperature of the heating degree-days when none is given (°C): 15.5 °C, the base
/// customary in UK practice for dwellings.
pub const DEFAULT_HDD_BASE_C: f64 = 15.5;

/// Share of hours at or above the design temperature (%); the design temperature is the
/// 0.4 % quantile of the hourly air temperature (the "99.6 % annual" design condition).
pub const DESIGN_PERCENTILE: f64 = 99.6;

/// One calendar month (by the middle of each hour, so the 00:00 stamp of 1 February belongs
/// to January).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MonthSummary {
    /// Year.
    pub year: i32,
    /// Month, 1 … 12.
    pub month: u32,
    /// Number of hours.
    pub hours: usize,
    /// Mean air temperature (°C).
    pub mean_air_c: f64,
    /// Lowest hourly air temperature (°C).
    pub min_air_c: f64,
    /// Highest hourly air temperature (°C).
    pub max_air_c: f64,
    /// Heating degree-days: Σ over days of max(0, base − daily mean air temperature) (K·day).
    pub hdd_k_day: f64,
    /// Global horizontal irradiation (kWh/m²), if the file has GHI.
    pub ghi_kwh_m2: Option<f64>,
}

/// Summary of a whole series.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Summary {
    /// Where the weather came from.
    pub source: String,
    /// Number of hours.
    pub hours: usize,
    /// True when the series is one calendar year.
    pub full_year: bool,
    /// Hours filled by interpolation when reading.
    pub filled_hours: usize,
    /// Mean air temperature (°C).
    pub mean_air_c: f64,
    /// Base temperature of the degree-days (°C).
    pub hdd_base_c: f64,
    /// Heating degree-days over the series (K·day).
    pub hdd_k_day: f64,
    /// Design temperature: the 0.4 % quantile of hourly air temperature (°C), linear
    /// interpolation between order statistics (position (n − 1)·0.004).
    pub design_temperature_c: f64,
    /// The annual percentile the design temperature stands for (%).
    pub design_percentile: f64,
    /// Global horizontal irradiation over the series (kWh/m²), if the file has GHI.
    pub ghi_kwh_m2: Option<f64>,
    /// Months in time order.
    pub months: Vec<MonthSummary>,
}

/// The `q` quantile (0 … 1) of `v` with linear interpolation at position (n − 1)·q.
pub fn quantile(v: &[f64], q: f64) -> f64 {
    let mut s = v.to_vec();
    s.sort_by(|a, b| a.total_cmp(b));
    let pos = (s.len() - 1) as f64 * q;
    let i = pos.floor() as usize;
    let f = pos - i as f64;
    if i + 1 < s.len() {
        s[i] + f * (s[i + 1] - s[i])
    } else {
        s[i]
    }
}

/// Summarises `w` with heating degree-days to base `hdd_base_c` (°C).
pub fn summarize(w: &WeatherSeries, hdd_base_c: f64) -> Summary {
    // Daily means by the date of the hour's middle.
    let mut days: Vec<(NaiveDate, f64, usize)> = Vec::new();
    for i in 0..w.len() {
        let d = w.hour_middle(i).date_naive();
        match days.last_mut() {
            Some((day, sum, n)) if *day == d => {
                *sum += w.air_c[i];
                *n += 1;
            }
            _ => days.push((d, w.air_c[i], 1)),
        }
    }
    let mut months: Vec<MonthSummary> = Vec::new();
    for i in 0..w.len() {
        let m = w.hour_middle(i);
        let (y, mo) = (m.year(), m.month());
        if months.last().is_none_or(|l| (l.year, l.month) != (y, mo)) {
            months.push(MonthSummary {
                year: y,
                month: mo,
                hours: 0,
                mean_air_c: 0.0,
                min_air_c: f64::INFINITY,
                max_air_c: f64::NEG_INFINITY,
                hdd_k_day: 0.0,
                ghi_kwh_m2: w.ghi_w_m2.as_ref().map(|_| 0.0),
            });
        }
        let l = months.last_mut().expect("pushed");
        let t = w.air_c[i];
        l.hours += 1;
        l.mean_air_c += t;
        l.min_air_c = l.min_air_c.min(t);
        l.max_air_c = l.max_air_c.max(t);
        if let (Some(g), Some(s)) = (&w.ghi_w_m2, l.ghi_kwh_m2.as_mut()) {
            *s += g[i] / 1000.0;
        }
    }
    for m in &mut months {
        m.mean_air_c /= m.hours as f64;
    }
    for (d, sum, n) in &days {
        let hdd = (hdd_base_c - sum / *n as f64).max(0.0);
        if let Some(m) = months
            .iter_mut()
            .find(|m| (m.year, m.month) == (d.year(), d.month()))
        {
            m.hdd_k_day += hdd;
        }
    }
    Summary {
        source: w.source.clone(),
        hours: w.len(),
        full_year: w.is_full_year(),
        filled_hours: w.filled_hours,
        mean_air_c: w.annual_mean_air_c(),
        hdd_base_c,
        hdd_k_day: months.iter().map(|m| m.hdd_k_day).sum(),
        design_temperature_c: quantile(&w.air_c, 1.0 - DESIGN_PERCENTILE / 100.0),
        design_percentile: DESIGN_PERCENTILE,
        ghi_kwh_m2: w.ghi_w_m2.as_ref().map(|g| g.iter().sum::<f64>() / 1000.0),
        months,
    }
}

impl Summary {
    /// A plain-text table for the terminal.
    pub fn to_text(&self) -> String {
        const NAMES: [&str; 12] = [
            "Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec",
        ];
        let mut s = String::new();
        s.push_str(&format!("weather: {}\n", self.source));
        s.push_str(&format!(
            "hours: {}{}{}\n",
            self.hours,
            if self.full_year {
                " (one full year)"
            } else {
                " (not one full calendar year)"
            },
            if self.filled_hours > 0 {
                format!(", {} filled by interpolation", self.filled_hours)
            } else {
                String::new()
            }
        ));
        s.push_str(&format!(
            "mean air temperature: {:.1} °C\n",
            self.mean_air_c
        ));
        s.push_str(&format!(
            "heating degree-days (base {:.1} °C, from daily means): {:.0} K·day\n",
            self.hdd_base_c, self.hdd_k_day
        ));
        s.push_str(&format!(
            "design temperature ({:.1} % annual: exceeded in {:.1} % of hours): {:.1} °C\n",
            self.design_percentile, self.design_percentile, self.design_temperature_c
        ));
        match self.ghi_kwh_m2 {
            Some(g) => s.push_str(&format!("global horizontal irradiation: {g:.0} kWh/m²\n")),
            None => s.push_str("global horizontal irradiation: (no ghi_w_m2 column)\n"),
        }
        s.push_str("\nmonth      mean °C   min °C   max °C   HDD K·day   GHI kWh/m²\n");
        for m in &self.months {
            let g = m
                .ghi_kwh_m2
                .map(|g| format!("{g:>12.1}"))
                .unwrap_or_else(|| format!("{:>12}", "-"));
            s.push_str(&format!(
                "{} {:<5} {:>8.1} {:>8.1} {:>8.1} {:>11.0} {}\n",
                NAMES[m.month as usize - 1],
                m.year,
                m.mean_air_c,
                m.min_air_c,
                m.max_air_c,
                m.hdd_k_day,
                g
            ));
        }
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn quantile_interpolates_between_order_statistics() {
        // Same definition as numpy.quantile's default ("linear", Hyndman & Fan type 7):
        // for 1…11, q = 0.004 → position 0.04 → 1.04.
        let v: Vec<f64> = (1..=11).map(f64::from).collect();
        assert!((quantile(&v, 0.004) - 1.04).abs() < 1e-12);
        assert_eq!(quantile(&v, 0.0), 1.0);
        assert_eq!(quantile(&v, 1.0), 11.0);
    }
}
