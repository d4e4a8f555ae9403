//! One node and one conductance against closed-form solutions.

mod common;

use common::one_node;
use dwell_solver::{Discretization, Readout, Route, Stepper};

const ROUTES: [Route; 2] = [Route::Modal, Route::Block];

fn stepper(h: f64, c: f64, step: f64, route: Route) -> Stepper {
    let sys = one_node(h, c);
    let d = Discretization::new(&sys, step, route).unwrap();
    Stepper::new(&d, &Readout::nodes(&[0], 1, 2), &Readout::nodes(&[0], 1, 2)).unwrap()
}

#[test]
fn step_response_is_the_exponential_decay() {
    // Analytic: T(t) = T_e + (T₀ − T_e) e^{−t/RC}, R = 1/H.
    let (h, c, te, t0) = (150.0, 3e6, -5.0, 21.0);
    for route in ROUTES {
        for step in [1.0, 600.0, 3600.0, 86_400.0] {
            let mut s = stepper(h, c, step, route);
            s.set_state(&[t0]);
            for k in 1..=40 {
                s.step(&[te, 0.0], &[te, 0.0]);
                let t = k as f64 * step;
                let want = te + (t0 - te) * (-t * h / c).exp();
                assert!(
                    (s.instant()[0] - want).abs() < 1e-9,
                    "{route:?} h={step} k={k}: {} vs {want}",
                    s.instant()[0]
                );
            }
        }
    }
}

#[test]
fn checks_md_one_node_values() {
    // CHECKS.md "Numerical references": H = 200 W/K, C = 20 MJ/K, 20 °C start, 0 °C outside:
    // T(8 h) = 14.99523 °C; one-hour ZOH Φ = 0.964640293483, Γ(outdoor) = 0.035359706517,
    // Γ(heat) = 1.76798533e-4 K/W.
    for route in ROUTES {
        let sys = one_node(200.0, 20e6);
        let d = Discretization::new(&sys, 3600.0, route).unwrap();
        assert!(
            (d.phi()[(0, 0)] - 0.964640293483).abs() < 1e-12,
            "{route:?} Φ"
        );
        assert!(
            (d.gamma0()[(0, 0)] - 0.035359706517).abs() < 1e-12,
            "{route:?} Γ outdoor"
        );
        assert!(
            (d.gamma0()[(0, 1)] - 1.76798533e-4).abs() < 1e-12,
            "{route:?} Γ heat"
        );
        let mut s = stepper(200.0, 20e6, 3600.0, route);
        s.set_state(&[20.0]);
        for _ in 0..8 {
            s.step(&[0.0, 0.0], &[0.0, 0.0]);
        }
        let t8 = s.instant()[0];
        dwell_testkit::record(
            "solver",
            dwell_testkit::Check {
                area: "Analytic solutions",
                what: &format!("one node H 200 W/K, C 20 MJ/K ({route:?} route): Φ, Γ and T(8 h)"),
                source: "T_e + (T₀ − T_e)·e^(−t/RC); values in CHECKS.md (scipy)",
                tolerance: "Φ, Γ 1e-12; T(8 h) 5e-6 K (5 printed digits)",
                obtained: format!("Φ {:.12}, T(8 h) {t8:.6} °C", d.phi()[(0, 0)]),
                pass: (t8 - 14.99523).abs() < 5e-6
                    && (d.phi()[(0, 0)] - 0.964640293483).abs() < 1e-12,
            },
        );
        assert!((t8 - 14.99523).abs() < 5e-6, "{route:?} T(8h) = {}", t8);
    }
}

#[test]
fn ramped_inputs_match_the_per_step_closed_form() {
    // By hand: τ ẋ = −x + u₀ + (u₁ − u₀) t/h over one step gives
    // x(h) = u₁ − τ s + (x₀ − u₀ + τ s) e^{−h/τ}, s = (u₁ − u₀)/h. Driven by a daily sinusoid
    // sampled every 10 min, for both routes.
    let (h, c) = (200.0, 2e6);
    let tau = c / h;
    let omega = std::f64::consts::TAU / 86_400.0;
    let step = 600.0;
    for route in ROUTES {
        let mut s = stepper(h, c, step, route);
        let mut x = 3.0;
        s.set_state(&[x]);
        let mut worst: f64 = 0.0;
        for k in 0..1000 {
            let (u0, u1) = (
                (omega * k as f64 * step).sin(),
                (omega * (k + 1) as f64 * step).sin(),
            );
            s.step(&[u0, 0.0], &[u1, 0.0]);
            let slope = (u1 - u0) / step;
            x = u1 - tau * slope + (x - u0 + tau * slope) * (-step / tau).exp();
            worst = worst.max((s.instant()[0] - x).abs());
        }
        assert!(
            worst < 1e-12,
            "{route:?} stepper vs per-step closed form: {worst}"
        );
    }
}

#[test]
fn sinusoidal_amplitude_and_lag_from_the_stepped_signal() {
    // Analytic: amplitude 1/√(1+(ωRC)²), lag atan(ωRC). Fitted by projecting one period of
    // the stepped response (1-s steps, so the interpolation error (ωh)²/8 ≈ 7e-10 is below
    // the tolerance) on sin and cos.
    let (h, c) = (200.0, 2e6);
    let tau = c / h;
    let omega = std::f64::consts::TAU / 86_400.0;
    let wt = omega * tau;
    let (amp, lag) = (1.0 / (1.0 + wt * wt).sqrt(), wt.atan());
    let step = 1.0;
    for route in ROUTES {
        let mut s = stepper(h, c, step, route);
        s.set_state(&[amp * (-lag).sin()]);
        let skip = 4 * 86_400; // 4 days ≈ 35 τ of transient
        let mut t = 0.0;
        for _ in 0..skip {
            s.step(
                &[(omega * t).sin(), 0.0],
                &[(omega * (t + step)).sin(), 0.0],
            );
            t += step;
        }
        let (mut a_sin, mut a_cos) = (0.0, 0.0);
        for _ in 0..86_400 {
            s.step(
                &[(omega * t).sin(), 0.0],
                &[(omega * (t + step)).sin(), 0.0],
            );
            let y = s.instant()[0];
            t += step;
            a_sin += y * (omega * t).sin();
            a_cos += y * (omega * t).cos();
        }
        let (a_sin, a_cos) = (2.0 * a_sin / 86_400.0, 2.0 * a_cos / 86_400.0);
        let got_amp = a_sin.hypot(a_cos);
        let got_lag = (-a_cos).atan2(a_sin);
        assert!(
            (got_amp - amp).abs() < 1e-9,
            "{route:?} amplitude {got_amp} vs {amp}"
        );
        assert!(
            (got_lag - lag).abs() < 1e-9,
            "{route:?} lag {got_lag} vs {lag}"
        );
    }
}

#[test]
fn step_range_is_validated_at_both_ends() {
    let sys = one_node(200.0, 20e6);
    for route in ROUTES {
        assert!(Discretization::new(&sys, 1.0, route).is_ok());
        assert!(Discretization::new(&sys, 86_400.0, route).is_ok());
        for bad in [0.999, 86_400.5, 0.0, -3600.0, f64::NAN, f64::INFINITY] {
            let err = Discretization::new(&sys, bad, route)
                .unwrap_err()
                .to_string();
            assert!(
                err.contains("step_s must be finite and within 1 s ..= 86400 s"),
                "{err}"
            );
        }
    }
}

#[test]
fn steady_state_is_outdoor_plus_heat_over_conductance_and_singular_k_is_an_error() {
    // By hand: H (x − T_e) = Q ⇒ x = T_e + Q/H = −5 + 1000/200 = 0 °C.
    let x = dwell_solver::steady_state(&one_node(200.0, 20e6), &[-5.0, 1000.0]).unwrap();
    assert!((x[0] - 0.0).abs() < 1e-12, "{x:?}");
    let floating = common::random_network(3, 10, 2, false);
    let err = dwell_solver::steady_state(&floating, &[0.0, 0.0, 100.0, 0.0])
        .unwrap_err()
        .to_string();
    assert!(err.contains("no path to a boundary temperature"), "{err}");
    // And a long stepped run converges to the steady state of a connected network.
    let sys = common::random_network(4, 8, 2, true);
    let u = [3.0, 9.0, 400.0, 250.0];
    let want = dwell_solver::steady_state(&sys, &u).unwrap();
    let d = Discretization::new(&sys, 86_400.0, Route::Modal).unwrap();
    let tau_max = d.time_constants_s()[0];
    let mut s = Stepper::new(&d, &Readout::empty(8, 4), &Readout::empty(8, 4)).unwrap();
    let days = (60.0 * tau_max / 86_400.0).ceil() as usize;
    for _ in 0..days {
        s.step(&u, &u);
    }
    let mut x = vec![0.0; 8];
    s.state_into(&mut x);
    for i in 0..8 {
        assert!(
            (x[i] - want[i]).abs() < 1e-8,
            "node {i}: {} vs {}",
            x[i],
            want[i]
        );
    }
}
