//! Property tests over random physical RC networks (seeded; regressions in
//! `tests/properties.proptest-regressions`, committed; proptest adds failing cases there).

mod common;

use common::{input_series, random_network};
use dwell_solver::{ControlChannel, Discretization, Readout, Route, Stepper};
use proptest::prelude::*;
use proptest::test_runner::{Config, FileFailurePersistence, RngAlgorithm, RngSeed};

fn config() -> Config {
    Config {
        cases: 24,
        rng_algorithm: RngAlgorithm::ChaCha,
        rng_seed: RngSeed::Fixed(0xd3e11),
        failure_persistence: Some(Box::new(FileFailurePersistence::WithSource(
            "proptest-regressions",
        ))),
        ..Config::default()
    }
}

proptest! {
    #![proptest_config(config())]

    /// Both routes agree (1e-9 relative per column), Φ ≥ 0 (block), and Φ·1 + Γ₀·1_T = 1 for
    /// networks with a boundary: a uniform temperature everywhere is an equilibrium.
    #[test]
    fn routes_agree_and_uniform_temperature_is_an_equilibrium(
        seed in 0u64..1_000_000, n in 2usize..24, boundary in any::<bool>(), step in 60.0f64..86_400.0
    ) {
        let sys = random_network(seed, n, 2, boundary);
        let dm = Discretization::new(&sys, step, Route::Modal).unwrap();
        let db = Discretization::new(&sys, step, Route::Block).unwrap();
        for (x, y) in [(dm.phi(), db.phi()), (dm.gamma0(), db.gamma0()), (dm.gamma1(), db.gamma1())] {
            for j in 0..x.ncols() {
                let (cx, cy) = (x.column(j).into_owned(), y.column(j).into_owned());
                let d = (&cx - &cy).amax() / cx.amax().max(cy.amax()).max(f64::MIN_POSITIVE);
                prop_assert!(d < 1e-9, "column {} relative {:e}", j, d);
            }
        }
        let phi = db.phi();
        prop_assert!(phi.min() >= -1e-15);
        let g = db.gamma0();
        for i in 0..n {
            let total: f64 = phi.row(i).sum() + g[(i, 0)] + g[(i, 1)];
            prop_assert!((total - 1.0).abs() < 1e-12, "row {} sums to {}", i, total);
        }
    }

    /// The energy ledger closes and free-floating temperatures respect the maximum principle.
    #[test]
    fn ledger_closes_and_maximum_principle_holds(seed in 0u64..1_000_000, n in 2usize..16) {
        let sys = random_network(seed, n, 2, true);
        let m = sys.inputs();
        let series = input_series(seed, m, 200, 0.0, 0.0);
        let d = Discretization::new(&sys, 3600.0, Route::Modal).unwrap();
        // Mean heat from the boundaries into the nodes (W).
        let mut x = nalgebra::DMatrix::zeros(1, n);
        let mut u = nalgebra::DMatrix::zeros(1, m);
        for i in 0..n {
            for j in 0..2 {
                x[(0, i)] -= sys.input[(i, j)];
                u[(0, j)] += sys.input[(i, j)];
            }
        }
        let all: Vec<usize> = (0..n).collect();
        let mut s = Stepper::new(&d, &Readout::nodes(&all, n, m), &Readout::new(x, u).unwrap()).unwrap();
        let x0 = vec![25.0; n];
        s.set_state(&x0);
        let (mut before, mut after) = (x0.clone(), vec![0.0; n]);
        for k in 0..200 {
            s.step(&series[k], &series[k + 1]);
            s.state_into(&mut after);
            let stored: f64 = (0..n).map(|i| sys.capacitance[i] * (after[i] - before[i])).sum();
            let flow = 3600.0 * s.mean()[0];
            let gross = flow.abs() + (0..n).map(|i| (sys.capacitance[i] * (after[i] - before[i])).abs()).sum::<f64>();
            prop_assert!((flow - stored).abs() <= 1e-9 * gross.max(1.0), "step {}: {} vs {}", k, flow, stored);
            for &t in s.instant() {
                prop_assert!((-2.0 - 1e-9..=25.0 + 1e-9).contains(&t), "temperature {} outside [-2, 25]", t);
            }
            before.copy_from_slice(&after);
        }
    }

    /// The thermostat's choice satisfies the complementarity conditions each step.
    #[test]
    fn thermostat_solution_is_complementary(seed in 0u64..1_000_000, n in 3usize..12, sp in 15.0f64..24.0) {
        let sys = random_network(seed, n, 2, true);
        let m = sys.inputs();
        let d = Discretization::new(&sys, 3600.0, Route::Block).unwrap();
        // Control the nodes that receive the larger share of each heater.
        let target = |j: usize| (0..n).max_by(|&a, &b| sys.input[(a, j)].total_cmp(&sys.input[(b, j)])).unwrap();
        let (o0, o1) = (target(2), target(3));
        prop_assume!(o0 != o1);
        let r = Readout::nodes(&[o0, o1], n, m);
        let channels = [
            ControlChannel { weights: vec![(2, 3000.0)], output: 0 },
            ControlChannel { weights: vec![(3, 3000.0)], output: 1 },
        ];
        let mut s = Stepper::new(&d, &r, &r).unwrap().with_control(&channels).unwrap();
        s.set_state(&vec![10.0; n]);
        let series = input_series(seed, m, 100, 0.0, 0.0);
        let mut f = [0.0; 2];
        for k in 0..100 {
            let mut u = series[k].clone();
            s.step_thermostat(&mut u, &series[k + 1], &[sp, sp], &[true, true], &mut f);
            for (&fz, &y) in f.iter().zip(s.instant()) {
                if fz > 0.0 && fz < 1.0 {
                    prop_assert!((y - sp).abs() < 1e-6, "interior f={} but y={}", fz, y);
                } else if fz == 0.0 {
                    prop_assert!(y >= sp - 1e-6, "off but y={} < {}", y, sp);
                } else {
                    prop_assert!(y <= sp + 1e-6, "full but y={} > {}", y, sp);
                }
            }
        }
    }
}
