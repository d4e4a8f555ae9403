//! A capacity-limited thermostat solved jointly for all zones inside the stepper.
//!
//! Each step is linear in the heater powers, so the controlled outputs at the end of the
//! step are `y = y⁰ + M f`: `y⁰` with all heaters off, `f ∈ [0, 1]^q` the channels' output
//! fractions and `M` (K per unit fraction) the influence matrix,
//! `M_{c'c} = r_{c'}ᵀ Γ₀ e_c + (U_y)_{c'} e_c`, where `e_c` holds channel `c`'s full-output
//! powers (W) in its heat-flow inputs and `r_{c'}` is the readout row of the zone channel
//! `c'` controls. The fractions solve the box LCP "each zone ends the step at its setpoint
//! unless its heater is off (zone warmer) or at full power (zone colder)"; see `lcp.rs`.

use crate::lcp::{self, LcpScratch};
use crate::onoff::OnOffThermostat;
use crate::packed::{flat, Line, Packed, Panels, PANEL};
use crate::{InputKind, SolverError, Stepper};
use nalgebra::DMatrix;

/// One thermostat-driven heating channel.
///
/// Why the joint problem is well posed: when each heater delivers its heat to the node whose
/// temperature its thermostat reads, `M = E C^{-1/2} W C^{-1/2} Eᵀ D` with
/// `W = ∫₀ʰ e^{−sS} ds = V diag((1 − e^{−λh})/λ) Vᵀ` symmetric positive definite (every factor
/// `(1 − e^{−λh})/λ > 0`, equal to `h` at `λ = 0`), `E` selecting the controlled nodes and
/// `D = diag(full powers) > 0`. So `M D⁻¹` and all its principal submatrices are symmetric
/// positive definite: the LCP has exactly one solution for every setpoint and projected
/// Gauss–Seidel converges to it. When a heater spreads its heat over several nodes (air and
/// surfaces) or the readout mixes nodes, `M` is a small perturbation of that case and, for
/// hourly steps, strongly diagonally dominant (a zone's own heater moves it far more than its
/// neighbours' do), which also guarantees convergence; the sweep cap bounds the work
/// regardless.
#[derive(Clone, Debug, PartialEq)]
pub struct ControlChannel {
    /// `(input index, full output (W))` pairs: the heat-flow inputs this channel drives and
    /// the power each receives at fraction 1. Powers must be finite and positive.
    pub weights: Vec<(usize, f64)>,
    /// Index into the instant readout of the controlled temperature (°C).
    pub output: usize,
}

/// Precomputed control data and scratch.
#[derive(Clone, Debug)]
pub(crate) struct Control {
    pub(crate) channels: Vec<ControlChannel>,
    /// `M`, `q × q`, row-major: output of channel row per unit fraction of channel column.
    pub(crate) influence: Vec<f64>,
    /// The readouts' change per unit fraction (means, then instant values), one row per
    /// channel.
    pub(crate) output_gain: Packed,
    pub(crate) rhs: Vec<f64>,
    pub(crate) fraction: Vec<f64>,
    now: Vec<f64>,
    pub(crate) scratch: LcpScratch,
    pub(crate) sweeps: usize,
    /// For block runs (`stepper/march.rs`), one row per channel, each padded with zeros to
    /// whole panels (`⌈n/8⌉` lines): the state part of the controlled instant readout row
    /// (over `ξ`) and the state gain `H e_c` (the state change per unit fraction, also used
    /// by the step-by-step thermostats).
    pub(crate) row_state: Vec<Line>,
    pub(crate) gain_lines: Vec<Line>,
    /// The input part of the controlled instant readout rows (over `[u_k; u_{k+1,T}]`),
    /// `q` rows.
    pub(crate) row_inputs: Panels,
}

impl Stepper {
    /// Attaches thermostat channels (validated: distinct outputs within the instant readout,
    /// heat-flow inputs, finite positive powers, every channel able to warm its zone).
    pub fn with_control(mut self, channels: &[ControlChannel]) -> Result<Self, SolverError> {
        let q = channels.len();
        let mut problems = Vec::new();
        for (c, ch) in channels.iter().enumerate() {
            let p_inst = self.work.out().len() - self.p_mean;
            if ch.output >= p_inst {
                problems.push(format!(
                    "channel {c}: output {} is not an instant readout row (0..{p_inst})",
                    ch.output
                ));
            }
            if channels[..c].iter().any(|o| o.output == ch.output) {
                problems.push(format!(
                    "channel {c}: output {} is already controlled by another channel",
                    ch.output
                ));
            }
            for &(j, p) in &ch.weights {
                if j >= self.m || self.kind(j) != InputKind::HeatFlow {
                    problems.push(format!("channel {c}: input {j} is not a heat-flow input"));
                }
                if !(p.is_finite() && p > 0.0) {
                    problems.push(format!(
                        "channel {c}: full output {p} W must be finite and positive"
                    ));
                }
            }
        }
        if !problems.is_empty() {
            return Err(SolverError::Control(problems.join("; ")));
        }
        let mut gains = DMatrix::zeros(q, self.n);
        let mut out_gains = DMatrix::zeros(q, self.work.out().len());
        let mut influence = vec![0.0; q * q];
        for (c, ch) in channels.iter().enumerate() {
            let mut e = vec![0.0; self.m];
            for &(j, p) in &ch.weights {
                e[j] += p;
            }
            let ds = self.input_response(&e);
            for (i, v) in ds.iter().enumerate() {
                gains[(c, i)] = *v;
            }
            let dy = self.output_response(&e);
            for (i, v) in dy.iter().enumerate() {
                out_gains[(c, i)] = *v;
            }
            for (r, other) in channels.iter().enumerate() {
                influence[r * q + c] = dy[self.p_mean + other.output];
            }
        }
        for c in 0..q {
            if influence[c * q + c].is_nan() || influence[c * q + c] <= 0.0 {
                return Err(SolverError::Control(format!(
                    "channel {c}: its heaters do not warm its output within one step (influence {})",
                    influence[c * q + c]
                )));
            }
        }
        // The controlled rows and gains for block runs.
        let np = self.n.div_ceil(PANEL);
        let all = self.outputs.to_matrix();
        let mut row_state = vec![Line([0.0; PANEL]); q * np];
        let mut gain_lines = vec![Line([0.0; PANEL]); q * np];
        let wl = all.ncols() - self.n;
        let mut row_inputs = DMatrix::zeros(q, wl);
        for (c, ch) in channels.iter().enumerate() {
            let r = self.p_mean + ch.output;
            for i in 0..self.n {
                row_state[c * np + i / PANEL].0[i % PANEL] = all[(r, i)];
                gain_lines[c * np + i / PANEL].0[i % PANEL] = gains[(c, i)];
            }
            for j in 0..wl {
                row_inputs[(c, j)] = all[(r, self.n + j)];
            }
        }
        let scratch = LcpScratch::with_inverse(&influence, q);

        self.control = Some(Box::new(Control {
            row_state,
            gain_lines,
            row_inputs: Panels::from_matrix(&row_inputs),
            channels: channels.to_vec(),
            influence,
            output_gain: Packed::from_matrix(&out_gains),
            rhs: vec![0.0; q],
            fraction: vec![0.0; q],
            now: vec![0.0; q],
            scratch,
            sweeps: 0,
        }));
        Ok(self)
    }

    fn kind(&self, j: usize) -> InputKind {
        self.kinds[j]
    }

    /// The influence matrix `M` (K per unit fraction), row-major `q × q`, if control is set.
    pub fn influence(&self) -> Option<&[f64]> {
        self.control.as_ref().map(|c| c.influence.as_slice())
    }

    /// Projected Gauss–Seidel sweeps used by the last [`Stepper::step_thermostat`].
    pub fn last_sweeps(&self) -> usize {
        self.control.as_ref().map_or(0, |c| c.sweeps)
    }

    /// One step with capacity-limited thermostats: picks fractions `f ∈ [0, 1]` (0 for
    /// disabled channels) so every enabled channel's output ends the step at `setpoint_c`
    /// (°C) where its capacity allows, jointly for all channels; adds `f·power` (W) into
    /// `u_k`'s heater entries (which the caller passes as the other, non-thermostat heat in
    /// those inputs, normally 0), writes `f` into `fraction_out`, and steps.
    ///
    /// # Panics
    /// If [`Stepper::with_control`] was not called, or a slice has the wrong length.
    pub fn step_thermostat(
        &mut self,
        u_k: &mut [f64],
        u_next: &[f64],
        setpoint_c: &[f64],
        enabled: &[bool],
        fraction_out: &mut [f64],
    ) {
        let mut ctl = self
            .control
            .take()
            .expect("step_thermostat needs with_control");
        let q = ctl.channels.len();
        assert!(
            setpoint_c.len() == q && enabled.len() == q && fraction_out.len() == q,
            "channel slice lengths"
        );
        self.load_inputs(u_k, u_next);
        // Readouts and next state with the heaters off; the instant rows are the free
        // end-of-step temperatures `y⁰`.
        self.outputs_and_next();
        for c in 0..q {
            ctl.rhs[c] = if enabled[c] {
                setpoint_c[c] - self.work.out()[self.p_mean + ctl.channels[c].output]
            } else {
                0.0
            };
        }
        ctl.sweeps = lcp::solve(
            &ctl.influence,
            &ctl.rhs,
            enabled,
            &mut ctl.fraction,
            &mut ctl.scratch,
        );
        self.apply(&ctl, u_k, fraction_out);
        self.commit();
        self.control = Some(ctl);
    }

    /// One step with on/off thermostats: each enabled channel's output at the start of the
    /// step (from the current state and `u_k`) is given to `thermostat`, which switches
    /// with its dead band; channels that are on run at full power over the whole step.
    ///
    /// # Panics
    /// If [`Stepper::with_control`] was not called, or a slice has the wrong length.
    pub fn step_on_off(
        &mut self,
        thermostat: &mut OnOffThermostat,
        u_k: &mut [f64],
        u_next: &[f64],
        setpoint_c: &[f64],
        enabled: &[bool],
        fraction_out: &mut [f64],
    ) {
        let mut ctl = self.control.take().expect("step_on_off needs with_control");
        let q = ctl.channels.len();
        assert!(fraction_out.len() == q, "channel slice lengths");
        assert_eq!(u_k.len(), self.m, "u_k length");
        self.align(u_k);
        for c in 0..q {
            ctl.now[c] = self.instant_row_now(ctl.channels[c].output, u_k);
        }
        thermostat.decide(&ctl.now, setpoint_c, enabled, &mut ctl.fraction);
        self.load_inputs(u_k, u_next);
        self.outputs_and_next();
        self.apply(&ctl, u_k, fraction_out);
        self.commit();
        self.control = Some(ctl);
    }

    /// Adds the chosen fractions' powers to `u_k` and `z`, their state change to `s_next`
    /// and their readout change to the outputs.
    fn apply(&mut self, ctl: &Control, u_k: &mut [f64], fraction_out: &mut [f64]) {
        let n = self.n;
        let (z, s_next, out) = self.work.split();
        for (c, ch) in ctl.channels.iter().enumerate() {
            let f = ctl.fraction[c];
            fraction_out[c] = f;
            if f == 0.0 {
                continue;
            }
            for &(j, p) in &ch.weights {
                u_k[j] += f * p;
                z[n + j] += f * p;
            }
            let np = n.div_ceil(PANEL);
            for (s, g) in s_next
                .iter_mut()
                .zip(flat(&ctl.gain_lines[c * np..(c + 1) * np]))
            {
                *s += f * g;
            }
            for (y, g) in out.iter_mut().zip(ctl.output_gain.row(c)) {
                *y += f * g;
            }
        }
    }
}
