//! The large symmetric eigen-decomposition with little workspace: faer's pieces, assembled
//! here so that `S` and `V` are never held together and the workspace is half an `n × n`.
//!
//! faer 0.24's `self_adjoint_evd` copies `S` (one `n × n`) and its divide and conquer keeps two
//! more `n × n` workspaces for the merge at the top: 97 MB at 2,000 states, on top of `S` and
//! `V` (docs/performance.md). Here, with the same algorithms:
//!
//! 1. `S` is reduced to tridiagonal form **in place** (faer's blocked Householder
//!    tridiagonalisation, `tridiag_in_place`); the Householder vectors are then packed, block
//!    by block, into about `n²/2` numbers and `S` is released;
//! 2. the tridiagonal matrix is split in two (Cuppen's rank-one tear,
//!    `T = diag(T₁, T₂) + ρ v vᵀ`) until the pieces have at most [`LEAF`] rows; the pieces
//!    go to faer's `tridiagonal_self_adjoint_evd` (its own divide and conquer, workspace
//!    `2·LEAF²`), their eigenvectors written straight into the diagonal blocks of `V`;
//! 3. each tear is mended here (`merge`): deflation, the secular equation
//!    `1/ρ + Σ zᵢ²/(dᵢ − λ) = 0` solved root by root, Gu and Eisenstat's recomputed `z` (so
//!    the eigenvectors are orthogonal however close the roots), and the update
//!    `V ← diag(Q₁, Q₂)·W`, done by blocks of rows in place from one half of `W` at a time
//!    (half an `n × n`); this is a port of faer 0.24's `divide_and_conquer_recurse` merge
//!    (MIT licence) with its two `n × n` workspaces replaced;
//! 4. the packed Householder vectors are applied to `V` block by block (faer's
//!    `apply_block_householder_on_the_left_in_place_with_conj`).
//!
//! At 2,000 states the peak is `S` + the packed vectors (32 + 16 MB) while packing, then `V` +
//! the packed vectors + half of `W` (32 + 16 + 16 MB) while merging.
//!
//! ## Reference
//!
//! J. J. M. Cuppen, "A divide and conquer method for the symmetric tridiagonal eigenproblem",
//! Numer. Math. 36, 177–195 (1981); M. Gu and S. C. Eisenstat, "A divide-and-conquer algorithm
//! for the symmetric tridiagonal eigenproblem", SIAM J. Matrix Anal. Appl. 16(1), 172–191
//! (1995) (volume and pages from memory); G. H. Golub and C. F. Van Loan, *Matrix
//! Computations*, 4th ed., §8.4.3 (divide and conquer), §5.1 (blocked Householder products).
//! Source ported: faer 0.24.4,
//! `src/linalg/evd/tridiag_evd.rs` and `src/linalg/svd/bidiag_svd.rs`
//! (`secular_eq_root_finder`), MIT licence; the notice is in
//! `crates/dwell-solver/THIRD-PARTY-NOTICES.md`.

use faer::diag::{DiagMut, DiagRef};
use faer::dyn_stack::{MemBuffer, MemStack, StackReq};
use faer::linalg::evd::tridiag::{tridiag_in_place, tridiag_in_place_scratch};
use faer::linalg::evd::{tridiagonal_self_adjoint_evd, SelfAdjointEvdParams};
use faer::linalg::householder::{
    apply_block_householder_on_the_left_in_place_scratch,
    apply_block_householder_on_the_left_in_place_with_conj, make_householder_in_place,
};
use faer::linalg::matmul::matmul;
use faer::linalg::qr::no_pivoting::factor::recommended_block_size;
use faer::linalg::temp_mat_scratch;
use faer::reborrow::{Reborrow, ReborrowMut};
use faer::{Accum, ColMut, Conj, Mat, MatMut, MatRef, Par, Spec};
use nalgebra::DMatrix;

use crate::SolverError;

/// Tridiagonal pieces of at most this many rows go to faer's own divide and conquer (whose
/// workspace is `2·LEAF²` numbers, 4 MB); larger ones are torn in two and merged here.
pub(crate) const LEAF: usize = 512;

/// Rows of `V` updated per block in a merge (the block's `rows × n` product is the only
/// other workspace there).
const ROW_BLOCK: usize = 128;

fn not_converged() -> SolverError {
    SolverError::Numerical("the symmetric eigen-decomposition did not converge".into())
}

fn out_of_memory(n: usize) -> SolverError {
    SolverError::Numerical(format!(
        "out of memory for the eigen-decomposition workspace of {n} states"
    ))
}

/// A faer workspace of `req`, or an error naming the size.
fn workspace(req: StackReq, n: usize) -> Result<MemBuffer, SolverError> {
    MemBuffer::try_new(req).map_err(|_| out_of_memory(n))
}

/// Eigenvalues (ascending) and orthonormal eigenvectors of the symmetric `s` (lower
/// triangle read; `s` is overwritten and released). `leaf` is [`LEAF`] except in tests.
pub(crate) fn symmetric_eigen_lean(
    mut s: DMatrix<f64>,
    par: Par,
    leaf: usize,
) -> Result<(Vec<f64>, DMatrix<f64>), SolverError> {
    let n = s.nrows();
    if n == 0 {
        return Ok((vec![], DMatrix::zeros(0, 0)));
    }
    // 1. Tridiagonalise in place; keep the diagonals and the packed Householder blocks.
    let bs = recommended_block_size::<f64>(n, n);
    let mut factor = Mat::<f64>::zeros(bs, n - 1);
    {
        let req = tridiag_in_place_scratch::<f64>(n, par, Default::default());
        let mut buf = workspace(req, n)?;
        let a = MatMut::from_column_major_slice_mut(s.as_mut_slice(), n, n);
        tridiag_in_place(
            a,
            factor.as_mut(),
            par,
            MemStack::new(&mut buf),
            Default::default(),
        );
    }
    let mut diag: Vec<f64> = (0..n).map(|i| s[(i, i)]).collect();
    let mut offdiag: Vec<f64> = (0..n)
        .map(|i| if i + 1 < n { s[(i + 1, i)] } else { 0.0 })
        .collect();
    // The Householder basis is `s[1.., 0..n−1]`; faer applies it in column blocks of `bs`
    // starting at multiples of `bs`, each block reading rows `j0..` of the basis only.
    let size = n - 1;
    let mut panels: Vec<(usize, usize, Vec<f64>)> = Vec::with_capacity(size.div_ceil(bs.max(1)));
    let mut j0 = 0;
    while j0 < size {
        let j1 = (j0 + bs).min(size);
        let rows = size - j0;
        let mut p = Vec::with_capacity(rows * (j1 - j0));
        for j in j0..j1 {
            p.extend_from_slice(&s.column(j).as_slice()[1 + j0..]);
        }
        panels.push((j0, j1, p));
        j0 = j1;
    }
    drop(s);

    // 2–3. Eigenvectors of the tridiagonal matrix.
    let mut v = DMatrix::<f64>::zeros(n, n);
    {
        let vm = MatMut::from_column_major_slice_mut(v.as_mut_slice(), n, n);
        tridiagonal_dc(&mut diag, &mut offdiag, vm, par, leaf.max(4))?;
    }

    // 4. V ← Q V, last block first.
    if n > 1 {
        let req = apply_block_householder_on_the_left_in_place_scratch::<f64>(size, bs, n);
        let mut buf = workspace(req, n)?;
        let stack = MemStack::new(&mut buf);
        let mut vm = MatMut::from_column_major_slice_mut(v.as_mut_slice(), n, n);
        for (j0, j1, p) in panels.iter().rev() {
            let (j0, j1) = (*j0, *j1);
            let essentials = MatRef::from_column_major_slice(p, size - j0, j1 - j0);
            let h = factor.as_ref().submatrix(0, j0, j1 - j0, j1 - j0);
            let target = vm.rb_mut().submatrix_mut(1 + j0, 0, size - j0, n);
            apply_block_householder_on_the_left_in_place_with_conj(
                essentials,
                h,
                Conj::No,
                target,
                par,
                stack,
            );
        }
    }
    Ok((diag, v))
}

/// Eigen-decomposition of the symmetric tridiagonal matrix (`diag`, `offdiag[i]` joining rows
/// `i` and `i + 1`) into `v` (`n × n`, overwritten); eigenvalues ascending into `diag`.
fn tridiagonal_dc(
    diag: &mut [f64],
    offdiag: &mut [f64],
    mut v: MatMut<'_, f64>,
    par: Par,
    leaf: usize,
) -> Result<(), SolverError> {
    let n = diag.len();
    if n <= leaf {
        let params: Spec<SelfAdjointEvdParams, f64> = Default::default();
        let req = StackReq::all_of(&[
            temp_mat_scratch::<f64>(n, 1).array(8),
            StackReq::new::<usize>(n).array(4),
            temp_mat_scratch::<f64>(n, n).array(2),
        ]);
        let mut buf = workspace(req, n)?;
        let mut values = vec![0.0; n];
        tridiagonal_self_adjoint_evd(
            DiagRef::from_slice(diag),
            DiagRef::from_slice(&offdiag[..n - 1]),
            DiagMut::from_slice_mut(&mut values),
            Some(v.rb_mut()),
            par,
            MemStack::new(&mut buf),
            params,
        )
        .map_err(|_| not_converged())?;
        diag.copy_from_slice(&values);
        return Ok(());
    }
    // Cuppen's tear: T = diag(T₁ − |ρ| e_last e_lastᵀ, T₂ − |ρ| e₁e₁ᵀ) + |ρ| w wᵀ with
    // w = (e_last, sign(ρ) e₁).
    let n1 = n / 2;
    let rho = offdiag[n1 - 1];
    diag[n1 - 1] -= rho.abs();
    diag[n1] -= rho.abs();
    {
        let (d0, d1) = diag.split_at_mut(n1);
        let (e0, e1) = offdiag.split_at_mut(n1);
        let (v00, _, _, v11) = v.rb_mut().split_at_mut(n1, n1);
        tridiagonal_dc(d0, e0, v00, par, leaf)?;
        tridiagonal_dc(d1, e1, v11, par, leaf)?;
    }
    // z = (last row of Q₁, sign(ρ)·first row of Q₂) / √2, ρ ← 2|ρ|.
    let inv_sqrt2 = 0.5f64.sqrt();
    let z: Vec<f64> = (0..n)
        .map(|i| {
            let zi = if i < n1 {
                v[(n1 - 1, i)]
            } else if rho < 0.0 {
                -v[(n1, i)]
            } else {
                v[(n1, i)]
            };
            zi * inv_sqrt2
        })
        .collect();
    merge(diag, z, rho.abs() * 2.0, v, n1, par)
}

/// Mends a tear, `D + ρ z zᵀ` with `‖z‖ = 1` and `ρ ≥ 0` in the eigenbasis held in `v`:
/// `diag[..n1]`, `diag[n1..]` hold two ascending lists of eigenvalues and, when `n1 < n`,
/// `v`'s diagonal blocks the matching eigenvectors (its off-diagonal blocks zero); with
/// `n1 = n`, one ascending list and a full `v`. On return `diag` holds the ascending
/// eigenvalues of the whole and `v` its eigenvectors. Port of the merge in faer 0.24.4's
/// `divide_and_conquer_recurse` (deflation, secular equation, Löwner's formula), with
/// `V·W` formed in place by blocks of rows; the columns of `W` that deflation left as unit
/// vectors are copied rather than multiplied.
pub(crate) fn merge(
    diag: &mut [f64],
    z: Vec<f64>,
    rho: f64,
    mut v: MatMut<'_, f64>,
    n1: usize,
    par: Par,
) -> Result<(), SolverError> {
    let n = diag.len();
    let eps = f64::EPSILON;
    // Merge the two ascending lists.
    let mut pl_before = vec![0usize; n];
    {
        let (mut i, mut j) = (0, 0);
        for p in pl_before.iter_mut() {
            if i == n1 {
                *p = n1 + j;
                j += 1;
            } else if j == n - n1 || diag[i] < diag[n1 + j] {
                *p = i;
                i += 1;
            } else {
                *p = n1 + j;
                j += 1;
            }
        }
    }
    let mut pdiag: Vec<f64> = pl_before.iter().map(|&p| diag[p]).collect();
    let mut pz: Vec<f64> = pl_before.iter().map(|&p| z[p]).collect();
    let dmax = pdiag.iter().fold(0.0f64, |a, b| a.max(b.abs()));
    let zmax = pz.iter().fold(0.0f64, |a, b| a.max(b.abs()));
    let tol = 8.0 * eps * dmax.max(zmax);
    if rho * zmax <= tol {
        // Nothing couples the halves: the eigenpairs are the halves', in merged order.
        permute_columns(v.rb_mut(), &pl_before);
        diag.copy_from_slice(&pdiag);
        return Ok(());
    }
    for zi in pz.iter_mut() {
        if (rho * *zi).abs() <= tol {
            *zi = 0.0;
        }
    }
    // Runs of (nearly) equal poles: a Householder reflection leaves one z per run.
    let mut householder = vec![0.0; n];
    let mut run_info = vec![0usize; n];
    let mut applied_householder = false;
    let mut idx = 0;
    while idx < n {
        let mut run_len = 1;
        let d_prev = pdiag[idx];
        while idx + run_len < n && pdiag[idx + run_len] - d_prev <= tol {
            pdiag[idx + run_len] = d_prev;
            run_len += 1;
        }
        run_info[idx..idx + run_len].fill(run_len);
        if run_len > 1 {
            applied_householder = true;
            let h = &mut householder[idx..idx + run_len];
            h.copy_from_slice(&pz[idx..idx + run_len]);
            let (tail, head) = h.split_at_mut(run_len - 1);
            let head = &mut head[0];
            let info =
                make_householder_in_place(head, ColMut::from_slice_mut(tail).reverse_rows_mut());
            pz[idx..idx + run_len].fill(0.0);
            pz[idx + run_len - 1] = *head;
            *head = info.tau;
        }
        idx += run_len;
    }
    // Deflated entries (z = 0) go last.
    let mut pl_after = vec![0usize; n];
    let mut deflated_diag = Vec::new();
    let mut deflated_from = Vec::new();
    let mut nd = 0;
    for reader in 0..n {
        let (zr, dr) = (pz[reader], pdiag[reader]);
        if zr == 0.0 {
            deflated_diag.push(dr);
            deflated_from.push(reader);
        } else {
            pz[nd] = zr;
            pdiag[nd] = dr;
            pl_after[nd] = reader;
            nd += 1;
        }
    }
    for (i, (&d, &from)) in deflated_diag.iter().zip(&deflated_from).enumerate() {
        pdiag[nd + i] = d;
        pl_after[nd + i] = from;
    }
    let deflated = deflated_diag.len();
    // Roots λ_j = shift_j + μ_j of the secular equation, one per interval.
    let mut mus = vec![0.0; n];
    let mut shifts = vec![0.0; n];
    compute_eigenvalues(&mut mus, &mut shifts, &pdiag, &pz, rho, nd);
    // Gu–Eisenstat: the z for which the computed roots are exact (up to a common factor,
    // which the normalisation of W's columns removes).
    for i in 0..nd {
        let di = pdiag[i];
        let mut prod = mus[i] + (shifts[i] - di);
        for k in (0..i).chain(i + 1..nd) {
            prod *= (mus[k] + (shifts[k] - di)) / (pdiag[k] - di);
        }
        let prod = prod.abs().sqrt();
        pz[i] = if pz[i] < 0.0 { -prod } else { prod };
    }
    let eigenvals: Vec<f64> = (0..n).map(|i| mus[i] + shifts[i]).collect();
    let mut pr: Vec<usize> = (0..n).collect();
    pr.sort_unstable_by(|&i, &j| eigenvals[i].total_cmp(&eigenvals[j]));
    if !applied_householder {
        for p in pl_after.iter_mut() {
            *p = pl_before[*p];
        }
    }
    // Column j of W before the reflections: in the merged order when reflections follow,
    // else straight in the halves' order (`pl_after` composed with `pl_before` above).
    let w_raw = |j: usize, c: &mut [f64]| {
        let pj = pr[j];
        if pj >= nd {
            c.fill(0.0);
            c[pl_after[pj]] = 1.0;
        } else {
            let (mu_j, shift_j) = (mus[pj], shifts[pj]);
            for (i, &pa) in pl_after[..nd].iter().enumerate() {
                c[pa] = pz[i] / ((pdiag[i] - shift_j) - mu_j);
            }
            for &pa in &pl_after[nd..nd + deflated] {
                c[pa] = 0.0;
            }
            let inv_norm = c.iter().map(|x| x * x).sum::<f64>().sqrt().recip();
            c.iter_mut().for_each(|x| *x *= inv_norm);
        }
    };
    // Column j of W (length n, in the halves' coordinates).
    let w_column = |j: usize, col: &mut [f64], work: &mut [f64]| {
        if !applied_householder {
            w_raw(j, col);
            return;
        }
        w_raw(j, work);
        let mut idx = 0;
        while idx < n {
            let run_len = run_info[idx];
            if run_len > 1 {
                let h = &householder[idx..idx + run_len];
                let tau_inv = h[run_len - 1].recip();
                let seg = &mut work[idx..idx + run_len];
                let dot = tau_inv
                    * (h[..run_len - 1]
                        .iter()
                        .zip(&seg[..run_len - 1])
                        .map(|(a, b)| a * b)
                        .sum::<f64>()
                        + seg[run_len - 1]);
                for (s, &hv) in seg[..run_len - 1].iter_mut().zip(&h[..run_len - 1]) {
                    *s -= dot * hv;
                }
                seg[run_len - 1] -= dot;
            }
            idx += run_len;
        }
        for (i, &pb) in pl_before.iter().enumerate() {
            col[pb] = work[i];
        }
    };
    // V ← diag(Q₁, Q₂)·W (or V·W when n1 = n), one half of W's rows at a time, by blocks of
    // rows in place. A column of W whose rows in this half are one 1 (a deflated pair kept
    // as it was) is a copy of a column of V; one with none there is 0 on these rows.
    let mut col = vec![0.0; n];
    let mut work = vec![0.0; n];
    for (r0, rows) in [(0, n1), (n1, n - n1)] {
        if rows == 0 {
            continue;
        }
        let mut kinds = Vec::with_capacity(n);
        let mut w_dense: Vec<f64> = Vec::with_capacity(rows * n);
        for j in 0..n {
            w_column(j, &mut col, &mut work);
            let part = &col[r0..r0 + rows];
            let mut nonzero = part.iter().enumerate().filter(|(_, x)| **x != 0.0);
            let kind = match (nonzero.next(), nonzero.next()) {
                (None, _) => Column::Zero,
                (Some((k, 1.0)), None) => Column::Copy(r0 + k),
                _ => {
                    w_dense.extend_from_slice(part);
                    Column::Product(w_dense.len() / rows - 1)
                }
            };
            kinds.push(kind);
        }
        let nd = w_dense.len() / rows;
        let w_dense = MatRef::from_column_major_slice(&w_dense, rows, nd);
        let mut product = Mat::<f64>::zeros(ROW_BLOCK.min(rows), nd);
        let mut assembled = Mat::<f64>::zeros(ROW_BLOCK.min(rows), n);
        let mut b0 = r0;
        while b0 < r0 + rows {
            let b = ROW_BLOCK.min(r0 + rows - b0);
            let mut t = product.as_mut().subrows_mut(0, b);
            if nd > 0 {
                matmul(
                    t.rb_mut(),
                    Accum::Replace,
                    v.rb().submatrix(b0, r0, b, rows),
                    w_dense,
                    1.0,
                    par,
                );
            }
            let mut out = assembled.as_mut().subrows_mut(0, b);
            for (j, kind) in kinds.iter().enumerate() {
                match *kind {
                    Column::Product(k) => out.rb_mut().col_mut(j).copy_from(t.rb().col(k)),
                    Column::Copy(k) => out
                        .rb_mut()
                        .col_mut(j)
                        .copy_from(v.rb().submatrix(b0, k, b, 1).col(0)),
                    Column::Zero => out.rb_mut().col_mut(j).fill(0.0),
                }
            }
            v.rb_mut().subrows_mut(b0, b).copy_from(out.rb());
            b0 += b;
        }
    }
    for (d, &p) in diag.iter_mut().zip(&pr) {
        *d = eigenvals[p];
    }
    Ok(())
}

/// Where column `j` of the merged eigenvectors comes from, on one half's rows.
#[derive(Clone, Copy)]
enum Column {
    /// Column `k` of `W`'s dense part: a product.
    Product(usize),
    /// Column `k` of the old `V` (a deflated pair).
    Copy(usize),
    /// Zero on these rows.
    Zero,
}

/// `v[:, j] ← v[:, perm[j]]`, in place (cycle by cycle, one column of workspace).
fn permute_columns(mut v: MatMut<'_, f64>, perm: &[usize]) {
    let n = perm.len();
    let mut done = vec![false; n];
    let mut keep = vec![0.0; v.nrows()];
    for start in 0..n {
        if done[start] || perm[start] == start {
            done[start] = true;
            continue;
        }
        for (k, x) in keep.iter_mut().enumerate() {
            *x = v[(k, start)];
        }
        let mut j = start;
        loop {
            done[j] = true;
            let src = perm[j];
            if src == start {
                for (k, x) in keep.iter().enumerate() {
                    v[(k, j)] = *x;
                }
                break;
            }
            for k in 0..v.nrows() {
                v[(k, j)] = v[(k, src)];
            }
            j = src;
        }
    }
}

/// `1/ρ + Σ zᵢ²/((dᵢ − shift) − μ)` (increasing in μ). Summed in eight interleaved
/// partial sums, so the divisions and additions of neighbouring terms overlap instead of
/// waiting on one chain of additions, and on 4-lane vectors where the processor has AVX
/// (the same operations in the same order, so the same result bit for bit). The root
/// finder evaluates this `O(n)` sum several times per root: it was a sixth of a
/// 2,000-state decomposition by graph tearing.
fn secular_eq(shift: f64, mu: f64, d: &[f64], z: &[f64], rho_recip: f64) -> f64 {
    // std caches the feature test (one atomic load), as `eigen.rs` relies on too.
    #[cfg(target_arch = "x86_64")]
    if std::is_x86_feature_detected!("avx") {
        // SAFETY: AVX is present (checked just above), which is all the copy needs.
        return unsafe { secular_eq_avx(shift, mu, d, z, rho_recip) };
    }
    secular_sum(shift, mu, d, z, rho_recip)
}

/// [`secular_eq`] compiled for AVX.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx")]
unsafe fn secular_eq_avx(shift: f64, mu: f64, d: &[f64], z: &[f64], rho_recip: f64) -> f64 {
    secular_sum(shift, mu, d, z, rho_recip)
}

#[inline(always)]
fn secular_sum(shift: f64, mu: f64, d: &[f64], z: &[f64], rho_recip: f64) -> f64 {
    const L: usize = 8;
    let mut acc = [0.0f64; L];
    let (dc, dr) = d.split_at(d.len() - d.len() % L);
    let (zc, zr) = z[..d.len()].split_at(dc.len());
    for (d8, z8) in dc.chunks_exact(L).zip(zc.chunks_exact(L)) {
        for k in 0..L {
            acc[k] += z8[k] * (z8[k] / ((d8[k] - shift) - mu));
        }
    }
    let mut res = rho_recip
        + (((acc[0] + acc[1]) + (acc[2] + acc[3])) + ((acc[4] + acc[5]) + (acc[6] + acc[7])));
    for (&d, &z) in dr.iter().zip(zr) {
        res += z * (z / ((d - shift) - mu));
    }
    res
}

/// The roots of the secular equation for the first `nd` (non-deflated) poles; the deflated
/// ones are their own eigenvalues (shift 0, μ = d).
fn compute_eigenvalues(
    mus: &mut [f64],
    shifts: &mut [f64],
    d: &[f64],
    z: &[f64],
    rho: f64,
    nd: usize,
) {
    let rho_recip = rho.recip();
    let (dn, zn) = (&d[..nd], &z[..nd]);
    let z_norm2: f64 = zn.iter().map(|x| x * x).sum();
    for i in 0..nd {
        let left = d[i];
        let last = i == nd - 1;
        let right = if last { d[i] + rho * z_norm2 } else { d[i + 1] };
        let f = |shift: f64, mu: f64| secular_eq(shift, mu, dn, zn, rho_recip);
        let (shift, mu) = secular_root(&f, left, right, last);
        shifts[i] = shift;
        mus[i] = mu;
    }
    for i in nd..d.len() {
        shifts[i] = 0.0;
        mus[i] = d[i];
    }
}

/// The root of the increasing secular function in `(left, right)` as `(shift, μ)` with the
/// shift the nearer pole (so `dᵢ − λ` is formed without cancellation). Port of faer 0.24.4's
/// `secular_eq_root_finder` (bisection to bracket, then secant steps, bisection as the
/// fallback).
fn secular_root(f: &dyn Fn(f64, f64) -> f64, left: f64, right: f64, last: bool) -> (f64, f64) {
    let eps = f64::EPSILON;
    let mid = left + (right - left) * 0.5;
    let f_mid0 = f(0.0, mid);
    let f_max = f(
        left,
        if last {
            right - left
        } else {
            (right - left) * 0.5
        },
    );
    let f_mid_left_shift = f(left, (right - left) * 0.5);
    let f_mid_right_shift = f(right, (left - right) * 0.5);
    let mut f_mid = f_mid0;
    let (mut shift, mu) = if last || f_mid > 0.0 {
        (left, (right - left) * 0.5)
    } else {
        (right, (left - right) * 0.5)
    };
    if f_mid_left_shift <= 0.0 && f_mid_right_shift > 0.0 {
        return (shift, mu);
    }
    if !last {
        if shift == left {
            if f_mid_left_shift < 0.0 {
                shift = right;
                f_mid = f_mid_right_shift;
            }
        } else if f_mid_right_shift > 0.0 {
            shift = left;
            f_mid = f_mid_left_shift;
        }
    }
    let (mut left_shifted, mut f_left, mut right_shifted, mut f_right) = if shift == left {
        (
            0.0,
            f64::NEG_INFINITY,
            if last {
                right - left
            } else {
                (right - left) * 0.5
            },
            if last { f_max } else { f_mid },
        )
    } else {
        ((left - right) * 0.5, f_mid, 0.0, f64::INFINITY)
    };
    let mut f_prev = f_mid;
    let base = if shift == left {
        right_shifted
    } else {
        left_shifted
    };
    let mu_values = [base / 256.0, base / 16.0, base / 4.0, base / 2.0];
    let f_values = mu_values.map(|mu| f(shift, mu));
    if shift == left {
        let mut i = 0;
        for (idx, (&mu, &fv)) in mu_values.iter().zip(&f_values).enumerate() {
            if fv < 0.0 {
                left_shifted = mu;
                f_left = fv;
                i = idx + 1;
            }
        }
        if i < f_values.len() {
            right_shifted = mu_values[i];
            f_right = f_values[i];
        }
    } else {
        let mut i = 0;
        for (idx, (&mu, &fv)) in mu_values.iter().zip(&f_values).enumerate() {
            if fv > 0.0 {
                right_shifted = mu;
                f_right = fv;
                i = idx + 1;
            }
        }
        if i < f_values.len() {
            left_shifted = mu_values[i];
            f_left = f_values[i];
        }
    }
    let mut iteration_count = 0;
    while right_shifted - left_shifted > 2.0 * eps * left_shifted.abs().max(right_shifted.abs()) {
        let mid_arith = (left_shifted + right_shifted) * 0.5;
        let mut mid_geo = left_shifted.abs().sqrt() * right_shifted.abs().sqrt();
        if left_shifted < 0.0 {
            mid_geo = -mid_geo;
        }
        let mid_shifted = if mid_geo == 0.0 { mid_arith } else { mid_geo };
        let fm = f(shift, mid_shifted);
        if fm == 0.0 {
            return (shift, mid_shifted);
        } else if fm > 0.0 {
            right_shifted = mid_shifted;
            f_prev = f_right;
            f_right = fm;
        } else {
            left_shifted = mid_shifted;
            f_prev = f_left;
            f_left = fm;
        }
        if iteration_count == 4 {
            break;
        }
        iteration_count += 1;
    }
    let (mu_a, mu_b, f_a, f_b) = if left_shifted == 0.0 {
        (right_shifted * 2.0, right_shifted, f_prev, f_right)
    } else if right_shifted == 0.0 {
        (left_shifted * 2.0, left_shifted, f_prev, f_left)
    } else {
        (left_shifted, right_shifted, f_left, f_right)
    };
    let (use_bisection, mut mu_cur, left_candidate, right_candidate) =
        secant(f, shift, left, right, mu_a, mu_b, f_a, f_b);
    if let (Some(l), Some(r)) = (left_candidate, right_candidate) {
        if l < r {
            if l > left_shifted {
                left_shifted = l;
            }
            if r < right_shifted {
                right_shifted = r;
            }
        }
    }
    if use_bisection {
        while right_shifted - left_shifted > 2.0 * eps * left_shifted.abs().max(right_shifted.abs())
        {
            let mid_shifted = (left_shifted + right_shifted) * 0.5;
            let fm = f(shift, mid_shifted);
            if fm == 0.0 {
                break;
            } else if fm > 0.0 {
                right_shifted = mid_shifted;
            } else {
                left_shifted = mid_shifted;
            }
        }
        mu_cur = (left_shifted + right_shifted) * 0.5;
    }
    (shift, mu_cur)
}

/// Secant iteration on the shifted root (faer's, see [`secular_root`]): returns whether to
/// fall back to bisection, the last iterate and the bracket it found.
#[allow(clippy::too_many_arguments)]
fn secant(
    f: &dyn Fn(f64, f64) -> f64,
    shift: f64,
    left: f64,
    right: f64,
    mut mu_cur: f64,
    mut mu_prev: f64,
    mut f_cur: f64,
    mut f_prev: f64,
) -> (bool, f64, Option<f64>, Option<f64>) {
    let eps = f64::EPSILON;
    if f_prev.abs() < f_cur.abs() {
        std::mem::swap(&mut f_prev, &mut f_cur);
        std::mem::swap(&mut mu_prev, &mut mu_cur);
    }
    let mut left_candidate = None;
    let mut right_candidate = None;
    let mut use_bisection = false;
    if (f_prev > 0.0) != (f_cur > 0.0) {
        left_candidate = Some(mu_cur.min(mu_prev));
        right_candidate = Some(mu_cur.max(mu_prev));
    }
    while f_cur != 0.0
        && (mu_cur - mu_prev).abs() > 8.0 * eps * mu_cur.abs().max(mu_prev.abs())
        && (f_cur - f_prev).abs() > eps
        && !use_bisection
    {
        let a = (f_cur - f_prev) * (mu_prev * mu_cur) / (mu_prev - mu_cur);
        let b = f_cur - a / mu_cur;
        let mu_zero = -a / b;
        let f_zero = f(shift, mu_zero);
        if f_zero < 0.0 {
            left_candidate = Some(mu_zero);
        } else {
            right_candidate = Some(mu_zero);
        }
        mu_prev = mu_cur;
        f_prev = f_cur;
        mu_cur = mu_zero;
        f_cur = f_zero;
        if shift == left && (mu_cur < 0.0 || mu_cur > right - left) {
            use_bisection = true;
        }
        if shift == right && (mu_cur > 0.0 || mu_cur < left - right) {
            use_bisection = true;
        }
        if f_cur.abs() > f_prev.abs() {
            let mut k = 1.0;
            for _ in 0..4 {
                let mu_opposite = -a / (k * f_zero + b);
                let f_opposite = f(shift, mu_opposite);
                if f_zero < 0.0 && f_opposite >= 0.0 {
                    right_candidate = Some(mu_opposite);
                    break;
                }
                if f_zero > 0.0 && f_opposite <= 0.0 {
                    left_candidate = Some(mu_opposite);
                    break;
                }
                k *= 2.0;
            }
            use_bisection = true;
        }
    }
    (use_bisection, mu_cur, left_candidate, right_candidate)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::testnets::link;

    /// `S = C^{-1/2} K C^{-1/2}` of `copies` identical rooms (a path of `len` nodes each,
    /// capacitances over 3 decades) joined in a row by weak links: clusters of nearly equal
    /// eigenvalues, so the merges deflate and reflect (`weak = 0` makes them exactly equal).
    fn rooms(copies: usize, len: usize, weak: f64) -> DMatrix<f64> {
        let n = copies * len;
        let c: Vec<f64> = (0..n)
            .map(|i| 10f64.powf(4.0 + 3.0 * ((i % len) * 7 % len) as f64 / len as f64))
            .collect();
        let mut k = DMatrix::<f64>::zeros(n, n);
        for r in 0..copies {
            for i in 0..len - 1 {
                link(&mut k, r * len + i, r * len + i + 1, 1.0 + (i % 5) as f64);
            }
            if r + 1 < copies && weak > 0.0 {
                link(&mut k, r * len, (r + 1) * len, weak);
            }
        }
        for r in 0..copies {
            k[(r * len + len - 1, r * len + len - 1)] += 0.5;
        }
        DMatrix::from_fn(n, n, |i, j| k[(i, j)] / (c[i] * c[j]).sqrt())
    }

    /// Backward stability (Golub & Van Loan §8.1): residual `‖SV − VΛ‖/‖S‖` (max norms) and
    /// loss of orthogonality `‖VᵀV − I‖`; eigenvalues against nalgebra's implicit QR. Divide and conquer's residual constant is larger than QR's: on these graded
    /// matrices faer 0.24's own `self_adjoint_evd` with the same recursion threshold reaches
    /// 1.9e-12 (37 states) and 9.6e-13 (120), bit for bit what this module gives (measured
    /// while writing it), so the bound is 5e-12; orthogonality stays near 1e-15, asked 1e-13.
    fn check(s: &DMatrix<f64>, leaf: usize, what: &str) {
        let n = s.nrows();
        let scale = s.amax();
        let (l, v) = symmetric_eigen_lean(s.clone(), Par::Seq, leaf).unwrap();
        assert!(l.windows(2).all(|w| w[0] <= w[1]), "{what}: not ascending");
        let lam = DMatrix::from_diagonal(&nalgebra::DVector::from_column_slice(&l));
        let r = (s * &v - &v * lam).amax() / scale;
        let o = (v.transpose() * &v - DMatrix::<f64>::identity(n, n)).amax();
        assert!(
            r < 5e-12 && o < 1e-13,
            "{what}: residual {r:e}, orthogonality {o:e}"
        );
        let mut reference: Vec<f64> = s.symmetric_eigenvalues().iter().copied().collect();
        reference.sort_by(f64::total_cmp);
        for (a, b) in l.iter().zip(&reference) {
            // A unit vector with residual r has an eigenvalue within ‖r‖₂ (Golub & Van Loan
            // Thm 8.1.13), so the eigenvalues get the residual's bound.
            assert!((a - b).abs() <= 5e-12 * scale, "{what}: {a} vs {b}");
        }
    }

    #[test]
    fn merges_decompose_distinct_clustered_and_repeated_spectra() {
        for (copies, len, weak) in [
            (1, 1, 0.0),
            (1, 2, 0.0),
            (1, 37, 0.0),
            (3, 40, 0.3),
            (8, 25, 0.01),
            (6, 30, 0.0),
        ] {
            let s = rooms(copies, len, weak);
            for leaf in [4, 16, 64] {
                check(
                    &s,
                    leaf,
                    &format!("{copies}×{len}, weak {weak}, leaf {leaf}"),
                );
            }
        }
    }

    #[test]
    fn an_uncoupled_tear_is_a_permutation() {
        // Two rooms with no link between them: the tear's ρ is 0 and the halves are kept.
        let s = rooms(2, 20, 0.0);
        check(&s, 8, "two separate rooms");
    }

    #[test]
    fn below_the_leaf_it_is_faer_itself() {
        // At or below LEAF nothing of this module's merge runs: faer's tridiagonal divide and
        // conquer returns the same values as its self_adjoint_evd (same operations).
        let s = rooms(2, 30, 0.2);
        let n = s.nrows();
        let (l, _) = symmetric_eigen_lean(s.clone(), Par::Seq, LEAF).unwrap();
        let mut values = vec![0.0; n];
        let mut vectors = DMatrix::<f64>::zeros(n, n);
        let par = Par::Seq;
        let params: Spec<SelfAdjointEvdParams, f64> = Default::default();
        let req = faer::linalg::evd::self_adjoint_evd_scratch::<f64>(
            n,
            faer::linalg::evd::ComputeEigenvectors::Yes,
            par,
            params,
        );
        let mut buf = MemBuffer::new(req);
        faer::linalg::evd::self_adjoint_evd(
            MatRef::from_column_major_slice(s.as_slice(), n, n),
            DiagMut::from_slice_mut(&mut values),
            Some(MatMut::from_column_major_slice_mut(
                vectors.as_mut_slice(),
                n,
                n,
            )),
            par,
            MemStack::new(&mut buf),
            params,
        )
        .unwrap();
        assert_eq!(l, values);
    }
}
