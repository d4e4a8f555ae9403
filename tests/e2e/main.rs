//! End-to-end tests of the `dwell` binary, compiled as one test binary.

mod model;
mod util;
mod weather;
