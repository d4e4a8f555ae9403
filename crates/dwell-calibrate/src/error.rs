//! Errors of reading measured data and of fitting.

/// What went wrong with a measured-data file or a fit.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum CalibrateError {
    /// The file could not be read.
    #[error("{path}: cannot read: {source}; check the path")]
    Io {
        /// The file.
        path: String,
        /// The operating system's error.
        #[source]
        source: std::io::Error,
    },
    /// A problem at a place in the file (line 1-based).
    #[error("{source_name}:{line}: {message}")]
    At {
        /// File name or description.
        source_name: String,
        /// 1-based line number.
        line: usize,
        /// What is wrong and what to do.
        message: String,
    },
    /// Several problems, each on its own line.
    #[error("{source_name}: {} problems:\n{}", .problems.len(), .problems.iter().map(|p| format!("  {p}")).collect::<Vec<_>>().join("\n"))]
    Several {
        /// File name or description.
        source_name: String,
        /// Every problem found (at most [`MAX_REPORTED`]).
        problems: Vec<CalibrateError>,
    },
    /// The data as a whole cannot support a fit.
    #[error("{source_name}: {message}")]
    Data {
        /// File name or description.
        source_name: String,
        /// What is wrong and what to do.
        message: String,
    },
    /// An option is out of range.
    #[error("{0}")]
    Option(String),
    /// The solver refused a candidate model (should not happen for positive parameters).
    #[error("the solver refused a candidate model: {0}")]
    Solver(#[from] dwell_solver::SolverError),
}

/// At most this many problems are collected before reading stops.
pub const MAX_REPORTED: usize = 20;

impl CalibrateError {
    /// Folds collected problems: none → Ok, one → itself, more → [`CalibrateError::Several`].
    pub(crate) fn collect(source_name: &str, mut errors: Vec<CalibrateError>) -> Result<(), Self> {
        match errors.len() {
            0 => Ok(()),
            1 => Err(errors.pop().expect("one")),
            _ => Err(CalibrateError::Several {
                source_name: source_name.to_string(),
                problems: errors,
            }),
        }
    }
}
