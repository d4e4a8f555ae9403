//! One module per subcommand: argument struct and `run`.

pub mod chart;
pub mod check;
pub mod model_io;
pub mod network;
pub mod schema;
pub mod simulate;
pub mod weather;
pub mod size;
pub mod setback;
pub mod outage;
pub mod period;
pub mod compare;
pub mod calibrate;
pub mod sweep;
