//! Errors of the solver.

/// What can go wrong when discretising or stepping a system.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum SolverError {
    /// Matrices of the wrong shape or with invalid values.
    #[error("invalid RC system: {0}")]
    Shape(String),
    /// A time step outside the allowed range.
    #[error("time step {0} s is not allowed: {1}")]
    Step(f64, String),
    /// A numerical routine failed (for example an eigen-decomposition did not converge).
    #[error("numerical failure: {0}")]
    Numerical(String),
    /// A steady state was asked of a system with no path to a boundary.
    #[error("no steady state: {0}")]
    Singular(String),
    /// An option out of its allowed range (for example a truncation threshold).
    #[error("invalid option: {0}")]
    Option(String),
    /// Thermostat channels or parameters that cannot be used.
    #[error("invalid control: {0}")]
    Control(String),
}
