//! Weekly schedules: a value for every moment, from a base value, periods on days of the week,
//! and yearly date ranges ("away") that override the week.
//!
//! Times are local standard time of the site (no daylight saving: a schedule written for
//! "06:30" means 06:30 standard time all year).

use chrono::{Datelike, NaiveDateTime, Timelike};

use crate::file::Schedule;

/// A schedule ready to evaluate.
#[derive(Clone, Debug)]
pub struct WeeklySchedule {
    base: f64,
    /// (weekday mask bit 0 = Monday, start minute, end minute, value); end may be < start.
    periods: Vec<(u8, u32, u32, f64)>,
    /// (start day-of-year key, end key, value) with key = month·100 + day.
    away: Vec<(u32, u32, f64)>,
}

/// Parses `HH:MM` (00:00 … 24:00) into minutes after midnight.
pub fn parse_clock(s: &str) -> Result<u32, String> {
    let (h, m) = s
        .split_once(':')
        .ok_or_else(|| format!("`{s}` is not a time of day `HH:MM`"))?;
    let h: u32 = h
        .parse()
        .map_err(|_| format!("`{s}` is not a time of day `HH:MM`"))?;
    let m: u32 = m
        .parse()
        .map_err(|_| format!("`{s}` is not a time of day `HH:MM`"))?;
    if m >= 60 || h > 24 || (h == 24 && m > 0) {
        return Err(format!(
            "`{s}` is not a time of day between 00:00 and 24:00"
        ));
    }
    Ok(h * 60 + m)
}

/// Parses `MM-DD` into the key month·100 + day.
pub fn parse_month_day(s: &str) -> Result<u32, String> {
    let bad = || format!("`{s}` is not a date `MM-DD`");
    let (m, d) = s.split_once('-').ok_or_else(bad)?;
    let m: u32 = m.parse().map_err(|_| bad())?;
    let d: u32 = d.parse().map_err(|_| bad())?;
    let days = [31, 29, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];
    if !(1..=12).contains(&m) || d == 0 || d > days[(m - 1) as usize] {
        return Err(bad());
    }
    Ok(m * 100 + d)
}

/// Parses a day word into a weekday mask (bit 0 Monday … bit 6 Sunday).
pub fn parse_days(s: &str) -> Result<u8, String> {
    Ok(match s {
        "mon" => 1,
        "tue" => 2,
        "wed" => 4,
        "thu" => 8,
        "fri" => 16,
        "sat" => 32,
        "sun" => 64,
        "weekdays" => 31,
        "weekend" => 96,
        "daily" => 127,
        _ => {
            return Err(format!(
            "`{s}` is not a day; use mon, tue, wed, thu, fri, sat, sun, weekdays, weekend or daily"
        ))
        }
    })
}

impl WeeklySchedule {
    /// Builds from the file form; errors name the field (relative to the schedule).
    pub fn new(s: &Schedule) -> Result<Self, Vec<(String, String)>> {
        let mut errors = Vec::new();
        let mut periods = Vec::new();
        for (i, p) in s.periods.iter().enumerate() {
            let mut mask = 0u8;
            for (j, d) in p.days.iter().enumerate() {
                match parse_days(d) {
                    Ok(m) => mask |= m,
                    Err(e) => errors.push((format!("periods[{i}].days[{j}]"), e)),
                }
            }
            if p.days.is_empty() {
                errors.push((
                    format!("periods[{i}].days"),
                    "no days given; use e.g. [\"daily\"]".into(),
                ));
            }
            let from =
                parse_clock(&p.from).map_err(|e| errors.push((format!("periods[{i}].from"), e)));
            let to = parse_clock(&p.to).map_err(|e| errors.push((format!("periods[{i}].to"), e)));
            if !p.value.is_finite() {
                errors.push((
                    format!("periods[{i}].value"),
                    "must be a finite number".into(),
                ));
            }
            if let (Ok(f), Ok(t)) = (from, to) {
                if f == t {
                    errors.push((
                        format!("periods[{i}].to"),
                        "the period is empty (from = to)".into(),
                    ));
                }
                periods.push((mask, f, t, p.value));
            }
        }
        let mut away = Vec::new();
        for (i, a) in s.away.iter().enumerate() {
            let f =
                parse_month_day(&a.from).map_err(|e| errors.push((format!("away[{i}].from"), e)));
            let t = parse_month_day(&a.to).map_err(|e| errors.push((format!("away[{i}].to"), e)));
            if let (Ok(f), Ok(t)) = (f, t) {
                away.push((f, t, a.value));
            }
        }
        if !s.base.is_finite() {
            errors.push(("base".into(), "must be a finite number".into()));
        }
        if errors.is_empty() {
            Ok(WeeklySchedule {
                base: s.base,
                periods,
                away,
            })
        } else {
            Err(errors)
        }
    }

    /// A schedule that is `value` all the time.
    pub fn constant(value: f64) -> Self {
        WeeklySchedule {
            base: value,
            periods: vec![],
            away: vec![],
        }
    }

    /// The value at a local standard time.
    pub fn value_at(&self, t: NaiveDateTime) -> f64 {
        let key = t.month() * 100 + t.day();
        for &(f, to, v) in self.away.iter().rev() {
            let inside = if f <= to {
                key >= f && key <= to
            } else {
                key >= f || key <= to
            };
            if inside {
                return v;
            }
        }
        let minute = t.hour() * 60 + t.minute();
        let wd = t.weekday().num_days_from_monday() as u8; // 0 = Monday
        let prev = (wd + 6) % 7;
        let mut value = self.base;
        for &(mask, f, to, v) in &self.periods {
            let today = mask & (1 << wd) != 0;
            let hit = if f < to {
                today && minute >= f && minute < to
            } else {
                // runs past midnight: the evening part belongs to today, the early part to the
                // day before
                (today && minute >= f) || (mask & (1 << prev) != 0 && minute < to)
            };
            if hit {
                value = v;
            }
        }
        value
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::file::{Away, Period};
    use chrono::NaiveDate;

    fn at(y: i32, m: u32, d: u32, h: u32, min: u32) -> NaiveDateTime {
        NaiveDate::from_ymd_opt(y, m, d)
            .unwrap()
            .and_hms_opt(h, min, 0)
            .unwrap()
    }

    #[test]
    fn setback_week_with_holiday() {
        let s = Schedule {
            id: "s".into(),
            base: 16.0,
            periods: vec![
                Period {
                    days: vec!["weekdays".into()],
                    from: "06:30".into(),
                    to: "22:00".into(),
                    value: 20.0,
                },
                Period {
                    days: vec!["weekend".into()],
                    from: "08:00".into(),
                    to: "23:00".into(),
                    value: 21.0,
                },
                Period {
                    days: vec!["fri".into()],
                    from: "23:00".into(),
                    to: "01:00".into(),
                    value: 19.0,
                },
            ],
            away: vec![Away {
                from: "12-30".into(),
                to: "01-02".into(),
                value: 12.0,
            }],
        };
        let w = WeeklySchedule::new(&s).unwrap();
        // 2025-01-06 is a Monday.
        assert_eq!(w.value_at(at(2025, 1, 6, 6, 29)), 16.0);
        assert_eq!(w.value_at(at(2025, 1, 6, 6, 30)), 20.0);
        assert_eq!(w.value_at(at(2025, 1, 6, 22, 0)), 16.0);
        assert_eq!(w.value_at(at(2025, 1, 11, 9, 0)), 21.0); // Saturday
        assert_eq!(w.value_at(at(2025, 1, 10, 23, 30)), 19.0); // Friday late
        assert_eq!(w.value_at(at(2025, 1, 11, 0, 30)), 19.0); // past midnight into Saturday
        assert_eq!(w.value_at(at(2025, 1, 11, 1, 0)), 16.0);
        assert_eq!(w.value_at(at(2025, 12, 31, 12, 0)), 12.0); // away across new year
        assert_eq!(w.value_at(at(2025, 1, 2, 12, 0)), 12.0);
        assert_eq!(w.value_at(at(2025, 1, 3, 12, 0)), 20.0);
    }

    #[test]
    fn bad_clock_and_days_are_named() {
        let s = Schedule {
            id: "s".into(),
            base: 1.0,
            periods: vec![Period {
                days: vec!["monday".into()],
                from: "25:00".into(),
                to: "06:00".into(),
                value: 0.0,
            }],
            away: vec![Away {
                from: "02-30".into(),
                to: "03-01".into(),
                value: 0.0,
            }],
        };
        let e = WeeklySchedule::new(&s).unwrap_err();
        let places: Vec<&str> = e.iter().map(|(p, _)| p.as_str()).collect();
        assert_eq!(
            places,
            vec!["periods[0].days[0]", "periods[0].from", "away[0].from"]
        );
    }
}
