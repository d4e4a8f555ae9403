//! End-to-end tests of the `dwell` binary, compiled as one test binary.

mod charts;
mod catalogue;
mod model;
mod simulate;
mod util;
mod weather;
mod studies;
mod calibrate;
mod sweep;
