//! Options shared by the commands that run a period of weather: which weather, which days,
//! which step.

use std::path::PathBuf;

use chrono::NaiveDate;

/// Weather, period and step of a run.
#[derive(clap::Args, Clone, Debug)]
pub struct PeriodArgs {
    /// Weather file; default: the built-in invented climate (see weather-samples/README.md)
    #[arg(long)]
    pub weather: Option<PathBuf>,
    /// First local day, YYYY-MM-DD (default: start of the weather)
    #[arg(long)]
    pub from: Option<NaiveDate>,
    /// Last local day, inclusive, YYYY-MM-DD (default: end of the weather)
    #[arg(long)]
    pub to: Option<NaiveDate>,
    /// Time step in minutes, a divisor of 60
    #[arg(long, default_value_t = 60)]
    pub step: u32,
}
