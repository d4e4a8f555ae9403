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
//! Under capacity-limited thermostats (`Stepper::run_thermostat`) the input response is a
//! product as above, but the recursion runs step by step with the thermostats: the controlled
//! outputs with the heaters off (their input part a product over the block too), the box
//! problem, and `ξ_{k+1} = F ξ_k + V[:, k] + Σ_c f_c H e_c`; then the readouts of the block
//! are one product plus the heaters' share.
//!
//! Memory for the block (states, readouts) is allocated once per call, before the loop; the
//! loop itself allocates nothing.

use super::Stepper;
use crate::control::Control;
use crate::lcp;
use crate::packed::Kernel;
use crate::packed::{flat, flat_mut, Lane8, Line, Plain, Segment, PANEL};
#[cfg(target_arch = "x86_64")]
use crate::packed::{Avx2, Avx512};

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
        self.march(inputs, steps, instant_out, mean_out, None);
    }

    /// The block march of the modal route, free or under thermostats.
    fn march(
        &mut self,
        inputs: &[f64],
        steps: usize,
        instant_out: &mut [f64],
        mean_out: &mut [f64],
        mut control: Option<(&mut Control, &mut Thermostat)>,
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
        // Thermostats: the free input response and the controlled rows' input part.
        let q = control.as_ref().map_or(0, |(c, _)| c.fraction.len());
        let ld_c = q.div_ceil(PANEL) * PANEL;
        let mut vb = lines(if q > 0 { npad * blk } else { 0 });
        let mut cb = lines(ld_c * blk);
        let mut active = Vec::with_capacity(m);
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
            let buf = Buffers {
                z: flat_mut(&mut zb),
                y: flat_mut(&mut yb),
                v: flat_mut(&mut vb),
                c: flat_mut(&mut cb),
                ld_c,
                active: &mut active,
            };
            let ctl = control.as_mut().map(|(c, t)| (&mut **c, &mut **t));
            match self.kernel {
                // SAFETY: `Plain` is baseline code.
                Kernel::Portable => unsafe { self.block::<Plain, 2>(shape, io, buf, ctl) },
                // SAFETY (both arms): these forms are only constructed after
                // `is_x86_feature_detected!` reported their features.
                #[cfg(target_arch = "x86_64")]
                Kernel::Avx2Fma => unsafe { block_avx2(self, shape, io, buf, ctl) },
                #[cfg(target_arch = "x86_64")]
                Kernel::Avx512 => unsafe { block_avx512(self, shape, io, buf, ctl) },
            }
            // The block's end state starts the next block.
            flat_mut(&mut zb).copy_within(b * npad..(b + 1) * npad, 0);
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
        if let Some((ctl, th)) = control {
            // As `step_thermostat` leaves them: the last step's heaters in `z`'s inputs.
            let f = &th.fractions[(steps - 1) * q..steps * q];
            for (ch, &fc) in ctl.channels.iter().zip(f) {
                for &(j, w) in &ch.weights {
                    z[n + j] += fc * w;
                }
            }
        }
        self.shifted = true;
    }

    /// One block of steps in one kernel form: `buf.z` holds the block's states (column 0
    /// filled), the other buffers are scratch; the readouts (and, under thermostats, the
    /// fractions) are written out.
    ///
    /// # Safety
    /// The processor must support `V`'s instructions.
    #[inline(always)]
    unsafe fn block<V: Lane8, const NC: usize>(
        &self,
        s: Shape,
        io: BlockIo,
        buf: Buffers,
        control: Option<(&mut Control, &mut Thermostat)>,
    ) {
        let (m, pm) = (self.m, self.p_mean);
        let BlockIo {
            inputs,
            k0,
            b,
            mean_out,
            instant_out,
        } = io;
        let Buffers {
            z,
            y,
            v,
            c: cb,
            ld_c,
            active,
        } = buf;
        let decay = &self.decay.as_deref().expect("modal route")[..s.npad];
        // u_k for the block's steps, read in place from the caller's table; inputs that are
        // 0 over the whole block (heaters in a free run, gains of an empty house) skipped.
        let u = &inputs[k0 * m..];
        active.clear();
        for j in 0..m {
            if (0..b).any(|r| u[r * m + j] != 0.0) {
                active.push(j);
            }
        }
        let u_k = Segment {
            data: u,
            ld: m,
            cols: m,
            rows: None,
            shift: 0,
            picks: (active.len() < m).then_some(&active[..]),
        };
        // u_{k+1,T}: the temperature entries of the next step's inputs.
        let u_t = Segment {
            data: u,
            ld: m,
            cols: self.temp_inputs.len(),
            rows: Some(&self.temp_inputs),
            shift: 1,
            picks: None,
        };
        // SAFETY (all): forwarded from this function's contract.
        unsafe {
            let mut control = control;
            match control.as_mut() {
                None => self.advance.gemm_scan_in::<V, NC>(&[u_k], b, decay, z),
                Some((ctl, th)) => {
                    self.advance.gemm_in::<V, NC>(&[u_k], b, v, s.npad);
                    ctl.row_inputs.gemm_in::<V, NC>(&[u_k, u_t], b, cb, ld_c);
                    // One thermostat (the usual house) and up to 64 states: the state in
                    // registers, the box problem written out; otherwise the general loop.
                    let one = ctl.fraction.len() == 1;
                    match (one, s.npad / PANEL) {
                        (true, 1) => {
                            single_in_registers::<V, 1>(decay, z, v, cb, ld_c, k0, b, ctl, th)
                        }
                        (true, 2) => {
                            single_in_registers::<V, 2>(decay, z, v, cb, ld_c, k0, b, ctl, th)
                        }
                        (true, 3) => {
                            single_in_registers::<V, 3>(decay, z, v, cb, ld_c, k0, b, ctl, th)
                        }
                        (true, 4) => {
                            single_in_registers::<V, 4>(decay, z, v, cb, ld_c, k0, b, ctl, th)
                        }
                        (true, 5) => {
                            single_in_registers::<V, 5>(decay, z, v, cb, ld_c, k0, b, ctl, th)
                        }
                        (true, 6) => {
                            single_in_registers::<V, 6>(decay, z, v, cb, ld_c, k0, b, ctl, th)
                        }
                        (true, 7) => {
                            single_in_registers::<V, 7>(decay, z, v, cb, ld_c, k0, b, ctl, th)
                        }
                        (true, 8) => {
                            single_in_registers::<V, 8>(decay, z, v, cb, ld_c, k0, b, ctl, th)
                        }
                        _ => thermostat_steps::<V>(s.npad, decay, z, v, cb, ld_c, k0, b, ctl, th),
                    }
                }
            }
            let segs = [
                Segment {
                    data: z,
                    ld: s.npad,
                    cols: s.n,
                    rows: None,
                    shift: 0,
                    picks: None,
                },
                u_k,
                u_t,
            ];
            self.outputs.gemm_in::<V, NC>(&segs, b, y, s.ld_y);
            if let Some((ctl, th)) = control {
                // The heaters' share of the readouts.
                let q = ctl.fraction.len();
                for j in 0..b {
                    let f = &th.fractions[(k0 + j) * q..(k0 + j + 1) * q];
                    let col = &mut y[j * s.ld_y..j * s.ld_y + s.p];
                    for (c, &fc) in f.iter().enumerate() {
                        if fc != 0.0 {
                            for (yr, g) in col.iter_mut().zip(ctl.output_gain.row(c)) {
                                *yr += fc * g;
                            }
                        }
                    }
                }
            }
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

/// The block's buffers: states `z` (`npad` a column, `b + 1` columns), readouts `y`, and
/// under thermostats the free input response `v` and the controlled rows' input part `c`
/// (leading dimension `ld_c`).
struct Buffers<'a> {
    z: &'a mut [f64],
    y: &'a mut [f64],
    v: &'a mut [f64],
    c: &'a mut [f64],
    ld_c: usize,
    /// The inputs not 0 somewhere in the block (capacity `m`, so filling never allocates).
    active: &'a mut Vec<usize>,
}

/// The sequential part of a thermostat block: for each step `j`, the controlled outputs
/// with the heaters off `y⁰_c = r_c · ξ_j + cb[c, j]`, the box problem for the fractions,
/// and `ξ_{j+1} = d ∘ ξ_j + v[:, j] + Σ_c f_c g_c`.
///
/// # Safety
/// The processor must support `V`'s instructions.
#[allow(clippy::too_many_arguments)]
#[inline(always)]
unsafe fn thermostat_steps<V: Lane8>(
    npad: usize,
    decay: &[f64],
    z: &mut [f64],
    v: &[f64],
    cb: &[f64],
    ld_c: usize,
    k0: usize,
    b: usize,
    ctl: &mut Control,
    th: &mut Thermostat,
) {
    let q = ctl.fraction.len();
    let np = npad / PANEL;
    assert!(
        z.len() >= (b + 1) * npad
            && v.len() >= b * npad
            && cb.len() >= b * ld_c
            && ctl.row_state.len() >= q * np
            && ctl.gain_lines.len() >= q * np
            && decay.len() >= npad,
        "thermostat block shapes"
    );
    let line = |p: *const f64| p.cast::<[f64; PANEL]>();
    for j in 0..b {
        let k = k0 + j;
        // SAFETY: the panels read lie in the slices (checked above); `V`'s instructions are
        // supported (this function's contract).
        unsafe {
            let xi = z.as_ptr().add(j * npad);
            for c in 0..q {
                let r = ctl.row_state.as_ptr().add(c * np).cast::<f64>();
                // Two chains (even and odd panels): half the latency of one.
                let term = |p: usize, acc: V| {
                    let off = p * PANEL;
                    V::fmadd(
                        V::load(&*line(r.add(off))),
                        V::load(&*line(xi.add(off))),
                        acc,
                    )
                };
                let (mut even, mut odd) = (V::zero(), V::zero());
                let mut p = 0;
                while p + 2 <= np {
                    even = term(p, even);
                    odd = term(p + 1, odd);
                    p += 2;
                }
                if p < np {
                    even = term(p, even);
                }
                let free = V::add(even, odd).sum() + cb[j * ld_c + c];
                ctl.rhs[c] = if th.enabled[c] {
                    th.setpoints[k * q + c] - free
                } else {
                    0.0
                };
            }
            ctl.sweeps = if lcp::shortcut(&ctl.rhs, th.enabled, &mut ctl.fraction, &mut ctl.scratch)
            {
                0
            } else {
                lcp::solve(
                    &ctl.influence,
                    &ctl.rhs,
                    th.enabled,
                    &mut ctl.fraction,
                    &mut ctl.scratch,
                )
            };
            // One by one: a masked vector store of a few lanes is slow on some processors.
            for (dst, &fc) in th.fractions[k * q..(k + 1) * q]
                .iter_mut()
                .zip(&ctl.fraction)
            {
                *dst = fc;
            }
            // The heaters that run, as (fraction, gain row): a local list, so the stores
            // below cannot be taken to change it.
            let mut on = [(0.0, 0usize); 8];
            let mut count = 0;
            for (c, &fc) in ctl.fraction.iter().enumerate() {
                if fc != 0.0 {
                    if count == on.len() {
                        break;
                    }
                    on[count] = (fc, c);
                    count += 1;
                }
            }
            let many =
                count == on.len() && ctl.fraction.iter().filter(|&&f| f != 0.0).count() > count;
            let vj = v.as_ptr().add(j * npad);
            let next = z.as_mut_ptr().add((j + 1) * npad);
            let gains = ctl.gain_lines.as_ptr();
            for p in 0..np {
                let off = p * PANEL;
                let mut x = V::fmadd(
                    V::load(&*line(decay.as_ptr().add(off))),
                    V::load(&*line(xi.add(off))),
                    V::load(&*line(vj.add(off))),
                );
                if many {
                    for (c, &fc) in ctl.fraction.iter().enumerate() {
                        let g = gains.add(c * np + p).cast::<f64>();
                        x = V::fmadd(V::splat(fc), V::load(&*line(g)), x);
                    }
                } else {
                    for &(fc, c) in &on[..count] {
                        let g = gains.add(c * np + p).cast::<f64>();
                        x = V::fmadd(V::splat(fc), V::load(&*line(g)), x);
                    }
                }
                V::store(x, &mut *next.add(off).cast::<[f64; PANEL]>());
            }
        }
    }
}

/// [`thermostat_steps`] for one thermostat (`q = 1`, the usual house) and `G ≤ 8` panels of
/// state: the same arithmetic in the same order, with the state carried in registers from
/// step to step (reading back a vector just stored costs more than the step's arithmetic on
/// the development machine) and the box problem written out — `f = M⁻¹ r` when that lies in
/// `[0, 1]` (`lcp::shortcut`'s two cases), `lcp::solve` otherwise.
///
/// # Safety
/// As [`thermostat_steps`].
#[allow(clippy::too_many_arguments)]
#[inline(always)]
unsafe fn single_in_registers<V: Lane8, const G: usize>(
    decay: &[f64],
    z: &mut [f64],
    v: &[f64],
    cb: &[f64],
    ld_c: usize,
    k0: usize,
    b: usize,
    ctl: &mut Control,
    th: &mut Thermostat,
) {
    assert!(
        ctl.fraction.len() == 1
            && z.len() >= (b + 1) * G * PANEL
            && v.len() >= b * G * PANEL
            && cb.len() >= b * ld_c
            && ctl.row_state.len() >= G
            && ctl.gain_lines.len() >= G
            && decay.len() >= G * PANEL
            && th.fractions.len() >= k0 + b
            && th.setpoints.len() >= k0 + b,
        "thermostat block shapes"
    );
    let mut f = ctl.fraction[0];
    let npad = G * PANEL;
    let line = |p: *const f64| p.cast::<[f64; PANEL]>();
    let enabled = th.enabled[0];
    let inverse = ctl.scratch.inverse().map(|m| m[0]);
    // SAFETY: `G` panels of each vector, inside the slices (checked by the caller); `V`'s
    // instructions are supported (this function's contract).
    unsafe {
        let r0 = flat(&ctl.row_state[..G]).as_ptr();
        let g0 = flat(&ctl.gain_lines[..G]).as_ptr();
        let (mut r, mut g, mut d, mut x) = (
            [V::zero(); G],
            [V::zero(); G],
            [V::zero(); G],
            [V::zero(); G],
        );
        for p in 0..G {
            r[p] = V::load(&*line(r0.add(p * PANEL)));
            g[p] = V::load(&*line(g0.add(p * PANEL)));
            d[p] = V::load(&*line(decay.as_ptr().add(p * PANEL)));
            x[p] = V::load(&*line(z.as_ptr().add(p * PANEL)));
        }
        for j in 0..b {
            let k = k0 + j;
            let (mut even, mut odd) = (V::zero(), V::zero());
            let mut p = 0;
            while p + 2 <= G {
                even = V::fmadd(r[p], x[p], even);
                odd = V::fmadd(r[p + 1], x[p + 1], odd);
                p += 2;
            }
            if p < G {
                even = V::fmadd(r[p], x[p], even);
            }
            let free = V::add(even, odd).sum() + cb[j * ld_c];
            let rhs = if enabled { th.setpoints[k] - free } else { 0.0 };
            let shortcut = if f == 0.0 && rhs <= 0.0 {
                Some(0.0)
            } else {
                match inverse {
                    Some(inv) if enabled && (0.0..=1.0).contains(&(inv * rhs)) => Some(inv * rhs),
                    _ => None,
                }
            };
            f = match shortcut {
                Some(value) => {
                    ctl.sweeps = 0;
                    value
                }
                None => {
                    ctl.rhs[0] = rhs;
                    ctl.fraction[0] = f;
                    ctl.sweeps = lcp::solve(
                        &ctl.influence,
                        &ctl.rhs,
                        th.enabled,
                        &mut ctl.fraction,
                        &mut ctl.scratch,
                    );
                    ctl.fraction[0]
                }
            };
            th.fractions[k] = f;
            let vj = v.as_ptr().add(j * npad);
            let next = z.as_mut_ptr().add((j + 1) * npad);
            let fv = V::splat(f);
            for p in 0..G {
                let mut y = V::fmadd(d[p], x[p], V::load(&*line(vj.add(p * PANEL))));
                if f != 0.0 {
                    y = V::fmadd(fv, g[p], y);
                }
                x[p] = y;
                V::store(y, &mut *next.add(p * PANEL).cast::<[f64; PANEL]>());
            }
        }
    }
    ctl.fraction[0] = f;
}

/// The per-run arguments of a thermostat block run.
struct Thermostat<'a> {
    setpoints: &'a [f64],
    enabled: &'a [bool],
    fractions: &'a mut [f64],
}

impl Stepper {
    /// Steps through known inputs under the capacity-limited thermostats of
    /// [`Stepper::with_control`]: the same as `K` calls of [`Stepper::step_thermostat`]
    /// (up to the order of rounding), with `inputs` holding `u_0 … u_K` row by row
    /// (`(K + 1) · m`; the heater entries carry heat other than the thermostats', normally
    /// 0), `setpoints` the channels' setpoints for each step (`K · q`, °C, row by row),
    /// `enabled` which channels may heat (`q`, for the whole run), and the chosen fractions
    /// written to `fractions` (`K · q`); the readouts go to `instant_out` (`K · p_i`) and
    /// `mean_out` (`K · p_m`) and include the heaters.
    ///
    /// On the modal route a block of steps runs as: the free input response `H u` and the
    /// controlled rows' input part as two matrix products; then step by step only what the
    /// thermostats need — the controlled outputs with the heaters off (`q` dot products of
    /// length `n`), the box problem (`lcp.rs`, warm-started from the previous step) and
    /// `ξ_{k+1} = F ξ_k + H u_k + Σ_c f_c H e_c`; then all readouts of the block as one more
    /// product, plus the heaters' `Σ_c f_c (O e_c)`. The block route steps one by one.
    ///
    /// # Panics
    /// If [`Stepper::with_control`] was not called, or a length does not match.
    pub fn run_thermostat(
        &mut self,
        inputs: &[f64],
        setpoints: &[f64],
        enabled: &[bool],
        fractions: &mut [f64],
        instant_out: &mut [f64],
        mean_out: &mut [f64],
    ) {
        let q = self
            .control
            .as_ref()
            .expect("run_thermostat needs with_control")
            .fraction
            .len();
        let (m, pm) = (self.m, self.p_mean);
        let pi = self.work.out().len() - pm;
        let steps = fractions.len().checked_div(q).unwrap_or(0);
        assert!(
            enabled.len() == q
                && fractions.len() == steps * q
                && setpoints.len() == steps * q
                && inputs.len() == (steps + 1) * m
                && instant_out.len() == steps * pi
                && mean_out.len() == steps * pm,
            "run_thermostat lengths"
        );
        if steps == 0 {
            return;
        }
        if self.decay.is_none() {
            let mut u_k = vec![0.0; m];
            for k in 0..steps {
                u_k.copy_from_slice(&inputs[k * m..(k + 1) * m]);
                self.step_thermostat(
                    &mut u_k,
                    &inputs[(k + 1) * m..(k + 2) * m],
                    &setpoints[k * q..(k + 1) * q],
                    enabled,
                    &mut fractions[k * q..(k + 1) * q],
                );
                instant_out[k * pi..(k + 1) * pi].copy_from_slice(self.instant());
                mean_out[k * pm..(k + 1) * pm].copy_from_slice(self.mean());
            }
            return;
        }
        let mut ctl = self.control.take().expect("checked above");
        let mut th = Thermostat {
            setpoints,
            enabled,
            fractions,
        };
        self.march(
            inputs,
            steps,
            instant_out,
            mean_out,
            Some((&mut ctl, &mut th)),
        );
        self.control = Some(ctl);
    }
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn block_avx2(
    st: &Stepper,
    s: Shape,
    io: BlockIo,
    buf: Buffers,
    ctl: Option<(&mut Control, &mut Thermostat)>,
) {
    // SAFETY: this function's features are those of `Avx2`.
    unsafe { st.block::<Avx2, 4>(s, io, buf, ctl) }
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx512f,avx2,fma")]
unsafe fn block_avx512(
    st: &Stepper,
    s: Shape,
    io: BlockIo,
    buf: Buffers,
    ctl: Option<(&mut Control, &mut Thermostat)>,
) {
    // SAFETY: this function's features include those of `Avx512`.
    unsafe { st.block::<Avx512, 8>(s, io, buf, ctl) }
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
        // Heaters for the thermostat test: input 2 at node 0, input 3 at the middle node.
        if m > 3 {
            u.column_mut(2).fill(0.0);
            u.column_mut(3).fill(0.0);
            u[(0, 2)] = 1.0;
            u[(n / 2, 3)] = 1.0;
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
                    let mut u = inputs(m, steps, 100 + call, 4.0 * call as f64);
                    // The last heat input off for a while (whole blocks of it skipped).
                    if m > 2 {
                        for k in 20..steps.min(120) {
                            u[k * m + m - 1] = 0.0;
                        }
                    }
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

    /// The thermostat block run against `step_thermostat` step by step: every form, both
    /// routes, sizes across the panel boundaries, a night setback (so heaters switch between
    /// off, modulating and full), one channel disabled in a second run. Fractions to 1e-9
    /// and temperatures to 1e-9 K: both solve the same box problems, whose right-hand sides
    /// differ by the order of rounding (~1e-14 K); the solution moves by that over the
    /// influence (~1e-2 K per unit fraction), so 1e-9 leaves a wide margin and still catches
    /// any wrong term (a heater's power alone moves a zone by ~1 K).
    #[test]
    fn thermostat_block_run_equals_step_by_step() {
        for (n, m) in [(5, 4), (9, 6), (40, 10), (70, 12)] {
            let sys = chain(n, m, 7 * n as u64);
            let channels = [
                crate::ControlChannel {
                    weights: vec![(2, 2500.0)],
                    output: 0,
                },
                crate::ControlChannel {
                    weights: vec![(3, 1500.0)],
                    output: 1,
                },
            ];
            // Readouts: some rows controlled, some not; every row controlled; more free rows
            // than states.
            let many: Vec<usize> = (0..2 * n).map(|i| i % n).collect();
            let layouts = [
                (vec![0, n / 2, n - 1], vec![n / 2, 0]),
                (vec![0, n / 2], vec![]),
                (vec![0, n / 2, n - 1], many),
            ];
            for ((inst, mean), route) in layouts
                .iter()
                .flat_map(|l| [(l, Route::Modal), (l, Route::Block)])
            {
                let (pi, pm) = (inst.len(), mean.len());
                let inst = Readout::nodes(inst, n, m);
                let mean = Readout::nodes(mean, n, m);
                let d = Discretization::new(&sys, 3600.0, route).unwrap();
                let forms = if route == Route::Modal {
                    Kernel::available()
                } else {
                    vec![Kernel::detect()]
                };
                // Two thermostats, and one (the usual house: its own code path).
                for (kernel, q) in forms.iter().flat_map(|&k| [(k, 2), (k, 1)]) {
                    let mut a = Stepper::new(&d, &inst, &mean)
                        .unwrap()
                        .with_control(&channels[..q])
                        .unwrap();
                    a.kernel = kernel;
                    a.set_state(&vec![14.0; n]);
                    let mut b = a.clone();
                    let mut worst = 0.0_f64;
                    let mut switched = [0usize; 3];
                    for (call, steps, enabled) in
                        [(0_u64, 200_usize, [true, true]), (1, 53, [q == 2, false])]
                    {
                        let enabled = &enabled[..q];
                        let mut u = inputs(m, steps, 40 + call, -12.0);
                        // The heater inputs carry no other heat.
                        for k in 0..=steps {
                            u[k * m + 2] = 0.0;
                            u[k * m + 3] = 0.0;
                        }
                        let set: Vec<f64> = (0..steps * q)
                            .map(|i| {
                                if (i / q) % 24 < 7 {
                                    16.0
                                } else {
                                    20.0 + (i % q) as f64
                                }
                            })
                            .collect();
                        let mut fb = vec![0.0; steps * q];
                        let (mut yi, mut ym) = (vec![0.0; steps * pi], vec![0.0; steps * pm]);
                        b.run_thermostat(&u, &set, enabled, &mut fb, &mut yi, &mut ym);
                        let mut fa = vec![0.0; q];
                        for k in 0..steps {
                            let mut u_k = u[k * m..(k + 1) * m].to_vec();
                            a.step_thermostat(
                                &mut u_k,
                                &u[(k + 1) * m..(k + 2) * m],
                                &set[k * q..(k + 1) * q],
                                enabled,
                                &mut fa,
                            );
                            for c in 0..q {
                                worst = worst.max((fa[c] - fb[k * q + c]).abs());
                                switched[if fa[c] == 0.0 {
                                    0
                                } else if fa[c] == 1.0 {
                                    2
                                } else {
                                    1
                                }] += 1;
                            }
                            for (r, v) in a.instant().iter().enumerate() {
                                worst = worst.max((v - yi[k * pi + r]).abs());
                            }
                            for (r, v) in a.mean().iter().enumerate() {
                                worst = worst.max((v - ym[k * pm + r]).abs());
                            }
                        }
                        for (x, y) in a
                            .instant()
                            .iter()
                            .zip(b.instant())
                            .chain(a.mean().iter().zip(b.mean()))
                        {
                            worst = worst.max((x - y).abs());
                        }
                        let (mut xa, mut xb) = (vec![0.0; n], vec![0.0; n]);
                        a.state_into(&mut xa);
                        b.state_into(&mut xb);
                        for (x, y) in xa.iter().zip(&xb) {
                            worst = worst.max((x - y).abs());
                        }
                    }
                    assert!(
                        worst < 1e-9,
                        "n {n}, {route:?}, {kernel:?}: worst {worst:e}"
                    );
                    // The run exercised every regime of the heaters.
                    assert!(
                        switched.iter().all(|&s| s > 0),
                        "n {n}: regimes {switched:?}"
                    );
                }
            }
        }
    }
}
