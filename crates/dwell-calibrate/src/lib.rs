//! Grey-box calibration: learn a house's heat-loss coefficient, time constants and solar
//! aperture from measured indoor temperature, outdoor temperature, heating power and
//! (optionally) solar irradiance.
//!
//! * [`read_measured`] / [`parse_measured`] read the data ([`data`] describes the format;
//!   stamps and error style as weather files).
//! * [`structure`] defines the 1R1C, 2R2C and 3R3C structures ([`Order`], [`RcParams`]).
//! * [`predict()`] simulates a candidate exactly with `dwell_solver` (`RcSystem` →
//!   `Discretization` → `Stepper`): no Euler step anywhere, so the fitted parameters do not
//!   absorb a discretisation error.
//! * [`calibrate`] fits by Levenberg–Marquardt ([`lm`], our own on nalgebra — why, there) and
//!   reports [`Calibration`]: HLC with a 95 % interval from the Jacobian at the optimum, time
//!   constants, aperture, residual statistics and what the data cannot identify.
//! * [`model_file()`] writes the fit as a dwell model file; [`synth`] invents test data from
//!   known parameters with seeded noise.
//!
//! ```
//! use dwell_calibrate::{calibrate, synth, FitOptions, Layout, Order};
//! let lay = Layout::new(Order::One, false);
//! let truth = lay.params(&[150f64.ln(), 15e6f64.ln(), 0.0]);
//! let spec = synth::SynthSpec { days: 10.0, solar: false, ..Default::default() };
//! let (data, _) = synth::synth_measured(&truth, 20.0, &spec).unwrap();
//! let cal = calibrate(&data, Order::One, &FitOptions::default()).unwrap();
//! assert!((cal.hlc_w_k.value / 150.0 - 1.0).abs() < 0.05);
//! ```
#![deny(missing_docs)]

pub mod data;
mod error;
pub mod fit;
pub mod lm;
pub mod model_file;
pub mod predict;
pub mod stats;
pub mod structure;
pub mod synth;

pub use data::{parse_measured, read_measured, MeasuredData};
pub use error::{CalibrateError, MAX_REPORTED};
pub use fit::{calibrate, Calibration, Estimate, FitOptions};
pub use model_file::{model_file, ModelFileOptions};
pub use predict::predict;
pub use structure::{Layout, Order, RcParams};
