//! The steady state for constant inputs, and the positive definite solve behind it.
//!
//! Below [`CHOLESKY_FROM`] unknowns the solve is nalgebra's full-pivoting LU (robust, and
//! what every example house has always used); from [`CHOLESKY_FROM`] up it is faer's blocked
//! Cholesky factorisation, `n³/3` flops at the speed of matrix products, where the
//! unblocked full-pivoting LU (`2n³/3` flops, one column at a time, and a search of the
//! whole remaining matrix for each pivot) took seconds at 2,000 states. A conductance matrix
//! with every node on a path to a boundary is symmetric positive definite (a weighted graph
//! Laplacian plus a non-negative diagonal that is positive on at least one node of each
//! connected part), so Cholesky applies; Golub & Van Loan, *Matrix Computations*, 4th ed.,
//! §4.2 (Cholesky, and its stability without pivoting).

use faer::dyn_stack::{MemBuffer, MemStack};
use faer::linalg::cholesky::llt::factor::{
    cholesky_in_place, cholesky_in_place_scratch, LltRegularization,
};
use faer::linalg::cholesky::llt::solve::{solve_in_place, solve_in_place_scratch};
use faer::{MatMut, MatRef, Par};
use nalgebra::{DMatrix, DVector};

use crate::{RcSystem, SolverError};

/// Smallest ratio of the smallest to the largest pivot of `K`'s LU factorisation that is
/// still taken as non-singular (for Cholesky, of the pivots `L_ii²`).
const PIVOT_RATIO: f64 = 1e-13;

/// From this many unknowns up, positive definite solves use a blocked Cholesky
/// factorisation (faer, one thread) instead of nalgebra's full-pivoting LU.
pub const CHOLESKY_FROM: usize = 200;

/// Solves `a x = b` for a symmetric positive definite `a` (its lower triangle is read; `a`
/// is consumed and factorised in place) by faer's blocked Cholesky factorisation, one
/// thread. `None` when `a` is not positive definite to working precision: a pivot `L_ii²`
/// that is not positive, or below `1e-13` of the largest (a group of nodes with no path to
/// a boundary), or a result that is not finite.
pub fn cholesky_solve(mut a: DMatrix<f64>, b: &[f64]) -> Option<Vec<f64>> {
    let n = a.nrows();
    if a.ncols() != n || b.len() != n {
        return None;
    }
    if n == 0 {
        return Some(vec![]);
    }
    let par = Par::Seq;
    let req = cholesky_in_place_scratch::<f64>(n, par, Default::default())
        .or(solve_in_place_scratch::<f64>(n, 1, par));
    let mut buf = MemBuffer::try_new(req).ok()?;
    let stack = MemStack::new(&mut buf);
    let mut l = MatMut::from_column_major_slice_mut(a.as_mut_slice(), n, n);
    cholesky_in_place(
        l.as_mut(),
        LltRegularization::default(),
        par,
        stack,
        Default::default(),
    )
    .ok()?;
    let pivots = (0..n).map(|i| l[(i, i)] * l[(i, i)]);
    let (lo, hi) = pivots.fold((f64::INFINITY, 0.0f64), |(lo, hi), p| {
        (lo.min(p), hi.max(p))
    });
    if lo.is_nan() || lo <= PIVOT_RATIO * hi {
        return None;
    }
    let mut x = b.to_vec();
    solve_in_place(
        MatRef::from_column_major_slice(a.as_slice(), n, n),
        MatMut::from_column_major_slice_mut(&mut x, n, 1),
        par,
        stack,
    );
    x.iter().all(|v| v.is_finite()).then_some(x)
}

/// Node temperatures (°C) at steady state for constant inputs `u`: the solution of
/// `K x = U u`.
///
/// Errors with [`SolverError::Singular`] when `K` is singular, which happens exactly when
/// some group of nodes has no conductance path to a boundary temperature (its temperature
/// then drifts without bound under a net heat input and has no steady state). Detected by a
/// full-pivoting LU whose smallest pivot is below `1e-13` of the largest (from
/// [`CHOLESKY_FROM`] states, a Cholesky factorisation whose smallest pivot `L_ii²` is).
pub fn steady_state(sys: &RcSystem, u: &[f64]) -> Result<Vec<f64>, SolverError> {
    if u.len() != sys.inputs() {
        return Err(SolverError::Shape(format!(
            "{} inputs given, the system has {}",
            u.len(),
            sys.inputs()
        )));
    }
    let rhs = &sys.input * DVector::from_column_slice(u);
    if sys.states() >= CHOLESKY_FROM {
        return cholesky_solve(sys.conductance.clone(), rhs.as_slice()).ok_or_else(|| {
            SolverError::Singular(
                "the conductance matrix is singular (a Cholesky pivot at or below 1e-13 of the largest): some nodes have no path to a boundary temperature".into(),
            )
        });
    }
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::testnets::link;
    use crate::InputKind;

    /// An INVENTED stiff network of `n` states: a chain with every fifth state also linked
    /// ten ahead (conductances 0.5–50 W/K), capacitances irrelevant here, an outdoor input
    /// on state 0 and, unless `floating`, on the last state; with `floating` the last 7
    /// states are joined only to each other (no path to a boundary: `K` is singular).
    fn network(n: usize, floating: bool) -> RcSystem {
        let mut k = DMatrix::<f64>::zeros(n, n);
        let cut = if floating { n - 7 } else { n };
        for i in 0..n - 1 {
            if i + 1 == cut {
                continue;
            }
            link(&mut k, i, i + 1, 0.5 + (i * 37 % 100) as f64 / 2.0);
            if i % 5 == 0 && i + 10 < cut {
                link(&mut k, i, i + 10, 3.0);
            }
        }
        let mut u = DMatrix::<f64>::zeros(n, 1);
        u[(0, 0)] = 4.0;
        if !floating {
            u[(n - 1, 0)] = 2.0;
        }
        for i in 0..n {
            k[(i, i)] += u[(i, 0)];
        }
        RcSystem::new(vec![1e5; n], k, u, vec![InputKind::Temperature]).unwrap()
    }

    #[test]
    fn cholesky_and_lu_give_the_same_steady_state() {
        // Below CHOLESKY_FROM the LU runs, from it Cholesky: on the same 300-state network
        // both are backward stable (Golub & Van Loan §3.4, §4.2), so they agree to the
        // condition number times ε; asked 1e-9 K. With one outdoor input at 10 °C every
        // node is at 10 °C exactly (K·1 = U·1), which both must reproduce to 1e-9 K.
        let sys = network(300, false);
        assert!(sys.states() >= CHOLESKY_FROM);
        let x = steady_state(&sys, &[10.0]).unwrap();
        let lu = sys
            .conductance
            .clone()
            .full_piv_lu()
            .solve(&(&sys.input * DVector::from_element(1, 10.0)))
            .unwrap();
        for (a, b) in x.iter().zip(lu.iter()) {
            assert!(
                (a - b).abs() < 1e-9 && (a - 10.0).abs() < 1e-9,
                "{a} vs {b}"
            );
        }
        // A right-hand side with structure: residual of order ε‖K‖‖x‖.
        let b: Vec<f64> = (0..300).map(|i| ((i * 13) % 17) as f64 - 8.0).collect();
        let x = cholesky_solve(sys.conductance.clone(), &b).unwrap();
        let r = &sys.conductance * DVector::from_column_slice(&x) - DVector::from_column_slice(&b);
        let scale = sys.conductance.amax() * x.iter().fold(0.0f64, |m, v| m.max(v.abs()));
        assert!(r.amax() < 1e-12 * scale, "residual {:e}", r.amax() / scale);
    }

    #[test]
    fn a_floating_group_is_singular_on_both_routes() {
        for n in [60, 300] {
            let sys = network(n, true);
            match steady_state(&sys, &[10.0]) {
                Err(SolverError::Singular(m)) => assert!(m.contains("no path"), "{m}"),
                other => panic!("n={n}: {other:?}"),
            }
        }
    }

    #[test]
    fn cholesky_refuses_what_is_not_positive_definite() {
        assert!(cholesky_solve(
            DMatrix::from_row_slice(2, 2, &[1.0, 2.0, 2.0, 1.0]),
            &[1.0, 1.0]
        )
        .is_none());
        assert!(cholesky_solve(
            DMatrix::from_row_slice(2, 2, &[1.0, 0.0, 0.0, -1.0]),
            &[1.0, 1.0]
        )
        .is_none());
        assert!(cholesky_solve(DMatrix::identity(3, 3), &[1.0, 1.0]).is_none());
        // L = 2I, exact in binary.
        assert_eq!(
            cholesky_solve(DMatrix::identity(2, 2) * 4.0, &[1.0, 4.0]),
            Some(vec![0.25, 1.0])
        );
    }
}
