//! Marching a [`Discretization`] through time without allocating.

use std::sync::Arc;

use nalgebra::DMatrix;

use crate::control::Control;
use crate::discretization::{ModalBasis, Transition};
use crate::packed::{dot, Kernel, Packed, Panels};
use crate::{Discretization, InputKind, Readout, SolverError};

/// Steps a discretised system and evaluates readouts, allocation-free after construction.
///
/// The state `s` is held in the discretisation's coordinates (modal coordinates for
/// [`Route::Modal`](crate::Route::Modal)); readout rows are pre-multiplied by `x = T s` so
/// node temperatures are never formed while stepping. With the packed input vector
/// `w = [u_k; (u_{k+1} − u_k)_T]` (the difference only for the `m_T` temperature inputs):
///
/// ```text
/// s_{k+1} = F s_k + G w                                  (F diagonal for the modal route)
/// instant = X T s_{k+1} + U_y u(t_{k+1}⁻)                  y at the end of the step
/// mean    = X T (F̄ s_k + Ḡ w) + U_y ū                     exact mean of y over the step
/// ```
///
/// where `u(t_{k+1}⁻)` is `u_{k+1}` for temperature inputs and the held `u_k` for heat flows,
/// and `ū = (u_k + u_{k+1})/2` for temperature inputs, `u_k` for heat flows.
///
/// The instant readout is evaluated from the step's start too, `X T (F s_k + G w) + U_y…`,
/// so both readouts are one product with one matrix. With `s` and `w` side by side in one
/// vector `z = [s; w]`, a step is two matrix–vector products: `[Φ | G]·z` (block) or
/// `F∘s + G·w` (modal) for the state, and `[[X T F̄ | X T Ḡ + U_y/2…]; [X T F | X T G +
/// U_y…]]·z` for the outputs, each matrix packed in panels of 4 or 8 rows (`packed.rs`) and
/// run by a kernel chosen once at construction from the processor's features (AVX2 + FMA
/// where present).
///
/// Cost per step: `n·(m + m_T) + (p_i + p_m)·(n + m + m_T)` multiply-adds, plus `n²` for the
/// block route; nothing else grows with `n`.
#[derive(Clone, Debug)]
pub struct Stepper {
    pub(crate) n: usize,
    pub(crate) m: usize,
    temp_inputs: Vec<usize>,
    pub(crate) kinds: Vec<InputKind>,
    kernel: Kernel,
    /// Modal route: the diagonal of `F`; block route: `None` (`Φ` is inside `advance`).
    decay: Option<Vec<f64>>,
    /// `[Φ | G]` (block) or `G` (modal), `n` rows.
    advance: Panels,
    /// Both readouts from the state and inputs at the step's start, `p_m + p_i` rows:
    /// `[[X T F̄ | X T Ḡ + U_y…]; [X T F | X T G + U_y…]]` (means, then instant values).
    outputs: Panels,
    /// `[X T | U_y…]`, `p_i` rows, row by row, for the thermostats.
    pub(crate) inst_packed: Packed,
    to_nodes: Option<Arc<ModalBasis>>,
    /// `z = [s; w]`, length `n + m + m_T`.
    pub(crate) z: Vec<f64>,
    pub(crate) s_next: Vec<f64>,
    /// `[mean; instant]`, `p_m + p_i`.
    out: Vec<f64>,
    p_mean: usize,
    pub(crate) control: Option<Control>,
}

/// `[a | b[:, cols] · scale]`.
fn join(a: &DMatrix<f64>, b: &DMatrix<f64>, cols: &[usize], scale: f64) -> DMatrix<f64> {
    let mut out = DMatrix::zeros(a.nrows(), a.ncols() + cols.len());
    out.columns_mut(0, a.ncols()).copy_from(a);
    for (k, &j) in cols.iter().enumerate() {
        out.set_column(a.ncols() + k, &(b.column(j) * scale));
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
        let in_state = |x: &DMatrix<f64>| match &disc.to_nodes {
            Some(b) => x * &b.t,
            None => x.clone(),
        };
        let g = join(&disc.gamma0, &disc.gamma1, &temp_inputs, 1.0);
        let mean_g = join(&disc.mean_gamma0, &disc.mean_gamma1, &temp_inputs, 1.0);
        let xt_inst = in_state(&instant.x);
        let xt_mean = in_state(&mean.x);
        let inst_w = join(&instant.u, &instant.u, &temp_inputs, 1.0);
        let mean_w = &xt_mean * &mean_g + join(&mean.u, &mean.u, &temp_inputs, 0.5);
        let mean_s = match &disc.mean_transition {
            Transition::Dense(f) => &xt_mean * f,
            Transition::Diagonal(d) => {
                let mut out = xt_mean;
                for (mut col, di) in out.column_iter_mut().zip(d.iter()) {
                    col *= *di;
                }
                out
            }
        };
        let (decay, advance, inst_s) = match &disc.transition {
            Transition::Dense(f) => (None, Panels::from_blocks(f, &g), &xt_inst * f),
            Transition::Diagonal(d) => {
                let mut xf = xt_inst.clone();
                for (mut col, di) in xf.column_iter_mut().zip(d.iter()) {
                    col *= *di;
                }
                (Some(d.as_slice().to_vec()), Panels::from_matrix(&g), xf)
            }
        };
        let wl = m + temp_inputs.len();
        let (p_mean, p_inst) = (mean.outputs(), instant.outputs());
        let mut inst_full = DMatrix::zeros(p_inst, n + wl);
        inst_full.columns_mut(0, n).copy_from(&xt_inst);
        inst_full.columns_mut(n, wl).copy_from(&inst_w);
        let mut out_s = DMatrix::zeros(p_mean + p_inst, n);
        out_s.rows_mut(0, p_mean).copy_from(&mean_s);
        out_s.rows_mut(p_mean, p_inst).copy_from(&inst_s);
        let mut out_w = DMatrix::zeros(p_mean + p_inst, wl);
        out_w.rows_mut(0, p_mean).copy_from(&mean_w);
        out_w
            .rows_mut(p_mean, p_inst)
            .copy_from(&(&xt_inst * &g + &inst_w));
        Ok(Stepper {
            n,
            m,
            temp_inputs,
            kinds: disc.input_kinds().to_vec(),
            kernel: Kernel::detect(),
            decay,
            advance,
            outputs: Panels::from_blocks(&out_s, &out_w),
            inst_packed: Packed::from_matrix(&inst_full),
            to_nodes: disc.to_nodes.clone(),
            z: vec![0.0; n + wl],
            s_next: vec![0.0; n],
            out: vec![0.0; p_mean + p_inst],
            p_mean,
            control: None,
        })
    }

    /// `G e` for a packed input vector `e` (length `m + m_T`): the state change over one step
    /// due to `e` alone (setup only; allocates).
    pub(crate) fn input_response(&self, e: &[f64]) -> Vec<f64> {
        let cols = self.advance.cols();
        let mut x = vec![0.0; cols];
        x[cols - e.len()..].copy_from_slice(e);
        let mut out = vec![0.0; self.n];
        self.advance.gemv(self.kernel, &x, &mut out, false);
        out
    }

    /// Length of the packed input vector `w` (`m + m_T`).
    pub(crate) fn packed_inputs(&self) -> usize {
        self.z.len() - self.n
    }

    /// Sets the node temperatures `x` (°C), length `n`.
    ///
    /// # Panics
    /// If `x.len() != n`.
    pub fn set_state(&mut self, x: &[f64]) {
        assert_eq!(x.len(), self.n, "state length");
        let s = &mut self.z[..self.n];
        match &self.to_nodes {
            Some(b) => b.state_to_modal_into(x, s),
            None => s.copy_from_slice(x),
        }
    }

    /// Writes the node temperatures `x` (°C) into `out`, length `n`.
    ///
    /// # Panics
    /// If `out.len() != n`.
    pub fn state_into(&self, out: &mut [f64]) {
        assert_eq!(out.len(), self.n, "state length");
        let s = &self.z[..self.n];
        match &self.to_nodes {
            Some(b) => b.modal_to_state_into(s, out),
            None => out.copy_from_slice(s),
        }
    }

    /// The instant readout at the end of the last step.
    pub fn instant(&self) -> &[f64] {
        &self.out[self.p_mean..]
    }

    /// The mean readout over the last step.
    pub fn mean(&self) -> &[f64] {
        &self.out[..self.p_mean]
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
        self.load_inputs(u_k, u_next);
        self.advance();
        self.finish();
    }

    /// Fills `w = [u_k; (u_{k+1} − u_k)_T]`.
    pub(crate) fn load_inputs(&mut self, u_k: &[f64], u_next: &[f64]) {
        assert_eq!(u_k.len(), self.m, "u_k length");
        assert_eq!(u_next.len(), self.m, "u_next length");
        let (m, n) = (self.m, self.n);
        let w = &mut self.z[n..];
        w[..m].copy_from_slice(u_k);
        for (slot, &j) in w[m..].iter_mut().zip(&self.temp_inputs) {
            *slot = u_next[j] - u_k[j];
        }
    }

    /// `s_next = F s + G w` (does not touch `s`).
    pub(crate) fn advance(&mut self) {
        match &self.decay {
            None => self
                .advance
                .gemv(self.kernel, &self.z, &mut self.s_next, false),
            Some(d) => {
                let (s, w) = self.z.split_at(self.n);
                for ((next, di), si) in self.s_next.iter_mut().zip(d).zip(s) {
                    *next = di * si;
                }
                self.advance.gemv(self.kernel, w, &mut self.s_next, true);
            }
        }
    }

    /// Both readouts from `s` and `w` (with `s_next = F s + G w`), then `s ← s_next`.
    pub(crate) fn finish(&mut self) {
        self.outputs
            .gemv(self.kernel, &self.z, &mut self.out, false);
        self.z[..self.n].copy_from_slice(&self.s_next);
    }

    /// Instant output `row` for the state `s` and the packed inputs `w`.
    pub(crate) fn instant_row(&self, row: usize, s: &[f64], w: &[f64]) -> f64 {
        let r = self.inst_packed.row(row);
        dot(&r[..self.n], s) + dot(&r[self.n..], w)
    }

    /// Instant output `row` for the state in `s_next` and the inputs in `w`.
    pub(crate) fn instant_row_next(&self, row: usize) -> f64 {
        self.instant_row(row, &self.s_next, &self.z[self.n..])
    }

    /// Instant output `row` for the current state and the inputs `u_k` at the step's start
    /// (the ramp part of `w` is zero at that instant).
    pub(crate) fn instant_row_now(&self, row: usize, u_k: &[f64]) -> f64 {
        let r = self.inst_packed.row(row);
        dot(&r[..self.n], &self.z[..self.n]) + dot(&r[self.n..self.n + self.m], u_k)
    }
}
