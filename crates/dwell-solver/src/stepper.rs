//! Marching a [`Discretization`] through time without allocating.

use std::sync::Arc;

use nalgebra::DMatrix;

use crate::control::Control;
use crate::discretization::{ModalBasis, Transition};
use crate::packed::{dot, Init, Kernel, Lane8, Packed, Panels, Plain, Segment, PANEL};
#[cfg(target_arch = "x86_64")]
use crate::packed::{Avx2, Avx512};
use crate::work::Work;
use crate::{Discretization, InputKind, Readout, SolverError};

mod march;

/// Steps a discretised system and evaluates readouts, allocation-free after construction.
///
/// The state `s` is held in the discretisation's coordinates (modal coordinates for
/// [`Route::Modal`](crate::Route::Modal)); readout rows are pre-multiplied by `x = T s` so
/// node temperatures are never formed while stepping.
///
/// **Shifted state.** With first-order hold the update `s_{k+1} = F s_k + Γ₀ u_k +
/// Γ₁ (u_{k+1} − u_k)` needs the ramp `u_{k+1} − u_k` of the `m_T` temperature inputs. The
/// stepper carries instead `ξ_k = s_k − Γ₁ u_k` (only the temperature columns of `Γ₁`), for
/// which the ramp drops out:
///
/// ```text
/// ξ_{k+1} = F ξ_k + H u_k,          H = Γ₀ + (F − I) Γ₁          (F diagonal for the modal route)
/// ```
///
/// so the update costs `n·m` multiply-adds instead of `n·(m + m_T)`. Readouts are rewritten
/// for `z = [ξ_k; u_k; u_{k+1,T}]` by substituting `s_k = ξ_k + Γ₁ u_k` (exact algebra; only
/// rounding changes). If a caller's `u_k` differs from the previous step's `u_{k+1}` (a jump
/// in a boundary temperature) the shift is re-based before the step, so the result is that
/// of the unshifted recursion for any input sequence.
///
/// **Readouts**, from the step's start:
///
/// ```text
/// instant = X T s_{k+1} + U_y u(t_{k+1}⁻)         y at the end of the step
/// mean    = X T (F̄ s_k + Ḡ w) + U_y ū            exact mean of y over the step
/// ```
///
/// where `u(t_{k+1}⁻)` is `u_{k+1}` for temperature inputs and the held `u_k` for heat flows,
/// and `ū = (u_k + u_{k+1})/2` for temperature inputs, `u_k` for heat flows. Both are one
/// matrix over `z`, so a step is two matrix–vector products, `out = O z` and
/// `ξ ← F ξ + H u_k`, run back to back inside one function compiled for the processor's
/// widest vector units (`packed.rs`).
///
/// Cost per step: `n·m + (p_i + p_m)·(n + m + m_T)` multiply-adds, plus `n²` for the block
/// route; nothing else grows with `n`.
#[derive(Clone, Debug)]
pub struct Stepper {
    pub(crate) n: usize,
    pub(crate) m: usize,
    temp_inputs: Vec<usize>,
    pub(crate) kinds: Vec<InputKind>,
    kernel: Kernel,
    /// Modal route: the diagonal of `F`; block route: `None` (`Φ` is inside `advance`).
    decay: Option<Vec<f64>>,
    /// `[Φ | H]` (block) or `H` (modal), `n` rows.
    advance: Panels,
    /// Both readouts over `z`, `p_m + p_i` rows (means, then instant values).
    pub(crate) outputs: Panels,
    /// Instant readout rows over `[ξ_k; u_k]` (the start of a step), for the thermostats.
    inst_now: Packed,
    /// `Γ₁` (temperature columns), `n × m_T`, in the state's coordinates.
    shift: DMatrix<f64>,
    /// `T Γ₁` in node coordinates (`Γ₁` for the block route), `n × m_T`.
    shift_nodes: DMatrix<f64>,
    to_nodes: Option<Arc<ModalBasis>>,
    /// `z = [ξ; u_k; u_{k+1,T}]` (length `n + m + m_T`; until the first step after
    /// [`Stepper::set_state`], `z[..n]` holds the plain state `s`, `shifted == false`),
    /// `s_next` (length `n`) and the readouts `[mean; instant]` (`p_m + p_i`).
    pub(crate) work: Work,
    shifted: bool,
    pub(crate) p_mean: usize,
    /// Boxed: a thermostat step takes it out and puts it back, which then moves a pointer,
    /// not the whole struct.
    pub(crate) control: Option<Box<Control>>,
}

/// Steps per readout product in [`Stepper::run_known`].
pub const RUN_BLOCK: usize = 64;

/// `[a | b[:, cols] · scale]`.
fn join(a: &DMatrix<f64>, b: &DMatrix<f64>, cols: &[usize], scale: f64) -> DMatrix<f64> {
    let mut out = DMatrix::zeros(a.nrows(), a.ncols() + cols.len());
    out.columns_mut(0, a.ncols()).copy_from(a);
    for (k, &j) in cols.iter().enumerate() {
        out.set_column(a.ncols() + k, &(b.column(j) * scale));
    }
    out
}

/// Rows `[R_s | R_u | R_d]` over `[s_k; u_k; u_{k+1,T} − u_{k,T}]` rewritten over
/// `[ξ_k; u_k; u_{k+1,T}]` with `s_k = ξ_k + Γ₁ u_{k,T}`:
/// `[R_s | R_u + (R_s Γ₁ − R_d) on the T columns | R_d]`.
fn rebase_start(
    r: &DMatrix<f64>,
    n: usize,
    m: usize,
    temp: &[usize],
    g1: &DMatrix<f64>,
) -> DMatrix<f64> {
    let mut out = r.clone();
    let rs_g1 = r.columns(0, n) * g1;
    for (k, &j) in temp.iter().enumerate() {
        let add = rs_g1.column(k) - r.column(n + m + k);
        let mut col = out.column_mut(n + j);
        col += add;
    }
    out
}

impl Stepper {
    /// A stepper for `disc` with an `instant` readout (values at the end of each step) and a
    /// `mean` readout (exact means over each step). The state starts at 0 °C; see
    /// [`Stepper::set_state`].
    pub fn new(
        disc: &Discretization,
        instant: &Readout,
        mean: &Readout,
    ) -> Result<Self, SolverError> {
        let (n, m) = (disc.states(), disc.inputs());
        instant.check("instant", n, m)?;
        mean.check("mean", n, m)?;
        let temp_inputs: Vec<usize> = (0..m)
            .filter(|&j| disc.input_kinds()[j] == InputKind::Temperature)
            .collect();
        let mt = temp_inputs.len();
        let in_state = |x: &DMatrix<f64>| match &disc.to_nodes {
            Some(b) => x * &b.t,
            None => x.clone(),
        };
        let g1 = join(&DMatrix::zeros(n, 0), &disc.gamma1, &temp_inputs, 1.0);
        let g = join(&disc.gamma0, &disc.gamma1, &temp_inputs, 1.0);
        let mean_g = join(&disc.mean_gamma0, &disc.mean_gamma1, &temp_inputs, 1.0);
        let xt_inst = in_state(&instant.x);
        let xt_mean = in_state(&mean.x);
        let inst_w = join(&instant.u, &instant.u, &temp_inputs, 1.0);
        let mean_w = &xt_mean * &mean_g + join(&mean.u, &mean.u, &temp_inputs, 0.5);
        let scale_cols = |x: &DMatrix<f64>, d: &nalgebra::DVector<f64>| {
            let mut out = x.clone();
            for (mut col, di) in out.column_iter_mut().zip(d.iter()) {
                col *= *di;
            }
            out
        };
        let mean_s = match &disc.mean_transition {
            Transition::Dense(f) => &xt_mean * f,
            Transition::Diagonal(d) => scale_cols(&xt_mean, d),
        };
        // F Γ₁ − Γ₁ on the temperature columns of Γ₀ gives H.
        let mut h = disc.gamma0.clone();
        let (decay, inst_s, f_g1) = match &disc.transition {
            Transition::Dense(f) => (None, &xt_inst * f, f * &g1),
            Transition::Diagonal(d) => {
                let mut fg = g1.clone();
                for (i, di) in d.iter().enumerate() {
                    fg.row_mut(i).scale_mut(*di);
                }
                let mut padded = d.as_slice().to_vec();
                padded.resize(n.div_ceil(PANEL) * PANEL, 0.0);
                (Some(padded), scale_cols(&xt_inst, d), fg)
            }
        };
        for (k, &j) in temp_inputs.iter().enumerate() {
            let add = f_g1.column(k) - g1.column(k);
            let mut col = h.column_mut(j);
            col += add;
        }
        let advance = match &disc.transition {
            Transition::Dense(f) => Panels::from_blocks(f, &h),
            Transition::Diagonal(_) => Panels::from_matrix(&h),
        };
        let wl = m + mt;
        let (p_mean, p_inst) = (mean.outputs(), instant.outputs());
        let mut raw_out = DMatrix::zeros(p_mean + p_inst, n + wl);
        raw_out.view_mut((0, 0), (p_mean, n)).copy_from(&mean_s);
        raw_out
            .view_mut((p_mean, 0), (p_inst, n))
            .copy_from(&inst_s);
        raw_out.view_mut((0, n), (p_mean, wl)).copy_from(&mean_w);
        raw_out
            .view_mut((p_mean, n), (p_inst, wl))
            .copy_from(&(&xt_inst * &g + &inst_w));
        let outputs = rebase_start(&raw_out, n, m, &temp_inputs, &g1);
        let mut raw_inst = DMatrix::zeros(p_inst, n + wl);
        raw_inst.columns_mut(0, n).copy_from(&xt_inst);
        raw_inst.columns_mut(n, wl).copy_from(&inst_w);
        let mut raw_now = raw_inst.clone();
        raw_now.columns_mut(n + m, mt).fill(0.0);
        let inst_now = rebase_start(&raw_now, n, m, &temp_inputs, &g1)
            .columns(0, n + m)
            .into_owned();
        let shift_nodes = match &disc.to_nodes {
            Some(b) => &b.t * &g1,
            None => g1.clone(),
        };
        Ok(Stepper {
            n,
            m,
            temp_inputs,
            kinds: disc.input_kinds().to_vec(),
            kernel: Kernel::detect(),
            decay,
            advance,
            outputs: Panels::from_matrix(&outputs),
            inst_now: Packed::from_matrix(&inst_now),
            shift: g1,
            shift_nodes,
            to_nodes: disc.to_nodes.clone(),
            work: Work::new(n + wl, n, p_mean + p_inst),
            shifted: false,
            p_mean,
            control: None,
        })
    }

    /// `H e` for heat-flow inputs `e` (length `m`; temperature entries must be 0): the
    /// state change over one step due to `e` alone (setup only; allocates).
    pub(crate) fn input_response(&self, e: &[f64]) -> Vec<f64> {
        let cols = self.advance.cols();
        let mut x = vec![0.0; cols];
        x[cols - e.len()..].copy_from_slice(e);
        let mut out = vec![0.0; self.n];
        self.advance.gemv(self.kernel, &x, &mut out, Init::Set);
        out
    }

    /// Sets the node temperatures `x` (°C), length `n`.
    ///
    /// # Panics
    /// If `x.len() != n`.
    pub fn set_state(&mut self, x: &[f64]) {
        assert_eq!(x.len(), self.n, "state length");
        let s = &mut self.work.z_mut()[..self.n];
        match &self.to_nodes {
            Some(b) => b.state_to_modal_into(x, s),
            None => s.copy_from_slice(x),
        }
        self.shifted = false;
    }

    /// Writes the node temperatures `x` (°C) into `out`, length `n`.
    ///
    /// # Panics
    /// If `out.len() != n`.
    pub fn state_into(&self, out: &mut [f64]) {
        assert_eq!(out.len(), self.n, "state length");
        let s = &self.work.z()[..self.n];
        match &self.to_nodes {
            Some(b) => b.modal_to_state_into(s, out),
            None => out.copy_from_slice(s),
        }
        if self.shifted {
            // x = T (ξ + Γ₁ u_T) with u_T the last step's end temperatures.
            let tail = &self.work.z()[self.n + self.m..];
            for (col, &u) in self.shift_nodes.column_iter().zip(tail) {
                for (xi, g) in out.iter_mut().zip(col.iter()) {
                    *xi += g * u;
                }
            }
        }
    }

    /// The instant readout at the end of the last step.
    pub fn instant(&self) -> &[f64] {
        &self.work.out()[self.p_mean..]
    }

    /// The mean readout over the last step.
    pub fn mean(&self) -> &[f64] {
        &self.work.out()[..self.p_mean]
    }

    /// Number of states `n`.
    pub fn states(&self) -> usize {
        self.n
    }

    /// Number of inputs `m`.
    pub fn inputs(&self) -> usize {
        self.m
    }

    /// Advances one step from `u_k` (inputs at the start) to `u_next` (inputs at the end;
    /// only its temperature entries are used).
    ///
    /// # Panics
    /// If either slice's length is not `m`.
    pub fn step(&mut self, u_k: &[f64], u_next: &[f64]) {
        assert!(
            u_k.len() == self.m && u_next.len() == self.m,
            "input lengths"
        );
        match self.kernel {
            // SAFETY: `Plain` is baseline code.
            Kernel::Portable => unsafe { self.whole_step::<Plain, 2>(u_k, u_next) },
            // SAFETY (both arms): the fused forms are only constructed after
            // `is_x86_feature_detected!` reported their features.
            #[cfg(target_arch = "x86_64")]
            Kernel::Avx2Fma => unsafe { whole_step_avx2(self, u_k, u_next) },
            #[cfg(target_arch = "x86_64")]
            Kernel::Avx512 => unsafe { whole_step_avx512(self, u_k, u_next) },
        }
    }

    /// All of [`Stepper::step`] in one function per kernel form: re-base, load the inputs,
    /// both products, `ξ ← s_next`, with the copies done in vector registers (no calls).
    ///
    /// # Safety
    /// The processor must support `V`'s instructions; `u_k` and `u_next` have length `m`.
    #[inline(always)]
    unsafe fn whole_step<V: Lane8, const B: usize>(&mut self, u_k: &[f64], u_next: &[f64]) {
        let (n, m) = (self.n, self.m);
        self.align(u_k);
        {
            let w = &mut self.work.z_mut()[n..];
            // SAFETY: forwarded from this function's contract.
            unsafe { copy_lanes::<V>(&mut w[..m], u_k) };
            for (slot, &j) in w[m..].iter_mut().zip(&self.temp_inputs) {
                *slot = u_next[j];
            }
        }
        // SAFETY: forwarded from this function's contract.
        unsafe { self.step_in::<V, B, true>() };
        let (z, s_next, _) = self.work.split();
        // SAFETY: forwarded from this function's contract.
        unsafe { copy_lanes::<V>(&mut z[..n], s_next) };
    }

    /// `out = O z` and `s_next = F ξ + H u_k`, in one call into the kernel form.
    pub(crate) fn outputs_and_next(&mut self) {
        match self.kernel {
            // SAFETY: `Plain` is baseline code.
            Kernel::Portable => unsafe { self.step_in::<Plain, 2, true>() },
            // SAFETY (both arms): the fused forms are only constructed after
            // `is_x86_feature_detected!` reported their features.
            #[cfg(target_arch = "x86_64")]
            Kernel::Avx2Fma => unsafe { step_avx2(self) },
            #[cfg(target_arch = "x86_64")]
            Kernel::Avx512 => unsafe { step_avx512(self) },
        }
    }

    /// `s_next = F ξ + H u_k` only (no readouts).
    fn next_only(&mut self) {
        match self.kernel {
            // SAFETY: `Plain` is baseline code.
            Kernel::Portable => unsafe { self.step_in::<Plain, 2, false>() },
            // SAFETY (both arms): the fused forms are only constructed after
            // `is_x86_feature_detected!` reported their features.
            #[cfg(target_arch = "x86_64")]
            Kernel::Avx2Fma => unsafe { next_avx2(self) },
            #[cfg(target_arch = "x86_64")]
            Kernel::Avx512 => unsafe { next_avx512(self) },
        }
    }

    /// Steps through known inputs: `inputs` holds `u_0 … u_K` row by row (`(K + 1) · m`
    /// values), and the readouts of the `K` steps are written row by row into `instant_out`
    /// (`K · p_i`) and `mean_out` (`K · p_m`). The same numbers as `K` calls of
    /// [`Stepper::step`] (up to the order of rounding), computed by blocks of steps:
    ///
    /// - modal route: the input response of a block is one matrix–matrix product, the
    ///   diagonal recursion the only sequential part, and the readouts of the block one more
    ///   product (`march.rs`); about twice as fast as `step` for a house of 40 states;
    /// - block route: the state is marched step by step, and the readouts of a block of
    ///   [`RUN_BLOCK`] steps are one product `Y = O [z_k … z_{k+B−1}]`.
    ///
    /// Either way the readout matrix is read once per block instead of once per step, which
    /// matters when it no longer fits in the processor's caches (hundreds of readouts of
    /// thousands of states). Allocates its block buffers once per call, before stepping.
    /// Afterwards [`Stepper::instant`] and [`Stepper::mean`] hold the last step's readouts.
    ///
    /// # Panics
    /// If `inputs.len()` is not `(K + 1) · m` for the `K` given by the output lengths, or
    /// the two outputs disagree on `K`.
    pub fn run_known(&mut self, inputs: &[f64], instant_out: &mut [f64], mean_out: &mut [f64]) {
        let (m, pm) = (self.m, self.p_mean);
        let p = self.work.out().len();
        let pi = p - pm;
        let steps = instant_out
            .len()
            .checked_div(pi)
            .or_else(|| mean_out.len().checked_div(pm))
            .unwrap_or_else(|| (inputs.len() / m.max(1)).saturating_sub(1));
        assert!(
            instant_out.len() == steps * pi
                && mean_out.len() == steps * pm
                && inputs.len() == (steps + 1) * m,
            "run_known lengths"
        );
        if steps == 0 {
            return;
        }
        if self.decay.is_some() {
            self.run_known_modal(inputs, steps, instant_out, mean_out);
            return;
        }
        let zl = self.work.z().len();
        let blk = RUN_BLOCK.min(steps);
        let ld_y = p.div_ceil(PANEL) * PANEL;
        let mut zb = vec![0.0; zl * blk];
        let mut yb = vec![0.0; ld_y * blk];
        let (mut k, mut last) = (0, 0);
        while k < steps {
            let b = blk.min(steps - k);
            last = b;
            for j in 0..b {
                let u_k = &inputs[(k + j) * m..(k + j + 1) * m];
                let u_next = &inputs[(k + j + 1) * m..(k + j + 2) * m];
                self.load_inputs(u_k, u_next);
                zb[j * zl..(j + 1) * zl].copy_from_slice(self.work.z());
                self.next_only();
                self.commit();
            }
            let z = Segment {
                data: &zb,
                ld: zl,
                cols: zl,
                rows: None,
                shift: 0,
                picks: None,
            };
            self.outputs.gemm(self.kernel, &[z], b, &mut yb, ld_y);
            for j in 0..b {
                let col = &yb[j * ld_y..j * ld_y + p];
                mean_out[(k + j) * pm..(k + j + 1) * pm].copy_from_slice(&col[..pm]);
                instant_out[(k + j) * pi..(k + j + 1) * pi].copy_from_slice(&col[pm..]);
            }
            k += b;
        }
        let (_, _, out) = self.work.split();
        out.copy_from_slice(&yb[(last - 1) * ld_y..(last - 1) * ld_y + p]);
    }

    /// `ξ ← s_next`.
    #[inline]
    pub(crate) fn commit(&mut self) {
        let n = self.n;
        let (z, s_next, _) = self.work.split();
        z[..n].copy_from_slice(s_next);
    }

    /// Both products of a step, inlined into one function per kernel form.
    ///
    /// # Safety
    /// The processor must support `V`'s instructions.
    #[inline(always)]
    unsafe fn step_in<V: Lane8, const B: usize, const OUT: bool>(&mut self) {
        let (n, m) = (self.n, self.m);
        // SAFETY: forwarded from this function's contract.
        // The padded sections let the kernels store whole panels (zeros into the padding).
        let (z, s_next, out) = self.work.split_padded();
        unsafe {
            if OUT {
                self.outputs.gemv_in::<V, B>(z, out, Init::Set);
            }
            match &self.decay {
                None => self.advance.gemv_in::<V, B>(&z[..n + m], s_next, Init::Set),
                Some(d) => {
                    // `s` is read over the padded height too: beyond `n` it meets the
                    // inputs, which the zero padding of `d` multiplies by 0.
                    let w = &z[n..n + m];
                    self.advance.gemv_in::<V, B>(w, s_next, Init::Scaled(d, z));
                }
            }
        }
    }

    /// Re-bases the shifted state on the temperatures in `u_k`: afterwards
    /// `z[..n] = ξ = s − Γ₁ u_{k,T}` and the tail of `z` holds `u_{k,T}`.
    #[inline(always)]
    pub(crate) fn align(&mut self, u_k: &[f64]) {
        assert_eq!(u_k.len(), self.m, "u_k length");
        let (n, m) = (self.n, self.m);
        let (s, rest) = self.work.z_mut().split_at_mut(n);
        let tail = &mut rest[m..];
        let mut same = self.shifted;
        if same {
            for (t, &j) in tail.iter().zip(&self.temp_inputs) {
                same &= *t == u_k[j];
            }
        }
        if same {
            return;
        }
        // ξ ← ξ + Γ₁ (t_old − u_{k,T}), with t_old = 0 for a plain state.
        for ((col, t), &j) in self
            .shift
            .column_iter()
            .zip(tail.iter_mut())
            .zip(&self.temp_inputs)
        {
            let old = if self.shifted { *t } else { 0.0 };
            let d = old - u_k[j];
            if d != 0.0 {
                for (si, g) in s.iter_mut().zip(col.iter()) {
                    *si += g * d;
                }
            }
            *t = u_k[j];
        }
        self.shifted = true;
    }

    /// Re-bases the state on `u_k` and fills `z[n..] = [u_k; u_{k+1,T}]`.
    pub(crate) fn load_inputs(&mut self, u_k: &[f64], u_next: &[f64]) {
        assert_eq!(u_next.len(), self.m, "u_next length");
        self.align(u_k);
        let (m, n) = (self.m, self.n);
        let w = &mut self.work.z_mut()[n..];
        w[..m].copy_from_slice(u_k);
        for (slot, &j) in w[m..].iter_mut().zip(&self.temp_inputs) {
            *slot = u_next[j];
        }
    }

    /// The outputs `O x` for `x = [0; e; 0]`: the readouts' response to inputs `e`
    /// (length `m`) held over one step from a zero state (setup only; allocates).
    pub(crate) fn output_response(&self, e: &[f64]) -> Vec<f64> {
        let mut x = vec![0.0; self.work.z().len()];
        x[self.n..self.n + self.m].copy_from_slice(e);
        let mut out = vec![0.0; self.work.out().len()];
        self.outputs.gemv(self.kernel, &x, &mut out, Init::Set);
        out
    }

    /// Instant output `row` for the current state and the inputs `u_k` at the step's start
    /// (call [`Stepper::align`] with `u_k` first).
    pub(crate) fn instant_row_now(&self, row: usize, u_k: &[f64]) -> f64 {
        let r = self.inst_now.row(row);
        dot(&r[..self.n], &self.work.z()[..self.n]) + dot(&r[self.n..], u_k)
    }
}

/// `dst ← src` (same length), eight values at a time in `V`'s registers.
///
/// # Safety
/// The processor must support `V`'s instructions.
#[inline(always)]
unsafe fn copy_lanes<V: Lane8>(dst: &mut [f64], src: &[f64]) {
    let (d, d_rest) = dst.as_chunks_mut::<PANEL>();
    let (s, s_rest) = src.as_chunks::<PANEL>();
    for (d, s) in d.iter_mut().zip(s) {
        // SAFETY: forwarded from this function's contract.
        unsafe { V::store(V::load(s), d) };
    }
    for (d, s) in d_rest.iter_mut().zip(s_rest) {
        *d = *s;
    }
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn whole_step_avx2(s: &mut Stepper, u_k: &[f64], u_next: &[f64]) {
    // SAFETY: this function's features are those of `Avx2`.
    unsafe { s.whole_step::<Avx2, 4>(u_k, u_next) }
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx512f,avx2,fma")]
unsafe fn whole_step_avx512(s: &mut Stepper, u_k: &[f64], u_next: &[f64]) {
    // SAFETY: this function's features include those of `Avx512`.
    unsafe { s.whole_step::<Avx512, 8>(u_k, u_next) }
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn step_avx2(s: &mut Stepper) {
    // SAFETY: this function's features are those of `Avx2`.
    unsafe { s.step_in::<Avx2, 4, true>() }
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn next_avx2(s: &mut Stepper) {
    // SAFETY: this function's features are those of `Avx2`.
    unsafe { s.step_in::<Avx2, 4, false>() }
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx512f,avx2,fma")]
unsafe fn next_avx512(s: &mut Stepper) {
    // SAFETY: this function's features include those of `Avx512`.
    unsafe { s.step_in::<Avx512, 8, false>() }
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx512f,avx2,fma")]
unsafe fn step_avx512(s: &mut Stepper) {
    // SAFETY: this function's features include those of `Avx512`.
    unsafe { s.step_in::<Avx512, 8, true>() }
}
