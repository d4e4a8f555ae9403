//! Exact integration of linear RC networks.
//!
//! A building is a linear system `C ẋ = −K x + U u` ([`RcSystem`]): node temperatures `x`
//! (°C), capacitances `C` (J/K), conductances `K` (W/K), inputs `u` that are boundary
//! temperatures (°C, linear between samples) or heat flows (W, held over a step). For such
//! inputs one step `h` is solved exactly by the matrix exponential:
//!
//! ```text
//! x_{k+1} = Φ x_k + Γ₀ u_k + Γ₁ (u_{k+1} − u_k),    Φ = e^{hA},  A = −C⁻¹K
//! ```
//!
//! - [`Discretization`] computes `Φ, Γ₀, Γ₁` and the mean-over-step matrices by one of two
//!   [`Route`]s: a block-matrix exponential (Van Loan 1978, with our own Padé scaling and
//!   squaring, `expm.rs`) or the symmetric eigen-decomposition of `C^{-1/2} K C^{-1/2}`.
//!   The two are independent and cross-checked in the tests.
//! - [`Stepper`] marches it without allocating and evaluates [`Readout`]s both at the end of
//!   each step and as exact means over the step (for energy ledgers).
//! - [`ControlChannel`] and [`Stepper::step_thermostat`] add capacity-limited thermostats
//!   solved jointly for all zones; [`OnOffThermostat`] switches with a dead band.
//! - [`steady_state`] solves `K x = U u`.
//! - [`TruncatedModal`] drops the modes faster than a [`Truncation`] threshold and keeps
//!   their static response (exact steady state, stated error bound).
//!
//! The solver knows nothing about walls, files or weather: only matrices.
//!
//! ```
//! use dwell_solver::{Discretization, InputKind, RcSystem, Readout, Route, Stepper};
//! use nalgebra::DMatrix;
//!
//! // One node, H = 200 W/K to outdoors, C = 20 MJ/K, a heater.
//! let sys = RcSystem::new(
//!     vec![20e6],
//!     DMatrix::from_element(1, 1, 200.0),
//!     DMatrix::from_row_slice(1, 2, &[200.0, 1.0]),
//!     vec![InputKind::Temperature, InputKind::HeatFlow],
//! )?;
//! let disc = Discretization::new(&sys, 3600.0, Route::Modal)?;
//! let mut stepper = Stepper::new(&disc, &Readout::nodes(&[0], 1, 2), &Readout::empty(1, 2))?;
//! stepper.set_state(&[20.0]);
//! for _ in 0..8 {
//!     stepper.step(&[0.0, 0.0], &[0.0, 0.0]);
//! }
//! assert!((stepper.instant()[0] - 14.99523).abs() < 1e-5);
//! # Ok::<(), dwell_solver::SolverError>(())
//! ```
#![deny(missing_docs)]

mod block;
mod control;
mod dc;
mod discretization;
mod eigen;
mod error;
mod expm;
mod lcp;
mod modal;
mod onoff;
mod packed;
mod phi;
mod readout;
mod steady;
mod stepper;
mod system;
mod tear;
#[cfg(test)]
mod testnets;
mod truncation;
mod work;

pub use control::ControlChannel;
pub use discretization::{Discretization, Route, MAX_STEP_S, MIN_STEP_S};
pub use error::SolverError;
pub use expm::expm;
pub use onoff::OnOffThermostat;
pub use readout::Readout;
pub use steady::{cholesky_solve, steady_state, CHOLESKY_FROM};
pub use stepper::{Stepper, RUN_BLOCK};
pub use system::{InputKind, RcSystem};
pub use truncation::{ErrorBound, TruncatedModal, Truncation};
