//! A small box-constrained linear complementarity problem, solved without allocating.
//!
//! Find `f ∈ [0, 1]^q` with `y = M f − r` such that for each free index `i`:
//! `0 < f_i < 1 ⇒ y_i = 0`, `f_i = 0 ⇒ y_i ≥ 0`, `f_i = 1 ⇒ y_i ≤ 0`; indices that are not
//! free are held at 0.
//!
//! Method: projected Gauss–Seidel (PGS), `f_i ← clamp((r_i − Σ_{j≠i} M_ij f_j) / M_ii, 0, 1)`,
//! warm-started, until no component moves by more than [`TOLERANCE`] or [`MAX_SWEEPS`]
//! sweeps; then an exact "polish": with the bounds PGS found held fixed, the interior
//! equations `M_II f_I = r_I − M_IB f_B` are solved by Gaussian elimination with partial
//! pivoting, and accepted if the result stays within the box. PGS converges for any `M`
//! that is symmetric positive definite after scaling its columns by positive numbers (it is
//! then the same iteration as on the scaled problem), and for strictly diagonally dominant
//! `M`; see [`crate::ControlChannel`] for why thermostat problems are of that kind.
//!
//! ## Reference
//!
//! K. G. Murty, *Linear Complementarity, Linear and Nonlinear Programming*, Heldermann
//! (1988), §9.5 (projected SOR/Gauss–Seidel for box-constrained LCPs, convergence for
//! symmetric positive definite matrices).

/// Largest change of any fraction (1) in a sweep at which PGS stops.
pub(crate) const TOLERANCE: f64 = 1e-14;
/// Cap on PGS sweeps.
pub(crate) const MAX_SWEEPS: usize = 500;

/// Scratch space for [`solve`], sized once for `q` unknowns.
#[derive(Clone, Debug)]
pub(crate) struct LcpScratch {
    mat: Vec<f64>,
    rhs: Vec<f64>,
    interior: Vec<usize>,
}

impl LcpScratch {
    pub(crate) fn new(q: usize) -> Self {
        LcpScratch {
            mat: vec![0.0; q * q],
            rhs: vec![0.0; q],
            interior: Vec::with_capacity(q),
        }
    }
}

/// Solves the box LCP for `m` (`q × q`, row-major), `r`, the `free` mask; `f` holds the warm
/// start on entry and the solution on exit. Returns the number of PGS sweeps.
pub(crate) fn solve(
    m: &[f64],
    r: &[f64],
    free: &[bool],
    f: &mut [f64],
    scratch: &mut LcpScratch,
) -> usize {
    let q = r.len();
    for i in 0..q {
        if !free[i] {
            f[i] = 0.0;
        } else {
            f[i] = f[i].clamp(0.0, 1.0);
        }
    }
    let mut sweeps = 0;
    while sweeps < MAX_SWEEPS {
        sweeps += 1;
        let mut moved = 0.0_f64;
        for i in 0..q {
            if !free[i] {
                continue;
            }
            let row = &m[i * q..(i + 1) * q];
            let mut rest = r[i];
            for j in 0..q {
                if j != i {
                    rest -= row[j] * f[j];
                }
            }
            let new = (rest / row[i]).clamp(0.0, 1.0);
            moved = moved.max((new - f[i]).abs());
            f[i] = new;
        }
        if moved <= TOLERANCE {
            break;
        }
    }
    polish(m, r, free, f, scratch);
    sweeps
}

/// Exact solve of the interior equations with the bounds held; keeps `f` if it fails.
fn polish(m: &[f64], r: &[f64], free: &[bool], f: &mut [f64], s: &mut LcpScratch) {
    let q = r.len();
    let edge = 1e-12;
    s.interior.clear();
    for i in 0..q {
        if free[i] && f[i] > edge && f[i] < 1.0 - edge {
            s.interior.push(i);
        }
    }
    let k = s.interior.len();
    if k == 0 {
        return;
    }
    for (a, &i) in s.interior.iter().enumerate() {
        let mut rhs = r[i];
        for j in 0..q {
            if !s.interior.contains(&j) {
                rhs -= m[i * q + j] * f[j];
            }
        }
        s.rhs[a] = rhs;
        for (b, &j) in s.interior.iter().enumerate() {
            s.mat[a * k + b] = m[i * q + j];
        }
    }
    if !gauss_solve(&mut s.mat[..k * k], &mut s.rhs[..k], k) {
        return;
    }
    if s.rhs[..k]
        .iter()
        .all(|v| v.is_finite() && (-1e-9..=1.0 + 1e-9).contains(v))
    {
        for (a, &i) in s.interior.iter().enumerate() {
            f[i] = s.rhs[a].clamp(0.0, 1.0);
        }
    }
}

/// Gaussian elimination with partial pivoting in place; `b` becomes the solution.
fn gauss_solve(a: &mut [f64], b: &mut [f64], k: usize) -> bool {
    for col in 0..k {
        let (mut piv, mut best) = (col, a[col * k + col].abs());
        for row in col + 1..k {
            if a[row * k + col].abs() > best {
                piv = row;
                best = a[row * k + col].abs();
            }
        }
        if best.is_nan() || best <= 0.0 {
            return false;
        }
        if piv != col {
            for c in 0..k {
                a.swap(col * k + c, piv * k + c);
            }
            b.swap(col, piv);
        }
        for row in col + 1..k {
            let factor = a[row * k + col] / a[col * k + col];
            for c in col..k {
                a[row * k + c] -= factor * a[col * k + c];
            }
            b[row] -= factor * b[col];
        }
    }
    for col in (0..k).rev() {
        let mut v = b[col];
        for c in col + 1..k {
            v -= a[col * k + c] * b[c];
        }
        b[col] = v / a[col * k + col];
    }
    true
}

#[cfg(test)]
mod tests {
    use super::*;

    fn residual_ok(m: &[f64], r: &[f64], f: &[f64], free: &[bool]) {
        let q = r.len();
        for i in 0..q {
            let y: f64 = (0..q).map(|j| m[i * q + j] * f[j]).sum::<f64>() - r[i];
            if !free[i] {
                assert_eq!(f[i], 0.0);
            } else if f[i] <= 0.0 {
                assert!(y >= -1e-12, "i={i}: f=0 but y={y}");
            } else if f[i] >= 1.0 {
                assert!(y <= 1e-12, "i={i}: f=1 but y={y}");
            } else {
                assert!(y.abs() <= 1e-12, "i={i}: interior f={} but y={y}", f[i]);
            }
        }
    }

    #[test]
    fn interior_solution_of_a_coupled_pair_is_the_linear_solve() {
        // [[2, 1], [1, 2]] f = [1.5, 1.5] ⇒ f = [0.5, 0.5] (by hand).
        let m = [2.0, 1.0, 1.0, 2.0];
        let mut f = [0.0; 2];
        solve(
            &m,
            &[1.5, 1.5],
            &[true, true],
            &mut f,
            &mut LcpScratch::new(2),
        );
        assert!(
            (f[0] - 0.5).abs() < 1e-15 && (f[1] - 0.5).abs() < 1e-15,
            "{f:?}"
        );
    }

    #[test]
    fn bounds_are_hit_and_complementarity_holds() {
        let m = [2.0, 0.5, 0.1, 0.4, 3.0, 0.2, 0.1, 0.3, 1.0];
        for r in [
            [5.0, 1.0, -1.0],
            [-1.0, -1.0, -1.0],
            [10.0, 10.0, 10.0],
            [1.0, 1.5, 0.3],
        ] {
            for free in [[true, true, true], [true, false, true]] {
                let mut f = [0.3; 3];
                solve(&m, &r, &free, &mut f, &mut LcpScratch::new(3));
                residual_ok(&m, &r, &f, &free);
            }
        }
    }
}
