//! Packed matrices and the plain loops the stepper runs on.
//!
//! Two layouts:
//!
//! - [`Packed`]: row by row, for single rows (`dot`) used by the thermostats;
//! - [`Panels`]: the matrix cut into panels of 4 or 8 rows, each panel stored column by
//!   column (4 or 8 values per column, zero-padded). `y = A x` then runs as, per panel,
//!   `acc += x_j · A[panel, j]` over the columns `j`: the accumulators stay in vector
//!   registers, every matrix entry is loaded once, contiguously, and there is no horizontal
//!   sum. This is the layout of the "N" kernel of a BLAS `gemv`; written as plain loops over
//!   fixed-size arrays, the compiler vectorises it.
//!
//! The kernel is compiled twice: for the x86-64 baseline (SSE2, which every x86-64 has) and,
//! where the processor reports AVX2 and FMA at run time (`is_x86_feature_detected!`), with
//! 256-bit registers and fused multiply-adds. The choice is made once, in
//! [`Kernel::detect`]; a shipped binary therefore runs on any x86-64 and still uses the wider
//! units where they exist. The fused kernel rounds once per multiply-add instead of twice;
//! the results differ from the baseline's by rounding only (about `1e-16` relative per term).
//!
//! On the development machine a hand-written loop over a packed matrix beat nalgebra's
//! `gemv` by 1.3–2.5× in a prototype (DESIGN.md); the panel kernel is another 3–10× faster
//! than the row-wise dot products this module used before (docs/performance.md).

use nalgebra::DMatrix;

/// Rows per panel, tall: two 256-bit registers (or four 128-bit ones) of `f64`.
const TALL: usize = 8;
/// Rows per panel, short (for few rows, such as readouts): one 256-bit register.
const SHORT: usize = 4;

/// A dense matrix stored row by row.
#[derive(Clone, Debug)]
pub(crate) struct Packed {
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

    pub(crate) fn rows(&self) -> usize {
        self.rows
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

/// Which compiled form of the panel kernel runs.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum Kernel {
    /// Baseline x86-64 (SSE2) or any other architecture: separate multiply and add.
    Portable,
    /// x86-64 with AVX2 and FMA, detected at run time.
    #[cfg(target_arch = "x86_64")]
    Avx2Fma,
}

impl Kernel {
    /// The fastest form this processor supports.
    pub(crate) fn detect() -> Self {
        #[cfg(target_arch = "x86_64")]
        {
            if std::is_x86_feature_detected!("avx2") && std::is_x86_feature_detected!("fma") {
                return Kernel::Avx2Fma;
            }
        }
        Kernel::Portable
    }
}

/// A dense `rows × cols` matrix in panels of `height` rows (4 or 8, whichever pads less;
/// 8 on a tie), each panel column-major.
#[derive(Clone, Debug)]
pub(crate) struct Panels {
    rows: usize,
    cols: usize,
    height: usize,
    /// `ceil(rows / height)` panels of `cols · height` values.
    data: Vec<f64>,
}

impl Panels {
    /// Packs the columns `[a | b]` (same row count).
    pub(crate) fn from_blocks(a: &DMatrix<f64>, b: &DMatrix<f64>) -> Self {
        debug_assert_eq!(a.nrows(), b.nrows());
        let rows = a.nrows();
        let cols = a.ncols() + b.ncols();
        let height = if rows.div_ceil(SHORT) * SHORT < rows.div_ceil(TALL) * TALL {
            SHORT
        } else {
            TALL
        };
        let np = rows.div_ceil(height);
        let mut data = vec![0.0; np * cols * height];
        for p in 0..np {
            let panel = &mut data[p * cols * height..(p + 1) * cols * height];
            for r in 0..height.min(rows - p * height) {
                let i = p * height + r;
                for j in 0..cols {
                    let v = if j < a.ncols() {
                        a[(i, j)]
                    } else {
                        b[(i, j - a.ncols())]
                    };
                    panel[j * height + r] = v;
                }
            }
        }
        Panels {
            rows,
            cols,
            height,
            data,
        }
    }

    /// Packs `a`.
    pub(crate) fn from_matrix(a: &DMatrix<f64>) -> Self {
        Self::from_blocks(a, &DMatrix::zeros(a.nrows(), 0))
    }

    /// Number of columns.
    pub(crate) fn cols(&self) -> usize {
        self.cols
    }

    /// `y = self · x` (`add = false`) or `y += self · x` (`add = true`).
    ///
    /// # Panics
    /// If `x.len() != cols` or `y.len() != rows`.
    #[inline]
    pub(crate) fn gemv(&self, kernel: Kernel, x: &[f64], y: &mut [f64], add: bool) {
        assert!(x.len() == self.cols && y.len() == self.rows, "gemv shapes");
        let (d, c) = (&self.data, self.cols);
        match (kernel, self.height) {
            (Kernel::Portable, TALL) => gemv_body::<false, TALL, 2>(d, c, x, y, add),
            (Kernel::Portable, _) => gemv_body::<false, SHORT, 4>(d, c, x, y, add),
            // SAFETY (both arms): `Kernel::Avx2Fma` is only constructed after
            // `is_x86_feature_detected!` reported AVX2 and FMA.
            #[cfg(target_arch = "x86_64")]
            (Kernel::Avx2Fma, TALL) => unsafe { gemv_avx2_fma_tall(d, c, x, y, add) },
            #[cfg(target_arch = "x86_64")]
            (Kernel::Avx2Fma, _) => unsafe { gemv_avx2_fma_short(d, c, x, y, add) },
        }
    }
}

// Accumulators: the portable (SSE2) forms hold 8 of the 16 128-bit registers, the AVX2 forms
// 8 of the 16 256-bit registers, leaving room for loads; that is 4–8 independent chains of
// vector multiply-adds in flight.

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn gemv_avx2_fma_tall(data: &[f64], cols: usize, x: &[f64], y: &mut [f64], add: bool) {
    gemv_body::<true, TALL, 4>(data, cols, x, y, add)
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn gemv_avx2_fma_short(data: &[f64], cols: usize, x: &[f64], y: &mut [f64], add: bool) {
    gemv_body::<true, SHORT, 8>(data, cols, x, y, add)
}

/// `acc + a·b`, fused when `FUSED` (then only called where FMA is enabled).
#[inline(always)]
fn madd<const FUSED: bool>(a: f64, b: f64, acc: f64) -> f64 {
    if FUSED {
        a.mul_add(b, acc)
    } else {
        acc + a * b
    }
}

/// The panel kernel. `SETS` sets of accumulators (columns `j mod SETS`) keep independent
/// dependency chains of vector multiply-adds in flight.
#[inline(always)]
fn gemv_body<const FUSED: bool, const P: usize, const SETS: usize>(
    data: &[f64],
    cols: usize,
    x: &[f64],
    y: &mut [f64],
    add: bool,
) {
    if cols == 0 {
        if !add {
            y.iter_mut().for_each(|v| *v = 0.0);
        }
        return;
    }
    let x = &x[..cols];
    for (panel, yp) in data.chunks_exact(cols * P).zip(y.chunks_mut(P)) {
        let mut acc = [[0.0_f64; P]; SETS];
        let groups = panel.chunks_exact(SETS * P);
        let rest = groups.remainder();
        for (g, xg) in groups.zip(x.chunks_exact(SETS)) {
            for (a, (col, &xj)) in acc.iter_mut().zip(g.chunks_exact(P).zip(xg)) {
                for r in 0..P {
                    a[r] = madd::<FUSED>(xj, col[r], a[r]);
                }
            }
        }
        let x_rest = &x[cols - rest.len() / P..];
        for (a, (col, &xj)) in acc.iter_mut().zip(rest.chunks_exact(P).zip(x_rest)) {
            for r in 0..P {
                a[r] = madd::<FUSED>(xj, col[r], a[r]);
            }
        }
        for (r, v) in yp.iter_mut().enumerate() {
            let mut sum = acc[0][r];
            for a in &acc[1..] {
                sum += a[r];
            }
            *v = if add { *v + sum } else { sum };
        }
    }
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

    /// Every shape around the panel and quad boundaries, both kernels, set and add; the
    /// entries are small integers so every product and sum is exact in `f64` and the kernels
    /// must agree with nalgebra's product bit for bit.
    #[test]
    fn panels_match_nalgebra_product_exactly() {
        let kernels = [Kernel::Portable, Kernel::detect()];
        for rows in [0, 1, 3, 4, 5, 7, 8, 9, 12, 17] {
            for (ca, cb) in [(0, 0), (0, 3), (1, 0), (4, 1), (5, 6), (13, 2)] {
                let a = DMatrix::from_fn(rows, ca, |i, j| ((i * 3 + j * 5) % 11) as f64 - 5.0);
                let b = DMatrix::from_fn(rows, cb, |i, j| ((i * 7 + j * 2) % 13) as f64 - 6.0);
                let x: Vec<f64> = (0..ca + cb).map(|j| (j % 5) as f64 - 2.0).collect();
                let mut full = DMatrix::zeros(rows, ca + cb);
                full.columns_mut(0, ca).copy_from(&a);
                full.columns_mut(ca, cb).copy_from(&b);
                let want = &full * nalgebra::DVector::from_column_slice(&x);
                let p = Panels::from_blocks(&a, &b);
                for k in kernels {
                    let mut y = vec![3.0; rows];
                    p.gemv(k, &x, &mut y, false);
                    assert_eq!(y, want.as_slice(), "{rows}×({ca}+{cb}) {k:?}");
                    p.gemv(k, &x, &mut y, true);
                    let twice: Vec<f64> = want.iter().map(|v| 2.0 * v).collect();
                    assert_eq!(y, twice, "{rows}×({ca}+{cb}) {k:?} add");
                }
            }
        }
    }
}
