//! The symmetric eigen-decomposition behind the modal route, `S = V Λ Vᵀ`.
//!
//! Three implementations, chosen by size and sparsity:
//!
//! - below [`FAER_FROM_STATES`] states, nalgebra's `SymmetricEigen` (Householder
//!   tridiagonalisation, then implicit symmetric QR; Golub & Van Loan §8.3): cheapest for
//!   small matrices, where the fixed costs of a blocked code dominate;
//! - from [`FAER_FROM_STATES`] states up, faer's algorithms (blocked Householder
//!   tridiagonalisation with level-3 updates, then Cuppen's divide and conquer on the
//!   tridiagonal matrix; Golub & Van Loan §8.4.3): at 2,000 states about 3 s against ~24 s
//!   for nalgebra (wall clock under the same load, docs/performance.md), where nalgebra's
//!   unblocked tridiagonalisation and the rotations of QR applied to `V` dominate. They are
//!   assembled in `dc.rs` from faer's public pieces so that the workspace stays small: `S`
//!   is tridiagonalised in its own storage and the top merges of divide and conquer are done
//!   there without faer's two extra `n × n` matrices (at 2,000 states the decomposition's
//!   peak fell from `S` + `V` + 97 MB to `S`, then `V` + 32 MB). Up to `dc::LEAF` (512)
//!   states the numbers are faer's `self_adjoint_evd`'s, bit for bit (tested);
//! - from [`TEAR_FROM_STATES`] states up, when `S` is sparse and its graph has cheap cuts
//!   (rooms joined by a few walls), divide and conquer on the graph itself (`tear.rs`): the
//!   couplings across each cut are exact rank-one terms merged back as in `dc.rs`, with no
//!   tridiagonal reduction and no back-transformation (the synthetic 200-zone building:
//!   0.50 s against 1.6–1.9 s, docs/performance.md). Where no cut beats the dense route, the
//!   dense route runs.
//!
//! All are backward stable: the computed pairs are exact for some `S + E` with
//! `‖E‖ = O(ε‖S‖)`, so each eigenvalue is within `O(ε‖S‖)` of the exact one (Weyl) and the
//! eigenvectors are orthonormal to `O(nε)`. They are cross-checked in the tests below and
//! in `tear.rs`.
//!
//! faer runs **sequentially** here (`Par::Seq`): the modal route is one `O(n³)` call per
//! discretisation, studies already run discretisations in parallel (one per variant on
//! rayon's pool), and a single thread keeps the result independent of the thread count
//! (with 2 threads the smallest eigenvalue of a 2,000-state test matrix moved in the 12th
//! significant digit, since the blocked products then sum in another order). Two threads
//! (faer's `rayon` feature, `Par::rayon(2)`) were tried at 2,000 states and gave no clear
//! wall-clock gain on the shared two-core machine (docs/performance.md), so they are not
//! built in.
//! faer's products use AVX-512 where the processor has it; the upper vector state is cleared
//! afterwards (`clear_upper_vector_state`) so no SSE code pays for it.
//!
//! The matrices cross the boundary without copies: nalgebra's `DMatrix` is column-major and
//! contiguous, so faer reads `S` and writes `V` through views of the same storage.
//!
//! ## Reference
//!
//! G. H. Golub and C. F. Van Loan, *Matrix Computations*, 4th ed., §8.1 (perturbation),
//! §8.3 (symmetric QR), §8.4.3 (divide and conquer). J. J. M. Cuppen, "A divide and conquer
//! method for the symmetric tridiagonal eigenproblem", Numer. Math. 36, 177–195 (1981).

use faer::diag::DiagMut;
use faer::dyn_stack::{MemBuffer, MemStack};
use faer::linalg::evd::{
    self_adjoint_evd, self_adjoint_evd_scratch, ComputeEigenvectors, SelfAdjointEvdParams,
};
use faer::{MatMut, MatRef, Par, Spec};
use nalgebra::{DMatrix, SymmetricEigen};

use crate::dc::{symmetric_eigen_lean, LEAF};
use crate::tear::{symmetric_eigen_torn, TEAR_FROM_STATES, TEAR_LEAF};
use crate::SolverError;

/// From this many states up, faer's blocked divide-and-conquer solver is used (below it,
/// nalgebra's; the crossover measured on the development machine was 40–60 states).
pub(crate) const FAER_FROM_STATES: usize = 48;

/// Which implementation decomposes `S`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum Backend {
    /// nalgebra `SymmetricEigen` (implicit QR).
    Nalgebra,
    /// faer `self_adjoint_evd` (blocked tridiagonalisation, divide and conquer).
    Faer,
}

impl Backend {
    /// The backend for an `n × n` matrix.
    pub(crate) fn for_states(n: usize) -> Self {
        if n >= FAER_FROM_STATES {
            Backend::Faer
        } else {
            Backend::Nalgebra
        }
    }
}

fn not_converged() -> SolverError {
    SolverError::Numerical("the symmetric eigen-decomposition did not converge".into())
}

/// Eigenvalues `λ` (in no promised order) and orthonormal eigenvectors `V` (columns) of the
/// symmetric `s`; `s` is consumed so its storage can be released before `V` is used.
///
/// From [`TEAR_FROM_STATES`] states up, the network's graph is tried first (`tear.rs`): when
/// `S` is sparse enough to cut cheaply, its divide and conquer runs on the graph itself and
/// the dense tridiagonal reduction is skipped.
pub(crate) fn symmetric_eigen(
    s: DMatrix<f64>,
    backend: Backend,
) -> Result<(Vec<f64>, DMatrix<f64>), SolverError> {
    if backend == Backend::Faer && s.nrows() >= TEAR_FROM_STATES {
        return match symmetric_eigen_torn(s, TEAR_LEAF) {
            Ok(done) => {
                clear_upper_vector_state();
                done
            }
            Err(s) => dense_eigen(s, backend),
        };
    }
    dense_eigen(s, backend)
}

/// [`symmetric_eigen`] without looking at the graph: the dense routes only.
pub(crate) fn dense_eigen(
    s: DMatrix<f64>,
    backend: Backend,
) -> Result<(Vec<f64>, DMatrix<f64>), SolverError> {
    match backend {
        Backend::Nalgebra => {
            let eig = SymmetricEigen::try_new(s, f64::EPSILON, 0).ok_or_else(not_converged)?;
            Ok((eig.eigenvalues.as_slice().to_vec(), eig.eigenvectors))
        }
        Backend::Faer => {
            let done = symmetric_eigen_lean(s, Par::Seq, LEAF);
            clear_upper_vector_state();
            done
        }
    }
}

/// Eigenvalues only (`O(n³)` with a smaller constant; no eigenvectors formed).
pub(crate) fn symmetric_eigenvalues(s: &DMatrix<f64>, backend: Backend) -> Vec<f64> {
    match backend {
        Backend::Nalgebra => s.symmetric_eigenvalues().as_slice().to_vec(),
        Backend::Faer => {
            let mut values = vec![0.0; s.nrows()];
            match faer_evd(s, &mut values, None) {
                Ok(()) => values,
                // Fall back to the other implementation rather than fail a diagnostic.
                Err(_) => s.symmetric_eigenvalues().as_slice().to_vec(),
            }
        }
    }
}

/// faer's `self_adjoint_evd` on views of nalgebra storage (reads the lower triangle of `s`).
fn faer_evd(
    s: &DMatrix<f64>,
    values: &mut [f64],
    vectors: Option<&mut DMatrix<f64>>,
) -> Result<(), SolverError> {
    let n = s.nrows();
    let par = Par::Seq;
    let params: Spec<SelfAdjointEvdParams, f64> = Default::default();
    let compute = if vectors.is_some() {
        ComputeEigenvectors::Yes
    } else {
        ComputeEigenvectors::No
    };
    let mut buf = MemBuffer::try_new(self_adjoint_evd_scratch::<f64>(n, compute, par, params))
        .map_err(|_| {
            SolverError::Numerical(format!(
                "out of memory for the eigen-decomposition workspace of {n} states"
            ))
        })?;
    let stack = MemStack::new(&mut buf);
    let a = MatRef::from_column_major_slice(s.as_slice(), n, n);
    let diag = DiagMut::from_slice_mut(values);
    let u = vectors.map(|v| MatMut::from_column_major_slice_mut(v.as_mut_slice(), n, n));
    let done = self_adjoint_evd(a, diag, u, par, stack, params).map_err(|_| not_converged());
    clear_upper_vector_state();
    done
}

/// Clears the upper halves of the vector registers (`vzeroupper`) where the processor has
/// AVX. faer's matrix products run hand-written AVX-512 kernels (runtime-detected, in the
/// `private-gemm-x86` crate) that return without clearing them; while they are dirty,
/// ordinary SSE code in the same thread (the baseline x86-64 code of the rest of the
/// program) can run several times slower (DESIGN.md's prototype measured 2.7×). In the
/// `building200` example a scalar SSE probe after the decomposition ran equally fast with
/// and without this clear (nalgebra's products, which clear the state on exit, run in
/// between); the clear makes that independent of what the caller runs next.
fn clear_upper_vector_state() {
    #[cfg(target_arch = "x86_64")]
    {
        if std::is_x86_feature_detected!("avx") {
            // SAFETY: AVX is present (checked just above), which is all `zero_upper` needs.
            unsafe { zero_upper() }
        }
    }
}

/// `vzeroupper`: zeroes bits 128 and up of every vector register; no Rust value is held
/// there across a function call, so nothing live is lost.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx")]
unsafe fn zero_upper() {
    core::arch::x86_64::_mm256_zeroupper();
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A stiff symmetric positive semi-definite test matrix: a weighted path graph Laplacian
    /// plus a boundary term at one end, scaled by capacitances spread over 3 decades.
    fn chain(n: usize) -> DMatrix<f64> {
        let c: Vec<f64> = (0..n)
            .map(|i| 10f64.powf(4.0 + 3.0 * ((i * 7) % n) as f64 / n as f64))
            .collect();
        let mut k = DMatrix::<f64>::zeros(n, n);
        for i in 0..n - 1 {
            let g = 1.0 + (i % 5) as f64;
            k[(i, i)] += g;
            k[(i + 1, i + 1)] += g;
            k[(i, i + 1)] -= g;
            k[(i + 1, i)] -= g;
        }
        k[(0, 0)] += 0.5;
        DMatrix::from_fn(n, n, |i, j| k[(i, j)] / (c[i] * c[j]).sqrt())
    }

    fn sorted(mut v: Vec<f64>) -> Vec<f64> {
        v.sort_by(f64::total_cmp);
        v
    }

    /// Residual `‖S V − V Λ‖_max / ‖S‖_max` and orthogonality `‖VᵀV − I‖_max`.
    fn residuals(s: &DMatrix<f64>, l: &[f64], v: &DMatrix<f64>) -> (f64, f64) {
        let lam = DMatrix::from_diagonal(&nalgebra::DVector::from_column_slice(l));
        let r = (s * v - v * lam).amax() / s.amax();
        let n = s.nrows();
        let o = (v.transpose() * v - DMatrix::<f64>::identity(n, n)).amax();
        (r, o)
    }

    #[test]
    fn both_backends_decompose_and_agree() {
        // Backward stability (Golub & Van Loan §8.1): residual and loss of orthogonality of
        // order nε ≈ 1e-14 at n = 100; eigenvalues agree to a few ε‖S‖ (Weyl).
        for n in [1, 2, 7, 47, 48, 100] {
            let s = chain(n);
            let scale = s.amax();
            let (ln, vn) = symmetric_eigen(s.clone(), Backend::Nalgebra).unwrap();
            let (lf, vf) = symmetric_eigen(s.clone(), Backend::Faer).unwrap();
            for (name, l, v) in [("nalgebra", &ln, &vn), ("faer", &lf, &vf)] {
                let (r, o) = residuals(&s, l, v);
                assert!(
                    r < 1e-12 && o < 1e-12,
                    "{name} n={n}: residual {r:e}, orthogonality {o:e}"
                );
            }
            for (a, b) in sorted(ln).iter().zip(sorted(lf)) {
                assert!((a - b).abs() <= 1e-13 * scale, "n={n}: {a} vs {b}");
            }
            let only = sorted(symmetric_eigenvalues(&s, Backend::Faer));
            let with = sorted(symmetric_eigen(s, Backend::Faer).unwrap().0);
            for (a, b) in only.iter().zip(&with) {
                assert!(
                    (a - b).abs() <= 1e-13 * scale,
                    "n={n}: values-only {a} vs {b}"
                );
            }
        }
    }

    #[test]
    fn backend_switches_at_the_stated_size() {
        assert_eq!(Backend::for_states(FAER_FROM_STATES - 1), Backend::Nalgebra);
        assert_eq!(Backend::for_states(FAER_FROM_STATES), Backend::Faer);
    }
}
