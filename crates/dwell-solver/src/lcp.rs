//! A small box-constrained linear complementarity problem, solved without allocating.
//!
//! Find `f ∈ [0, 1]^q` with `y = M f − r` such that for each free index `i`:
//! `0 < f_i < 1 ⇒ y_i = 0`, `f_i = 0 ⇒ y_i ≥ 0`, `f_i = 1 ⇒ y_i ≤ 0`; indices that are not
//! free are held at 0.
//!
//! Method, first: an active-set (principal pivoting) solve. Each index is guessed to be at
//! its lower bound, at its upper bound or interior (from the warm start, i.e. the previous
//! step's answer), the interior equations `M_II f_I = r_I − M_IB f_B` are solved exactly, and
//! the guess is checked: interior values inside `[0, 1]`, `y_i ≥ 0` at the lower bound and
//! `y_i ≤ 0` at the upper. If a condition fails, the worst offender changes side and the
//! solve repeats (at most `2q + 2` times). From one step to the next the active set rarely
//! changes, so this is usually one `q × q` elimination — far cheaper than iterating. For a
//! P-matrix (which these are, see [`crate::ControlChannel`]) the solution is unique, so
//! whatever this finds is the answer; if it does not settle, the robust method below runs.
//!
//! Fallback: projected Gauss–Seidel (PGS), `f_i ← clamp((r_i − Σ_{j≠i} M_ij f_j) / M_ii, 0, 1)`,
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
//! symmetric positive definite matrices) and ch. 4 (principal pivoting methods).

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
    /// Active-set guess per index: below, inside or above the box.
    side: Vec<Side>,
    trial: Vec<f64>,
    /// `M⁻¹`, row-major, when built by [`LcpScratch::with_inverse`]: the answer when every
    /// index is free and strictly inside the box (the usual case of heaters that modulate),
    /// one `q × q` product instead of an elimination.
    inverse: Option<Vec<f64>>,
}

/// Where an index sits in the active-set guess.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Side {
    Low,
    Inside,
    High,
}

impl LcpScratch {
    /// `M⁻¹` (row-major), if kept.
    pub(crate) fn inverse(&self) -> Option<&[f64]> {
        self.inverse.as_deref()
    }

    pub(crate) fn new(q: usize) -> Self {
        LcpScratch {
            mat: vec![0.0; q * q],
            rhs: vec![0.0; q],
            interior: Vec::with_capacity(q),
            side: vec![Side::Low; q],
            trial: vec![0.0; q],
            inverse: None,
        }
    }

    /// As [`LcpScratch::new`], with `M⁻¹` kept for the interior case (none if `M` is
    /// singular to working precision).
    pub(crate) fn with_inverse(m: &[f64], q: usize) -> Self {
        let mut s = Self::new(q);
        let mut inv = vec![0.0; q * q];
        let mut ok = q > 0;
        for col in 0..q {
            s.mat.copy_from_slice(m);
            s.rhs
                .iter_mut()
                .enumerate()
                .for_each(|(i, v)| *v = f64::from(u8::from(i == col)));
            ok &= gauss_solve(&mut s.mat, &mut s.rhs, q) && s.rhs.iter().all(|v| v.is_finite());
            for i in 0..q {
                inv[i * q + col] = s.rhs[i];
            }
        }
        s.inverse = ok.then_some(inv);
        s
    }
}

/// Solves the box LCP for `m` (`q × q`, row-major), `r`, the `free` mask; `f` holds the warm
/// start on entry and the solution on exit. Returns the number of PGS sweeps (0 when the
/// active-set solve settled).
pub(crate) fn solve(
    m: &[f64],
    r: &[f64],
    free: &[bool],
    f: &mut [f64],
    scratch: &mut LcpScratch,
) -> usize {
    let q = r.len();
    if shortcut(r, free, f, scratch) {
        return 0;
    }
    for i in 0..q {
        if !free[i] {
            f[i] = 0.0;
        } else {
            f[i] = f[i].clamp(0.0, 1.0);
        }
    }
    if active_set(m, r, free, f, scratch) {
        return 0;
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

/// The two cases answered without a solve, checked first by [`solve`] (and inlined into the
/// block runs' step loop); `true` with `f` set when one applies:
///
/// - every heater off before (`f = 0`) and wanted off now (`r ≤ 0`, e.g. summer): `f = 0`
///   gives `y = −r ≥ 0` for every index, the solution;
/// - with `M⁻¹` kept, every index free and `M⁻¹ r` inside the box: then `y = 0` everywhere,
///   the solution (unique for these matrices).
#[inline(always)]
pub(crate) fn shortcut(r: &[f64], free: &[bool], f: &mut [f64], scratch: &mut LcpScratch) -> bool {
    let q = r.len();
    if f.iter().all(|&v| v == 0.0) && r.iter().all(|&v| v <= 0.0) {
        return true;
    }
    if let Some(inv) = &scratch.inverse {
        if free.iter().all(|&x| x) {
            let trial = &mut scratch.trial;
            let mut inside = true;
            for i in 0..q {
                let v: f64 = inv[i * q..(i + 1) * q]
                    .iter()
                    .zip(r)
                    .map(|(a, b)| a * b)
                    .sum();
                inside &= (0.0..=1.0).contains(&v);
                trial[i] = v;
            }
            if inside {
                f.copy_from_slice(&trial[..q]);
                return true;
            }
        }
    }
    false
}

/// The active-set solve; `true` (and `f` set) when a guess passed every check.
fn active_set(m: &[f64], r: &[f64], free: &[bool], f: &mut [f64], s: &mut LcpScratch) -> bool {
    let q = r.len();
    let edge = 1e-12;
    for i in 0..q {
        s.side[i] = if !free[i] || f[i] <= edge {
            Side::Low
        } else if f[i] >= 1.0 - edge {
            Side::High
        } else {
            Side::Inside
        };
    }
    for _ in 0..2 * q + 2 {
        // Bounds as guessed, then the interior equations.
        s.interior.clear();
        for i in 0..q {
            s.trial[i] = match s.side[i] {
                Side::Low => 0.0,
                Side::High => 1.0,
                Side::Inside => {
                    s.interior.push(i);
                    0.0
                }
            };
        }
        let k = s.interior.len();
        for (a, &i) in s.interior.iter().enumerate() {
            let mut rhs = r[i];
            for j in 0..q {
                if s.side[j] == Side::High {
                    rhs -= m[i * q + j];
                }
            }
            s.rhs[a] = rhs;
            for (b, &j) in s.interior.iter().enumerate() {
                s.mat[a * k + b] = m[i * q + j];
            }
        }
        if k > 0 && !gauss_solve(&mut s.mat[..k * k], &mut s.rhs[..k], k) {
            return false;
        }
        for (a, &i) in s.interior.iter().enumerate() {
            s.trial[i] = s.rhs[a];
        }
        // Checks; the worst violation (in units of fraction) changes side.
        let mut worst = (0.0, usize::MAX, Side::Inside);
        for i in 0..q {
            if !free[i] {
                continue;
            }
            let v = s.trial[i];
            if !v.is_finite() {
                return false;
            }
            let (excess, to) = match s.side[i] {
                Side::Inside if v < 0.0 => (-v, Side::Low),
                Side::Inside if v > 1.0 => (v - 1.0, Side::High),
                Side::Inside => (0.0, Side::Inside),
                bound => {
                    let row = &m[i * q..(i + 1) * q];
                    let y: f64 = row
                        .iter()
                        .zip(&s.trial[..q])
                        .map(|(a, b)| a * b)
                        .sum::<f64>()
                        - r[i];
                    // Rounding scale of y: the terms that make it up.
                    let scale: f64 = r[i].abs()
                        + row
                            .iter()
                            .zip(&s.trial[..q])
                            .map(|(a, b)| (a * b).abs())
                            .sum::<f64>();
                    let tol = 1e-12 * scale;
                    match bound {
                        Side::Low if y < -tol => (-y / row[i], Side::Inside),
                        Side::High if y > tol => (y / row[i], Side::Inside),
                        _ => (0.0, Side::Inside),
                    }
                }
            };
            if excess > edge && excess > worst.0 {
                worst = (excess, i, to);
            }
        }
        if worst.1 == usize::MAX {
            for i in 0..q {
                f[i] = if free[i] {
                    s.trial[i].clamp(0.0, 1.0)
                } else {
                    0.0
                };
            }
            return true;
        }
        s.side[worst.1] = worst.2;
    }
    false
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

    /// The active-set solve and projected Gauss–Seidel (run alone, to convergence) are two
    /// methods for the same problem, whose solution is unique for these matrices: they must
    /// agree, from cold and warm starts, on seeded random diagonally dominant problems.
    #[test]
    fn active_set_agrees_with_projected_gauss_seidel() {
        let mut seed = 0x2545_f491_4f6c_dd1d_u64;
        let mut next = || {
            seed ^= seed << 13;
            seed ^= seed >> 7;
            seed ^= seed << 17;
            (seed >> 11) as f64 / (1u64 << 53) as f64
        };
        let mut settled = 0;
        for case in 0..400 {
            let q = 1 + case % 6;
            let mut m = vec![0.0; q * q];
            for i in 0..q {
                for j in 0..q {
                    m[i * q + j] = if i == j {
                        2.0 + 3.0 * next()
                    } else {
                        0.3 * next()
                    };
                }
            }
            let r: Vec<f64> = (0..q).map(|_| 6.0 * next() - 2.0).collect();
            let free: Vec<bool> = (0..q).map(|i| i == 0 || next() > 0.2).collect();
            let mut warm: Vec<f64> = (0..q).map(|_| next()).collect();
            let mut s = LcpScratch::new(q);
            let mut by_pgs = warm.clone();
            for fi in by_pgs.iter_mut() {
                *fi = fi.clamp(0.0, 1.0);
            }
            // PGS alone, as in `solve` after the active-set attempt.
            for _ in 0..MAX_SWEEPS {
                let mut moved = 0.0_f64;
                for i in 0..q {
                    if !free[i] {
                        by_pgs[i] = 0.0;
                        continue;
                    }
                    let mut rest = r[i];
                    for j in 0..q {
                        if j != i {
                            rest -= m[i * q + j] * by_pgs[j];
                        }
                    }
                    let new = (rest / m[i * q + i]).clamp(0.0, 1.0);
                    moved = moved.max((new - by_pgs[i]).abs());
                    by_pgs[i] = new;
                }
                if moved <= TOLERANCE {
                    break;
                }
            }
            if active_set(&m, &r, &free, &mut warm, &mut s) {
                settled += 1;
            }
            solve(&m, &r, &free, &mut warm, &mut s);
            residual_ok(&m, &r, &warm, &free);
            for (a, b) in warm.iter().zip(&by_pgs) {
                assert!((a - b).abs() < 1e-12, "case {case}: {warm:?} vs {by_pgs:?}");
            }
        }
        // The active-set solve, not the fallback, answers these (measured: every case).
        assert!(settled >= 390, "active set settled {settled} of 400");
    }

    /// With `M⁻¹` kept (the interior shortcut), the same answers as without, to 1e-12, on
    /// seeded problems of which a good share are interior (so the shortcut is taken).
    #[test]
    fn interior_shortcut_agrees_with_the_general_solve() {
        let mut seed = 0x9e37_79b9_7f4a_7c15_u64;
        let mut next = || {
            seed ^= seed << 13;
            seed ^= seed >> 7;
            seed ^= seed << 17;
            (seed >> 11) as f64 / (1u64 << 53) as f64
        };
        let mut shortcut = 0;
        for case in 0..400 {
            let q = 1 + case % 5;
            let m: Vec<f64> = (0..q * q)
                .map(|k| {
                    if k % (q + 1) == 0 {
                        2.0 + 3.0 * next()
                    } else {
                        0.3 * next()
                    }
                })
                .collect();
            let r: Vec<f64> = (0..q).map(|_| 3.0 * next() - 0.5).collect();
            let free: Vec<bool> = (0..q).map(|_| case % 7 != 0 || next() > 0.3).collect();
            let mut general = vec![0.4; q];
            let mut fast = general.clone();
            solve(&m, &r, &free, &mut general, &mut LcpScratch::new(q));
            let mut s = LcpScratch::with_inverse(&m, q);
            let sweeps = solve(&m, &r, &free, &mut fast, &mut s);
            assert_eq!(sweeps, 0);
            residual_ok(&m, &r, &fast, &free);
            for (a, b) in fast.iter().zip(&general) {
                assert!(
                    (a - b).abs() < 1e-12,
                    "case {case}: {fast:?} vs {general:?}"
                );
            }
            if free.iter().all(|&x| x) && fast.iter().all(|&v| v > 0.0 && v < 1.0) {
                shortcut += 1;
            }
        }
        assert!(shortcut >= 50, "interior cases {shortcut} of 400");
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
