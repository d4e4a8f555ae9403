//! Known inputs on the modal route, a block of steps at a time.
//!
//! With the inputs known in advance (free-floating, scheduled heat), nothing in a step
//! depends on the previous one except the diagonal recursion `ξ_{k+1} = F ξ_k + H u_k`. So
//! for a block of `B` steps:
//!
//! 1. `V = H [u_k … u_{k+B−1}]`, one matrix–matrix product (`n × m` by `m × B`), each
//!    finished panel of `V` fed at once into the recursion `ξ_{k+j+1} = F ξ_{k+j} + V[:, j]`
//!    (`n` multiply-adds a step, the only sequential part; `Panels::gemm_scan_in`);
//! 2. `Y = O [z_k … z_{k+B−1}]` with `z = [ξ; u_k; u_{k+1,T}]`, one product for both
//!    readouts of all `B` steps (`Panels::gemm_in`).
//!
//! The inputs are read in place from the caller's table; only the states are held in a
//! block buffer. The arithmetic is that of [`Stepper::step`] (`n·m + (p_i + p_m)·(n + m +
//! m_T)` multiply-adds a step, plus `n` for the recursion), but both products now have `B`
//! independent columns, so they run at the rate of the multiply-add units instead of at
//! their latency, and the per-step calls, copies and branches are gone. Results equal those
//! of step-by-step stepping up to the order of rounding (`H u_k` is summed in another
//! order; tests `block_march_equals_step_by_step_in_every_form` and
//! `run_known_equals_step_by_step`).
//!
//! Memory for the block (states, readouts) is allocated once per call, before the loop; the
//! loop itself allocates nothing.

use super::Stepper;
use crate::packed::Kernel;
#[cfg(target_arch = "x86_64")]
use crate::packed::{Avx2, Avx512};
use crate::packed::{Lane8, Line, Plain, Segment, PANEL};

/// Steps per block: the block's states and the inputs read (about `2 · ld · B` values) should
/// stay in the level-1 data cache (32 KiB on the development machine) while they are used.
fn block_len(ld: usize, steps: usize) -> usize {
    let fit = (24 * 1024 / 8) / (2 * ld).max(1);
    // A multiple of 8, the widest group of columns the products take at once.
    (fit / 8 * 8).clamp(16, 64).min(steps).max(1)
}

/// A vector of `len` zeros on whole cache lines (so every panel load is aligned).
fn lines(len: usize) -> Vec<Line> {
    vec![Line([0.0; PANEL]); len.div_ceil(PANEL)]
}

fn flat(v: &[Line]) -> &[f64] {
    // SAFETY: `Line` is `repr(C)` around `[f64; PANEL]`, size 64, no padding.
    unsafe { std::slice::from_raw_parts(v.as_ptr().cast::<f64>(), v.len() * PANEL) }
}

fn flat_mut(v: &mut [Line]) -> &mut [f64] {
    // SAFETY: as in `flat`, and the borrow is unique.
    unsafe { std::slice::from_raw_parts_mut(v.as_mut_ptr().cast::<f64>(), v.len() * PANEL) }
}

/// Writes row `k` of a table with rows of `width` values: `src[..width]`. Where eight
/// values fit from the row's start (rows of up to 8, not near the table's end) with eight
/// readable in `src`, one plain 8-lane load and store (the lanes past the row are
/// overwritten by the next rows, written after); otherwise a masked copy.
///
/// # Safety
/// The processor must support `V`'s instructions.
#[inline(always)]
unsafe fn put<V: Lane8>(table: &mut [f64], k: usize, width: usize, src: &[f64]) {
    let at = k * width;
    // SAFETY: forwarded from this function's contract; both ranges are checked.
    unsafe {
        if width <= PANEL && at + PANEL <= table.len() && src.len() >= PANEL {
            let from = &*src.as_ptr().cast::<[f64; PANEL]>();
            let to = &mut *table.as_mut_ptr().add(at).cast::<[f64; PANEL]>();
            V::store(V::load(from), to);
        } else {
            V::copy(&mut table[at..at + width], &src[..width]);
        }
    }
}

/// Shapes of a block run.
#[derive(Clone, Copy)]
struct Shape {
    n: usize,
    /// `n` rounded up to whole panels: the leading dimension of the block's states.
    npad: usize,
    /// Readouts per step, rounded up to whole panels.
    ld_y: usize,
    /// Readouts per step (means, then instant values).
    p: usize,
}

/// The inputs and readout tables of a block run, and where the block starts.
struct BlockIo<'a> {
    inputs: &'a [f64],
    k0: usize,
    b: usize,
    mean_out: &'a mut [f64],
    instant_out: &'a mut [f64],
}

impl Stepper {
    /// [`Stepper::run_known`] for the modal route (see the module comment).
    pub(super) fn run_known_modal(
        &mut self,
        inputs: &[f64],
        steps: usize,
        instant_out: &mut [f64],
        mean_out: &mut [f64],
    ) {
        let (n, m) = (self.n, self.m);
        let p = self.work.out().len();
        let npad = n.div_ceil(PANEL) * PANEL;
        let shape = Shape {
            n,
            npad,
            ld_y: p.div_ceil(PANEL) * PANEL,
            p,
        };
        let blk = block_len(npad + m, steps);
        let mut zb = lines(npad * (blk + 1));
        // One panel more than the block's readouts, so the last column can be read 8 values
        // past its means (`put`).
        let mut yb = lines(shape.ld_y * blk + PANEL);
        // ξ_0 relative to u_0's temperatures.
        self.align(&inputs[..m]);
        flat_mut(&mut zb)[..n].copy_from_slice(&self.work.z()[..n]);
        let mut k0 = 0;
        let mut last = 0;
        while k0 < steps {
            let b = blk.min(steps - k0);
            last = b;
            let io = BlockIo {
                inputs,
                k0,
                b,
                mean_out: &mut *mean_out,
                instant_out: &mut *instant_out,
            };
            let (z, y) = (flat_mut(&mut zb), flat_mut(&mut yb));
            match self.kernel {
                // SAFETY: `Plain` is baseline code.
                Kernel::Portable => unsafe { self.block::<Plain, 2>(shape, io, z, y) },
                // SAFETY (both arms): these forms are only constructed after
                // `is_x86_feature_detected!` reported their features.
                #[cfg(target_arch = "x86_64")]
                Kernel::Avx2Fma => unsafe { block_avx2(self, shape, io, z, y) },
                #[cfg(target_arch = "x86_64")]
                Kernel::Avx512 => unsafe { block_avx512(self, shape, io, z, y) },
            }
            // The block's end state starts the next block.
            z.copy_within(b * npad..(b + 1) * npad, 0);
            k0 += b;
        }
        // Leave the stepper as `step` would: ξ_K, the last step's inputs and end
        // temperatures in `z`, its readouts in `out`.
        let z_end = &flat(&zb)[..n];
        let y_last = &flat(&yb)[(last - 1) * shape.ld_y..(last - 1) * shape.ld_y + p];
        let (z, _, out) = self.work.split();
        z[..n].copy_from_slice(z_end);
        z[n..n + m].copy_from_slice(&inputs[(steps - 1) * m..steps * m]);
        let end = &inputs[steps * m..(steps + 1) * m];
        for (slot, &t) in z[n + m..].iter_mut().zip(&self.temp_inputs) {
            *slot = end[t];
        }
        out.copy_from_slice(y_last);
        self.shifted = true;
    }

    /// One block of steps in one kernel form: `z` holds the block's states (column 0
    /// filled), `y` is scratch; the readouts are written out.
    ///
    /// # Safety
    /// The processor must support `V`'s instructions.
    #[inline(always)]
    unsafe fn block<V: Lane8, const NC: usize>(
        &self,
        s: Shape,
        io: BlockIo,
        z: &mut [f64],
        y: &mut [f64],
    ) {
        let (m, pm) = (self.m, self.p_mean);
        let BlockIo {
            inputs,
            k0,
            b,
            mean_out,
            instant_out,
        } = io;
        let decay = self.decay.as_deref().expect("modal route");
        // u_k for the block's steps, read in place from the caller's table.
        let u = &inputs[k0 * m..];
        let u_k = Segment {
            data: u,
            ld: m,
            cols: m,
            rows: None,
            shift: 0,
        };
        // SAFETY (all): forwarded from this function's contract.
        unsafe {
            self.advance
                .gemm_scan_in::<V, NC>(&[u_k], b, &decay[..s.npad], z);
            let segs = [
                Segment {
                    data: z,
                    ld: s.npad,
                    cols: s.n,
                    rows: None,
                    shift: 0,
                },
                u_k,
                // u_{k+1,T}: the temperature entries of the next step's inputs.
                Segment {
                    data: u,
                    ld: m,
                    cols: self.temp_inputs.len(),
                    rows: Some(&self.temp_inputs),
                    shift: 1,
                },
            ];
            self.outputs.gemm_in::<V, NC>(&segs, b, y, s.ld_y);
            let pi = s.p - pm;
            for j in 0..b {
                let k = k0 + j;
                let col = &y[j * s.ld_y..];
                put::<V>(mean_out, k, pm, &col[..pm]);
                put::<V>(instant_out, k, pi, &col[pm..]);
            }
        }
    }
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn block_avx2(st: &Stepper, s: Shape, io: BlockIo, z: &mut [f64], y: &mut [f64]) {
    // SAFETY: this function's features are those of `Avx2`.
    unsafe { st.block::<Avx2, 4>(s, io, z, y) }
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx512f,avx2,fma")]
unsafe fn block_avx512(st: &Stepper, s: Shape, io: BlockIo, z: &mut [f64], y: &mut [f64]) {
    // SAFETY: this function's features include those of `Avx512`.
    unsafe { st.block::<Avx512, 8>(s, io, z, y) }
}

#[cfg(test)]
mod tests {
    use crate::packed::Kernel;
    use crate::{Discretization, InputKind, RcSystem, Readout, Route, Stepper};
    use nalgebra::DMatrix;
    use rand::{Rng, SeedableRng};
    use rand_chacha::ChaCha8Rng;

    /// A chain of `n` nodes with random capacitances and conductances, node 0 and every
    /// third node joined to outdoors (input 0, °C), the last to the ground (input 1, °C),
    /// `m − 2` heat inputs (W) spread over the nodes.
    fn chain(n: usize, m: usize, seed: u64) -> RcSystem {
        let mut rng = ChaCha8Rng::seed_from_u64(seed);
        let mut k = DMatrix::zeros(n, n);
        let mut u = DMatrix::zeros(n, m);
        for i in 1..n {
            let g = rng.random_range(1.0..100.0);
            k[(i, i)] += g;
            k[(i - 1, i - 1)] += g;
            k[(i, i - 1)] -= g;
            k[(i - 1, i)] -= g;
        }
        for i in (0..n).step_by(3) {
            let g = rng.random_range(5.0..50.0);
            k[(i, i)] += g;
            u[(i, 0)] += g;
        }
        k[(n - 1, n - 1)] += 20.0;
        u[(n - 1, 1)] += 20.0;
        for j in 2..m {
            u[(rng.random_range(0..n), j)] = 1.0;
        }
        let c = (0..n).map(|_| rng.random_range(1e4..2e7)).collect();
        let mut kinds = vec![InputKind::Temperature; 2];
        kinds.resize(m, InputKind::HeatFlow);
        RcSystem::new(c, k, u, kinds).unwrap()
    }

    /// `steps + 1` input samples: smooth temperatures, heat flows redrawn every step.
    fn inputs(m: usize, steps: usize, seed: u64, offset: f64) -> Vec<f64> {
        let mut rng = ChaCha8Rng::seed_from_u64(seed);
        let mut out = Vec::with_capacity((steps + 1) * m);
        for k in 0..=steps {
            let t = k as f64;
            out.push(offset + 5.0 + 8.0 * (t / 24.0 * std::f64::consts::TAU).sin());
            out.push(offset + 10.0);
            for _ in 2..m {
                out.push(rng.random_range(0.0..1500.0));
            }
        }
        out
    }

    /// Every kernel form, sizes on both sides of the panel (8) and block boundaries, two
    /// calls in a row whose boundary temperatures jump between them: the block march equals
    /// `step` to rounding. Both are exact maps of the same recursion; they differ only in
    /// the order of the sums, ~1e-16 relative per product of temperatures of order 10–40 °C.
    #[test]
    fn block_march_equals_step_by_step_in_every_form() {
        for (n, m) in [(1, 3), (7, 2), (8, 9), (9, 4), (40, 10), (70, 12)] {
            let sys = chain(n, m, n as u64);
            let d = Discretization::new(&sys, 3600.0, Route::Modal).unwrap();
            let inst = Readout::nodes(&[0, n / 2, n - 1], n, m);
            let mean = Readout::nodes(&[n - 1, 0], n, m);
            for kernel in Kernel::available() {
                let mut a = Stepper::new(&d, &inst, &mean).unwrap();
                a.kernel = kernel;
                let x0: Vec<f64> = (0..n).map(|i| 12.0 + 0.3 * i as f64).collect();
                a.set_state(&x0);
                let mut b = a.clone();
                let mut worst = 0.0_f64;
                for (call, steps) in [(0_u64, 150_usize), (1, 37)] {
                    // The second call's temperatures are 4 K above the first's end.
                    let u = inputs(m, steps, 100 + call, 4.0 * call as f64);
                    let (mut yi, mut ym) = (vec![0.0; steps * 3], vec![0.0; steps * 2]);
                    b.run_known(&u, &mut yi, &mut ym);
                    for k in 0..steps {
                        a.step(&u[k * m..(k + 1) * m], &u[(k + 1) * m..(k + 2) * m]);
                        for (r, v) in a.instant().iter().enumerate() {
                            worst = worst.max((v - yi[k * 3 + r]).abs());
                        }
                        for (r, v) in a.mean().iter().enumerate() {
                            worst = worst.max((v - ym[k * 2 + r]).abs());
                        }
                    }
                    for (x, y) in a.instant().iter().zip(b.instant()) {
                        worst = worst.max((x - y).abs());
                    }
                    for (x, y) in a.mean().iter().zip(b.mean()) {
                        worst = worst.max((x - y).abs());
                    }
                    let (mut xa, mut xb) = (vec![0.0; n], vec![0.0; n]);
                    a.state_into(&mut xa);
                    b.state_into(&mut xb);
                    for (x, y) in xa.iter().zip(&xb) {
                        worst = worst.max((x - y).abs());
                    }
                }
                assert!(worst < 1e-11, "n {n}, m {m}, {kernel:?}: worst {worst:e} K");
            }
        }
    }
}
