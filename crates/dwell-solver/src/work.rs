//! The stepper's working vectors in one cache-line-aligned allocation.
//!
//! `z = [ξ; u_k; u_{k+1,T}]`, the next state and the readouts are read and written every
//! step with full-width vector loads and stores. In one block, each section starting on its
//! own 64-byte line, no such access straddles two cache lines and the sections' relative
//! offsets are fixed and small (no accidental 4 KiB-apart placement of a store and a later
//! load). Measured: no change in the fastest-of-N year at 40 states on the shared
//! development machine, where launches of the same binary still fall into two groups
//! (0.57–0.60 ms and 0.87–1.0 ms) with address-space randomisation on or off alike, so
//! the spread comes from the machine, not from where the data lands.

use crate::packed::{Line, PANEL};

/// `z`, `s_next` and `out`, each starting on a 64-byte line.
#[derive(Clone, Debug)]
pub(crate) struct Work {
    buf: Vec<Line>,
    z_len: usize,
    s_at: usize,
    s_len: usize,
    out_at: usize,
    out_len: usize,
}

impl Work {
    /// Zeroed sections of `z_len`, `s_len` and `out_len` values.
    pub(crate) fn new(z_len: usize, s_len: usize, out_len: usize) -> Self {
        let lines = |len: usize| len.div_ceil(PANEL);
        let s_at = lines(z_len) * PANEL;
        let out_at = s_at + lines(s_len) * PANEL;
        let total = lines(z_len) + lines(s_len) + lines(out_len);
        Work {
            buf: vec![Line([0.0; PANEL]); total],
            z_len,
            s_at,
            s_len,
            out_at,
            out_len,
        }
    }

    fn flat(&self) -> &[f64] {
        crate::packed::flat(&self.buf)
    }

    fn flat_mut(&mut self) -> &mut [f64] {
        crate::packed::flat_mut(&mut self.buf)
    }

    /// `z`.
    #[inline]
    pub(crate) fn z(&self) -> &[f64] {
        &self.flat()[..self.z_len]
    }

    /// `z`, writable.
    #[inline]
    pub(crate) fn z_mut(&mut self) -> &mut [f64] {
        let len = self.z_len;
        &mut self.flat_mut()[..len]
    }

    /// The readouts `[mean; instant]`.
    #[inline]
    pub(crate) fn out(&self) -> &[f64] {
        &self.flat()[self.out_at..self.out_at + self.out_len]
    }

    /// `(z, s_next, out)`, all writable, each with its padding to a whole number of lines
    /// (zero unless written).
    #[inline]
    pub(crate) fn split_padded(&mut self) -> (&mut [f64], &mut [f64], &mut [f64]) {
        let (s_at, out_at) = (self.s_at, self.out_at);
        let flat = self.flat_mut();
        let (z, rest) = flat.split_at_mut(s_at);
        let (s, out) = rest.split_at_mut(out_at - s_at);
        (z, s, out)
    }

    /// `(z, s_next, out)`, all writable.
    #[inline]
    pub(crate) fn split(&mut self) -> (&mut [f64], &mut [f64], &mut [f64]) {
        let (z_len, s_at, s_len, out_at, out_len) =
            (self.z_len, self.s_at, self.s_len, self.out_at, self.out_len);
        let flat = self.flat_mut();
        let (z, rest) = flat.split_at_mut(s_at);
        let (s, out) = rest.split_at_mut(out_at - s_at);
        (&mut z[..z_len], &mut s[..s_len], &mut out[..out_len])
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sections_are_disjoint_aligned_and_sized() {
        for (a, b, c) in [(0, 0, 0), (1, 1, 1), (52, 40, 6), (8, 8, 8), (9, 17, 3)] {
            let mut w = Work::new(a, b, c);
            let (z, s, o) = w.split();
            assert_eq!((z.len(), s.len(), o.len()), (a, b, c));
            for p in [z.as_ptr(), s.as_ptr(), o.as_ptr()] {
                assert_eq!(p as usize % 64, 0);
            }
            z.iter_mut().for_each(|v| *v = 1.0);
            s.iter_mut().for_each(|v| *v = 2.0);
            o.iter_mut().for_each(|v| *v = 3.0);
            assert!(w.z().iter().all(|&v| v == 1.0));
            assert!(w.out().iter().all(|&v| v == 3.0));
        }
    }
}
