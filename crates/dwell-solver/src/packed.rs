//! Row-major packed matrices and the plain loops the stepper runs on.
//!
//! A hand-written dot product over contiguous rows with four independent accumulators beat
//! nalgebra's `gemv` by 1.3–2.5× in a prototype on the target machine (DESIGN.md); the four
//! accumulators let the compiler keep several multiply-adds in flight.

use nalgebra::DMatrix;

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
    #[inline]
    pub(crate) fn mul_into(&self, x: &[f64], y: &mut [f64]) {
        debug_assert_eq!(x.len(), self.cols);
        for (i, yi) in y.iter_mut().enumerate().take(self.rows) {
            *yi = dot(self.row(i), x);
        }
    }

    /// `y += self · x`.
    #[inline]
    pub(crate) fn mul_add_into(&self, x: &[f64], y: &mut [f64]) {
        debug_assert_eq!(x.len(), self.cols);
        for (i, yi) in y.iter_mut().enumerate().take(self.rows) {
            *yi += dot(self.row(i), x);
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
        p.mul_add_into(&x, &mut y);
        assert_eq!(y, (want * 2.0).as_slice());
    }
}
