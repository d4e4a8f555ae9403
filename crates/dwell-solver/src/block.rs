//! The block route: one exponential of an augmented matrix (Van Loan 1978).
//!
//! With the state `x` (°C), an integrator `r̃` of the state divided by the step, and two
//! input chains `v` (the held input, 1) and `w` (its ramp, 1), the augmented system over
//! one step `h` (s) is
//!
//! ```text
//!        ⎡ r̃ ⎤   ⎡ 0  I   0   0 ⎤ ⎡ r̃ ⎤                   ⎡ ·  Ψ̄   Ψ̄₀  Ψ̄₁ ⎤
//!   h d/dt ⎢ x ⎥ = ⎢ 0  hA  hB  0 ⎥ ⎢ x ⎥,    e^{h M}  =   ⎢ ·  Φ   Γ₀  Γ₁ ⎥
//!        ⎢ v ⎥   ⎢ 0  0   0   D ⎥ ⎢ v ⎥                   ⎢ ·  ·   ·   ·  ⎥
//!        ⎣ w ⎦   ⎣ 0  0   0   0 ⎦ ⎣ w ⎦                   ⎣ ·  ·   ·   ·  ⎦
//! ```
//!
//! where `D` is diagonal with 1 for temperature (first-order-hold) inputs and 0 for heat-flow
//! (zero-order-hold) inputs, so heat-flow columns of `Γ₁` and `Ψ̄₁` come out exactly zero.
//! Reading the blocks off:
//!
//! ```text
//! Φ  = e^{hA}                          Ψ̄  = (1/h) ∫₀ʰ e^{tA} dt            = φ₁(hA)
//! Γ₀ = ∫₀ʰ e^{sA} ds B        = hφ₁(hA)B   Ψ̄₀ = (1/h) ∫₀ʰ ∫₀ᵗ e^{sA} ds dt B = hφ₂(hA)B
//! Γ₁ = (1/h)∫₀ʰ e^{(h−s)A} s ds B = hφ₂(hA)B   Ψ̄₁ = (1/h²) ∫₀ʰ∫₀ᵗ e^{(t−s)A} s ds dt B = hφ₃(hA)B
//! ```
//!
//! so that `x_{k+1} = Φx_k + Γ₀u_k + Γ₁(u_{k+1} − u_k)` and the mean state over the step is
//! `x̄ = Ψ̄x_k + Ψ̄₀u_k + Ψ̄₁(u_{k+1} − u_k)`. No inverse of `A` appears, so a singular `K`
//! (a network with no path to a boundary) is handled. The integrator is scaled by `1/h` so
//! that its coupling block is `I` and does not inflate the norm (and the squarings).
//!
//! Cost: one exponential of order `2n + 2m`.
//!
//! ## Reference
//!
//! C. F. Van Loan, "Computing integrals involving the matrix exponential", IEEE Trans.
//! Automatic Control 23(3), 395–404 (1978).

use nalgebra::DMatrix;

use crate::{expm::expm, InputKind, SolverError};

/// The six matrices of one step, in node coordinates.
pub(crate) struct BlockParts {
    pub phi: DMatrix<f64>,
    pub gamma0: DMatrix<f64>,
    pub gamma1: DMatrix<f64>,
    pub mean_phi: DMatrix<f64>,
    pub mean_gamma0: DMatrix<f64>,
    pub mean_gamma1: DMatrix<f64>,
}

/// Discretises `ẋ = A x + B u` over a step `h` (s) by one block exponential.
pub(crate) fn block_parts(
    a: &DMatrix<f64>,
    b: &DMatrix<f64>,
    kinds: &[InputKind],
    h: f64,
) -> Result<BlockParts, SolverError> {
    let n = a.nrows();
    let m = b.ncols();
    let size = 2 * n + 2 * m;
    let (r0, x0, v0, w0) = (0, n, 2 * n, 2 * n + m);
    let mut big = DMatrix::<f64>::zeros(size, size);
    for i in 0..n {
        big[(r0 + i, x0 + i)] = 1.0;
        for j in 0..n {
            big[(x0 + i, x0 + j)] = h * a[(i, j)];
        }
        for j in 0..m {
            big[(x0 + i, v0 + j)] = h * b[(i, j)];
        }
    }
    for (j, kind) in kinds.iter().enumerate() {
        if *kind == InputKind::Temperature {
            big[(v0 + j, w0 + j)] = 1.0;
        }
    }
    let e = expm(&big).ok_or_else(|| {
        SolverError::Numerical("the Padé denominator of the block exponential is singular".into())
    })?;
    if e.iter().any(|v| !v.is_finite()) {
        return Err(SolverError::Numerical(
            "the block exponential overflowed".into(),
        ));
    }
    Ok(BlockParts {
        phi: e.view((x0, x0), (n, n)).into_owned(),
        gamma0: e.view((x0, v0), (n, m)).into_owned(),
        gamma1: e.view((x0, w0), (n, m)).into_owned(),
        mean_phi: e.view((r0, x0), (n, n)).into_owned(),
        mean_gamma0: e.view((r0, v0), (n, m)).into_owned(),
        mean_gamma1: e.view((r0, w0), (n, m)).into_owned(),
    })
}
