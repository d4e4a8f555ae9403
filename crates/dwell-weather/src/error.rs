//! The errors of reading, validating and writing weather.
//!
//! Every variant that points into a file carries the file name (`source_name`) and the
//! 1-based line number, and its message says what to change. Validation collects every
//! problem it finds (up to [`MAX_REPORTED`]) and returns them together as
//! [`WeatherError::Several`].

use std::path::PathBuf;

/// At most this many problems are collected before validation stops looking.
pub const MAX_REPORTED: usize = 20;

/// What went wrong with a weather file or a weather request.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum WeatherError {
    /// The file could not be read or written.
    #[error("{path}: cannot {action}: {source}")]
    Io {
        /// The file.
        path: PathBuf,
        /// "read" or "write".
        action: &'static str,
        /// The operating system's error.
        #[source]
        source: std::io::Error,
    },
    /// The CSV structure is broken (a row with the wrong number of fields, bad UTF-8).
    #[error("{source_name}:{line}: {message}; every row must have one field per header column")]
    Csv {
        /// File name or description.
        source_name: String,
        /// 1-based line number.
        line: usize,
        /// What the CSV reader reported.
        message: String,
    },
    /// The file holds no data rows.
    #[error(
        "{source_name}: no data rows; a weather file needs a header line and one row per hour"
    )]
    Empty {
        /// File name or description.
        source_name: String,
    },
    /// A required column (time, air temperature) is not in the header.
    #[error("{source_name}:{line}: no column `{column}` in the header (found: {found}); {hint}")]
    MissingColumn {
        /// File name or description.
        source_name: String,
        /// Line of the header.
        line: usize,
        /// The column that was looked for.
        column: String,
        /// The header's columns, comma-separated.
        found: String,
        /// What to do.
        hint: String,
    },
    /// A header column is not one of the known columns and no column mapping was given.
    #[error(
        "{source_name}:{line}: unknown column `{column}`{suggestion}; the known columns are \
         time, air_c, ghi_w_m2, dhi_w_m2, dni_w_m2, ground_c, wind_m_s (map other names with \
         --time-col, --air-col, … which also ignores the remaining columns)"
    )]
    UnknownColumn {
        /// File name or description.
        source_name: String,
        /// Line of the header.
        line: usize,
        /// The unknown column.
        column: String,
        /// ", did you mean `x`?" or empty.
        suggestion: String,
    },
    /// A time stamp could not be read.
    #[error(
        "{source_name}:{line}: bad time stamp `{value}` in column `{column}`: {reason}; write \
         ISO 8601 with an explicit offset, e.g. 2025-01-01T01:00+01:00"
    )]
    BadTimestamp {
        /// File name or description.
        source_name: String,
        /// 1-based line number.
        line: usize,
        /// The time column's name.
        column: String,
        /// The text found.
        value: String,
        /// Why it was rejected.
        reason: String,
    },
    /// The offset from UTC changes inside the file (a daylight-saving jump).
    #[error(
        "{source_name}:{line}: the UTC offset changes from {from} to {to} (a daylight-saving \
         jump?); a weather file keeps one offset all year: write every stamp in standard time"
    )]
    OffsetChange {
        /// File name or description.
        source_name: String,
        /// 1-based line number of the first stamp with the new offset.
        line: usize,
        /// Offset before, e.g. "+01:00".
        from: String,
        /// Offset after.
        to: String,
    },
    /// Two rows carry the same instant.
    #[error(
        "{source_name}:{line}: time stamp {stamp} duplicates line {first_line}; remove one of \
         the two rows"
    )]
    Duplicate {
        /// File name or description.
        source_name: String,
        /// 1-based line number of the second occurrence.
        line: usize,
        /// The stamp.
        stamp: String,
        /// Line of the first occurrence.
        first_line: usize,
    },
    /// A stamp is earlier than the one before it.
    #[error(
        "{source_name}:{line}: time stamp {stamp} is earlier than {previous} on the line \
         before; rows must be in time order"
    )]
    OutOfOrder {
        /// File name or description.
        source_name: String,
        /// 1-based line number.
        line: usize,
        /// The stamp.
        stamp: String,
        /// The stamp on the row before.
        previous: String,
    },
    /// Hours are missing between two rows.
    #[error(
        "{source_name}:{line}: {missing} hour(s) missing between {previous} and {stamp}{hint}"
    )]
    MissingHours {
        /// File name or description.
        source_name: String,
        /// 1-based line number of the row after the gap.
        line: usize,
        /// Number of missing hourly rows.
        missing: usize,
        /// Stamp before the gap.
        previous: String,
        /// Stamp after the gap.
        stamp: String,
        /// What to do.
        hint: String,
    },
    /// Two consecutive stamps are not a whole number of hours apart.
    #[error(
        "{source_name}:{line}: time stamp {stamp} is {minutes} min after {previous}; weather \
         must be hourly (resample the file to whole hours)"
    )]
    NotHourly {
        /// File name or description.
        source_name: String,
        /// 1-based line number.
        line: usize,
        /// The stamp.
        stamp: String,
        /// The stamp before.
        previous: String,
        /// Minutes between the two.
        minutes: i64,
    },
    /// A cell is empty or holds NaN.
    #[error("{source_name}:{line}: column `{column}` is {what}; {hint}")]
    MissingValue {
        /// File name or description.
        source_name: String,
        /// 1-based line number.
        line: usize,
        /// Column name.
        column: String,
        /// "empty" or "NaN".
        what: String,
        /// What to do.
        hint: String,
    },
    /// A cell is not a number.
    #[error("{source_name}:{line}: column `{column}` holds `{value}`, which is not a number")]
    BadNumber {
        /// File name or description.
        source_name: String,
        /// 1-based line number.
        line: usize,
        /// Column name.
        column: String,
        /// The text found.
        value: String,
    },
    /// A value lies outside its physical bounds (after unit conversion).
    #[error(
        "{source_name}:{line}: column `{column}` = {value} {unit} is outside the physical \
         bounds {min} … {max} {unit}{hint}"
    )]
    OutOfBounds {
        /// File name or description.
        source_name: String,
        /// 1-based line number.
        line: usize,
        /// Column name.
        column: String,
        /// The value, converted to SI/°C.
        value: f64,
        /// Lower bound.
        min: f64,
        /// Upper bound.
        max: f64,
        /// Unit of value and bounds.
        unit: &'static str,
        /// A hint about units, or empty.
        hint: String,
    },
    /// Diffuse horizontal irradiance exceeds global horizontal irradiance.
    #[error(
        "{source_name}:{line}: diffuse horizontal {dhi} W/m² is above global horizontal {ghi} \
         W/m² (by more than {tolerance} W/m²); check that the two columns are not swapped"
    )]
    DiffuseAboveGlobal {
        /// File name or description.
        source_name: String,
        /// 1-based line number.
        line: usize,
        /// Diffuse horizontal (W/m²).
        dhi: f64,
        /// Global horizontal (W/m²).
        ghi: f64,
        /// Allowed excess for rounding (W/m²).
        tolerance: f64,
    },
    /// The file does not hold exactly one year of hours when one was required.
    #[error("{source_name}: {rows} hourly rows; a year of weather has 8760 or 8784 rows")]
    NotAYear {
        /// File name or description.
        source_name: String,
        /// Number of rows found.
        rows: usize,
    },
    /// An option or parameter is out of its allowed range.
    #[error("{name} = {value} is outside {range}{hint}")]
    BadParameter {
        /// The parameter's name as the user typed it.
        name: String,
        /// The value given.
        value: String,
        /// The allowed range, e.g. "-90 … 90 degrees".
        range: String,
        /// Extra advice or empty.
        hint: String,
    },
    /// Several problems were found; each is listed.
    #[error("{source_name}: {} problems (fix them all, then read again):\n  {}", .errors.len(),
        .errors.iter().map(|e| e.to_string()).collect::<Vec<_>>().join("\n  "))]
    Several {
        /// File name or description.
        source_name: String,
        /// The problems, in file order.
        errors: Vec<WeatherError>,
    },
}

impl WeatherError {
    /// Builds the result of a validation pass: `Ok` if `errors` is empty, the single error
    /// if there is one, [`WeatherError::Several`] otherwise.
    pub(crate) fn collect(source_name: &str, mut errors: Vec<WeatherError>) -> Result<(), Self> {
        match errors.len() {
            0 => Ok(()),
            1 => Err(errors.pop().expect("one error")),
            _ => Err(WeatherError::Several {
                source_name: source_name.to_string(),
                errors,
            }),
        }
    }

    /// The 1-based line the problem is on, when it is on one line.
    pub fn line(&self) -> Option<usize> {
        use WeatherError::*;
        match self {
            Csv { line, .. }
            | MissingColumn { line, .. }
            | UnknownColumn { line, .. }
            | BadTimestamp { line, .. }
            | OffsetChange { line, .. }
            | Duplicate { line, .. }
            | OutOfOrder { line, .. }
            | MissingHours { line, .. }
            | NotHourly { line, .. }
            | MissingValue { line, .. }
            | BadNumber { line, .. }
            | OutOfBounds { line, .. }
            | DiffuseAboveGlobal { line, .. } => Some(*line),
            _ => None,
        }
    }

    /// The individual problems: the list inside [`WeatherError::Several`], or this error alone.
    pub fn problems(&self) -> Vec<&WeatherError> {
        match self {
            WeatherError::Several { errors, .. } => errors.iter().collect(),
            e => vec![e],
        }
    }

    /// A range check for user-given parameters.
    pub(crate) fn check_range(
        name: &str,
        value: f64,
        min: f64,
        max: f64,
        unit: &str,
    ) -> Result<f64, WeatherError> {
        if value.is_finite() && value >= min && value <= max {
            Ok(value)
        } else {
            Err(WeatherError::BadParameter {
                name: name.to_string(),
                value: value.to_string(),
                range: format!("{min} … {max} {unit}").trim_end().to_string(),
                hint: String::new(),
            })
        }
    }
}
