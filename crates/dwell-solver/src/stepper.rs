//! Marching a [`Discretization`] through time without allocating.

use nalgebra::DMatrix;

use crate::control::Control;
use crate::discretization::Transition;
use crate::packed::{dot, Packed};
use crate::{Discretization, InputKind, Readout, SolverError};

/// The state transition as the stepper runs it.
#[derive(Clone, Debug)]
enum Step {
    Dense(Packed),
    Diagonal(Vec<f64>),
}

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
/// and `ū = (u_k + u_{k+1})/2` for temperature inputs, `u_k` for heat flows. Cost per step:
/// `n·(m + m_T) + (p_i + p_m)·(n + m + m_T)` multiply-adds, plus `n²` for the block route.
#[derive(Clone, Debug)]
pub struct Stepper {
    pub(crate) n: usize,
    pub(crate) m: usize,
    temp_inputs: Vec<usize>,
    pub(crate) kinds: Vec<InputKind>,
    transition: Step,
    pub(crate) g: Packed,
    pub(crate) inst_x: Packed,
    pub(crate) inst_w: Packed,
    mean_x: Packed,
    mean_w: Packed,
    to_nodes: Option<Packed>,
    from_nodes: Option<Packed>,
    pub(crate) s: Vec<f64>,
    pub(crate) s_next: Vec<f64>,
    pub(crate) w: Vec<f64>,
    inst: Vec<f64>,
    mean: Vec<f64>,
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
        let t = disc
            .to_nodes
            .clone()
            .unwrap_or_else(|| DMatrix::identity(n, n));
        let g = join(&disc.gamma0, &disc.gamma1, &temp_inputs, 1.0);
        let mean_g = join(&disc.mean_gamma0, &disc.mean_gamma1, &temp_inputs, 1.0);
        let mean_f = match &disc.mean_transition {
            Transition::Dense(f) => f.clone(),
            Transition::Diagonal(d) => DMatrix::from_diagonal(d),
        };
        let xt_inst = &instant.x * &t;
        let xt_mean = &mean.x * &t;
        let inst_w = join(&instant.u, &instant.u, &temp_inputs, 1.0);
        let mean_w = &xt_mean * &mean_g + join(&mean.u, &mean.u, &temp_inputs, 0.5);
        let transition = match &disc.transition {
            Transition::Dense(f) => Step::Dense(Packed::from_matrix(f)),
            Transition::Diagonal(d) => Step::Diagonal(d.as_slice().to_vec()),
        };
        let wl = m + temp_inputs.len();
        Ok(Stepper {
            n,
            m,
            temp_inputs,
            kinds: disc.input_kinds().to_vec(),
            transition,
            g: Packed::from_matrix(&g),
            inst_x: Packed::from_matrix(&xt_inst),
            inst_w: Packed::from_matrix(&inst_w),
            mean_x: Packed::from_matrix(&(xt_mean * mean_f)),
            mean_w: Packed::from_matrix(&mean_w),
            to_nodes: disc.to_nodes.as_ref().map(Packed::from_matrix),
            from_nodes: disc.from_nodes.as_ref().map(Packed::from_matrix),
            s: vec![0.0; n],
            s_next: vec![0.0; n],
            w: vec![0.0; wl],
            inst: vec![0.0; instant.outputs()],
            mean: vec![0.0; mean.outputs()],
            control: None,
        })
    }

    /// Sets the node temperatures `x` (°C), length `n`.
    ///
    /// # Panics
    /// If `x.len() != n`.
    pub fn set_state(&mut self, x: &[f64]) {
        assert_eq!(x.len(), self.n, "state length");
        match &self.from_nodes {
            Some(ti) => ti.mul_into(x, &mut self.s),
            None => self.s.copy_from_slice(x),
        }
    }

    /// Writes the node temperatures `x` (°C) into `out`, length `n`.
    ///
    /// # Panics
    /// If `out.len() != n`.
    pub fn state_into(&self, out: &mut [f64]) {
        assert_eq!(out.len(), self.n, "state length");
        match &self.to_nodes {
            Some(t) => t.mul_into(&self.s, out),
            None => out.copy_from_slice(&self.s),
        }
    }

    /// The instant readout at the end of the last step.
    pub fn instant(&self) -> &[f64] {
        &self.inst
    }

    /// The mean readout over the last step.
    pub fn mean(&self) -> &[f64] {
        &self.mean
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
        self.w[..self.m].copy_from_slice(u_k);
        for (slot, &j) in self.w[self.m..].iter_mut().zip(&self.temp_inputs) {
            *slot = u_next[j] - u_k[j];
        }
    }

    /// `s_next = F s + G w` (does not touch `s`).
    pub(crate) fn advance(&mut self) {
        match &self.transition {
            Step::Dense(f) => {
                for i in 0..self.n {
                    self.s_next[i] = dot(f.row(i), &self.s) + dot(self.g.row(i), &self.w);
                }
            }
            Step::Diagonal(d) => {
                for (i, (next, di)) in self.s_next.iter_mut().zip(d).enumerate() {
                    *next = di * self.s[i] + dot(self.g.row(i), &self.w);
                }
            }
        }
    }

    /// Mean readout from `s` and `w`, then `s ← s_next` and the instant readout.
    pub(crate) fn finish(&mut self) {
        self.mean_x.mul_into(&self.s, &mut self.mean);
        self.mean_w.mul_add_into(&self.w, &mut self.mean);
        std::mem::swap(&mut self.s, &mut self.s_next);
        self.inst_x.mul_into(&self.s, &mut self.inst);
        self.inst_w.mul_add_into(&self.w, &mut self.inst);
    }

    /// Instant output `row` for the state in `s_next` and the inputs in `w`.
    pub(crate) fn instant_row_next(&self, row: usize) -> f64 {
        dot(self.inst_x.row(row), &self.s_next) + dot(self.inst_w.row(row), &self.w)
    }

    /// Instant output `row` for the current state and the inputs `u_k` at the step's start
    /// (the ramp part of `w` is zero at that instant).
    pub(crate) fn instant_row_now(&self, row: usize, u_k: &[f64]) -> f64 {
        dot(self.inst_x.row(row), &self.s) + dot(&self.inst_w.row(row)[..self.m], u_k)
    }
}
