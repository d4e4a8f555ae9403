//! Divide and conquer on the network's own graph: the eigen-decomposition of a large, sparse
//! `S = C^{-1/2} K C^{-1/2}` without reducing it to tridiagonal form.
//!
//! A building's `S` is sparse: a state couples only to the states it exchanges heat with.
//! Cut the states into two groups. Every coupling across the cut is an entry
//! `s_cb` of `S`; group the cut's entries by the endpoint `c` on one side (the side with
//! fewer endpoints) and write, for each such `c` with its row `s` of cross entries,
//!
//! ```text
//! e_c sᵀ + s e_cᵀ = z zᵀ − ρ e_c e_cᵀ − s sᵀ/ρ,   z = √ρ e_c + s/√ρ,   ρ = ‖s‖,
//! ```
//!
//! so `S = diag(S₁, S₂) + Σ_c z_c z_cᵀ` **exactly**, where `S₁`, `S₂` are the two groups'
//! blocks with `ρ` taken off `c`'s diagonal and `s sᵀ/ρ` off the other side's block. The
//! halves are decomposed the same way, down to blocks small enough for the dense solver,
//! and each `z_c z_cᵀ` is then added back by the rank-one merge of divide and conquer
//! (`dc::merge`: deflation, the secular equation, Gu and Eisenstat's eigenvectors) — the
//! first with the halves' block-diagonal eigenvectors, later ones with the merged full
//! ones. This is Cuppen's tear generalised from a tridiagonal matrix to a graph; with one
//! coupling across each cut (rooms in a row), the work is that of the merges alone
//! (`≈ n³` flops at the top), where the dense route also pays the tridiagonal reduction and
//! the back-transformation (about `8 n³` flops all told, measured). Each further term of a
//! cut costs a product with the full eigenvectors (`2 n³`), so cuts through several walls
//! save less (docs/performance.md: a terrace with two party walls a cut saved 13 %).
//!
//! The cut is chosen from the order in which a greedy growth adds the block's states (from a
//! pseudo-peripheral state, one connected component after another, so disconnected parts
//! split for free; [`Tearing::order`]): every prefix between a tenth and nine tenths of the
//! block is scored by the estimated flops of the merges it needs plus a dense decomposition
//! of both sides, and the cheapest is taken if it beats decomposing the block densely. A
//! block with no such cut, or at most [`TEAR_LEAF`] states, is decomposed densely
//! (`eigen.rs`).
//!
//! The result is exact up to rounding, like the dense route: each merge is backward stable
//! (Gu & Eisenstat), and the tears are identities, not approximations.
//!
//! ## Reference
//!
//! J. J. M. Cuppen, "A divide and conquer method for the symmetric tridiagonal
//! eigenproblem", Numer. Math. 36, 177–195 (1981) (the rank-one tear); M. Gu and S. C.
//! Eisenstat, SIAM J. Matrix Anal. Appl. 16(1), 172–191 (1995) (the stable merge); J. R.
//! Bunch, C. P. Nielsen and D. C. Sorensen, "Rank-one modification of the symmetric
//! eigenproblem", Numer. Math. 31, 31–48 (1978) (the secular equation); G. H. Golub and C.
//! F. Van Loan, *Matrix Computations*, 4th ed., §8.4.3 and §8.5.4 (rank-one updates); the
//! pseudo-peripheral start: N. E. Gibbs, W. G. Poole and P. K. Stockmeyer, SIAM J. Numer.
//! Anal. 13(2), 236–250 (1976). (Volumes and pages from memory.)

use faer::reborrow::ReborrowMut;
use faer::{MatMut, Par};
use nalgebra::DMatrix;

use crate::dc::merge;
use crate::eigen::{dense_eigen, Backend};
use crate::SolverError;

/// From this many states up, a decomposition first looks for cheap cuts in the graph.
pub(crate) const TEAR_FROM_STATES: usize = 200;

/// Blocks of at most this many states are decomposed densely.
pub(crate) const TEAR_LEAF: usize = 64;

/// Flops of the dense route per `m³` (tridiagonal reduction, divide and conquer,
/// back-transformation: 1.5–1.6 s at 2,000 states on the development machines, whose
/// blocked products run at about 40 Gflop/s, is `≈ 8 m³` flops at that rate).
const DENSE_FLOPS: f64 = 8.0;

/// What a merge costs against the flops of its products: the secular equation, the merge
/// matrix's columns and the copies come on top. Measured against [`DENSE_FLOPS`]' rate
/// (2026-12-02): 1.6 for the synthetic 200-zone building (one term a cut: 0.50 s against a
/// model of 1.4 `n³`), 1.7 for a terrace of 12 houses (two terms a cut, 1,004 states:
/// 0.165 s against 4.1 `n³`). With it, a cut of three terms loses to the dense route.
const MERGE_OVERHEAD: f64 = 1.65;

/// A graph's rows hold at most this many couplings on average for tearing to be tried.
const MAX_MEAN_DEGREE: usize = 48;

/// `S` held sparsely: its diagonal and, per state, the off-diagonal entries of its row.
struct Graph {
    diag: Vec<f64>,
    adj: Vec<Vec<(usize, f64)>>,
}

impl Graph {
    /// The graph of the symmetric `s` (lower triangle read), or `None` if it is too dense
    /// to tear.
    fn from_dense(s: &DMatrix<f64>) -> Option<Graph> {
        let n = s.nrows();
        let nnz: usize = (0..n)
            .map(|j| {
                s.column(j).as_slice()[j + 1..]
                    .iter()
                    .filter(|x| **x != 0.0)
                    .count()
            })
            .sum();
        if 2 * nnz > MAX_MEAN_DEGREE * n {
            return None;
        }
        let mut adj: Vec<Vec<(usize, f64)>> = vec![Vec::new(); n];
        for j in 0..n {
            for (i, &x) in s.column(j).as_slice().iter().enumerate().skip(j + 1) {
                if x != 0.0 {
                    adj[i].push((j, x));
                    adj[j].push((i, x));
                }
            }
        }
        Some(Graph {
            diag: (0..n).map(|i| s[(i, i)]).collect(),
            adj,
        })
    }

    /// `S[a, b] += x` and `S[b, a] += x`.
    fn add(&mut self, a: usize, b: usize, x: f64) {
        if a == b {
            self.diag[a] += x;
            return;
        }
        for (p, q) in [(a, b), (b, a)] {
            match self.adj[p].iter_mut().find(|(k, _)| *k == q) {
                Some(entry) => entry.1 += x,
                None => self.adj[p].push((q, x)),
            }
        }
    }

    /// Drops the entry `S[a, b]` (and `S[b, a]`).
    fn remove(&mut self, a: usize, b: usize) {
        self.adj[a].retain(|(k, _)| *k != b);
        self.adj[b].retain(|(k, _)| *k != a);
    }
}

/// Estimated flops of the dense route for `m` states.
fn dense_cost(m: usize) -> f64 {
    DENSE_FLOPS * (m as f64).powi(3)
}

/// Estimated flops of mending a cut of `n1 + n2` states with `r` rank-one terms: the first
/// multiplies the halves' block-diagonal eigenvectors by the merge matrix
/// (`2(n1² + n2²)n`), each later one the full `n × n` eigenvectors (`2n³`); times
/// [`MERGE_OVERHEAD`].
fn merge_cost(n1: usize, n2: usize, r: usize) -> f64 {
    if r == 0 {
        return 0.0;
    }
    let (a, b) = (n1 as f64, n2 as f64);
    let n = a + b;
    MERGE_OVERHEAD * (2.0 * (a * a + b * b) * n + (r - 1) as f64 * 2.0 * n * n * n)
}

/// A chosen cut of a block: its states in their new order (the first `n1` form one side),
/// and the states on the covering side whose cross couplings become rank-one terms.
struct Cut {
    order: Vec<usize>,
    n1: usize,
    cover: Vec<usize>,
}

/// The decomposition in progress: the graph (torn as it goes), and where each state sits.
struct Tearing {
    g: Graph,
    /// Position → state; each block is a range of positions.
    perm: Vec<usize>,
    /// State → position.
    pos: Vec<usize>,
    /// Scratch per state: BFS stamps, side flags, counts of cross couplings.
    stamp: Vec<u32>,
    epoch: u32,
    first: Vec<bool>,
    cross: Vec<u32>,
    leaf: usize,
}

impl Tearing {
    fn new(g: Graph, leaf: usize) -> Tearing {
        let n = g.diag.len();
        Tearing {
            g,
            perm: (0..n).collect(),
            pos: (0..n).collect(),
            stamp: vec![0; n],
            epoch: 0,
            first: vec![false; n],
            cross: vec![0; n],
            leaf: leaf.max(2),
        }
    }

    /// Breadth-first order of one connected component from `seed`, stamped with a new epoch;
    /// the component's states are all inside the block (torn couplings are gone).
    fn bfs(&mut self, seed: usize, out: &mut Vec<usize>) {
        self.epoch += 1;
        let e = self.epoch;
        let start = out.len();
        self.stamp[seed] = e;
        out.push(seed);
        let mut head = start;
        while head < out.len() {
            let x = out[head];
            head += 1;
            for &(y, _) in &self.g.adj[x] {
                if self.stamp[y] != e {
                    self.stamp[y] = e;
                    out.push(y);
                }
            }
        }
    }

    /// The block's states in the order a greedy growth adds them, one connected component
    /// after another, each grown from a pseudo-peripheral state (the last reached by a
    /// breadth-first search from an arbitrary one). The next state is always the frontier
    /// state with most couplings into the grown part and fewest out of it (the latest
    /// touched on ties), so a wall's chain of states is finished before the growth crosses
    /// a room (greedy graph growing; Karypis & Kumar, SIAM J. Sci. Comput. 20(1), 359–392,
    /// 1998, from memory): every prefix is a candidate side of a cut.
    fn order(&mut self, lo: usize, hi: usize) -> Vec<usize> {
        let mut order = Vec::with_capacity(hi - lo);
        let mut probe = Vec::new();
        self.epoch += 1;
        let placed = self.epoch;
        let mut heap = std::collections::BinaryHeap::new();
        let mut seq: u64 = 0;
        for p in lo..hi {
            let x = self.perm[p];
            self.cross[x] = 0;
        }
        for p in lo..hi {
            let x = self.perm[p];
            if self.stamp[x] == placed {
                continue;
            }
            probe.clear();
            self.bfs(x, &mut probe);
            let far = *probe.last().expect("the seed itself");
            // `cross` counts couplings into the grown part here.
            heap.push((i64::MIN, seq, far));
            seq += 1;
            while let Some((gain, _, y)) = heap.pop() {
                if self.stamp[y] == placed {
                    continue;
                }
                let now = 2 * self.cross[y] as i64 - self.g.adj[y].len() as i64;
                if gain != i64::MIN && gain != now {
                    continue;
                }
                self.stamp[y] = placed;
                order.push(y);
                for &(w, _) in &self.g.adj[y] {
                    if self.stamp[w] != placed {
                        self.cross[w] += 1;
                        let gain = 2 * self.cross[w] as i64 - self.g.adj[w].len() as i64;
                        heap.push((gain, seq, w));
                        seq += 1;
                    }
                }
            }
        }
        order
    }

    /// The cheapest cut of the block `lo..hi`, if it beats the dense route.
    fn best_cut(&mut self, lo: usize, hi: usize) -> Option<Cut> {
        let n = hi - lo;
        if n <= self.leaf {
            return None;
        }
        let order = self.order(lo, hi);
        for &x in &order {
            self.first[x] = false;
            self.cross[x] = 0;
        }
        // Endpoints of cross couplings on each side, as the cut sweeps along the order.
        let (mut ends1, mut ends2) = (0usize, 0usize);
        let (from, to) = ((n / 10).max(1), n - (n / 10).max(1));
        let mut best: Option<(f64, usize, usize)> = None;
        for (p, &x) in order.iter().enumerate().take(to) {
            if self.cross[x] > 0 {
                ends2 -= 1;
            }
            self.first[x] = true;
            for &(y, _) in &self.g.adj[x] {
                if self.first[y] {
                    self.cross[y] -= 1;
                    if self.cross[y] == 0 {
                        ends1 -= 1;
                    }
                    self.cross[x] -= 1;
                } else {
                    if self.cross[y] == 0 {
                        ends2 += 1;
                    }
                    self.cross[y] += 1;
                    self.cross[x] += 1;
                }
            }
            if self.cross[x] > 0 {
                ends1 += 1;
            }
            let n1 = p + 1;
            if n1 < from {
                continue;
            }
            let r = ends1.min(ends2);
            let cost = merge_cost(n1, n - n1, r) + dense_cost(n1) + dense_cost(n - n1);
            if best.is_none_or(|(c, _, _)| cost < c) {
                best = Some((cost, n1, r));
            }
        }
        let (cost, n1, _) = best?;
        if cost >= dense_cost(n) {
            return None;
        }
        // The covering side: the one with fewer endpoints at the chosen cut.
        for &x in &order {
            self.first[x] = false;
        }
        for &x in &order[..n1] {
            self.first[x] = true;
        }
        let ends = |side: &[usize], g: &Graph, first: &[bool]| -> Vec<usize> {
            side.iter()
                .copied()
                .filter(|&x| g.adj[x].iter().any(|&(y, _)| first[y] != first[x]))
                .collect()
        };
        let e1 = ends(&order[..n1], &self.g, &self.first);
        let e2 = ends(&order[n1..], &self.g, &self.first);
        let cover = if e1.len() <= e2.len() { e1 } else { e2 };
        Some(Cut { order, n1, cover })
    }

    /// Puts the cut's order into place and tears its cross couplings out of the graph;
    /// returns the rank-one terms `z_c` (sparse: state, value).
    fn tear(&mut self, lo: usize, cut: &Cut) -> Vec<Vec<(usize, f64)>> {
        for (k, &x) in cut.order.iter().enumerate() {
            self.perm[lo + k] = x;
            self.pos[x] = lo + k;
        }
        let split = lo + cut.n1;
        let side = |pos: &[usize], x: usize| pos[x] < split;
        let mut terms = Vec::with_capacity(cut.cover.len());
        for &c in &cut.cover {
            let s: Vec<(usize, f64)> = self.g.adj[c]
                .iter()
                .copied()
                .filter(|&(y, _)| side(&self.pos, y) != side(&self.pos, c))
                .collect();
            let rho = s.iter().map(|(_, x)| x * x).sum::<f64>().sqrt();
            for &(b, _) in &s {
                self.g.remove(c, b);
            }
            if rho == 0.0 {
                continue;
            }
            self.g.diag[c] -= rho;
            for (i, &(b, sb)) in s.iter().enumerate() {
                for &(b2, sb2) in &s[i..] {
                    self.g.add(b, b2, -sb * sb2 / rho);
                }
            }
            let root = rho.sqrt();
            let mut z = Vec::with_capacity(s.len() + 1);
            z.push((c, root));
            z.extend(s.iter().map(|&(b, sb)| (b, sb / root)));
            terms.push(z);
        }
        terms
    }

    /// Eigenvalues (ascending, into `values`) and eigenvectors (into `v`, rows in position
    /// order) of the block `lo..hi`; `v` is zero on entry.
    fn solve(
        &mut self,
        lo: usize,
        hi: usize,
        values: &mut [f64],
        v: MatMut<'_, f64>,
    ) -> Result<(), SolverError> {
        match self.best_cut(lo, hi) {
            Some(cut) => self.solve_cut(lo, hi, cut, values, v),
            None => self.dense(lo, hi, values, v),
        }
    }

    fn solve_cut(
        &mut self,
        lo: usize,
        hi: usize,
        cut: Cut,
        values: &mut [f64],
        mut v: MatMut<'_, f64>,
    ) -> Result<(), SolverError> {
        let n = hi - lo;
        let n1 = cut.n1;
        let terms = self.tear(lo, &cut);
        drop(cut);
        {
            let (v00, _, _, v11) = v.rb_mut().split_at_mut(n1, n1);
            let (d0, d1) = values.split_at_mut(n1);
            self.solve(lo, lo + n1, d0, v00)?;
            self.solve(lo + n1, hi, d1, v11)?;
        }
        if terms.is_empty() {
            // Nothing couples the halves: merge the two lists.
            return merge(values, vec![0.0; n], 0.0, v, n1, Par::Seq);
        }
        for (k, term) in terms.iter().enumerate() {
            // z in the eigenbasis: Vᵀ z_c, from the rows of V at z_c's states.
            let mut z = vec![0.0; n];
            for &(x, w) in term {
                let r = self.pos[x] - lo;
                for (j, zj) in z.iter_mut().enumerate() {
                    *zj += w * v[(r, j)];
                }
            }
            let rho: f64 = z.iter().map(|x| x * x).sum();
            if rho > 0.0 {
                let inv = rho.sqrt().recip();
                z.iter_mut().for_each(|x| *x *= inv);
            }
            let layout = if k == 0 { n1 } else { n };
            merge(values, z, rho, v.rb_mut(), layout, Par::Seq)?;
        }
        Ok(())
    }

    /// The block decomposed densely, eigenvalues sorted ascending.
    fn dense(
        &mut self,
        lo: usize,
        hi: usize,
        values: &mut [f64],
        mut v: MatMut<'_, f64>,
    ) -> Result<(), SolverError> {
        let m = hi - lo;
        let mut s = DMatrix::<f64>::zeros(m, m);
        for r in 0..m {
            let x = self.perm[lo + r];
            s[(r, r)] = self.g.diag[x];
            for &(y, w) in &self.g.adj[x] {
                debug_assert!((lo..hi).contains(&self.pos[y]), "a coupling left the block");
                s[(self.pos[y] - lo, r)] = w;
            }
        }
        let (l, q) = dense_eigen(s, Backend::for_states(m))?;
        let mut idx: Vec<usize> = (0..m).collect();
        idx.sort_unstable_by(|&a, &b| l[a].total_cmp(&l[b]));
        for (j, &k) in idx.iter().enumerate() {
            values[j] = l[k];
            for r in 0..m {
                v[(r, j)] = q[(r, k)];
            }
        }
        Ok(())
    }
}

/// Eigenvalues (ascending) and orthonormal eigenvectors of the symmetric `s` by tearing its
/// graph, or `Err(s)` back when the graph is too dense or offers no cut cheaper than the
/// dense route. `leaf` is [`TEAR_LEAF`] except in tests.
#[allow(clippy::type_complexity)]
pub(crate) fn symmetric_eigen_torn(
    s: DMatrix<f64>,
    leaf: usize,
) -> Result<Result<(Vec<f64>, DMatrix<f64>), SolverError>, DMatrix<f64>> {
    let n = s.nrows();
    let Some(g) = Graph::from_dense(&s) else {
        return Err(s);
    };
    let mut t = Tearing::new(g, leaf);
    let Some(cut) = t.best_cut(0, n) else {
        return Err(s);
    };
    drop(s);
    let mut values = vec![0.0; n];
    let mut v = DMatrix::<f64>::zeros(n, n);
    {
        let vm = MatMut::from_column_major_slice_mut(v.as_mut_slice(), n, n);
        if let Err(e) = t.solve_cut(0, n, cut, &mut values, vm) {
            return Ok(Err(e));
        }
    }
    // Rows from position order back to state order, a column at a time.
    let mut scratch = vec![0.0; n];
    for j in 0..n {
        let col = &mut v.as_mut_slice()[j * n..(j + 1) * n];
        for (p, &x) in t.perm.iter().enumerate() {
            scratch[x] = col[p];
        }
        col.copy_from_slice(&scratch);
    }
    Ok(Ok((values, v)))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::testnets::link;

    /// `S = C^{-1/2} K C^{-1/2}` of an INVENTED grid of `rows × cols` rooms, each a chain of
    /// `len` states (capacitances over 3 decades), the first state of each room linked to its
    /// right and lower neighbours with conductance `weak`, the last state to outdoors.
    /// `vary` makes the rooms differ; without it they are identical (repeated eigenvalues,
    /// so the merges deflate and reflect).
    pub(super) fn grid(
        rows: usize,
        cols: usize,
        len: usize,
        weak: f64,
        vary: bool,
    ) -> DMatrix<f64> {
        let rooms = rows * cols;
        let n = rooms * len;
        let c: Vec<f64> = (0..n)
            .map(|i| {
                let room = i / len;
                let f = if vary {
                    1.0 + 0.1 * ((room * 7) % 5) as f64
                } else {
                    1.0
                };
                f * 10f64.powf(4.0 + 3.0 * ((i % len) * 7 % len) as f64 / len as f64)
            })
            .collect();
        let mut k = DMatrix::<f64>::zeros(n, n);
        for room in 0..rooms {
            for i in 0..len - 1 {
                link(
                    &mut k,
                    room * len + i,
                    room * len + i + 1,
                    1.0 + (i % 5) as f64,
                );
            }
            let (r, col) = (room / cols, room % cols);
            if col + 1 < cols && weak > 0.0 {
                link(&mut k, room * len, (room + 1) * len, weak);
            }
            if r + 1 < rows && weak > 0.0 {
                link(
                    &mut k,
                    room * len + len / 2,
                    (room + cols) * len + len / 2,
                    weak,
                );
            }
        }
        for room in 0..rooms {
            k[(room * len + len - 1, room * len + len - 1)] += 0.5;
        }
        DMatrix::from_fn(n, n, |i, j| k[(i, j)] / (c[i] * c[j]).sqrt())
    }

    /// Backward stability as in `dc.rs`'s tests (Golub & Van Loan §8.1): residual
    /// `‖SV − VΛ‖/‖S‖` within twice that of the dense divide and conquer on the same
    /// matrix (1e-12 to 7e-12 on these graded matrices, measured while writing this; the
    /// torn route measured 0.6–1.1× of it), orthogonality `‖VᵀV − I‖` under 1e-13,
    /// eigenvalues within twice that bound (times ‖S‖) of nalgebra's implicit QR (a unit vector with residual
    /// `r` has an eigenvalue within `‖r‖₂`, Golub & Van Loan Thm 8.1.13). Returns whether
    /// the graph was torn.
    fn check(s: &DMatrix<f64>, leaf: usize, what: &str) -> bool {
        let n = s.nrows();
        let scale = s.amax();
        let (l, v) = match symmetric_eigen_torn(s.clone(), leaf) {
            Ok(done) => done.unwrap(),
            Err(_) => return false,
        };
        assert!(l.windows(2).all(|w| w[0] <= w[1]), "{what}: not ascending");
        let lam = DMatrix::from_diagonal(&nalgebra::DVector::from_column_slice(&l));
        let r = (s * &v - &v * lam).amax() / scale;
        let o = (v.transpose() * &v - DMatrix::<f64>::identity(n, n)).amax();
        // The dense divide and conquer on the same matrix, for the residual's yardstick.
        let (l2, v2) = crate::dc::symmetric_eigen_lean(s.clone(), Par::Seq, 16).unwrap();
        let lam2 = DMatrix::from_diagonal(&nalgebra::DVector::from_column_slice(&l2));
        let r_dense = (s * &v2 - &v2 * lam2).amax() / scale;
        assert!(
            r <= 2.0 * r_dense.max(1e-12) && o < 1e-13,
            "{what}: residual {r:e} (dense route {r_dense:e}), orthogonality {o:e}"
        );
        let mut reference: Vec<f64> = s.symmetric_eigenvalues().iter().copied().collect();
        reference.sort_by(f64::total_cmp);
        for (a, b) in l.iter().zip(&reference) {
            // Both sides' errors: this route's residual bound and QR's (below it).
            assert!(
                (a - b).abs() <= 4.0 * r_dense.max(1e-12) * scale,
                "{what}: {a} vs {b}"
            );
        }
        true
    }

    #[test]
    fn rooms_in_a_row_are_torn_one_coupling_at_a_time() {
        for (cols, len, weak, vary) in [
            (12, 10, 0.3, true),
            (12, 10, 0.3, false),
            (30, 8, 0.01, true),
            (7, 15, 2.0, false),
        ] {
            for leaf in [8, 20, 64] {
                let what = format!("row of {cols}×{len}, weak {weak}, vary {vary}, leaf {leaf}");
                assert!(
                    check(&grid(1, cols, len, weak, vary), leaf, &what),
                    "{what}: not torn"
                );
            }
        }
    }

    #[test]
    fn a_grid_needs_several_terms_per_cut_and_still_decomposes() {
        // A cut across two rows of rooms crosses two couplings: the second term merges into
        // full eigenvectors (`n1 = n`).
        for (rows, cols) in [(2, 8), (2, 13)] {
            for vary in [true, false] {
                let what = format!("grid {rows}×{cols}×6, vary {vary}");
                assert!(
                    check(&grid(rows, cols, 6, 0.5, vary), 12, &what),
                    "{what}: not torn"
                );
            }
        }
        // Four rows: cuts of four couplings or more cost more than the dense route.
        assert!(!check(&grid(4, 6, 6, 0.5, true), 12, "grid 4×6×6"));
    }

    #[test]
    fn disconnected_rooms_split_for_free() {
        // No link between rooms: every cut has no terms and the merges only sort.
        let s = grid(1, 9, 12, 0.0, false);
        assert!(check(&s, 16, "nine separate identical rooms"));
        let s = grid(1, 9, 12, 0.0, true);
        assert!(check(&s, 16, "nine separate rooms"));
    }

    #[test]
    fn a_dense_matrix_is_handed_back() {
        // Every state coupled to every other: no cut beats the dense route.
        let n = 120;
        let s = DMatrix::from_fn(n, n, |i, j| if i == j { 2.0 * n as f64 } else { -1.0 });
        assert!(symmetric_eigen_torn(s, 8).is_err());
    }

    #[test]
    fn a_star_coupling_is_one_term() {
        // The cost estimate counts one term per endpoint on the covering side: a room whose
        // first state couples to five states of the next room is mended by one merge.
        let (len, rooms) = (10, 2);
        let n = len * rooms;
        let mut k = DMatrix::<f64>::zeros(n, n);
        for room in 0..rooms {
            for i in 0..len - 1 {
                link(&mut k, room * len + i, room * len + i + 1, 1.0 + i as f64);
            }
        }
        for b in 0..5 {
            link(&mut k, len - 1, len + 2 * b, 0.7);
        }
        for room in 0..rooms {
            k[(room * len, room * len)] += 0.3;
        }
        let g = Graph::from_dense(&k).unwrap();
        let mut t = Tearing::new(g, 4);
        let cut = t.best_cut(0, n).expect("a cut");
        assert_eq!(cut.cover.len(), 1, "one endpoint covers the star");
        assert!(check(&k, 4, "a star across the cut"));
    }

    #[test]
    fn the_propagator_matches_the_dense_route() {
        // What the modal route uses is `e^{−hS} = V e^{−hΛ} Vᵀ`, which does not depend on
        // how eigenvectors of close eigenvalues are chosen: 50 rooms of 8 states in a row
        // (400 states, above TEAR_FROM_STATES, default leaf), through the dispatch in
        // `eigen.rs`, against the dense route. Both are backward stable, so they agree to
        // their residuals (above, ~1e-12 of ‖S‖), here asked 1e-11 of the largest entry.
        let s = grid(1, 50, 8, 0.3, true);
        let n = s.nrows();
        assert!(n >= TEAR_FROM_STATES);
        let (lt, vt) = crate::eigen::symmetric_eigen(s.clone(), Backend::Faer).unwrap();
        let (ld, vd) = dense_eigen(s.clone(), Backend::Faer).unwrap();
        assert!(
            symmetric_eigen_torn(s.clone(), TEAR_LEAF).is_ok(),
            "not torn"
        );
        let lmax = ld.iter().fold(0.0f64, |a, b| a.max(b.abs()));
        let h = 5.0 / lmax;
        let prop = |l: &[f64], v: &DMatrix<f64>| {
            let e = DMatrix::from_diagonal(&nalgebra::DVector::from_iterator(
                n,
                l.iter().map(|x| (-h * x).exp()),
            ));
            v * e * v.transpose()
        };
        let (pt, pd) = (prop(&lt, &vt), prop(&ld, &vd));
        let diff = (&pt - &pd).amax() / pd.amax();
        assert!(diff < 1e-11, "propagators differ by {diff:e}");
    }

    /// An INVENTED random building (seeded): rooms of 3–12 chained states with capacitances
    /// over 3 decades, joined along a random tree of rooms with conductances over 2 decades
    /// (each join between random states of the two rooms), `extra` more random joins, one
    /// random state of each room to outdoors.
    fn random_building(seed: u64, rooms: usize, extra: usize) -> DMatrix<f64> {
        let mut x = seed.wrapping_mul(0x9E37_79B9_7F4A_7C15) | 1;
        let mut next = move || {
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            (x >> 11) as f64 / (1u64 << 53) as f64
        };
        let mut start = vec![0usize];
        for _ in 0..rooms {
            let len = 3 + (next() * 10.0) as usize;
            start.push(start.last().unwrap() + len);
        }
        let n = *start.last().unwrap();
        let mut k = DMatrix::<f64>::zeros(n, n);
        let pick = |room: usize, u: f64| {
            start[room] + (u * (start[room + 1] - start[room]) as f64) as usize
        };
        for room in 0..rooms {
            for i in start[room]..start[room + 1] - 1 {
                link(&mut k, i, i + 1, 10f64.powf(2.0 * next()));
            }
        }
        for room in 1..rooms {
            let other = (next() * room as f64) as usize;
            let (a, b) = (pick(room, next()), pick(other, next()));
            link(&mut k, a, b, 10f64.powf(2.0 * next() - 1.0));
        }
        for _ in 0..extra {
            let (r1, r2) = (
                (next() * rooms as f64) as usize,
                (next() * rooms as f64) as usize,
            );
            let (a, b) = (pick(r1, next()), pick(r2, next()));
            if a != b {
                link(&mut k, a, b, 10f64.powf(2.0 * next() - 1.0));
            }
        }
        for room in 0..rooms {
            let a = pick(room, next());
            k[(a, a)] += 0.5 + next();
        }
        let c: Vec<f64> = (0..n).map(|_| 10f64.powf(4.0 + 3.0 * next())).collect();
        DMatrix::from_fn(n, n, |i, j| k[(i, j)] / (c[i] * c[j]).sqrt())
    }

    #[test]
    fn random_buildings_decompose_whichever_route_they_take() {
        // 24 seeded buildings of 12–30 rooms (about 90–230 states), tree-like (most cuts one
        // coupling) or with up to 6 extra joins (wider cuts, some handed back). Every torn
        // one passes `check`; most must be torn, or the test would not be testing the tear.
        let mut torn = 0;
        for seed in 0..24u64 {
            let rooms = 12 + (seed as usize * 7) % 19;
            let extra = (seed as usize) % 7;
            let s = random_building(seed, rooms, extra);
            let what = format!(
                "seed {seed}: {rooms} rooms, {extra} extra joins, {} states",
                s.nrows()
            );
            if check(&s, 8, &what) {
                torn += 1;
            }
        }
        assert!(torn >= 16, "only {torn} of 24 torn");
    }
}
