//! Free-floating temperatures stay within the range of the boundary and initial temperatures
//! (the maximum principle for `C ẋ = −K x + G_b w` with `K` an M-matrix: `Φ ≥ 0` and
//! `Φ 1 + Γ₀ 1 = 1` per step, a convex combination).

mod common;

use common::{input_series, random_network};
use dwell_solver::{Discretization, Readout, Route, Stepper};

#[test]
fn phi_is_elementwise_non_negative() {
    // e^{hA} ≥ 0 for a Metzler A (non-negative off-diagonal): R. S. Varga, Matrix Iterative
    // Analysis, thm 8.2. Block route: rounding allowance 1e-15. Modal route: Φ is formed as
    // C^{-1/2} V e^{−hΛ} Vᵀ C^{1/2}, whose entries carry the eigenvectors' orthogonality error
    // (~nε) scaled by √(C_j/C_i); the scaled matrix V e^{−hΛ} Vᵀ = C^{1/2} Φ C^{-1/2} is held
    // to −n·ε instead.
    for seed in 61..66 {
        let sys = random_network(seed, 30, 2, seed % 2 == 0);
        let n = sys.states();
        for step in [1.0, 3600.0, 86_400.0] {
            let phi = Discretization::new(&sys, step, Route::Block).unwrap().phi();
            assert!(
                phi.min() >= -1e-15,
                "seed {seed} block h {step}: min Φ = {:e}",
                phi.min()
            );
            let phi = Discretization::new(&sys, step, Route::Modal).unwrap().phi();
            let c = &sys.capacitance;
            let scaled =
                nalgebra::DMatrix::from_fn(n, n, |i, j| phi[(i, j)] * (c[i] / c[j]).sqrt());
            let floor = -(n as f64) * f64::EPSILON;
            assert!(
                scaled.min() >= floor,
                "seed {seed} modal h {step}: min = {:e}",
                scaled.min()
            );
        }
    }
}

#[test]
fn free_floating_temperatures_stay_within_boundary_and_initial_range() {
    for seed in 71..74 {
        let sys = random_network(seed, 25, 2, true);
        let (n, m) = (sys.states(), sys.inputs());
        let series = input_series(seed, m, 3000, 0.0, 0.0);
        let x0: Vec<f64> = (0..n)
            .map(|i| -5.0 + 35.0 * ((i * 7919) % 13) as f64 / 12.0)
            .collect();
        let mut lo = x0.iter().copied().fold(f64::INFINITY, f64::min);
        let mut hi = x0.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        for u in &series {
            lo = lo.min(u[0]).min(u[1]);
            hi = hi.max(u[0]).max(u[1]);
        }
        for route in [Route::Modal, Route::Block] {
            let d = Discretization::new(&sys, 3600.0, route).unwrap();
            let all: Vec<usize> = (0..n).collect();
            let r = Readout::nodes(&all, n, m);
            let mut s = Stepper::new(&d, &r, &r).unwrap();
            s.set_state(&x0);
            for k in 0..3000 {
                s.step(&series[k], &series[k + 1]);
                for (i, (&a, &b)) in s.instant().iter().zip(s.mean()).enumerate() {
                    for v in [a, b] {
                        assert!(
                            v >= lo - 1e-9 && v <= hi + 1e-9,
                            "seed {seed} {route:?} k {k} node {i}: {v} outside [{lo}, {hi}]"
                        );
                    }
                }
            }
        }
    }
}
