//! The reduced network: a state space plus readouts.

use std::collections::BTreeMap;

use dwell_solver::{InputKind, RcSystem};
use nalgebra::DVector;
use serde::Serialize;

/// How an input varies between samples.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Hold {
    /// Linear between samples (first-order hold): boundary temperatures (°C).
    Linear,
    /// Constant over a step (zero-order hold): heat flows (W) and irradiances (W/m²).
    Step,
}

impl From<Hold> for InputKind {
    fn from(h: Hold) -> Self {
        match h {
            Hold::Linear => InputKind::Temperature,
            Hold::Step => InputKind::HeatFlow,
        }
    }
}

/// An input of the network.
#[derive(Clone, Debug, Serialize)]
pub struct InputInfo {
    /// Name, with its unit as a suffix (for example `outdoor_air_c`, `heater_hall_w`).
    pub name: String,
    /// How it is held between samples.
    pub hold: Hold,
}

/// A linear map `y = x·X + u·U` from states and inputs to one quantity.
#[derive(Clone, Debug, PartialEq)]
pub struct LinearMap {
    /// Coefficients on the states (length n).
    pub x: Vec<f64>,
    /// Coefficients on the inputs (length m).
    pub u: Vec<f64>,
}

impl LinearMap {
    /// Evaluates the map.
    pub fn eval(&self, x: &[f64], u: &[f64]) -> f64 {
        self.x.iter().zip(x).map(|(a, b)| a * b).sum::<f64>()
            + self.u.iter().zip(u).map(|(a, b)| a * b).sum::<f64>()
    }

    /// `self + k·other`.
    pub fn add_scaled(&mut self, other: &LinearMap, k: f64) {
        for (a, b) in self.x.iter_mut().zip(&other.x) {
            *a += k * b;
        }
        for (a, b) in self.u.iter_mut().zip(&other.u) {
            *a += k * b;
        }
    }
}

/// The temperature of one original node as a sparse linear map of the states and inputs,
/// `y = Σ c·x[s] + u·U`: a kept node is its own state (`[(s, 1.0)]`); an eliminated massless
/// node depends on the states of the kept nodes next to its massless piece only
/// (`kron.rs`), so the maps of a large network stay small.
#[derive(Clone, Debug, PartialEq)]
pub struct NodeMap {
    /// `(state index, coefficient)` pairs, state indices increasing.
    pub x: Vec<(usize, f64)>,
    /// Coefficients on the inputs (length m).
    pub u: Vec<f64>,
}

impl NodeMap {
    /// Evaluates the map.
    pub fn eval(&self, x: &[f64], u: &[f64]) -> f64 {
        self.x.iter().map(|&(s, c)| c * x[s]).sum::<f64>()
            + self.u.iter().zip(u).map(|(a, b)| a * b).sum::<f64>()
    }

    /// The same map with dense state coefficients (`n` states).
    pub fn to_dense(&self, n: usize) -> LinearMap {
        let mut x = vec![0.0; n];
        for &(s, c) in &self.x {
            x[s] += c;
        }
        LinearMap {
            x,
            u: self.u.clone(),
        }
    }

    /// `target ← target + k·self`.
    pub fn add_scaled_to(&self, target: &mut LinearMap, k: f64) {
        for &(s, c) in &self.x {
            target.x[s] += k * c;
        }
        for (a, b) in target.u.iter_mut().zip(&self.u) {
            *a += k * b;
        }
    }
}

/// A network reduced to `C ẋ = −K x + U u`, with readouts for every original node and for the
/// heat flow through each group of boundary links.
#[derive(Clone, Debug)]
pub struct Network {
    /// Names of the states (the nodes with a capacitance), in state order.
    pub states: Vec<String>,
    /// Inputs, in column order of `U`.
    pub inputs: Vec<InputInfo>,
    /// The state space.
    pub system: RcSystem,
    /// Temperature (°C) of every original node, kept or eliminated, as a sparse map of
    /// `(x, u)`.
    pub node_temperature: BTreeMap<String, NodeMap>,
    /// Heat flow (W) leaving the network through each group of boundary links, positive
    /// outwards, as a map of `(x, u)`.
    pub boundary_flow: BTreeMap<String, LinearMap>,
    /// Number of massless nodes eliminated by Kron reduction.
    pub eliminated: usize,
    /// Heat (W) entering the network per unit of each input, summed over its injections (0 for
    /// temperature inputs): the input's contribution to an energy ledger.
    pub injected: Vec<f64>,
}

impl Network {
    /// Index of the state with this name.
    pub fn state_index(&self, name: &str) -> Option<usize> {
        self.states.iter().position(|s| s == name)
    }

    /// Index of the input with this name.
    pub fn input_index(&self, name: &str) -> Option<usize> {
        self.inputs.iter().position(|s| s.name == name)
    }

    /// Time constants (s) of the network, `1/λ` for the eigenvalues `λ` of
    /// `S = C^{-1/2} K C^{-1/2}`, longest first; a zero eigenvalue gives `f64::INFINITY`
    /// (eigenvalues only, [`dwell_solver::RcSystem::time_constants_s`]).
    pub fn time_constants_s(&self) -> Vec<f64> {
        self.system.time_constants_s()
    }

    /// Steady state `x = K⁻¹ U u` for constant inputs; `None` if `K` is singular.
    pub fn steady_state(&self, u: &[f64]) -> Option<Vec<f64>> {
        let rhs = &self.system.input * DVector::from_column_slice(u);
        let lu = self.system.conductance.clone().lu();
        lu.solve(&rhs).map(|v| v.iter().copied().collect())
    }
}
