//! Packed matrices and the plain loops the stepper runs on.
//!
//! Two layouts:
//!
//! - [`Packed`]: row by row, for single rows (`dot`) used by the thermostats;
//! - [`Panels`]: column-major with the leading dimension rounded up to a multiple of 8 rows
//!   (zero-padded), read as panels of 8 rows. `y = A x` runs as `acc += x_j · A[rows, j]`
//!   over the columns `j`, with the accumulators of a group of panels held in vector
//!   registers: every matrix entry is loaded once, contiguously, each broadcast `x_j` serves
//!   the whole group, and no horizontal sums are needed. This is the layout of the "N"
//!   kernel of a BLAS `gemv`, written as plain loops over fixed-size arrays that the compiler
//!   vectorises.
//!
//! **Grouping.** A multiply-add has a latency of about 4 cycles and two issue each cycle, so
//! about 8 independent accumulator chains keep the units busy. A tall matrix (state update,
//! `n × m`) gets its chains from several panels side by side (`G` panels); a short, wide one
//! (a few readout rows over `n + m` columns) gets them from `S` sets of columns summed at the
//! end. The pair `(G, S)` is picked from the number of panels and the register budget of the
//! kernel form (8 accumulators of 8 lanes for AVX-512's 32 registers, 4 for AVX2's 16,
//! 2 for SSE2's 16 two-lane registers).
//!
//! **Forms.** The loops are compiled three times: for the x86-64 baseline (SSE2, which every
//! x86-64 has), with AVX2 + FMA, and with AVX-512F (which implies both). The form is chosen
//! once, in [`Kernel::detect`], by `is_x86_feature_detected!`; a shipped binary runs on any
//! x86-64 and still uses the widest units present. The fused forms round once per
//! multiply-add instead of twice; results differ from the baseline's by rounding only (about
//! `1e-16` relative per term). A whole step is one call into the chosen form
//! (`stepper.rs`), so the kernels inline into one another and the per-step overhead is a
//! single indirect branch.

// Index loops over fixed-size accumulator arrays (`for g in 0..G`) are deliberate: with
// constant bounds they unroll into registers, which iterator chains over two arrays at once
// obscure.
#![allow(clippy::needless_range_loop)]

use nalgebra::DMatrix;

/// Rows per panel: one AVX-512 register, two AVX2 registers or four SSE2 registers of `f64`.
pub(crate) const PANEL: usize = 8;

/// A dense matrix stored row by row.
#[derive(Clone, Debug)]
pub(crate) struct Packed {
    #[cfg_attr(not(test), allow(dead_code))]
    rows: usize,
    cols: usize,
    data: Vec<f64>,
}

impl Packed {
    pub(crate) fn from_matrix(m: &DMatrix<f64>) -> Self {
        let (rows, cols) = m.shape();
        let mut data = Vec::with_capacity(rows * cols);
        for i in 0..rows {
            data.extend(m.row(i).iter().copied());
        }
        Packed { rows, cols, data }
    }

    #[inline]
    pub(crate) fn row(&self, i: usize) -> &[f64] {
        &self.data[i * self.cols..(i + 1) * self.cols]
    }

    /// `y = self · x`.
    #[cfg(test)]
    pub(crate) fn mul_into(&self, x: &[f64], y: &mut [f64]) {
        debug_assert_eq!(x.len(), self.cols);
        for (i, yi) in y.iter_mut().enumerate().take(self.rows) {
            *yi = dot(self.row(i), x);
        }
    }
}

/// `Σ aᵢ bᵢ` with four accumulators.
#[inline]
pub(crate) fn dot(a: &[f64], b: &[f64]) -> f64 {
    let n = a.len().min(b.len());
    let (a, b) = (&a[..n], &b[..n]);
    let mut acc = [0.0_f64; 4];
    let ca = a.chunks_exact(4);
    let cb = b.chunks_exact(4);
    let (ra, rb) = (ca.remainder(), cb.remainder());
    for (x, y) in ca.zip(cb) {
        acc[0] += x[0] * y[0];
        acc[1] += x[1] * y[1];
        acc[2] += x[2] * y[2];
        acc[3] += x[3] * y[3];
    }
    let mut tail = 0.0;
    for (x, y) in ra.iter().zip(rb) {
        tail += x * y;
    }
    (acc[0] + acc[1]) + (acc[2] + acc[3]) + tail
}

/// Which compiled form of the kernels runs.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum Kernel {
    /// Baseline x86-64 (SSE2) or any other architecture: separate multiply and add.
    Portable,
    /// x86-64 with AVX2 and FMA, detected at run time.
    #[cfg(target_arch = "x86_64")]
    Avx2Fma,
    /// x86-64 with AVX-512F (and AVX2, FMA), detected at run time.
    #[cfg(target_arch = "x86_64")]
    Avx512,
}

impl Kernel {
    /// The fastest form this processor supports, or a narrower one named by the environment
    /// variable `DWELL_KERNEL` (`portable`, `avx2`; for benchmarks).
    pub(crate) fn detect() -> Self {
        // Read once per process: every stepper asks, and a sweep builds thousands.
        static FORM: std::sync::OnceLock<Kernel> = std::sync::OnceLock::new();
        *FORM.get_or_init(Self::detect_now)
    }

    fn detect_now() -> Self {
        let cap = std::env::var("DWELL_KERNEL").unwrap_or_default();
        if cap == "portable" {
            return Kernel::Portable;
        }
        #[cfg(target_arch = "x86_64")]
        {
            let avx2 =
                std::is_x86_feature_detected!("avx2") && std::is_x86_feature_detected!("fma");
            if avx2 && cap != "avx2" && std::is_x86_feature_detected!("avx512f") {
                return Kernel::Avx512;
            }
            if avx2 {
                return Kernel::Avx2Fma;
            }
        }
        Kernel::Portable
    }

    /// Every form this processor can run (for tests).
    #[cfg(test)]
    pub(crate) fn available() -> Vec<Self> {
        let mut out = vec![Kernel::Portable];
        #[cfg(target_arch = "x86_64")]
        {
            if std::is_x86_feature_detected!("avx2") && std::is_x86_feature_detected!("fma") {
                out.push(Kernel::Avx2Fma);
                if std::is_x86_feature_detected!("avx512f") {
                    out.push(Kernel::Avx512);
                }
            }
        }
        out
    }
}

/// A dense `rows × cols` matrix, column-major with leading dimension `ld = ⌈rows/8⌉·8`,
/// zero-padded.
#[derive(Clone, Debug)]
pub(crate) struct Panels {
    rows: usize,
    cols: usize,
    ld: usize,
    /// Panel `p` of column `j` at `data[j · ld/8 + p]`, each on its own cache line.
    data: Vec<Line>,
}

/// Eight `f64` on one 64-byte cache line.
#[derive(Clone, Copy, Debug)]
#[repr(C, align(64))]
pub(crate) struct Line(pub(crate) [f64; PANEL]);

/// A run of lines as the `f64` it holds (`8 · lines.len()` values).
pub(crate) fn flat(lines: &[Line]) -> &[f64] {
    // SAFETY: `Line` is `repr(C)` around `[f64; PANEL]` with no padding (size 64, alignment
    // 64), so the lines are `len · PANEL` contiguous `f64`.
    unsafe { std::slice::from_raw_parts(lines.as_ptr().cast::<f64>(), lines.len() * PANEL) }
}

/// [`flat`], writable.
pub(crate) fn flat_mut(lines: &mut [Line]) -> &mut [f64] {
    // SAFETY: as in `flat`, and the borrow is unique.
    unsafe { std::slice::from_raw_parts_mut(lines.as_mut_ptr().cast::<f64>(), lines.len() * PANEL) }
}

/// How `y = A x` starts.
#[derive(Clone, Copy)]
pub(crate) enum Init<'a> {
    /// `y = A x`.
    Set,
    /// `y = d ∘ s + A x` (elementwise product; `d` and `s` at least `rows` long).
    Scaled(&'a [f64], &'a [f64]),
}

impl Panels {
    /// Packs the columns `[a | b]` (same row count).
    pub(crate) fn from_blocks(a: &DMatrix<f64>, b: &DMatrix<f64>) -> Self {
        debug_assert_eq!(a.nrows(), b.nrows());
        let rows = a.nrows();
        let cols = a.ncols() + b.ncols();
        let ld = rows.div_ceil(PANEL) * PANEL;
        let np = ld / PANEL;
        let mut data = vec![Line([0.0; PANEL]); np * cols];
        for j in 0..cols {
            for i in 0..rows {
                data[j * np + i / PANEL].0[i % PANEL] = if j < a.ncols() {
                    a[(i, j)]
                } else {
                    b[(i, j - a.ncols())]
                };
            }
        }
        Panels {
            rows,
            cols,
            ld,
            data,
        }
    }

    /// Packs `a`.
    pub(crate) fn from_matrix(a: &DMatrix<f64>) -> Self {
        Self::from_blocks(a, &DMatrix::zeros(a.nrows(), 0))
    }

    /// The matrix back as a dense `rows × cols` matrix (allocates).
    pub(crate) fn to_matrix(&self) -> DMatrix<f64> {
        let np = self.ld / PANEL;
        DMatrix::from_fn(self.rows, self.cols, |i, j| {
            self.data[j * np + i / PANEL].0[i % PANEL]
        })
    }

    /// Number of columns.
    pub(crate) fn cols(&self) -> usize {
        self.cols
    }

    /// `y = self · x` (or as `init` says), in the form `kernel` (one call, for setup and
    /// tests; the stepper calls [`Panels::gemv_in`] from inside its own per-form function).
    ///
    /// # Panics
    /// If `x.len() < cols` or `y.len() < rows`.
    pub(crate) fn gemv(&self, kernel: Kernel, x: &[f64], y: &mut [f64], init: Init) {
        match kernel {
            // SAFETY: `Plain` is baseline code.
            Kernel::Portable => unsafe { self.gemv_in::<Plain, 2>(x, y, init) },
            // SAFETY (both arms): the fused forms are only constructed after
            // `is_x86_feature_detected!` reported their features.
            #[cfg(target_arch = "x86_64")]
            Kernel::Avx2Fma => unsafe { gemv_avx2(self, x, y, init) },
            #[cfg(target_arch = "x86_64")]
            Kernel::Avx512 => unsafe { gemv_avx512(self, x, y, init) },
        }
    }

    /// The kernel body, to be inlined into a function compiled for the form: `V` is the
    /// form's 8-lane vector, `B` its accumulator budget (in 8-lane vectors).
    ///
    /// # Safety
    /// The processor must support `V`'s instructions.
    #[inline(always)]
    pub(crate) unsafe fn gemv_in<V: Lane8, const B: usize>(
        &self,
        x: &[f64],
        y: &mut [f64],
        init: Init,
    ) {
        assert!(x.len() >= self.cols && y.len() >= self.rows, "gemv shapes");
        let x = &x[..self.cols];
        if let Init::Scaled(d, s) = init {
            assert!(d.len() >= self.rows && s.len() >= self.rows, "gemv shapes");
        }
        // Where `y` (and `d`, `s`) extend to the padded height, whole panels are stored:
        // the padding rows of the matrix are zero, so they receive `0` (or `d·s` with `d`
        // padded by zeros).
        let padded = y.len() >= self.ld
            && match init {
                Init::Set => true,
                Init::Scaled(d, s) => d.len() >= self.ld && s.len() >= self.ld,
            };
        let room = if padded { self.ld } else { self.rows };
        let y = &mut y[..room];
        let np = self.ld / PANEL;
        // (G, S): G panels side by side, S column sets; G·S ≤ B accumulators.
        // SAFETY (all calls): forwarded from this function's contract.
        let done = unsafe {
            match (B, np) {
                (_, 0) => 0,
                (8, 1) => self.group::<V, 1, 8>(0, x, y, init),
                (8, 2) => self.group::<V, 2, 4>(0, x, y, init),
                (8, 3) => self.group::<V, 3, 2>(0, x, y, init),
                (8, _) => self.group::<V, 4, 2>(0, x, y, init),
                (4, 1) => self.group::<V, 1, 4>(0, x, y, init),
                (4, 2) => self.group::<V, 2, 2>(0, x, y, init),
                (4, _) => self.group::<V, 4, 1>(0, x, y, init),
                (_, 1) => self.group::<V, 1, 2>(0, x, y, init),
                _ => self.group::<V, 2, 1>(0, x, y, init),
            }
        };
        // Panels left over from the last full group, one at a time.
        let mut p0 = done;
        while p0 < np {
            p0 = unsafe { self.group::<V, 1, 2>(p0, x, y, init) };
        }
    }

    /// Runs full groups of `G` panels from panel `p0` on; returns the first panel not done.
    ///
    /// # Safety
    /// The processor must support `V`'s instructions.
    #[inline(always)]
    unsafe fn group<V: Lane8, const G: usize, const S: usize>(
        &self,
        mut p0: usize,
        x: &[f64],
        y: &mut [f64],
        init: Init,
    ) -> usize {
        let (np, rows) = (self.ld / PANEL, y.len());
        let main = x.len() / S * S;
        let (blocks, _) = x[..main].as_chunks::<S>();
        while p0 + G <= np {
            // SAFETY: `V`'s instructions are supported (this function's contract); every
            // pointer comes from a reference.
            unsafe {
                let mut acc = [[V::zero(); G]; S];
                for (b, xb) in blocks.iter().enumerate() {
                    for s in 0..S {
                        let xj = V::splat(xb[s]);
                        let base = (b * S + s) * np + p0;
                        let col = &self.data[base..base + G];
                        for g in 0..G {
                            acc[s][g] = V::fmadd(xj, V::load(&col[g].0), acc[s][g]);
                        }
                    }
                }
                for (j, &xv) in x.iter().enumerate().skip(main) {
                    let xj = V::splat(xv);
                    let base = j * np + p0;
                    let col = &self.data[base..base + G];
                    for g in 0..G {
                        acc[0][g] = V::fmadd(xj, V::load(&col[g].0), acc[0][g]);
                    }
                }
                // Pairwise sum of the sets (an odd one out joins set 0).
                let mut width = S;
                while width > 1 {
                    let half = width / 2;
                    for i in 0..half {
                        for g in 0..G {
                            acc[i][g] = V::add(acc[i][g], acc[i + half][g]);
                        }
                    }
                    if width % 2 == 1 {
                        for g in 0..G {
                            acc[0][g] = V::add(acc[0][g], acc[width - 1][g]);
                        }
                    }
                    width = half;
                }
                let mut sum = acc[0];
                let r0 = p0 * PANEL;
                if let Init::Scaled(d, s) = init {
                    if r0 + G * PANEL <= rows {
                        let (dg, _) = d[r0..r0 + G * PANEL].as_chunks::<PANEL>();
                        let (sg, _) = s[r0..r0 + G * PANEL].as_chunks::<PANEL>();
                        for g in 0..G {
                            sum[g] = V::fmadd(V::load(&dg[g]), V::load(&sg[g]), sum[g]);
                        }
                    } else {
                        let mut lanes = [0.0; PANEL];
                        for g in 0..G {
                            V::store(sum[g], &mut lanes);
                            for (l, v) in lanes.iter_mut().enumerate() {
                                let i = r0 + g * PANEL + l;
                                if i < rows {
                                    *v += d[i] * s[i];
                                }
                            }
                            sum[g] = V::load(&lanes);
                        }
                    }
                }
                if r0 + G * PANEL <= rows {
                    let (yg, _) = y[r0..r0 + G * PANEL].as_chunks_mut::<PANEL>();
                    for g in 0..G {
                        V::store(sum[g], &mut yg[g]);
                    }
                } else {
                    let mut lanes = [0.0; PANEL];
                    for g in 0..G {
                        V::store(sum[g], &mut lanes);
                        for (l, &v) in lanes.iter().enumerate() {
                            if let Some(t) = y.get_mut(r0 + g * PANEL + l) {
                                *t = v;
                            }
                        }
                    }
                }
            }
            p0 += G;
        }
        p0
    }
}

/// A run of consecutive matrix columns for [`Panels::gemm_in`] and where they find their
/// operand: matrix column `j0 + i` (`j0` the segment's first column) meets, for product
/// column `c`, the entry `data[(c + shift) · ld + row_i]` with `row_i = i`, or `rows[i]`
/// where `rows` is given. So one product reads its right-hand side from several arrays in
/// place (states from a block buffer, inputs straight from the caller's table), with no copy.
#[derive(Clone, Copy)]
pub(crate) struct Segment<'a> {
    pub(crate) data: &'a [f64],
    pub(crate) ld: usize,
    pub(crate) cols: usize,
    pub(crate) rows: Option<&'a [usize]>,
    pub(crate) shift: usize,
    /// Only these of the segment's columns (ascending, each below `cols`; with `rows`
    /// absent): the others are known to meet zeros in `X` (inputs that are 0 over a whole
    /// block, such as heaters in a free run) and are skipped, which changes no result.
    pub(crate) picks: Option<&'a [usize]>,
}

impl Segment<'_> {
    /// Whether `count` product columns stay inside `data`.
    fn fits(&self, count: usize) -> bool {
        let picks_ok = self
            .picks
            .is_none_or(|p| self.rows.is_none() && p.iter().all(|&i| i < self.cols));
        let reach = picks_ok
            && match self.rows {
                Some(r) => r.len() >= self.cols && r[..self.cols].iter().all(|&i| i < self.ld),
                None => self.cols <= self.ld,
            };
        let last_row = match self.rows {
            Some(r) => r[..self.cols].iter().max().map_or(0, |&i| i + 1),
            None => self.cols,
        };
        reach
            && (self.cols == 0 || self.data.len() >= (count - 1 + self.shift) * self.ld + last_row)
    }
}

impl Panels {
    /// `Y[:, c] = A · X[:, c]` for `c < count`, where the rows of `X` come from `segs` (their
    /// column counts add up to `A`'s); `Y` column-major with leading dimension
    /// `ld_y ≥ ⌈rows/8⌉·8`, whole panels stored (zeros into the padding rows).
    ///
    /// The "N" kernel of a BLAS `gemm` with one panel by `NC` product columns in registers:
    /// each matrix line is loaded once per group of `NC` columns and meets `NC` broadcast
    /// entries, so the `NC` accumulator chains are independent and the loop runs at the rate
    /// of the multiply-add units instead of at their latency (`gemv` has one chain per panel
    /// and column set).
    ///
    /// # Safety
    /// The processor must support `V`'s instructions.
    ///
    /// # Panics
    /// If the segments do not cover `A`'s columns, or a slice is too short for the shapes.
    #[inline(always)]
    pub(crate) unsafe fn gemm_in<V: Lane8, const NC: usize>(
        &self,
        segs: &[Segment],
        count: usize,
        y: &mut [f64],
        ld_y: usize,
    ) {
        if count == 0 {
            return;
        }
        assert!(
            ld_y >= self.ld && y.len() >= (count - 1) * ld_y + self.ld,
            "gemm shapes"
        );
        let mut sink = Store { y, ld: ld_y };
        // SAFETY: forwarded from this function's contract; `y`'s size was checked.
        unsafe { self.gemm_into::<V, NC, _>(segs, count, &mut sink) }
    }

    /// [`Panels::gemm_in`] in the form `kernel` (one call).
    pub(crate) fn gemm(
        &self,
        kernel: Kernel,
        segs: &[Segment],
        count: usize,
        y: &mut [f64],
        ld_y: usize,
    ) {
        match kernel {
            // SAFETY: `Plain` is baseline code.
            Kernel::Portable => unsafe { self.gemm_in::<Plain, 2>(segs, count, y, ld_y) },
            // SAFETY (both arms): the fused forms are only constructed after
            // `is_x86_feature_detected!` reported their features.
            #[cfg(target_arch = "x86_64")]
            Kernel::Avx2Fma => unsafe { gemm_avx2(self, segs, count, y, ld_y) },
            #[cfg(target_arch = "x86_64")]
            Kernel::Avx512 => unsafe { gemm_avx512(self, segs, count, y, ld_y) },
        }
    }

    /// `V = A · X` over `count` product columns as in [`Panels::gemm_in`], each panel of `V`
    /// fed at once into the diagonal recursion `s[:, c+1] = d ∘ s[:, c] + V[:, c]` (the state
    /// update of the modal route) instead of being stored: `s` column-major with leading
    /// dimension `ld_s = ⌈rows/8⌉·8`, column 0 given, columns `1 ..= count` written; `d` of
    /// length `ld_s`. The recursion's chain of dependent multiply-adds (one a column) runs
    /// alongside the product's independent ones.
    ///
    /// # Safety
    /// The processor must support `V`'s instructions.
    ///
    /// # Panics
    /// As [`Panels::gemm_in`], or if `d` or `s` is too short.
    #[inline(always)]
    pub(crate) unsafe fn gemm_scan_in<V: Lane8, const NC: usize>(
        &self,
        segs: &[Segment],
        count: usize,
        d: &[f64],
        s: &mut [f64],
    ) {
        let ld = self.ld;
        assert!(d.len() >= ld && s.len() >= (count + 1) * ld, "scan shapes");
        if count == 0 {
            return;
        }
        let mut sink = Scan { d, s, ld };
        // SAFETY: forwarded from this function's contract; the sizes were checked.
        unsafe { self.gemm_into::<V, NC, _>(segs, count, &mut sink) }
    }

    /// The loops of [`Panels::gemm_in`] with the results handed to `sink`.
    ///
    /// # Safety
    /// The processor must support `V`'s instructions; `sink` must accept every panel of
    /// `count` columns.
    #[inline(always)]
    unsafe fn gemm_into<V: Lane8, const NC: usize, K: Sink>(
        &self,
        segs: &[Segment],
        count: usize,
        sink: &mut K,
    ) {
        assert!(
            segs.iter().map(|s| s.cols).sum::<usize>() == self.cols
                && segs.iter().all(|s| s.fits(count)),
            "gemm shapes"
        );
        let y = sink;
        let full = count / NC * NC;
        // SAFETY: forwarded from this function's contract; the bounds were checked above.
        unsafe {
            let mut c0 = 0;
            while c0 < full {
                self.gemm_cols::<V, NC, K>(segs, c0, y);
                c0 += NC;
            }
            // Left-over columns in narrower groups (a group of one is a chain of dependent
            // multiply-adds, four times slower per column than a group of four).
            while NC > 4 && c0 + 4 <= count {
                self.gemm_cols::<V, 4, K>(segs, c0, y);
                c0 += 4;
            }
            while NC > 2 && c0 + 2 <= count {
                self.gemm_cols::<V, 2, K>(segs, c0, y);
                c0 += 2;
            }
            while c0 < count {
                self.gemm_cols::<V, 1, K>(segs, c0, y);
                c0 += 1;
            }
        }
    }

    /// Product columns `c0 .. c0 + NC` of [`Panels::gemm_in`].
    ///
    /// # Safety
    /// The processor must support `V`'s instructions, and the shapes must have been checked.
    #[inline(always)]
    unsafe fn gemm_cols<V: Lane8, const NC: usize, K: Sink>(
        &self,
        segs: &[Segment],
        c0: usize,
        sink: &mut K,
    ) {
        if self.rows <= HALF {
            // SAFETY: forwarded from this function's contract.
            unsafe { self.gemm_cols_half::<V, NC, K>(segs, c0, sink) };
            return;
        }
        let np = self.ld / PANEL;
        let ap = self.data.as_ptr();
        for p in 0..np {
            // SAFETY: `gemm_in` checked that every entry read lies inside its segment's
            // slice and every panel written inside `y`; `V`'s instructions are supported.
            unsafe {
                let mut acc = [V::zero(); NC];
                let mut j = 0;
                for seg in segs {
                    let xp = seg.data.as_ptr().add((c0 + seg.shift) * seg.ld);
                    match (seg.rows, seg.picks) {
                        (None, Some(picks)) => {
                            for &i in picks {
                                let a = V::load(&(*ap.add((j + i) * np + p)).0);
                                for c in 0..NC {
                                    let xv = *xp.add(c * seg.ld + i);
                                    acc[c] = V::fmadd(a, V::splat(xv), acc[c]);
                                }
                            }
                        }
                        (None, None) => {
                            for i in 0..seg.cols {
                                let a = V::load(&(*ap.add((j + i) * np + p)).0);
                                for c in 0..NC {
                                    let xv = *xp.add(c * seg.ld + i);
                                    acc[c] = V::fmadd(a, V::splat(xv), acc[c]);
                                }
                            }
                        }
                        (Some(rows), _) => {
                            for (i, &r) in rows[..seg.cols].iter().enumerate() {
                                let a = V::load(&(*ap.add((j + i) * np + p)).0);
                                for c in 0..NC {
                                    let xv = *xp.add(c * seg.ld + r);
                                    acc[c] = V::fmadd(a, V::splat(xv), acc[c]);
                                }
                            }
                        }
                    }
                    j += seg.cols;
                }
                sink.put::<V, NC>(p, c0, acc);
            }
        }
    }

    /// [`Panels::gemm_cols`] for a matrix of at most [`HALF`] rows (one panel, its lower
    /// half zero): the multiply-adds run on half-width vectors, which cost half as much
    /// where a full one is executed as two halves, and the result is widened with zeros.
    ///
    /// # Safety
    /// As [`Panels::gemm_cols`].
    #[inline(always)]
    unsafe fn gemm_cols_half<V: Lane8, const NC: usize, K: Sink>(
        &self,
        segs: &[Segment],
        c0: usize,
        sink: &mut K,
    ) {
        let ap = self.data.as_ptr();
        // SAFETY: as in `gemm_cols`; one panel (`rows ≤ 4 < 8`).
        unsafe {
            let mut acc = [V::half_zero(); NC];
            let mut j = 0;
            for seg in segs {
                let xp = seg.data.as_ptr().add((c0 + seg.shift) * seg.ld);
                match (seg.rows, seg.picks) {
                    (None, Some(picks)) => {
                        for &i in picks {
                            let a = V::half_load(&(*ap.add(j + i)).0);
                            for c in 0..NC {
                                let xv = *xp.add(c * seg.ld + i);
                                acc[c] = V::half_fmadd(a, V::half_splat(xv), acc[c]);
                            }
                        }
                    }
                    (None, None) => {
                        for i in 0..seg.cols {
                            let a = V::half_load(&(*ap.add(j + i)).0);
                            for c in 0..NC {
                                let xv = *xp.add(c * seg.ld + i);
                                acc[c] = V::half_fmadd(a, V::half_splat(xv), acc[c]);
                            }
                        }
                    }
                    (Some(rows), _) => {
                        for (i, &r) in rows[..seg.cols].iter().enumerate() {
                            let a = V::half_load(&(*ap.add(j + i)).0);
                            for c in 0..NC {
                                let xv = *xp.add(c * seg.ld + r);
                                acc[c] = V::half_fmadd(a, V::half_splat(xv), acc[c]);
                            }
                        }
                    }
                }
                j += seg.cols;
            }
            let mut wide = [V::zero(); NC];
            for c in 0..NC {
                wide[c] = V::widen(acc[c]);
            }
            sink.put::<V, NC>(0, c0, wide);
        }
    }
}

/// Rows of a matrix whose products run on half-width vectors ([`Panels::gemm_in`]).
pub(crate) const HALF: usize = PANEL / 2;

/// Where [`Panels::gemm_into`] delivers each finished panel of product columns.
trait Sink {
    /// Panel `p` of product columns `c0 .. c0 + NC`.
    ///
    /// # Safety
    /// The processor must support `V`'s instructions, and the sink must have room for
    /// these columns.
    unsafe fn put<V: Lane8, const NC: usize>(&mut self, p: usize, c0: usize, acc: [V; NC]);
}

/// Stores the product, column-major with leading dimension `ld`.
struct Store<'a> {
    y: &'a mut [f64],
    ld: usize,
}

impl Sink for Store<'_> {
    #[inline(always)]
    unsafe fn put<V: Lane8, const NC: usize>(&mut self, p: usize, c0: usize, acc: [V; NC]) {
        let yp = self.y.as_mut_ptr();
        for c in 0..NC {
            // SAFETY: `gemm_in` checked that `y` holds every column's panels.
            unsafe {
                let dst = yp
                    .add((c0 + c) * self.ld + p * PANEL)
                    .cast::<[f64; PANEL]>();
                V::store(acc[c], &mut *dst);
            }
        }
    }
}

/// Feeds the product into `s[:, c+1] = d ∘ s[:, c] + V[:, c]`.
struct Scan<'a> {
    d: &'a [f64],
    s: &'a mut [f64],
    ld: usize,
}

impl Sink for Scan<'_> {
    #[inline(always)]
    unsafe fn put<V: Lane8, const NC: usize>(&mut self, p: usize, c0: usize, acc: [V; NC]) {
        let sp = self.s.as_mut_ptr();
        let r = p * PANEL;
        // SAFETY: `gemm_scan_in` checked that `d` and columns `0 ..= count` of `s` are there;
        // column `c0` was written before (given, or by the previous group of columns).
        unsafe {
            let d = V::load(&*self.d.as_ptr().add(r).cast::<[f64; PANEL]>());
            let mut x = V::load(&*sp.add(c0 * self.ld + r).cast::<[f64; PANEL]>());
            for c in 0..NC {
                x = V::fmadd(d, x, acc[c]);
                V::store(
                    x,
                    &mut *sp.add((c0 + c + 1) * self.ld + r).cast::<[f64; PANEL]>(),
                );
            }
        }
    }
}

/// Eight `f64` lanes (one panel column) in the registers of one kernel form.
///
/// # Safety
/// Every method may use instructions of its form; call them only where the processor
/// supports them (inside the form's `#[target_feature]` functions, where they inline).
pub(crate) trait Lane8: Copy {
    /// All lanes 0.
    unsafe fn zero() -> Self;
    /// All lanes `x`.
    unsafe fn splat(x: f64) -> Self;
    /// The eight values at `p`.
    unsafe fn load(p: &[f64; PANEL]) -> Self;
    /// `a·b + c` (fused where the form has FMA).
    unsafe fn fmadd(a: Self, b: Self, c: Self) -> Self;
    /// `a + b`.
    unsafe fn add(a: Self, b: Self) -> Self;
    /// Writes the lanes to `p`.
    unsafe fn store(self, p: &mut [f64; PANEL]);
    /// The sum of the eight lanes.
    unsafe fn sum(self) -> f64;
    /// Four lanes (the first half of a panel column).
    type Half: Copy;
    /// Four lanes of 0.
    unsafe fn half_zero() -> Self::Half;
    /// The first four values at `p`.
    unsafe fn half_load(p: &[f64; PANEL]) -> Self::Half;
    /// Four lanes of `x`.
    unsafe fn half_splat(x: f64) -> Self::Half;
    /// `a·b + c` on four lanes.
    unsafe fn half_fmadd(a: Self::Half, b: Self::Half, c: Self::Half) -> Self::Half;
    /// Eight lanes: `h`, then four zeros.
    unsafe fn widen(h: Self::Half) -> Self;
    /// `dst ← src` (equal lengths) in this form's registers, a short tail masked where the
    /// form can: a row of a few values copied this way costs a few instructions, where
    /// `copy_from_slice` calls `memcpy`.
    unsafe fn copy(dst: &mut [f64], src: &[f64]);
}

/// The baseline form: plain arrays, separate multiply and add (SSE2 on x86-64).
#[derive(Clone, Copy)]
pub(crate) struct Plain([f64; PANEL]);

impl Lane8 for Plain {
    #[inline(always)]
    unsafe fn zero() -> Self {
        Plain([0.0; PANEL])
    }
    #[inline(always)]
    unsafe fn splat(x: f64) -> Self {
        Plain([x; PANEL])
    }
    #[inline(always)]
    unsafe fn load(p: &[f64; PANEL]) -> Self {
        Plain(*p)
    }
    #[inline(always)]
    unsafe fn fmadd(a: Self, b: Self, c: Self) -> Self {
        let mut out = c.0;
        for l in 0..PANEL {
            out[l] += a.0[l] * b.0[l];
        }
        Plain(out)
    }
    #[inline(always)]
    unsafe fn add(a: Self, b: Self) -> Self {
        let mut out = a.0;
        for l in 0..PANEL {
            out[l] += b.0[l];
        }
        Plain(out)
    }
    #[inline(always)]
    unsafe fn store(self, p: &mut [f64; PANEL]) {
        *p = self.0;
    }
    #[inline(always)]
    unsafe fn sum(self) -> f64 {
        let v = self.0;
        ((v[0] + v[4]) + (v[2] + v[6])) + ((v[1] + v[5]) + (v[3] + v[7]))
    }
    type Half = [f64; 4];
    #[inline(always)]
    unsafe fn half_zero() -> Self::Half {
        [0.0; 4]
    }
    #[inline(always)]
    unsafe fn half_load(p: &[f64; PANEL]) -> Self::Half {
        [p[0], p[1], p[2], p[3]]
    }
    #[inline(always)]
    unsafe fn half_splat(x: f64) -> Self::Half {
        [x; 4]
    }
    #[inline(always)]
    unsafe fn half_fmadd(a: Self::Half, b: Self::Half, c: Self::Half) -> Self::Half {
        let mut out = c;
        for l in 0..4 {
            out[l] += a[l] * b[l];
        }
        out
    }
    #[inline(always)]
    unsafe fn widen(h: Self::Half) -> Self {
        Plain([h[0], h[1], h[2], h[3], 0.0, 0.0, 0.0, 0.0])
    }
    #[inline(always)]
    unsafe fn copy(dst: &mut [f64], src: &[f64]) {
        dst.copy_from_slice(src);
    }
}

#[cfg(target_arch = "x86_64")]
mod x86 {
    use super::{Lane8, PANEL};
    use std::arch::x86_64::*;

    /// The half-width (4-lane, 256-bit) methods of [`Lane8`], the same for both AVX forms
    /// but for the features their functions are compiled with.
    macro_rules! half_lanes {
        ($features:literal) => {
            type Half = __m256d;
            #[inline]
            #[target_feature(enable = $features)]
            unsafe fn half_zero() -> __m256d {
                _mm256_setzero_pd()
            }
            #[inline]
            #[target_feature(enable = $features)]
            unsafe fn half_load(p: &[f64; PANEL]) -> __m256d {
                // SAFETY: `p` holds 8 values; unaligned load of the first 4.
                unsafe { _mm256_loadu_pd(p.as_ptr()) }
            }
            #[inline]
            #[target_feature(enable = $features)]
            unsafe fn half_splat(x: f64) -> __m256d {
                _mm256_set1_pd(x)
            }
            #[inline]
            #[target_feature(enable = $features)]
            unsafe fn half_fmadd(a: __m256d, b: __m256d, c: __m256d) -> __m256d {
                _mm256_fmadd_pd(a, b, c)
            }
        };
    }

    /// AVX2 + FMA: two 256-bit registers.
    #[derive(Clone, Copy)]
    pub(crate) struct Avx2([__m256d; 2]);

    impl Lane8 for Avx2 {
        #[inline]
        #[target_feature(enable = "avx2,fma")]
        unsafe fn zero() -> Self {
            Avx2([_mm256_setzero_pd(); 2])
        }
        #[inline]
        #[target_feature(enable = "avx2,fma")]
        unsafe fn splat(x: f64) -> Self {
            Avx2([_mm256_set1_pd(x); 2])
        }
        #[inline]
        #[target_feature(enable = "avx2,fma")]
        unsafe fn load(p: &[f64; PANEL]) -> Self {
            // SAFETY: `p` holds 8 values; unaligned loads.
            unsafe {
                Avx2([
                    _mm256_loadu_pd(p.as_ptr()),
                    _mm256_loadu_pd(p.as_ptr().add(4)),
                ])
            }
        }
        #[inline]
        #[target_feature(enable = "avx2,fma")]
        unsafe fn fmadd(a: Self, b: Self, c: Self) -> Self {
            Avx2([
                _mm256_fmadd_pd(a.0[0], b.0[0], c.0[0]),
                _mm256_fmadd_pd(a.0[1], b.0[1], c.0[1]),
            ])
        }
        #[inline]
        #[target_feature(enable = "avx2,fma")]
        unsafe fn add(a: Self, b: Self) -> Self {
            Avx2([_mm256_add_pd(a.0[0], b.0[0]), _mm256_add_pd(a.0[1], b.0[1])])
        }
        #[inline]
        #[target_feature(enable = "avx2,fma")]
        unsafe fn store(self, p: &mut [f64; PANEL]) {
            // SAFETY: `p` holds 8 values; unaligned stores.
            unsafe {
                _mm256_storeu_pd(p.as_mut_ptr(), self.0[0]);
                _mm256_storeu_pd(p.as_mut_ptr().add(4), self.0[1]);
            }
        }
        #[inline]
        #[target_feature(enable = "avx2,fma")]
        unsafe fn sum(self) -> f64 {
            // Lanes (0+4, 1+5, 2+6, 3+7), then pairs, then the last two.
            let v = _mm256_add_pd(self.0[0], self.0[1]);
            let lo = _mm256_castpd256_pd128(v);
            let hi = _mm256_extractf128_pd::<1>(v);
            let s = _mm_add_pd(lo, hi);
            _mm_cvtsd_f64(_mm_add_sd(s, _mm_unpackhi_pd(s, s)))
        }
        half_lanes!("avx2,fma");
        #[inline]
        #[target_feature(enable = "avx2,fma")]
        unsafe fn widen(h: __m256d) -> Self {
            Avx2([h, _mm256_setzero_pd()])
        }
        #[inline]
        #[target_feature(enable = "avx2,fma")]
        unsafe fn copy(dst: &mut [f64], src: &[f64]) {
            assert_eq!(dst.len(), src.len(), "copy lengths");
            let (len, d, s) = (src.len(), dst.as_mut_ptr(), src.as_ptr());
            let mut i = 0;
            // SAFETY: every access is below `len` (whole chunks, then a masked tail).
            unsafe {
                while i + 4 <= len {
                    _mm256_storeu_pd(d.add(i), _mm256_loadu_pd(s.add(i)));
                    i += 4;
                }
                if i < len {
                    let r = (len - i) as i64;
                    let mask = _mm256_set_epi64x(
                        -i64::from(r > 3),
                        -i64::from(r > 2),
                        -i64::from(r > 1),
                        -1,
                    );
                    _mm256_maskstore_pd(d.add(i), mask, _mm256_maskload_pd(s.add(i), mask));
                }
            }
        }
    }

    /// AVX-512F: one 512-bit register.
    #[derive(Clone, Copy)]
    pub(crate) struct Avx512(__m512d);

    impl Lane8 for Avx512 {
        #[inline]
        #[target_feature(enable = "avx512f")]
        unsafe fn zero() -> Self {
            Avx512(_mm512_setzero_pd())
        }
        #[inline]
        #[target_feature(enable = "avx512f")]
        unsafe fn splat(x: f64) -> Self {
            Avx512(_mm512_set1_pd(x))
        }
        #[inline]
        #[target_feature(enable = "avx512f")]
        unsafe fn load(p: &[f64; PANEL]) -> Self {
            // SAFETY: `p` holds 8 values; unaligned load.
            unsafe { Avx512(_mm512_loadu_pd(p.as_ptr())) }
        }
        #[inline]
        #[target_feature(enable = "avx512f")]
        unsafe fn fmadd(a: Self, b: Self, c: Self) -> Self {
            Avx512(_mm512_fmadd_pd(a.0, b.0, c.0))
        }
        #[inline]
        #[target_feature(enable = "avx512f")]
        unsafe fn add(a: Self, b: Self) -> Self {
            Avx512(_mm512_add_pd(a.0, b.0))
        }
        #[inline]
        #[target_feature(enable = "avx512f")]
        unsafe fn store(self, p: &mut [f64; PANEL]) {
            // SAFETY: `p` holds 8 values; unaligned store.
            unsafe { _mm512_storeu_pd(p.as_mut_ptr(), self.0) }
        }
        #[inline]
        #[target_feature(enable = "avx512f")]
        unsafe fn sum(self) -> f64 {
            // Lanes (0+4, 1+5, 2+6, 3+7), then pairs, then the last two.
            let v = _mm256_add_pd(
                _mm512_castpd512_pd256(self.0),
                _mm512_extractf64x4_pd::<1>(self.0),
            );
            let lo = _mm256_castpd256_pd128(v);
            let hi = _mm256_extractf128_pd::<1>(v);
            let s = _mm_add_pd(lo, hi);
            _mm_cvtsd_f64(_mm_add_sd(s, _mm_unpackhi_pd(s, s)))
        }
        half_lanes!("avx512f,avx2,fma");
        #[inline]
        #[target_feature(enable = "avx512f,avx2,fma")]
        unsafe fn widen(h: __m256d) -> Self {
            Avx512(_mm512_zextpd256_pd512(h))
        }
        #[inline]
        #[target_feature(enable = "avx512f")]
        unsafe fn copy(dst: &mut [f64], src: &[f64]) {
            assert_eq!(dst.len(), src.len(), "copy lengths");
            let (len, d, s) = (src.len(), dst.as_mut_ptr(), src.as_ptr());
            let mut i = 0;
            // SAFETY: every access is below `len` (whole chunks, then a masked tail, whose
            // masked-off lanes are neither read nor written).
            unsafe {
                while i + PANEL <= len {
                    _mm512_storeu_pd(d.add(i), _mm512_loadu_pd(s.add(i)));
                    i += PANEL;
                }
                if i < len {
                    let mask: __mmask8 = (1u8 << (len - i)) - 1;
                    _mm512_mask_storeu_pd(d.add(i), mask, _mm512_maskz_loadu_pd(mask, s.add(i)));
                }
            }
        }
    }
}

#[cfg(target_arch = "x86_64")]
pub(crate) use x86::{Avx2, Avx512};

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn gemm_avx2(a: &Panels, segs: &[Segment], count: usize, y: &mut [f64], ld_y: usize) {
    // SAFETY: this function's features are those of `Avx2`.
    unsafe { a.gemm_in::<Avx2, 4>(segs, count, y, ld_y) }
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx512f,avx2,fma")]
unsafe fn gemm_avx512(a: &Panels, segs: &[Segment], count: usize, y: &mut [f64], ld_y: usize) {
    // SAFETY: this function's features include those of `Avx512`.
    unsafe { a.gemm_in::<Avx512, 8>(segs, count, y, ld_y) }
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn gemv_avx2(a: &Panels, x: &[f64], y: &mut [f64], init: Init) {
    // SAFETY: this function's features are those of `Avx2`.
    unsafe { a.gemv_in::<Avx2, 4>(x, y, init) }
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx512f,avx2,fma")]
unsafe fn gemv_avx512(a: &Panels, x: &[f64], y: &mut [f64], init: Init) {
    // SAFETY: this function's features include those of `Avx512`.
    unsafe { a.gemv_in::<Avx512, 8>(x, y, init) }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn matches_nalgebra_product() {
        let m = DMatrix::from_fn(3, 7, |i, j| (i * 7 + j) as f64 - 9.5);
        let x: Vec<f64> = (0..7).map(|j| 0.25 * j as f64 - 1.0).collect();
        let want = &m * nalgebra::DVector::from_column_slice(&x);
        let p = Packed::from_matrix(&m);
        let mut y = vec![1.0; 3];
        p.mul_into(&x, &mut y);
        assert_eq!(y, want.as_slice());
    }

    /// The product over segments (consecutive rows, a row map, a shifted column) and the
    /// fused recursion, every form, column counts around the group widths (8, 4, 2, 1),
    /// against nalgebra on small integers (so exact: bit for bit).
    #[test]
    fn gemm_over_segments_and_the_fused_scan_match_nalgebra_exactly() {
        // With `skip`, inputs 1 and 4 are 0 throughout and the inputs' segment picks the
        // others: the same products.
        let cases = [1, 3, 4, 5, 6, 8, 9, 17, 40]
            .into_iter()
            .flat_map(|r| [(r, false), (r, true)]);
        for (rows, skip) in cases {
            for count in [1, 3, 7, 8, 13, 16, 21] {
                let (n, m, mt) = (rows + 2, 5, 2);
                let cols = n + m + mt;
                let a = DMatrix::from_fn(rows, cols, |i, j| ((i * 3 + j * 5) % 11) as f64 - 5.0);
                let ld_s = n + 3;
                let sdata: Vec<f64> = (0..ld_s * count).map(|i| (i % 7) as f64 - 3.0).collect();
                let udata: Vec<f64> = (0..m * (count + 1))
                    .map(|i| {
                        if skip && (i % m == 1 || i % m == 4) {
                            0.0
                        } else {
                            (i % 5) as f64 - 1.0
                        }
                    })
                    .collect();
                let picks = [0, 2, 3];
                let map = [3, 1];
                // The right-hand side the segments describe, as one matrix.
                let x = DMatrix::from_fn(cols, count, |j, c| {
                    if j < n {
                        sdata[c * ld_s + j]
                    } else if j < n + m {
                        udata[c * m + j - n]
                    } else {
                        udata[(c + 1) * m + map[j - n - m]]
                    }
                });
                let want = &a * &x;
                let segs = [
                    Segment {
                        data: &sdata,
                        ld: ld_s,
                        cols: n,
                        rows: None,
                        shift: 0,
                        picks: None,
                    },
                    Segment {
                        data: &udata,
                        ld: m,
                        cols: m,
                        rows: None,
                        shift: 0,
                        picks: skip.then_some(&picks[..]),
                    },
                    Segment {
                        data: &udata,
                        ld: m,
                        cols: mt,
                        rows: Some(&map),
                        shift: 1,
                        picks: None,
                    },
                ];
                let p = Panels::from_matrix(&a);
                let ld_y = rows.div_ceil(PANEL) * PANEL;
                // The recursion's decay: 0, ±1, 2 keep every value an integer.
                let d: Vec<f64> = (0..ld_y).map(|i| [1.0, -1.0, 0.0, 2.0][i % 4]).collect();
                let s0: Vec<f64> = (0..ld_y).map(|i| (i % 3) as f64).collect();
                let mut scan_want = vec![0.0; ld_y * (count + 1)];
                scan_want[..ld_y].copy_from_slice(&s0);
                for c in 0..count {
                    for i in 0..ld_y {
                        let v = if i < rows { want[(i, c)] } else { 0.0 };
                        scan_want[(c + 1) * ld_y + i] = d[i] * scan_want[c * ld_y + i] + v;
                    }
                }
                for k in Kernel::available() {
                    let mut y = vec![f64::NAN; ld_y * count];
                    let mut s = vec![f64::NAN; ld_y * (count + 1)];
                    s[..ld_y].copy_from_slice(&s0);
                    // SAFETY: each form only where the processor has it (`available`).
                    unsafe {
                        match k {
                            Kernel::Portable => {
                                p.gemm_in::<Plain, 2>(&segs, count, &mut y, ld_y);
                                p.gemm_scan_in::<Plain, 2>(&segs, count, &d, &mut s);
                            }
                            #[cfg(target_arch = "x86_64")]
                            Kernel::Avx2Fma => {
                                gemm_both_avx2(&p, &segs, count, &mut y, ld_y, &d, &mut s)
                            }
                            #[cfg(target_arch = "x86_64")]
                            Kernel::Avx512 => {
                                gemm_both_avx512(&p, &segs, count, &mut y, ld_y, &d, &mut s)
                            }
                        }
                    }
                    for c in 0..count {
                        for i in 0..ld_y {
                            let w = if i < rows { want[(i, c)] } else { 0.0 };
                            assert_eq!(
                                y[c * ld_y + i],
                                w,
                                "{rows}×{cols}, {count} columns, {k:?}: ({i}, {c})"
                            );
                        }
                    }
                    assert_eq!(s, scan_want, "{rows} rows, {count} columns, {k:?}: scan");
                }
            }
        }
    }

    #[cfg(target_arch = "x86_64")]
    #[target_feature(enable = "avx2,fma")]
    unsafe fn gemm_both_avx2(
        p: &Panels,
        segs: &[Segment],
        count: usize,
        y: &mut [f64],
        ld_y: usize,
        d: &[f64],
        s: &mut [f64],
    ) {
        unsafe {
            p.gemm_in::<Avx2, 4>(segs, count, y, ld_y);
            p.gemm_scan_in::<Avx2, 4>(segs, count, d, s);
        }
    }

    #[cfg(target_arch = "x86_64")]
    #[target_feature(enable = "avx512f,avx2,fma")]
    unsafe fn gemm_both_avx512(
        p: &Panels,
        segs: &[Segment],
        count: usize,
        y: &mut [f64],
        ld_y: usize,
        d: &[f64],
        s: &mut [f64],
    ) {
        unsafe {
            p.gemm_in::<Avx512, 8>(segs, count, y, ld_y);
            p.gemm_scan_in::<Avx512, 8>(segs, count, d, s);
        }
    }

    /// Every shape around the panel and group boundaries (1–6 panels, so every `(G, S)` pair
    /// and the left-over panels run), every form, set and scaled; the entries are small
    /// integers so every product and sum is exact in `f64` and the kernels must agree with
    /// nalgebra's product bit for bit.
    #[test]
    fn panels_match_nalgebra_product_exactly() {
        for rows in [0, 1, 3, 7, 8, 9, 16, 17, 24, 25, 33, 40, 41] {
            for (ca, cb) in [(0, 0), (0, 3), (1, 0), (4, 1), (5, 6), (13, 2), (40, 12)] {
                let a = DMatrix::from_fn(rows, ca, |i, j| ((i * 3 + j * 5) % 11) as f64 - 5.0);
                let b = DMatrix::from_fn(rows, cb, |i, j| ((i * 7 + j * 2) % 13) as f64 - 6.0);
                let x: Vec<f64> = (0..ca + cb).map(|j| (j % 5) as f64 - 2.0).collect();
                let d: Vec<f64> = (0..rows).map(|i| (i % 3) as f64 - 1.0).collect();
                let s: Vec<f64> = (0..rows).map(|i| (i % 4) as f64).collect();
                let mut full = DMatrix::zeros(rows, ca + cb);
                full.columns_mut(0, ca).copy_from(&a);
                full.columns_mut(ca, cb).copy_from(&b);
                let want = &full * nalgebra::DVector::from_column_slice(&x);
                let p = Panels::from_blocks(&a, &b);
                for k in Kernel::available() {
                    let mut y = vec![3.0; rows];
                    p.gemv(k, &x, &mut y, Init::Set);
                    assert_eq!(y, want.as_slice(), "{rows}×({ca}+{cb}) {k:?}");
                    p.gemv(k, &x, &mut y, Init::Scaled(&d, &s));
                    let scaled: Vec<f64> = (0..rows).map(|i| d[i] * s[i] + want[i]).collect();
                    assert_eq!(y, scaled, "{rows}×({ca}+{cb}) {k:?} scaled");
                }
            }
        }
    }
}
