//! End-to-end tests of the `dwell` binary, compiled as one test binary.

mod calibrate;
mod catalogue;
mod charts;
mod model;
mod simulate;
mod studies;
mod sweep;
mod util;
mod weather;
