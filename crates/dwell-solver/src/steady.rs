//! The steady state for constant inputs.

use nalgebra::DVector;

use crate::{RcSystem, SolverError};

/// Smallest ratio of the smallest to the largest pivot of `K`'s LU factorisation that is
/// still taken as non-singular.
const PIVOT_RATIO: f64 = 1e-13;

/// Node temperatures (°C) at steady state for constant inputs `u`: the solution of
/// `K x = U u`.
///
/// Errors with [`SolverError::Singular`] when `K` is singular, which happens exactly when
/// some group of nodes has no conductance path to a boundary temperature (its temperature
/// then drifts without bound under a net heat input and has no steady state). Detected by a
/// full-pivoting LU whose smallest pivot is below `1e-13` of the largest.
pub fn steady_state(sys: &RcSystem, u: &[f64]) -> Result<Vec<f64>, SolverError> {
    if u.len() != sys.inputs() {
        return Err(SolverError::Shape(format!(
            "{} inputs given, the system has {}",
            u.len(),
            sys.inputs()
        )));
    }
    let rhs = &sys.input * DVector::from_column_slice(u);
    let lu = sys.conductance.clone().full_piv_lu();
    let pivots = lu.u().diagonal().map(f64::abs);
    let (lo, hi) = (pivots.min(), pivots.max());
    if lo.is_nan() || lo <= PIVOT_RATIO * hi {
        return Err(SolverError::Singular(format!(
            "the conductance matrix is singular (pivot ratio {:.1e}): some nodes have no path to a boundary temperature",
            lo / hi
        )));
    }
    let x = lu.solve(&rhs).ok_or_else(|| {
        SolverError::Singular("the conductance matrix could not be solved".into())
    })?;
    Ok(x.as_slice().to_vec())
}
