//! The modal (symmetric) route.
//!
//! `A = −C⁻¹K = −C^{-1/2} S C^{1/2}` with `S = C^{-1/2} K C^{-1/2}` symmetric positive
//! semi-definite, so `S = V Λ Vᵀ` with orthogonal `V` and real `λ_i ≥ 0` (1/s). In modal
//! coordinates `z = Vᵀ C^{1/2} x` (√(J·K); never shown, only mapped back to nodes) the
//! system decouples into `ż_i = −λ_i z_i + b̃_iᵀ u` with `B̃ = Vᵀ C^{-1/2} U`, and one step `h`
//! is per mode, with `μ = λh`:
//!
//! ```text
//! z_{k+1} = φ₀(−μ) z_k + hφ₁(−μ) b̃ᵀu_k + hφ₂(−μ) b̃ᵀ(u_{k+1} − u_k)
//! z̄       = φ₁(−μ) z_k + hφ₂(−μ) b̃ᵀu_k + hφ₃(−μ) b̃ᵀ(u_{k+1} − u_k)     (mean over the step)
//! ```
//!
//! (the same φ-functions as the block route, evaluated on scalars; see `phi.rs`). Eigenvalues
//! below `4·n·ε·λ_max` in magnitude, including small negative ones from rounding, are set to 0:
//! the symmetric eigensolver's absolute error is of order `ε‖S‖`, and at `λ = 0` the factors are
//! exact (`1, h, h/2, h/6`), so a network without a boundary path still integrates.
//!
//! Cost: one symmetric eigen-decomposition `O(n³)` (`eigen.rs`: nalgebra's implicit QR for
//! small networks, faer's blocked divide and conquer for large ones).
//!
//! ## Reference
//!
//! G. H. Golub and C. F. Van Loan, *Matrix Computations*, 4th ed., §8.1 (symmetric eigenvalue
//! perturbation, Weyl) and §9.3 (functions of symmetric matrices via the spectral decomposition).

use nalgebra::{DMatrix, DVector};

use crate::eigen::{symmetric_eigen, Backend};
use crate::{phi::phi0123, InputKind, RcSystem, SolverError};

/// The decoupled step in modal coordinates.
pub(crate) struct ModalParts {
    /// Decay rates `λ` (1/s), ≥ 0.
    pub lambda: Vec<f64>,
    /// `x = T z`, `T = C^{-1/2} V` (`z = T⁻¹ x` with `T⁻¹ = Vᵀ C^{1/2}`, not stored).
    pub to_nodes: DMatrix<f64>,
    pub decay: DVector<f64>,
    pub gamma0: DMatrix<f64>,
    pub gamma1: DMatrix<f64>,
    pub mean_decay: DVector<f64>,
    pub mean_gamma0: DMatrix<f64>,
    pub mean_gamma1: DMatrix<f64>,
}

/// `S = C^{-1/2} K C^{-1/2}` (1/s).
pub(crate) fn symmetric_rate_matrix(sys: &RcSystem) -> DMatrix<f64> {
    let n = sys.states();
    let k = &sys.conductance;
    let c = &sys.capacitance;
    DMatrix::from_fn(n, n, |i, j| {
        // Symmetrise explicitly so rounding in K's validation tolerance cannot leak in.
        0.5 * (k[(i, j)] + k[(j, i)]) / (c[i] * c[j]).sqrt()
    })
}

/// `S = C^{-1/2} K C^{-1/2}` (1/s) formed in `k`'s storage (the same numbers as
/// [`symmetric_rate_matrix`], without a second `n × n` matrix).
pub(crate) fn symmetric_rate_matrix_in_place(mut k: DMatrix<f64>, c: &[f64]) -> DMatrix<f64> {
    let n = c.len();
    for j in 0..n {
        for i in j..n {
            let v = 0.5 * (k[(i, j)] + k[(j, i)]) / (c[i] * c[j]).sqrt();
            k[(i, j)] = v;
            k[(j, i)] = v;
        }
    }
    k
}

/// Eigenvalues of `S`, clamped as described in the module docs (1/s).
pub(crate) fn clamp_rates(raw: impl Iterator<Item = f64>, n: usize) -> Vec<f64> {
    let raw: Vec<f64> = raw.collect();
    let top = raw.iter().fold(0.0_f64, |a, &b| a.max(b.abs()));
    let floor = 4.0 * n as f64 * f64::EPSILON * top;
    raw.into_iter()
        .map(|l| if l <= floor { 0.0 } else { l })
        .collect()
}

/// The modes of `S`: rates, the basis `T = C^{-1/2} V` and the input projections
/// `B̃ = Vᵀ C^{-1/2} U`.
pub(crate) struct Modes {
    /// Decay rates `λ` (1/s), ≥ 0, clamped as described in the module docs.
    pub lambda: Vec<f64>,
    /// `T = C^{-1/2} V`, `n × n` (node temperature per unit modal coordinate).
    pub to_nodes: DMatrix<f64>,
    /// `B̃ = Vᵀ C^{-1/2} U`, `n × m` (modal rate per unit input).
    pub bt: DMatrix<f64>,
}

/// Decomposes `S` (one `O(n³)` eigen-decomposition, `eigen.rs`).
pub(crate) fn modes(sys: &RcSystem) -> Result<Modes, SolverError> {
    modes_of(symmetric_rate_matrix(sys), sys)
}

/// Decomposes `s`, the `S` of `sys` (consumed: its storage is reused).
pub(crate) fn modes_of(s: DMatrix<f64>, sys: &RcSystem) -> Result<Modes, SolverError> {
    let n = sys.states();
    let m = sys.inputs();
    let (raw, v) = symmetric_eigen(s, Backend::for_states(n))?;
    let lambda = clamp_rates(raw.into_iter(), n);
    let sqrt_c: Vec<f64> = sys.capacitance.iter().map(|c| c.sqrt()).collect();
    // B̃ = Vᵀ C^{-1/2} U
    let scaled_u = DMatrix::from_fn(n, m, |i, j| sys.input[(i, j)] / sqrt_c[i]);
    let bt = v.tr_mul(&scaled_u);
    // T = C^{-1/2} V, in place (no second n × n matrix).
    let mut to_nodes = v;
    for mut col in to_nodes.column_iter_mut() {
        for (t, sc) in col.iter_mut().zip(&sqrt_c) {
            *t /= sc;
        }
    }
    Ok(Modes {
        lambda,
        to_nodes,
        bt,
    })
}

/// The per-mode step coefficients for rates `lambda` (1/s) and input projections `bt`
/// (one row per mode).
pub(crate) fn step_coefficients(
    lambda: Vec<f64>,
    to_nodes: DMatrix<f64>,
    bt: &DMatrix<f64>,
    kinds: &[InputKind],
    h: f64,
) -> ModalParts {
    let (r, m) = (lambda.len(), kinds.len());
    let mut parts = ModalParts {
        lambda,
        to_nodes,
        decay: DVector::zeros(r),
        gamma0: DMatrix::zeros(r, m),
        gamma1: DMatrix::zeros(r, m),
        mean_decay: DVector::zeros(r),
        mean_gamma0: DMatrix::zeros(r, m),
        mean_gamma1: DMatrix::zeros(r, m),
    };
    for i in 0..r {
        let [p0, p1, p2, p3] = phi0123(parts.lambda[i] * h);
        parts.decay[i] = p0;
        parts.mean_decay[i] = p1;
        for j in 0..m {
            let b = bt[(i, j)];
            parts.gamma0[(i, j)] = h * p1 * b;
            parts.mean_gamma0[(i, j)] = h * p2 * b;
            if kinds[j] == InputKind::Temperature {
                parts.gamma1[(i, j)] = h * p2 * b;
                parts.mean_gamma1[(i, j)] = h * p3 * b;
            }
        }
    }
    parts
}

/// The modal step of `sys` over `h`, `s` being its `S` (consumed).
pub(crate) fn modal_parts(
    s: DMatrix<f64>,
    sys: &RcSystem,
    h: f64,
) -> Result<ModalParts, SolverError> {
    let md = modes_of(s, sys)?;
    Ok(step_coefficients(
        md.lambda,
        md.to_nodes,
        &md.bt,
        &sys.input_kinds,
        h,
    ))
}
