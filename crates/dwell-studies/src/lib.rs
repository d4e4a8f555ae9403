//! The studies users come for, as library functions: each takes a compiled house, weather and
//! options, runs the exact simulator and returns plain data that `dwell-report` writes.
//!
//! * [`simulate`](simulate::simulate): a period under a chosen control, with hourly results,
//!   an exact energy ledger and comfort figures.
//!
//! Studies never read or write files; they know the model and the weather but not the command
//! line.
#![deny(missing_docs)]

pub mod comfort;
pub mod forcing;
pub mod simulate;

pub use simulate::{simulate, Control, SimOptions, SimResult, StudyError};

/// The caution printed with every output that sizes equipment or judges comfort.
pub const CAUTION: &str = "Estimates for planning only: confirm sizes and comfort under local codes and with a licensed professional before buying or installing equipment.";
pub mod compare;
pub mod design_weather;
pub mod fastpath;
#[cfg(test)]
mod monotone_tests;
pub mod outage;
pub mod setback;
pub mod size;
pub mod steady_load;
pub mod sweep;
pub mod trace;
pub mod zone_schedules;
