//! The exact one-step map of an [`RcSystem`], by either route.

use std::sync::Arc;

use nalgebra::{DMatrix, DVector};

use crate::block::block_parts;
use crate::eigen::{symmetric_eigenvalues, Backend};
use crate::modal::{
    clamp_rates, modal_parts, symmetric_rate_matrix, symmetric_rate_matrix_in_place, ModalParts,
};
use crate::{InputKind, RcSystem, SolverError};

/// Smallest allowed step (s).
pub const MIN_STEP_S: f64 = 1.0;
/// Largest allowed step (s): one day.
pub const MAX_STEP_S: f64 = 86_400.0;

/// How the exponential is computed.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Route {
    /// Symmetric eigen-decomposition of `C^{-1/2} K C^{-1/2}`; state kept in modal
    /// coordinates; cheapest per step (`O(n)` transition) and gives the time constants.
    Modal,
    /// One block-matrix exponential (Van Loan 1978); dense `n × n` transition.
    Block,
}

/// The transition of the (possibly modal) state over one step.
#[derive(Clone, Debug)]
pub(crate) enum Transition {
    /// A full matrix (node coordinates).
    Dense(DMatrix<f64>),
    /// A diagonal (modal coordinates).
    Diagonal(DVector<f64>),
}

impl Transition {
    fn to_dense(&self) -> DMatrix<f64> {
        match self {
            Transition::Dense(m) => m.clone(),
            Transition::Diagonal(d) => DMatrix::from_diagonal(d),
        }
    }
}

/// The modal basis `T = C^{-1/2} V` and the capacitances `C` (J/K) that invert it:
/// `T⁻¹ = (C T)ᵀ`, since `V` is orthogonal.
#[derive(Debug)]
pub(crate) struct ModalBasis {
    /// `T`, `n × n`.
    pub t: DMatrix<f64>,
    /// `C` (J/K), length `n`.
    pub capacitance: Vec<f64>,
}

impl ModalBasis {
    /// `x = T s` (allocation-free).
    pub(crate) fn modal_to_state_into(&self, s: &[f64], x: &mut [f64]) {
        x.iter_mut().for_each(|v| *v = 0.0);
        for (col, &sj) in self.t.column_iter().zip(s) {
            for (xi, tij) in x.iter_mut().zip(col.iter()) {
                *xi += tij * sj;
            }
        }
    }

    /// `s = T⁻¹ x = (C T)ᵀ x` (allocation-free).
    pub(crate) fn state_to_modal_into(&self, x: &[f64], s: &mut [f64]) {
        for (col, si) in self.t.column_iter().zip(s.iter_mut()) {
            *si = col
                .iter()
                .zip(&self.capacitance)
                .zip(x)
                .map(|((t, c), x)| t * c * x)
                .sum();
        }
    }

    /// `T⁻¹`, `n × n`.
    fn inverse(&self) -> DMatrix<f64> {
        let n = self.capacitance.len();
        DMatrix::from_fn(n, n, |i, j| self.t[(j, i)] * self.capacitance[j])
    }
}

/// Where the eigenvalues for the time constants come from.
#[derive(Clone, Debug)]
enum Spectrum {
    /// Already known rates `λ` (1/s).
    Rates(Vec<f64>),
    /// The symmetric rate matrix `S`, decomposed on demand.
    Symmetric(DMatrix<f64>),
    /// A general `A` (from a bare state space), decomposed on demand.
    General(DMatrix<f64>),
}

/// The exact discrete-time map of `C ẋ = −K x + U u` over a step `h` (s).
///
/// With heat-flow inputs held over the step (zero-order hold) and temperature inputs linear
/// between samples (first-order hold), for `d_k = u_{k+1} − u_k` (heat-flow entries ignored):
///
/// ```text
/// x_{k+1} = Φ x_k + Γ₀ u_k + Γ₁ d_k                     (°C)
/// x̄_k     = Ψ̄ x_k + Ψ̄₀ u_k + Ψ̄₁ d_k    (mean over the step, °C)
/// ```
///
/// This is the exact solution of the linear ODE for such inputs, not an approximation; the
/// only errors are rounding (about `1e-13` relative for the block route, and the
/// eigen-decomposition's `ε‖S‖` for the modal route). Internally the state may live in modal
/// coordinates `s` with `x = T s`; the accessors return node coordinates.
#[derive(Clone, Debug)]
pub struct Discretization {
    route: Route,
    step_s: f64,
    kinds: Vec<InputKind>,
    pub(crate) transition: Transition,
    pub(crate) mean_transition: Transition,
    /// `Γ₀`, `Γ₁`, `Ψ̄₀`, `Ψ̄₁` in state coordinates (`n × m`).
    pub(crate) gamma0: DMatrix<f64>,
    pub(crate) gamma1: DMatrix<f64>,
    pub(crate) mean_gamma0: DMatrix<f64>,
    pub(crate) mean_gamma1: DMatrix<f64>,
    /// `x = T s` with `T = C^{-1/2} V` (modal route), shared with every [`Stepper`] built
    /// from this discretisation (it is `n × n`: 32 MB at 2,000 states); `None` means
    /// identity (node coordinates). `T⁻¹ = Vᵀ C^{1/2} = (C T)ᵀ` is not stored.
    ///
    /// [`Stepper`]: crate::Stepper
    pub(crate) to_nodes: Option<Arc<ModalBasis>>,
    spectrum: Spectrum,
}

/// Checks `step_s` is finite and within [`MIN_STEP_S`, `MAX_STEP_S`].
pub(crate) fn validate_step(step_s: f64) -> Result<(), SolverError> {
    if !step_s.is_finite() || !(MIN_STEP_S..=MAX_STEP_S).contains(&step_s) {
        return Err(SolverError::Step(
            step_s,
            format!("step_s must be finite and within {MIN_STEP_S} s ..= {MAX_STEP_S} s (one day)"),
        ));
    }
    Ok(())
}

impl Discretization {
    /// Discretises `sys` over a step of `step_s` seconds (1 s ..= 86 400 s) by `route`.
    ///
    /// Errors: [`SolverError::Step`] for a step out of range (the message names the range),
    /// [`SolverError::Numerical`] if the eigen-decomposition or the exponential fails.
    pub fn new(sys: &RcSystem, step_s: f64, route: Route) -> Result<Self, SolverError> {
        validate_step(step_s)?;
        let kinds = sys.input_kinds.clone();
        match route {
            Route::Block => {
                let mut d = Self::block(&sys.a(), &sys.b(), kinds, step_s)?;
                d.spectrum = Spectrum::Symmetric(symmetric_rate_matrix(sys));
                Ok(d)
            }
            Route::Modal => Self::modal(symmetric_rate_matrix(sys), sys, step_s),
        }
    }

    /// [`Discretization::new`] taking the system by value: the modal route forms
    /// `S = C^{-1/2} K C^{-1/2}` in `K`'s storage instead of beside it, so the peak memory of
    /// discretising is one `n × n` matrix lower (32 MB at 2,000 states; docs/performance.md).
    /// Same result, bit for bit. The block route gains nothing.
    ///
    /// Errors: as [`Discretization::new`].
    pub fn from_system(mut sys: RcSystem, step_s: f64, route: Route) -> Result<Self, SolverError> {
        match route {
            Route::Block => Self::new(&sys, step_s, route),
            Route::Modal => {
                validate_step(step_s)?;
                let k = std::mem::replace(&mut sys.conductance, DMatrix::zeros(0, 0));
                let s = symmetric_rate_matrix_in_place(k, &sys.capacitance);
                Self::modal(s, &sys, step_s)
            }
        }
    }

    /// The modal route from `s`, the `S` of `sys` (consumed).
    fn modal(s: DMatrix<f64>, sys: &RcSystem, step_s: f64) -> Result<Self, SolverError> {
        let mut p = modal_parts(s, sys, step_s)?;
        let t = std::mem::replace(&mut p.to_nodes, DMatrix::zeros(0, 0));
        let mut d = Self::modal_coordinates(sys.input_kinds.clone(), step_s, p);
        d.to_nodes = Some(Arc::new(ModalBasis {
            t,
            capacitance: sys.capacitance.clone(),
        }));
        Ok(d)
    }

    /// A modal discretisation whose state is the modal coordinates themselves (no map back
    /// to nodes): used for truncated models, whose readouts are pre-multiplied by the kept
    /// columns of the basis (`truncation.rs`).
    pub(crate) fn modal_coordinates(kinds: Vec<InputKind>, step_s: f64, p: ModalParts) -> Self {
        Discretization {
            route: Route::Modal,
            step_s,
            kinds,
            transition: Transition::Diagonal(p.decay),
            mean_transition: Transition::Diagonal(p.mean_decay),
            gamma0: p.gamma0,
            gamma1: p.gamma1,
            mean_gamma0: p.mean_gamma0,
            mean_gamma1: p.mean_gamma1,
            to_nodes: None,
            spectrum: Spectrum::Rates(p.lambda),
        }
    }

    /// Discretises a bare state space `ẋ = A x + B u` (`a` in 1/s, `b` per input unit per
    /// second) by the block route. Used for fixtures exported as state spaces, where `C` and
    /// `K` are not available; `A` need not be symmetrisable.
    pub fn from_state_space(
        a: &DMatrix<f64>,
        b: &DMatrix<f64>,
        kinds: Vec<InputKind>,
        step_s: f64,
    ) -> Result<Self, SolverError> {
        validate_step(step_s)?;
        let n = a.nrows();
        if a.ncols() != n || b.nrows() != n || b.ncols() != kinds.len() || n == 0 {
            return Err(SolverError::Shape(format!(
                "state space shapes A {:?}, B {:?} and {} input kinds do not fit",
                a.shape(),
                b.shape(),
                kinds.len()
            )));
        }
        if a.iter().chain(b.iter()).any(|v| !v.is_finite()) {
            return Err(SolverError::Shape(
                "state space holds a non-finite value".into(),
            ));
        }
        let mut d = Self::block(a, b, kinds, step_s)?;
        d.spectrum = Spectrum::General(a.clone());
        Ok(d)
    }

    fn block(
        a: &DMatrix<f64>,
        b: &DMatrix<f64>,
        kinds: Vec<InputKind>,
        step_s: f64,
    ) -> Result<Self, SolverError> {
        let p = block_parts(a, b, &kinds, step_s)?;
        Ok(Discretization {
            route: Route::Block,
            step_s,
            kinds,
            transition: Transition::Dense(p.phi),
            mean_transition: Transition::Dense(p.mean_phi),
            gamma0: p.gamma0,
            gamma1: p.gamma1,
            mean_gamma0: p.mean_gamma0,
            mean_gamma1: p.mean_gamma1,
            to_nodes: None,
            spectrum: Spectrum::General(DMatrix::zeros(0, 0)),
        })
    }

    /// The route used.
    pub fn route(&self) -> Route {
        self.route
    }

    /// The step `h` (s).
    pub fn step_s(&self) -> f64 {
        self.step_s
    }

    /// Number of states `n`.
    pub fn states(&self) -> usize {
        self.gamma0.nrows()
    }

    /// Number of inputs `m`.
    pub fn inputs(&self) -> usize {
        self.kinds.len()
    }

    /// Kind of each input.
    pub fn input_kinds(&self) -> &[InputKind] {
        &self.kinds
    }

    fn nodes(&self, m: DMatrix<f64>, right: bool) -> DMatrix<f64> {
        match &self.to_nodes {
            Some(b) if right => &b.t * m * b.inverse(),
            Some(b) => &b.t * m,
            None => m,
        }
    }

    /// `Φ = e^{hA}` (1), `n × n`, node coordinates.
    pub fn phi(&self) -> DMatrix<f64> {
        self.nodes(self.transition.to_dense(), true)
    }

    /// `Γ₀ = ∫₀ʰ e^{sA} ds B`, `n × m`: (1) for temperature inputs, (K/W) for heat flows.
    pub fn gamma0(&self) -> DMatrix<f64> {
        self.nodes(self.gamma0.clone(), false)
    }

    /// `Γ₁ = (1/h) ∫₀ʰ e^{(h−s)A} s ds B`, `n × m`, the coefficient of `u_{k+1} − u_k`;
    /// zero columns for heat-flow inputs.
    pub fn gamma1(&self) -> DMatrix<f64> {
        self.nodes(self.gamma1.clone(), false)
    }

    /// `Ψ̄ = (1/h) ∫₀ʰ e^{tA} dt` (1): the mean state over the step per unit initial state.
    pub fn mean_phi(&self) -> DMatrix<f64> {
        self.nodes(self.mean_transition.to_dense(), true)
    }

    /// `Ψ̄₀`: the mean state over the step per unit held input (units of `Γ₀`).
    pub fn mean_gamma0(&self) -> DMatrix<f64> {
        self.nodes(self.mean_gamma0.clone(), false)
    }

    /// `Ψ̄₁`: the mean state over the step per unit input change (units of `Γ₁`).
    pub fn mean_gamma1(&self) -> DMatrix<f64> {
        self.nodes(self.mean_gamma1.clone(), false)
    }

    /// The time constants `τ_i = 1/λ_i` (s), longest first; `f64::INFINITY` for `λ = 0`
    /// (a part of the network with no path to a boundary).
    ///
    /// For the modal route these are known; for the block route the symmetric eigenvalues
    /// are computed now (`O(n³)`); for a bare state space, the real parts of `A`'s
    /// eigenvalues are used.
    pub fn time_constants_s(&self) -> Vec<f64> {
        let n = self.states();
        let rates = match &self.spectrum {
            Spectrum::Rates(l) => l.clone(),
            Spectrum::Symmetric(s) => clamp_rates(
                symmetric_eigenvalues(s, Backend::for_states(n)).into_iter(),
                n,
            ),
            Spectrum::General(a) => clamp_rates(a.complex_eigenvalues().iter().map(|z| -z.re), n),
        };
        time_constants_from_rates(&rates)
    }
}

/// `τ_i = 1/λ_i` (s), longest first; `f64::INFINITY` for `λ = 0`.
pub(crate) fn time_constants_from_rates(rates: &[f64]) -> Vec<f64> {
    let mut tau: Vec<f64> = rates
        .iter()
        .map(|&l| if l > 0.0 { 1.0 / l } else { f64::INFINITY })
        .collect();
    tau.sort_by(|a, b| b.total_cmp(a));
    tau
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::testnets::link;

    #[test]
    fn from_system_gives_the_same_numbers_as_new() {
        // A 60-state chain (faer's path) with two inputs: by value and by reference must agree
        // bit for bit (S is the same numbers, only its storage differs).
        let n = 60;
        let sys = crate::testnets::chain_system(n);
        let by_ref = Discretization::new(&sys, 3600.0, Route::Modal).unwrap();
        let by_value = Discretization::from_system(sys, 3600.0, Route::Modal).unwrap();
        assert_eq!(by_ref.phi(), by_value.phi());
        assert_eq!(by_ref.gamma1(), by_value.gamma1());
        assert_eq!(by_ref.mean_gamma0(), by_value.mean_gamma0());
        assert_eq!(by_ref.time_constants_s(), by_value.time_constants_s());
    }

    #[test]
    fn the_systems_time_constants_are_the_modal_routes() {
        // Eigenvalues only (`RcSystem::time_constants_s`) against the modal route's full
        // decomposition, on both backends (20 states: nalgebra; 60: faer): the same
        // eigenvalues to rounding (both backward stable, Golub & Van Loan §8.1), asked 1e-10
        // relative. The last 4 states form a floating part (no boundary): τ = ∞ in both.
        for n in [20, 60] {
            let mut k = DMatrix::<f64>::zeros(n, n);
            for i in 0..n - 5 {
                link(&mut k, i, i + 1, 2.0 + (i % 7) as f64);
            }
            for i in n - 4..n - 1 {
                link(&mut k, i, i + 1, 3.0);
            }
            k[(0, 0)] += 4.0;
            let mut u = DMatrix::<f64>::zeros(n, 1);
            u[(0, 0)] = 4.0;
            let c: Vec<f64> = (0..n).map(|i| 1e5 * (1.0 + (i % 3) as f64)).collect();
            let sys = RcSystem::new(c, k, u, vec![InputKind::Temperature]).unwrap();
            let only = sys.time_constants_s();
            let full = Discretization::new(&sys, 3600.0, Route::Modal)
                .unwrap()
                .time_constants_s();
            assert_eq!(only.len(), n);
            assert!(
                only[0].is_infinite() && full[0].is_infinite(),
                "n={n}: {only:?}"
            );
            assert!(only[1].is_finite(), "n={n}: one zero eigenvalue only");
            for (a, b) in only.iter().zip(&full).skip(1) {
                assert!((a - b).abs() <= 1e-10 * b, "n={n}: {a} vs {b}");
            }
        }
    }
}
