//! Linear outputs of the state and the inputs.

use nalgebra::DMatrix;

use crate::SolverError;

/// Linear outputs `y = X x + U_y u`: for example zone air temperatures (°C, a row of `X`
/// picking a node), or the heat flow (W) through a group of walls, `G (x_i − x_j)`, or to a
/// boundary, `G (w − x_i)`.
///
/// `X` is `p × n` (units of `y` per K), `U_y` is `p × m` (units of `y` per input unit).
#[derive(Clone, Debug)]
pub struct Readout {
    /// `X`, `p × n`.
    pub x: DMatrix<f64>,
    /// `U_y`, `p × m`.
    pub u: DMatrix<f64>,
}

impl Readout {
    /// A readout with `X = x` and `U_y = u`; their row counts must agree.
    pub fn new(x: DMatrix<f64>, u: DMatrix<f64>) -> Result<Self, SolverError> {
        if x.nrows() != u.nrows() {
            return Err(SolverError::Shape(format!(
                "readout has {} state rows but {} input rows",
                x.nrows(),
                u.nrows()
            )));
        }
        Ok(Readout { x, u })
    }

    /// Picks the node temperatures `nodes` (°C): `X = rows of I`, `U_y = 0`.
    pub fn nodes(nodes: &[usize], states: usize, inputs: usize) -> Self {
        let p = nodes.len();
        Readout {
            x: DMatrix::from_fn(p, states, |r, c| if nodes[r] == c { 1.0 } else { 0.0 }),
            u: DMatrix::zeros(p, inputs),
        }
    }

    /// No outputs.
    pub fn empty(states: usize, inputs: usize) -> Self {
        Readout {
            x: DMatrix::zeros(0, states),
            u: DMatrix::zeros(0, inputs),
        }
    }

    /// Number of outputs `p`.
    pub fn outputs(&self) -> usize {
        self.x.nrows()
    }

    pub(crate) fn check(&self, name: &str, n: usize, m: usize) -> Result<(), SolverError> {
        let p = self.outputs();
        if self.x.shape() != (p, n) || self.u.shape() != (p, m) {
            return Err(SolverError::Shape(format!(
                "{name} readout is X {:?}, U_y {:?}; expected {p}×{n} and {p}×{m}",
                self.x.shape(),
                self.u.shape()
            )));
        }
        if self.x.iter().chain(self.u.iter()).any(|v| !v.is_finite()) {
            return Err(SolverError::Shape(format!(
                "{name} readout holds a non-finite value"
            )));
        }
        Ok(())
    }
}
