//! One module per subcommand: argument struct and `run`.

pub mod check;
pub mod model_io;
pub mod network;
pub mod schema;
pub mod simulate;
pub mod weather;
