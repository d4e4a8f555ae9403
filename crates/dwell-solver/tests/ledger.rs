//! The energy ledger closes: heat in − heat out = change in stored heat.

mod common;

use common::{input_series, random_network};
use dwell_solver::{Discretization, InputKind, RcSystem, Readout, Route, Stepper};
use nalgebra::DMatrix;

/// Rows: 0 heat from boundaries into the nodes `Σ_ij U_ij (u_j − x_i)` over temperature
/// inputs (W); 1 heat from heat-flow inputs `Σ_ij U_ij u_j` (W).
fn ledger_readout(sys: &RcSystem) -> Readout {
    let (n, m) = (sys.states(), sys.inputs());
    let mut x = DMatrix::zeros(2, n);
    let mut u = DMatrix::zeros(2, m);
    for j in 0..m {
        for i in 0..n {
            let g = sys.input[(i, j)];
            match sys.input_kinds[j] {
                InputKind::Temperature => {
                    x[(0, i)] -= g;
                    u[(0, j)] += g;
                }
                InputKind::HeatFlow => u[(1, j)] += g,
            }
        }
    }
    Readout::new(x, u).unwrap()
}

#[test]
fn heat_in_minus_heat_out_equals_stored_heat_each_step() {
    for (seed, boundary) in [(51, true), (52, false)] {
        let sys = random_network(seed, 30, 4, boundary);
        let (n, m) = (sys.states(), sys.inputs());
        let series = input_series(seed, m, 2000, 0.0, 3000.0);
        for route in [Route::Modal, Route::Block] {
            let d = Discretization::new(&sys, 3600.0, route).unwrap();
            let mut s = Stepper::new(&d, &Readout::empty(n, m), &ledger_readout(&sys)).unwrap();
            let mut x = vec![12.0; n];
            s.set_state(&x);
            let mut x_new = vec![0.0; n];
            let mut worst: f64 = 0.0;
            for k in 0..2000 {
                s.step(&series[k], &series[k + 1]);
                s.state_into(&mut x_new);
                let stored: f64 = (0..n).map(|i| sys.capacitance[i] * (x_new[i] - x[i])).sum();
                let (boundary_j, heat_j) = (3600.0 * s.mean()[0], 3600.0 * s.mean()[1]);
                let gross = boundary_j.abs()
                    + heat_j.abs()
                    + (0..n)
                        .map(|i| (sys.capacitance[i] * (x_new[i] - x[i])).abs())
                        .sum::<f64>();
                worst = worst.max((boundary_j + heat_j - stored).abs() / gross);
                x.copy_from_slice(&x_new);
            }
            assert!(
                worst < 1e-9,
                "seed {seed} {route:?}: relative imbalance {worst:e}"
            );
        }
    }
}
