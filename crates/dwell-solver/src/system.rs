//! The continuous-time RC system the solver integrates.
//!
//! ```text
//! C ẋ = −K x + U u(t)        ⇔        ẋ = A x + B u,   A = −C⁻¹K,   B = C⁻¹U
//! ```
//!
//! `x` are node temperatures (°C), `C` the diagonal node capacitances (J/K), `K` the symmetric
//! positive semi-definite conductance matrix (W/K): the weighted graph Laplacian plus the
//! boundary conductances on the diagonal. Column `j` of `U` says how input `j` enters the nodes:
//! for a boundary temperature (°C) it holds the conductances to that boundary (W/K); for a heat
//! input (W) it holds the share of that input each node receives (dimensionless, summing to 1
//! unless part of the heat is lost straight to a boundary through an eliminated massless node).

use nalgebra::DMatrix;
use serde::Serialize;

use crate::SolverError;

/// How an input behaves between two samples.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum InputKind {
    /// A temperature (°C), varying linearly between samples (first-order hold).
    Temperature,
    /// A heat flow (W), constant over each step (zero-order hold).
    HeatFlow,
}

/// A linear RC system `C ẋ = −K x + U u`, the one thing the solver knows about a building.
#[derive(Clone, Debug)]
pub struct RcSystem {
    /// Node capacitances `C` (J/K), all finite and positive.
    pub capacitance: Vec<f64>,
    /// Conductance matrix `K` (W/K), `n × n`, symmetric, non-negative diagonal,
    /// non-positive off-diagonal, row sums ≥ 0 (equal to each node's boundary conductance).
    pub conductance: DMatrix<f64>,
    /// Input matrix `U`, `n × m`: (W/K) for temperature inputs, (1) for heat-flow inputs.
    pub input: DMatrix<f64>,
    /// Kind of each of the `m` inputs.
    pub input_kinds: Vec<InputKind>,
}

impl RcSystem {
    /// Checks shapes, finiteness, positivity of `C` and symmetry of `K`.
    pub fn new(
        capacitance: Vec<f64>,
        conductance: DMatrix<f64>,
        input: DMatrix<f64>,
        input_kinds: Vec<InputKind>,
    ) -> Result<Self, SolverError> {
        let sys = RcSystem {
            capacitance,
            conductance,
            input,
            input_kinds,
        };
        sys.validate()?;
        Ok(sys)
    }

    /// The time constants `τ_i = 1/λ_i` (s) of the network, longest first, from the
    /// eigenvalues `λ` of `S = C^{-1/2} K C^{-1/2}` (eigenvalues only, no eigenvectors:
    /// nalgebra below 48 states, faer from 48 up, as the modal route). Eigenvalues below
    /// `4nε·λ_max` count as 0 (as in the modal route) and give `f64::INFINITY`: a part of the
    /// network with no path to a boundary.
    pub fn time_constants_s(&self) -> Vec<f64> {
        let n = self.states();
        let s = crate::modal::symmetric_rate_matrix(self);
        let raw = crate::eigen::symmetric_eigenvalues(&s, crate::eigen::Backend::for_states(n));
        let rates = crate::modal::clamp_rates(raw.into_iter(), n);
        crate::discretization::time_constants_from_rates(&rates)
    }

    /// Number of states `n`.
    pub fn states(&self) -> usize {
        self.capacitance.len()
    }

    /// Number of inputs `m`.
    pub fn inputs(&self) -> usize {
        self.input_kinds.len()
    }

    /// `A = −C⁻¹K` (1/s).
    pub fn a(&self) -> DMatrix<f64> {
        let n = self.states();
        DMatrix::from_fn(n, n, |i, j| -self.conductance[(i, j)] / self.capacitance[i])
    }

    /// `B = C⁻¹U`: (1/s) for temperature inputs, (K/J) for heat-flow inputs.
    pub fn b(&self) -> DMatrix<f64> {
        let (n, m) = self.input.shape();
        DMatrix::from_fn(n, m, |i, j| self.input[(i, j)] / self.capacitance[i])
    }

    fn validate(&self) -> Result<(), SolverError> {
        let n = self.states();
        let m = self.inputs();
        if n == 0 {
            return Err(SolverError::Shape("the system has no states".into()));
        }
        if self.conductance.shape() != (n, n) {
            return Err(SolverError::Shape(format!(
                "conductance matrix is {:?}, expected {n}×{n}",
                self.conductance.shape()
            )));
        }
        if self.input.shape() != (n, m) {
            return Err(SolverError::Shape(format!(
                "input matrix is {:?}, expected {n}×{m}",
                self.input.shape()
            )));
        }
        for (i, c) in self.capacitance.iter().enumerate() {
            if !(c.is_finite() && *c > 0.0) {
                return Err(SolverError::Shape(format!(
                    "capacitance of state {i} is {c}, must be positive"
                )));
            }
        }
        if self
            .conductance
            .iter()
            .chain(self.input.iter())
            .any(|v| !v.is_finite())
        {
            return Err(SolverError::Shape(
                "conductance or input matrix holds a non-finite value".into(),
            ));
        }
        let scale = self.conductance.amax().max(f64::MIN_POSITIVE);
        for i in 0..n {
            for j in 0..i {
                if (self.conductance[(i, j)] - self.conductance[(j, i)]).abs() > 1e-12 * scale {
                    return Err(SolverError::Shape(format!(
                        "conductance matrix is not symmetric at ({i}, {j})"
                    )));
                }
            }
        }
        Ok(())
    }
}
