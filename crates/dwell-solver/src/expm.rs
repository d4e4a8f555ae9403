//! Matrix exponential by scaling and squaring with Padé approximants.
//!
//! `e^A ≈ (r_m(A / 2^s))^(2^s)`, where `r_m = q_m(A)⁻¹ p_m(A)` is the diagonal Padé
//! approximant of degree `m ∈ {3, 5, 7, 9, 13}`. The degree and the number of squarings `s`
//! are chosen from the 1-norm so that the backward error is below the unit round-off
//! `2⁻⁵³` (the thresholds `θ_m` of the reference, table 2.3).
//!
//! Accuracy: backward stable in exact arithmetic of the squarings; for the Metzler
//! (non-negative off-diagonal) matrices of RC networks the forward error is a small multiple
//! of `u·‖A‖` per squaring. Cost: at most 6 matrix products plus one LU solve for `m = 13`,
//! and `s` more products for the squarings: `(6 + s + 4/3)·n³` flops.
//!
//! nalgebra 0.34 also ships `Matrix::exp` (a port of the Al-Mohy & Higham 2009 algorithm
//! used by `scipy.linalg.expm`); a unit test below compares the two. This module is kept so
//! that the algorithm and its choices are stated here and do not move with a dependency.
//!
//! ## Reference
//!
//! N. J. Higham, "The scaling and squaring method for the matrix exponential revisited",
//! SIAM J. Matrix Anal. Appl. 26(4), 1179–1193 (2005), algorithm 2.3.

use nalgebra::DMatrix;

/// `θ_m` for `m = 3, 5, 7, 9, 13` (Higham 2005, table 2.3, double precision).
const THETA: [(usize, f64); 5] = [
    (3, 1.495_585_217_958_292e-2),
    (5, 2.539_398_330_063_23e-1),
    (7, 9.504_178_996_162_932e-1),
    (9, 2.097_847_961_257_068),
    (13, 5.371_920_351_148_152),
];

const B3: [f64; 4] = [120.0, 60.0, 12.0, 1.0];
const B5: [f64; 6] = [30240.0, 15120.0, 3360.0, 420.0, 30.0, 1.0];
const B7: [f64; 8] = [
    17_297_280.0,
    8_648_640.0,
    1_995_840.0,
    277_200.0,
    25_200.0,
    1512.0,
    56.0,
    1.0,
];
const B9: [f64; 10] = [
    17_643_225_600.0,
    8_821_612_800.0,
    2_075_673_600.0,
    302_702_400.0,
    30_270_240.0,
    2_162_160.0,
    110_880.0,
    3960.0,
    90.0,
    1.0,
];
const B13: [f64; 14] = [
    64_764_752_532_480_000.0,
    32_382_376_266_240_000.0,
    7_771_770_303_897_600.0,
    1_187_353_796_428_800.0,
    129_060_195_264_000.0,
    10_559_470_521_600.0,
    670_442_572_800.0,
    33_522_128_640.0,
    1_323_241_920.0,
    40_840_800.0,
    960_960.0,
    16_380.0,
    182.0,
    1.0,
];

/// The 1-norm (largest absolute column sum).
pub(crate) fn norm1(a: &DMatrix<f64>) -> f64 {
    a.column_iter()
        .map(|c| c.iter().map(|v| v.abs()).sum::<f64>())
        .fold(0.0, f64::max)
}

/// `e^A` for a square matrix with finite entries (Higham 2005, algorithm 2.3).
///
/// Returns `None` only if the Padé denominator is singular, which cannot happen for finite
/// input within the `θ_m` bounds (Higham 2005, §2) but is reported rather than assumed.
pub fn expm(a: &DMatrix<f64>) -> Option<DMatrix<f64>> {
    assert!(a.is_square(), "expm needs a square matrix");
    let n = a.nrows();
    let norm = norm1(a);
    for &(m, theta) in &THETA[..4] {
        if norm <= theta {
            let b: &[f64] = match m {
                3 => &B3,
                5 => &B5,
                7 => &B7,
                _ => &B9,
            };
            return pade_low(a, b);
        }
    }
    let theta13 = THETA[4].1;
    let s = (norm / theta13).log2().ceil().max(0.0) as i32;
    let scaled = a * 2f64.powi(-s);
    let mut x = pade13(&scaled)?;
    for _ in 0..s {
        x = &x * &x;
    }
    debug_assert_eq!(x.nrows(), n);
    Some(x)
}

/// `r_m(A)` for `m ≤ 9`: `U = A Σ b_{2k+1} A^{2k}`, `V = Σ b_{2k} A^{2k}`.
fn pade_low(a: &DMatrix<f64>, b: &[f64]) -> Option<DMatrix<f64>> {
    let n = a.nrows();
    let a2 = a * a;
    let mut power = DMatrix::<f64>::identity(n, n);
    let mut u_inner = DMatrix::<f64>::zeros(n, n);
    let mut v = DMatrix::<f64>::zeros(n, n);
    for k in 0..b.len() / 2 {
        if k > 0 {
            power = &power * &a2;
        }
        v += &power * b[2 * k];
        u_inner += &power * b[2 * k + 1];
    }
    let u = a * u_inner;
    solve_pq(u, v)
}

/// `r_13(A)` evaluated with the 6-product scheme of Higham 2005, eq. (2.4)–(2.5).
fn pade13(a: &DMatrix<f64>) -> Option<DMatrix<f64>> {
    let n = a.nrows();
    let b = &B13;
    let id = DMatrix::<f64>::identity(n, n);
    let a2 = a * a;
    let a4 = &a2 * &a2;
    let a6 = &a4 * &a2;
    let u_tail = &a6 * (&a6 * b[13] + &a4 * b[11] + &a2 * b[9]);
    let u = a * (u_tail + &a6 * b[7] + &a4 * b[5] + &a2 * b[3] + &id * b[1]);
    let v_tail = &a6 * (&a6 * b[12] + &a4 * b[10] + &a2 * b[8]);
    let v = v_tail + &a6 * b[6] + &a4 * b[4] + &a2 * b[2] + &id * b[0];
    solve_pq(u, v)
}

/// Solves `(V − U) X = V + U`.
fn solve_pq(u: DMatrix<f64>, v: DMatrix<f64>) -> Option<DMatrix<f64>> {
    let q = &v - &u;
    let p = v + u;
    q.lu().solve(&p)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn max_rel_diff(a: &DMatrix<f64>, b: &DMatrix<f64>) -> f64 {
        let scale = a.amax().max(b.amax()).max(f64::MIN_POSITIVE);
        (a - b).amax() / scale
    }

    #[test]
    fn exponential_of_zero_is_identity() {
        let z = DMatrix::<f64>::zeros(4, 4);
        assert_eq!(expm(&z).unwrap(), DMatrix::identity(4, 4));
    }

    #[test]
    fn rotation_generator_gives_cos_sin_in_every_pade_branch() {
        // Closed form: exp([[0, −t], [t, 0]]) = [[cos t, −sin t], [sin t, cos t]].
        // The values of t hit the m = 3, 5, 7, 9 and 13 (with squaring) branches.
        for t in [1e-3, 0.2, 0.9, 2.0, 5.0, 40.0] {
            let a = DMatrix::from_row_slice(2, 2, &[0.0, -t, t, 0.0]);
            let e = expm(&a).unwrap();
            let want = DMatrix::from_row_slice(2, 2, &[t.cos(), -t.sin(), t.sin(), t.cos()]);
            assert!(
                max_rel_diff(&e, &want) < 1e-13 * t.max(1.0),
                "t = {t}: {e} vs {want}"
            );
        }
    }

    #[test]
    fn jordan_block_gives_exact_polynomial_terms() {
        // exp(t·[[λ, 1], [0, λ]]) = e^{λt}·[[1, t], [0, 1]] (closed form).
        let (lam, t) = (-3.0_f64, 2.5_f64);
        let a = DMatrix::from_row_slice(2, 2, &[lam * t, t, 0.0, lam * t]);
        let e = expm(&a).unwrap();
        let f = (lam * t).exp();
        let want = DMatrix::from_row_slice(2, 2, &[f, f * t, 0.0, f]);
        assert!(max_rel_diff(&e, &want) < 1e-14, "{e} vs {want}");
    }

    #[test]
    fn agrees_with_nalgebra_exp_on_a_stiff_metzler_matrix() {
        // nalgebra's `exp` follows Al-Mohy & Higham (2009); an independent implementation.
        let a =
            DMatrix::from_row_slice(3, 3, &[-50.0, 49.0, 0.0, 0.5, -1.0, 0.5, 0.0, 1e-3, -2e-3]);
        let ours = expm(&a).unwrap();
        let theirs = a.clone().exp();
        assert!(max_rel_diff(&ours, &theirs) < 1e-13, "{ours} vs {theirs}");
    }
}
