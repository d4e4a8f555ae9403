//! Modal truncation with a static correction: the fastest modes are replaced by their
//! quasi-steady response, so stepping costs less and the steady state stays exact.
//!
//! In modal coordinates (`modal.rs`) every mode is a first-order system
//! `ż_i = −λ_i z_i + b_iᵀ u` (`b_iᵀ` the `i`-th row of `B̃ = Vᵀ C^{-1/2} U`), and an output
//! is `y = Σ_i c_i z_i + U_y u` with `c_i` the `i`-th column of `X C^{-1/2} V`. A mode whose
//! time constant `τ_i = 1/λ_i` is far below the step `h` forgets its state within a step
//! (by `e^{−h/τ_i}`) and then follows its input with a lag of about `τ_i`. **Residualisation**
//! (singular perturbation) drops its dynamics and keeps its static response:
//!
//! ```text
//! z_i(t) ≈ ẑ_i(t) = b_iᵀ u(t) / λ_i        for every dropped mode i (τ_i < τ_min)
//! x(t)   = T_K z_K(t) + D u(t),   D = T_D Λ_D⁻¹ B̃_D   (n × m, K/K or K/W)
//! ```
//!
//! where `K` are the kept and `D` the dropped modes and `T = C^{-1/2} V`. Only `r` kept modes
//! are stepped; the dropped ones enter the readouts as a direct feed-through `X D` added to
//! `U_y`, evaluated at the same instants as `U_y` (the step's end for instant values; the mean
//! input over the step for means). At constant inputs every mode sits at `b_iᵀu/λ_i`, so the
//! steady state `x = K⁻¹ U u` is reproduced exactly (`T Λ⁻¹ B̃ = K⁻¹ U`); modes with `λ = 0`
//! are always kept.
//!
//! ## Error bound
//!
//! The error of a dropped mode, `e_i = z_i − ẑ_i`, obeys `ė_i = −λ_i e_i − b_iᵀu̇/λ_i`. With
//! temperature inputs linear over a step (ramp `d_k = u_{k+1} − u_k`) and heat flows held
//! (jump `J_k = b_iᵀ(u_k − u_{k−1})` at the step's start), integrating over one step
//! (`μ = λ_i h`, `φ_k = φ_k(−μ)` as in `phi.rs`) gives exactly
//!
//! ```text
//! e_{k+1} = e^{−μ} (e_k − J_k/λ) − φ₁ β_k/λ,         β_k = b_iᵀ d_k (temperature inputs)
//! ē_k     = φ₁ (e_k − J_k/λ) − φ₂ β_k/λ              (mean over the step)
//! ```
//!
//! If `|J_k| ≤ J_i = Σ_j |b_ij| δ_j` over heat-flow inputs and `|β_k| ≤ β_i = Σ_j |b_ij| δ_j`
//! over temperature inputs, `δ_j` bounding every change of input `j` between samples, and the
//! run starts with the dropped modes at their quasi-steady value (`e_0 = 0`, for example from
//! a steady state), then by induction (`|e_k| ≤ a/(1 − e^{−μ})`, `a = e^{−μ}J_i/λ + φ₁β_i/λ`):
//!
//! ```text
//! |e_k| ≤ E_i = J_i / (λ_i (e^{μ} − 1)) + β_i / (λ_i μ)               (step ends)
//! |ē_k| ≤ Ē_i = J_i / (λ_i μ) + β_i (φ₁/μ + φ₂) / λ_i                  (step means)
//! |Δy_r| ≤ Σ_{i dropped} |c_ri| E_i      (and Σ |c_ri| Ē_i for a mean readout)
//! ```
//!
//! For `μ ≫ 1` these are `J τ_i e^{−h/τ_i} + β τ_i²/h` and `(J + β/2) τ_i²/h`: the
//! dropped part of each output is off by about `τ_i/h` of the response of that mode to one
//! step's input change. A starting state away from the quasi-steady one adds
//! `|c_ri| |e_i(0)| e^{−t/τ_i}` (below `e^{−h/τ_min}` of the initial offset after one step).
//! Each inequality is attained by a single dropped mode under a constant ramp (or constant
//! staircase of heat steps), so the bound cannot be lowered in general; with many modes it is
//! pessimistic by the cancellation between modes (tests and docs/solver.md give the ratios).
//!
//! ## Reference
//!
//! P. Kokotović, H. K. Khalil and J. O'Reilly, *Singular Perturbation Methods in Control:
//! Analysis and Design*, SIAM (1999), ch. 2 (the quasi-steady-state model).
//! M. Hochbruck and A. Ostermann, "Exponential integrators", Acta Numerica 19 (2010), §2.1
//! (the φ-functions used above).

use nalgebra::DMatrix;

use crate::discretization::validate_step;
use crate::modal::{modes, modes_of, step_coefficients, symmetric_rate_matrix_in_place, Modes};
use crate::phi::phi0123;
use crate::{Discretization, InputKind, RcSystem, Readout, SolverError, Stepper};

/// Which modes a [`TruncatedModal`] drops: those with a time constant below
/// `min_time_constant_s` (s). `0` drops none (the result equals [`Route::Modal`]).
///
/// [`Route::Modal`]: crate::Route::Modal
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Truncation {
    min_time_constant_s: f64,
}

impl Truncation {
    /// Drops modes whose time constant is below `min_time_constant_s` (s; finite, ≥ 0).
    /// A value well under the step (say a tenth) keeps the error small; see
    /// [`TruncatedModal::error_bound`].
    pub fn new(min_time_constant_s: f64) -> Result<Self, SolverError> {
        if !(min_time_constant_s.is_finite() && min_time_constant_s >= 0.0) {
            return Err(SolverError::Option(format!(
                "min_time_constant_s = {min_time_constant_s} s must be finite and ≥ 0 s \
                 (0 drops no mode)"
            )));
        }
        Ok(Truncation {
            min_time_constant_s,
        })
    }

    /// The threshold time constant (s).
    pub fn min_time_constant_s(&self) -> f64 {
        self.min_time_constant_s
    }
}

/// Bounds (units of each output) on the truncation error of every row of a readout; see the
/// module docs for the derivation.
#[derive(Clone, Debug, PartialEq)]
pub struct ErrorBound {
    /// Bound for values at step ends (an instant readout).
    pub instant: Vec<f64>,
    /// Bound for exact means over a step (a mean readout).
    pub mean: Vec<f64>,
}

/// A modal discretisation with its fastest modes replaced by their static response.
///
/// Its [`Discretization`] has `r` states, the kept modal coordinates (not node
/// temperatures); node-coordinate readouts and states are mapped with
/// [`TruncatedModal::readout`], [`TruncatedModal::modal_state`] and
/// [`TruncatedModal::nodes_into`], or use [`TruncatedModal::stepper`]:
///
/// ```
/// use dwell_solver::{InputKind, RcSystem, Readout, TruncatedModal, Truncation};
/// use nalgebra::DMatrix;
///
/// // A heavy room node and a light surface node (τ ≈ 3 min) with a heater on the surface.
/// let k = DMatrix::from_row_slice(2, 2, &[150.0, -100.0, -100.0, 100.0]);
/// let u = DMatrix::from_row_slice(2, 2, &[50.0, 0.0, 0.0, 1.0]);
/// let sys = RcSystem::new(vec![2e7, 2e4], k, u, vec![InputKind::Temperature, InputKind::HeatFlow])?;
/// let tm = TruncatedModal::new(&sys, 3600.0, Truncation::new(600.0)?)?;
/// assert_eq!((tm.kept_modes(), tm.dropped_modes()), (1, 1));
/// let mut st = tm.stepper(&Readout::nodes(&[0, 1], 2, 2), &Readout::empty(2, 2))?;
/// st.set_state(&tm.modal_state(&[20.0, 20.0]));
/// st.step(&[0.0, 500.0], &[0.0, 500.0]);
/// assert_eq!(st.instant().len(), 2);
/// # Ok::<(), dwell_solver::SolverError>(())
/// ```
#[derive(Clone, Debug)]
pub struct TruncatedModal {
    disc: Discretization,
    truncation: Truncation,
    /// `T = C^{-1/2} V`, `n × n`, columns by increasing rate: kept modes `0..r`, dropped
    /// `r..n`.
    basis: DMatrix<f64>,
    capacitance: Vec<f64>,
    kept: usize,
    /// Rates `λ` (1/s), increasing, all `n` modes.
    lambda: Vec<f64>,
    /// `B̃`, `n × m`, rows in the order of `lambda`.
    bt: DMatrix<f64>,
    /// `D = T_D Λ_D⁻¹ B̃_D`, `n × m`: node temperature per unit input from the dropped modes.
    static_gain: DMatrix<f64>,
    kinds: Vec<InputKind>,
}

impl TruncatedModal {
    /// Decomposes `sys` (one symmetric eigen-decomposition, as [`Route::Modal`]), drops the
    /// modes faster than `truncation` and discretises the rest over `step_s` (1 s ..= 1 day).
    ///
    /// [`Route::Modal`]: crate::Route::Modal
    pub fn new(sys: &RcSystem, step_s: f64, truncation: Truncation) -> Result<Self, SolverError> {
        validate_step(step_s)?;
        let md = modes(sys)?;
        Self::with_modes(md, sys, step_s, truncation)
    }

    /// As [`TruncatedModal::new`], taking the system by value so that `S` is formed in
    /// `K`'s storage instead of beside it (as [`Discretization::from_system`]): the peak
    /// memory of discretising is one `n × n` matrix lower (32 MB at 2,000 states). Same
    /// result, bit for bit.
    ///
    /// [`Discretization::from_system`]: crate::Discretization::from_system
    pub fn from_system(
        mut sys: RcSystem,
        step_s: f64,
        truncation: Truncation,
    ) -> Result<Self, SolverError> {
        validate_step(step_s)?;
        let k = std::mem::replace(&mut sys.conductance, DMatrix::zeros(0, 0));
        let s = symmetric_rate_matrix_in_place(k, &sys.capacitance);
        let md = modes_of(s, &sys)?;
        Self::with_modes(md, &sys, step_s, truncation)
    }

    fn with_modes(
        md: Modes,
        sys: &RcSystem,
        step_s: f64,
        truncation: Truncation,
    ) -> Result<Self, SolverError> {
        let (n, m) = (sys.states(), sys.inputs());
        let mut order: Vec<usize> = (0..n).collect();
        order.sort_by(|&a, &b| md.lambda[a].total_cmp(&md.lambda[b]));
        let (lambda, basis, bt) = if order.iter().enumerate().all(|(i, &o)| i == o) {
            // faer returns increasing eigenvalues: no copy of the n × n basis.
            (md.lambda, md.to_nodes, md.bt)
        } else {
            (
                order.iter().map(|&o| md.lambda[o]).collect(),
                DMatrix::from_fn(n, n, |i, j| md.to_nodes[(i, order[j])]),
                DMatrix::from_fn(n, m, |i, j| md.bt[(order[i], j)]),
            )
        };
        let tau_min = truncation.min_time_constant_s;
        let kept = lambda.partition_point(|&l| l * tau_min <= 1.0);
        let dropped = n - kept;
        let scaled = DMatrix::from_fn(dropped, m, |i, j| bt[(kept + i, j)] / lambda[kept + i]);
        let static_gain = basis.columns(kept, dropped) * scaled;
        let parts = step_coefficients(
            lambda[..kept].to_vec(),
            DMatrix::zeros(0, 0),
            &bt.rows(0, kept).into_owned(),
            &sys.input_kinds,
            step_s,
        );
        Ok(TruncatedModal {
            disc: Discretization::modal_coordinates(sys.input_kinds.clone(), step_s, parts),
            truncation,
            basis,
            capacitance: sys.capacitance.clone(),
            kept,
            lambda,
            bt,
            static_gain,
            kinds: sys.input_kinds.clone(),
        })
    }

    /// The discretisation of the kept modes (`r` states in modal coordinates).
    pub fn discretization(&self) -> &Discretization {
        &self.disc
    }

    /// The truncation used.
    pub fn truncation(&self) -> Truncation {
        self.truncation
    }

    /// Number of nodes `n` of the network.
    pub fn nodes(&self) -> usize {
        self.basis.nrows()
    }

    /// Number of modes kept and stepped, `r`.
    pub fn kept_modes(&self) -> usize {
        self.kept
    }

    /// Number of modes replaced by their static response, `n − r`.
    pub fn dropped_modes(&self) -> usize {
        self.nodes() - self.kept
    }

    /// Time constants of the dropped modes (s), longest first.
    pub fn dropped_time_constants_s(&self) -> Vec<f64> {
        self.lambda[self.kept..].iter().map(|l| 1.0 / l).collect()
    }

    /// `D = T_D Λ_D⁻¹ B̃_D` (`n × m`): the node temperatures carried by the dropped modes per
    /// unit input (1 for temperature inputs, K/W for heat flows), added to `T_K z`.
    pub fn static_gain(&self) -> &DMatrix<f64> {
        &self.static_gain
    }

    /// Maps a node-coordinate readout (`X` is `p × n`) to the kept modes: `X T_K` and
    /// `U_y + X D`.
    pub fn readout(&self, nodes: &Readout) -> Result<Readout, SolverError> {
        nodes.check("node", self.nodes(), self.kinds.len())?;
        let x = &nodes.x * self.basis.columns(0, self.kept);
        let u = &nodes.u + &nodes.x * &self.static_gain;
        Readout::new(x, u)
    }

    /// A [`Stepper`] of the kept modes with node-coordinate readouts (see
    /// [`Stepper::new`]); its state is set with [`TruncatedModal::modal_state`].
    pub fn stepper(&self, instant: &Readout, mean: &Readout) -> Result<Stepper, SolverError> {
        Stepper::new(&self.disc, &self.readout(instant)?, &self.readout(mean)?)
    }

    /// The kept modal coordinates of node temperatures `x` (°C, length `n`):
    /// `z_K = (C T_K)ᵀ x`.
    ///
    /// # Panics
    /// If `x.len() != n`.
    pub fn modal_state(&self, x: &[f64]) -> Vec<f64> {
        assert_eq!(x.len(), self.nodes(), "state length");
        self.basis
            .columns(0, self.kept)
            .column_iter()
            .map(|col| {
                col.iter()
                    .zip(&self.capacitance)
                    .zip(x)
                    .map(|((t, c), x)| t * c * x)
                    .sum()
            })
            .collect()
    }

    /// Node temperatures (°C) `x = T_K z + D u` from kept modal coordinates `z` (length `r`,
    /// for example from [`Stepper::state_into`]) and the inputs `u` at that instant (length
    /// `m`). Allocation-free.
    ///
    /// # Panics
    /// If a length is wrong.
    pub fn nodes_into(&self, z: &[f64], u: &[f64], x: &mut [f64]) {
        assert!(
            z.len() == self.kept && u.len() == self.kinds.len() && x.len() == self.nodes(),
            "lengths"
        );
        x.iter_mut().for_each(|v| *v = 0.0);
        let kept = self.basis.columns(0, self.kept);
        for (col, &zj) in kept.column_iter().zip(z) {
            for (xi, t) in x.iter_mut().zip(col.iter()) {
                *xi += t * zj;
            }
        }
        for (col, &uj) in self.static_gain.column_iter().zip(u) {
            for (xi, d) in x.iter_mut().zip(col.iter()) {
                *xi += d * uj;
            }
        }
    }

    /// Bounds on the truncation error of each row of the node-coordinate `readout`, given
    /// `max_change[j]`, a bound on `|u_{k+1} − u_k|` for input `j` over the whole run (K for
    /// temperature inputs, W for heat flows), for a run started with the dropped modes at
    /// rest (for example from a steady state). Derivation in the module docs.
    pub fn error_bound(
        &self,
        readout: &Readout,
        max_change: &[f64],
    ) -> Result<ErrorBound, SolverError> {
        let (n, m) = (self.nodes(), self.kinds.len());
        readout.check("node", n, m)?;
        if max_change.len() != m || max_change.iter().any(|d| !(d.is_finite() && *d >= 0.0)) {
            return Err(SolverError::Option(format!(
                "max_change needs {m} finite values ≥ 0 (one per input), got {max_change:?}"
            )));
        }
        let h = self.disc.step_s();
        let dropped = n - self.kept;
        let c = &readout.x * self.basis.columns(self.kept, dropped);
        let mut per_mode = Vec::with_capacity(dropped);
        for i in self.kept..n {
            let lambda = self.lambda[i];
            let mu = lambda * h;
            let (mut jump, mut ramp) = (0.0, 0.0);
            for (j, (delta, kind)) in max_change.iter().zip(&self.kinds).enumerate() {
                let v = self.bt[(i, j)].abs() * delta;
                match kind {
                    InputKind::HeatFlow => jump += v,
                    InputKind::Temperature => ramp += v,
                }
            }
            let [_, p1, p2, _] = phi0123(mu);
            let instant = jump / (lambda * mu.exp_m1()) + ramp / (lambda * mu);
            let mean = jump / (lambda * mu) + ramp * (p1 / mu + p2) / lambda;
            per_mode.push((instant, mean));
        }
        let sum = |pick: fn(&(f64, f64)) -> f64| -> Vec<f64> {
            (0..readout.outputs())
                .map(|r| {
                    c.row(r)
                        .iter()
                        .zip(&per_mode)
                        .map(|(cr, e)| cr.abs() * pick(e))
                        .sum()
                })
                .collect()
        };
        Ok(ErrorBound {
            instant: sum(|e| e.0),
            mean: sum(|e| e.1),
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::{steady_state, Route};

    /// Heavy node 0 (τ of hours to days) and light node 1 (τ ≈ 2 min) to outdoors; a heater
    /// on node 1.
    fn two_node() -> RcSystem {
        let k = DMatrix::from_row_slice(2, 2, &[150.0, -100.0, -100.0, 120.0]);
        let u = DMatrix::from_row_slice(2, 2, &[50.0, 0.0, 20.0, 1.0]);
        RcSystem::new(
            vec![2e7, 1.5e4],
            k,
            u,
            vec![InputKind::Temperature, InputKind::HeatFlow],
        )
        .unwrap()
    }

    /// Steps `tm` and the full modal route through `inputs` from the steady state at
    /// `inputs[0]`, and returns the worst |difference| per output row (instant, mean).
    fn run(
        sys: &RcSystem,
        tm: &TruncatedModal,
        ro: &Readout,
        inputs: &[Vec<f64>],
    ) -> (Vec<f64>, Vec<f64>) {
        let full = Discretization::new(sys, tm.discretization().step_s(), Route::Modal).unwrap();
        let mut a = Stepper::new(&full, ro, ro).unwrap();
        let mut b = tm.stepper(ro, ro).unwrap();
        let x0 = steady_state(sys, &inputs[0]).unwrap();
        a.set_state(&x0);
        b.set_state(&tm.modal_state(&x0));
        let p = ro.outputs();
        let (mut di, mut dm) = (vec![0.0_f64; p], vec![0.0_f64; p]);
        for w in inputs.windows(2) {
            a.step(&w[0], &w[1]);
            b.step(&w[0], &w[1]);
            for r in 0..p {
                di[r] = di[r].max((a.instant()[r] - b.instant()[r]).abs());
                dm[r] = dm[r].max((a.mean()[r] - b.mean()[r]).abs());
            }
        }
        (di, dm)
    }

    #[test]
    fn threshold_is_validated() {
        for bad in [-1.0, f64::NAN, f64::INFINITY] {
            let e = Truncation::new(bad).unwrap_err().to_string();
            assert!(e.contains("min_time_constant_s"), "{e}");
        }
        assert_eq!(Truncation::new(0.0).unwrap().min_time_constant_s(), 0.0);
    }

    #[test]
    fn zero_threshold_keeps_every_mode_and_matches_the_modal_route() {
        let sys = two_node();
        let tm = TruncatedModal::new(&sys, 3600.0, Truncation::new(0.0).unwrap()).unwrap();
        assert_eq!((tm.kept_modes(), tm.dropped_modes()), (2, 0));
        let inputs: Vec<Vec<f64>> = (0..200)
            .map(|k| {
                vec![
                    5.0 + (k as f64 * 0.3).sin() * 4.0,
                    ((k / 7) % 2) as f64 * 800.0,
                ]
            })
            .collect();
        let (di, dm) = run(&sys, &tm, &Readout::nodes(&[0, 1], 2, 2), &inputs);
        // Same eigen-decomposition and coefficients; only the order of the sums differs.
        for d in di.iter().chain(&dm) {
            assert!(*d < 1e-11, "{di:?} {dm:?}");
        }
    }

    /// A single dropped mode under a constant ramp (temperature input) or a constant
    /// staircase (heat input) attains the bound in the limit (module docs), so the observed
    /// error must equal the bound to rounding: the bound is derived correctly and is sharp.
    #[test]
    fn bound_is_attained_by_one_mode_under_a_ramp_and_a_staircase() {
        let sys = two_node();
        // h = 600 s against τ ≈ 2 min: μ ≈ 5, so both terms of the bound are visible.
        let tm = TruncatedModal::new(&sys, 600.0, Truncation::new(600.0).unwrap()).unwrap();
        assert_eq!(tm.dropped_modes(), 1);
        let tau = tm.dropped_time_constants_s()[0];
        assert!((60.0..200.0).contains(&tau), "τ = {tau} s");
        let ro = Readout::nodes(&[0, 1], 2, 2);
        for (name, delta, make) in [
            (
                "ramp",
                [0.5, 0.0],
                (|k: usize| vec![0.5 * k as f64, 0.0]) as fn(usize) -> Vec<f64>,
            ),
            ("staircase", [0.0, 40.0], |k| vec![0.0, 40.0 * k as f64]),
        ] {
            let inputs: Vec<Vec<f64>> = (0..60).map(make).collect();
            let (di, dm) = run(&sys, &tm, &ro, &inputs);
            let bound = tm.error_bound(&ro, &delta).unwrap();
            for r in 0..2 {
                for (what, got, b) in [
                    ("instant", di[r], bound.instant[r]),
                    ("mean", dm[r], bound.mean[r]),
                ] {
                    assert!(
                        b > 1e-9,
                        "{name} {what} row {r}: bound {b:e} should not vanish"
                    );
                    assert!(
                        got <= b * (1.0 + 1e-9) && got >= b * (1.0 - 1e-6),
                        "{name} {what} row {r}: observed {got:e}, bound {b:e}"
                    );
                }
            }
        }
    }

    #[test]
    fn steady_state_is_exact_however_many_modes_are_dropped() {
        let sys = two_node();
        for tau_min in [600.0, 1e12] {
            let tm = TruncatedModal::new(&sys, 3600.0, Truncation::new(tau_min).unwrap()).unwrap();
            let u = [3.0, 250.0];
            let want = steady_state(&sys, &u).unwrap();
            let mut st = tm
                .stepper(&Readout::nodes(&[0, 1], 2, 2), &Readout::empty(2, 2))
                .unwrap();
            st.set_state(&tm.modal_state(&[20.0, 20.0]));
            for _ in 0..24 * 200 {
                st.step(&u, &u);
            }
            let mut z = vec![0.0; tm.kept_modes()];
            st.state_into(&mut z);
            let mut x = vec![0.0; 2];
            tm.nodes_into(&z, &u, &mut x);
            for i in 0..2 {
                // K x = U u solved by LU: agreement to rounding (1e-9 K).
                assert!(
                    (st.instant()[i] - want[i]).abs() < 1e-9,
                    "τ_min {tau_min}: {:?} vs {want:?}",
                    st.instant()
                );
                assert!(
                    (x[i] - want[i]).abs() < 1e-9,
                    "τ_min {tau_min}: {x:?} vs {want:?}"
                );
            }
        }
    }

    #[test]
    fn from_system_gives_the_same_numbers_as_new() {
        // A 60-state chain (faer's path) with two inputs, half its modes dropped: by value and
        // by reference must agree bit for bit (S is the same numbers in other storage).
        let n = 60;
        let sys = crate::testnets::chain_system(n);
        let by_ref = TruncatedModal::new(&sys, 3600.0, Truncation::new(2.0e4).unwrap()).unwrap();
        let by_value =
            TruncatedModal::from_system(sys, 3600.0, Truncation::new(2.0e4).unwrap()).unwrap();
        assert!(by_ref.kept_modes() > 0 && by_ref.dropped_modes() > 0);
        assert_eq!(by_ref.kept_modes(), by_value.kept_modes());
        assert_eq!(by_ref.static_gain(), by_value.static_gain());
        let (a, b) = (by_ref.discretization(), by_value.discretization());
        assert_eq!(a.phi(), b.phi());
        assert_eq!(a.gamma1(), b.gamma1());
        let x: Vec<f64> = (0..n).map(|i| 10.0 + (i % 4) as f64).collect();
        assert_eq!(by_ref.modal_state(&x), by_value.modal_state(&x));
    }
}
