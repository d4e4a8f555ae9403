//! One module per subcommand: argument struct and `run`.

pub mod calibrate;
pub mod chart;
pub mod check;
pub mod compare;
pub mod model_io;
pub mod network;
pub mod outage;
pub mod period;
pub mod schema;
pub mod setback;
pub mod simulate;
pub mod size;
pub mod sweep;
pub mod weather;
