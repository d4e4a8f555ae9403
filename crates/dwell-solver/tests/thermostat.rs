//! The capacity-limited thermostat and the on/off thermostat.

use dwell_solver::{
    ControlChannel, Discretization, InputKind, OnOffThermostat, RcSystem, Readout, Route, Stepper,
};
use nalgebra::DMatrix;

/// Two zones, each an air node (0, 2) and a mass node (1, 3); inputs: outdoor (°C),
/// heater 1 (W → air 1), heater 2 (W → air 2), gains (W → air 1).
fn two_zones() -> RcSystem {
    let c = vec![5e5, 2e7, 5e5, 2e7];
    let mut k = DMatrix::zeros(4, 4);
    let mut link = |i: usize, j: usize, g: f64| {
        k[(i, i)] += g;
        k[(j, j)] += g;
        k[(i, j)] -= g;
        k[(j, i)] -= g;
    };
    link(0, 1, 300.0);
    link(2, 3, 300.0);
    link(0, 2, 50.0);
    let mut u = DMatrix::zeros(4, 4);
    u[(0, 0)] = 80.0;
    u[(2, 0)] = 60.0;
    k[(0, 0)] += 80.0;
    k[(2, 2)] += 60.0;
    u[(0, 1)] = 1.0;
    u[(2, 2)] = 1.0;
    u[(0, 3)] = 1.0;
    let kinds = vec![
        InputKind::Temperature,
        InputKind::HeatFlow,
        InputKind::HeatFlow,
        InputKind::HeatFlow,
    ];
    RcSystem::new(c, k, u, kinds).unwrap()
}

fn outdoor(k: usize) -> f64 {
    2.0 + 6.0 * (std::f64::consts::TAU * k as f64 / 24.0).sin()
}

fn controlled(route: Route, p1: f64, p2: f64) -> Stepper {
    let sys = two_zones();
    let d = Discretization::new(&sys, 3600.0, route).unwrap();
    let r = Readout::nodes(&[0, 2], 4, 4);
    let channels = [
        ControlChannel {
            weights: vec![(1, p1)],
            output: 0,
        },
        ControlChannel {
            weights: vec![(2, p2)],
            output: 1,
        },
    ];
    let mut s = Stepper::new(&d, &r, &r)
        .unwrap()
        .with_control(&channels)
        .unwrap();
    s.set_state(&[15.0, 15.0, 15.0, 15.0]);
    s
}

/// Runs `hours` with setpoints and gains; returns (fractions per hour, instant per hour).
fn run(s: &mut Stepper, hours: usize, setpoint: [f64; 2], gains: f64) -> Vec<([f64; 2], [f64; 2])> {
    let mut out = Vec::new();
    let mut f = [0.0; 2];
    for k in 0..hours {
        let mut u = [outdoor(k), 0.0, 0.0, gains];
        let next = [outdoor(k + 1), 0.0, 0.0, gains];
        s.step_thermostat(&mut u, &next, &setpoint, &[true, true], &mut f);
        out.push((f, [s.instant()[0], s.instant()[1]]));
    }
    out
}

#[test]
fn below_capacity_each_zone_ends_the_step_at_its_setpoint() {
    for route in [Route::Modal, Route::Block] {
        let mut s = controlled(route, 8000.0, 8000.0);
        let mut interior = 0;
        for (k, (f, y)) in run(&mut s, 24 * 30, [20.0, 19.0], 0.0)
            .into_iter()
            .enumerate()
        {
            for z in 0..2 {
                if f[z] > 0.0 && f[z] < 1.0 {
                    interior += 1;
                    let sp = [20.0, 19.0][z];
                    assert!(
                        (y[z] - sp).abs() < 1e-6,
                        "{route:?} hour {k} zone {z}: {} vs {sp}",
                        y[z]
                    );
                }
                // Complementarity: at full power the zone may not exceed its setpoint.
                if f[z] == 1.0 {
                    assert!(y[z] <= [20.0, 19.0][z] + 1e-6);
                }
            }
        }
        assert!(
            interior > 1000,
            "{route:?}: only {interior} interior zone-hours"
        );
        assert!(s.last_sweeps() < 500);
    }
}

#[test]
fn free_gains_above_setpoint_switch_the_heater_off() {
    for route in [Route::Modal, Route::Block] {
        let mut s = controlled(route, 8000.0, 8000.0);
        // 6 kW of gains in zone 1 on a mild day keep it above 16 °C; its heater must be 0.
        let hours = run(&mut s, 24 * 10, [16.0, 16.0], 6000.0);
        for (k, (f, y)) in hours.iter().enumerate().skip(24) {
            if y[0] > 16.0 + 1e-6 {
                assert_eq!(
                    f[0], 0.0,
                    "hour {k}: zone 1 at {} yet heater on ({})",
                    y[0], f[0]
                );
            }
        }
        assert!(hours.iter().skip(24).filter(|(f, _)| f[0] == 0.0).count() > 100);
    }
}

#[test]
fn coupled_zones_with_one_heater_at_capacity() {
    // Zone 2's small heater saturates; zone 1 compensates through the 50 W/K link, and the
    // joint solution still holds zone 1 at its setpoint (a sequential, zone-by-zone choice
    // with zone 1 first would miss it by the coupling term).
    for route in [Route::Modal, Route::Block] {
        let mut s = controlled(route, 20_000.0, 300.0);
        let hours = run(&mut s, 24 * 20, [21.0, 21.0], 0.0);
        let mut saturated = 0;
        for (k, (f, y)) in hours.iter().enumerate().skip(2) {
            if f[1] == 1.0 && f[0] < 1.0 {
                saturated += 1;
                assert!(y[1] < 21.0, "hour {k}");
                assert!(
                    (y[0] - 21.0).abs() < 1e-6,
                    "{route:?} hour {k}: zone 1 at {}",
                    y[0]
                );
            }
        }
        assert!(saturated > 100, "{route:?}: {saturated}");
        let m = s.influence().unwrap();
        assert!(m[1] > 0.0 && m[2] > 0.0, "zones interact through M: {m:?}");
    }
}

#[test]
fn raising_the_setpoint_never_lowers_heating_energy() {
    let mut last = -1.0;
    for sp in [14.0, 16.0, 18.0, 19.0, 20.0, 21.0, 22.0] {
        let mut s = controlled(Route::Modal, 4000.0, 3000.0);
        let energy: f64 = run(&mut s, 24 * 20, [sp, sp], 500.0)
            .iter()
            .map(|(f, _)| 3600.0 * (f[0] * 4000.0 + f[1] * 3000.0))
            .sum();
        assert!(energy >= last, "setpoint {sp}: {energy} J < {last} J");
        last = energy;
    }
    assert!(last > 0.0);
}

#[test]
fn disabled_channels_stay_off_and_bad_channels_are_rejected() {
    let mut s = controlled(Route::Block, 8000.0, 8000.0);
    let mut f = [0.5; 2];
    let mut u = [0.0, 0.0, 0.0, 0.0];
    s.step_thermostat(&mut u, &[0.0; 4], &[20.0, 20.0], &[false, true], &mut f);
    assert_eq!(f[0], 0.0);
    assert!(f[1] > 0.0 && u[2] == f[1] * 8000.0);
    let sys = two_zones();
    let d = Discretization::new(&sys, 3600.0, Route::Block).unwrap();
    let r = Readout::nodes(&[0, 2], 4, 4);
    let bad = [ControlChannel {
        weights: vec![(0, 100.0), (1, -1.0)],
        output: 5,
    }];
    let err = Stepper::new(&d, &r, &r)
        .unwrap()
        .with_control(&bad)
        .unwrap_err()
        .to_string();
    assert!(
        err.contains("output 5 is not an instant readout row")
            && err.contains("input 0 is not a heat-flow input")
            && err.contains("-1 W"),
        "{err}"
    );
}

#[test]
fn on_off_thermostat_cycles_and_counts_switch_ons() {
    // 5-minute steps, 1 K dead band: the zone swings around the setpoint and the heater
    // cycles; the count must be positive and the zone stay within a few kelvin of the band.
    let sys = two_zones();
    let d = Discretization::new(&sys, 300.0, Route::Modal).unwrap();
    let r = Readout::nodes(&[0, 2], 4, 4);
    let channels = [
        ControlChannel {
            weights: vec![(1, 4000.0)],
            output: 0,
        },
        ControlChannel {
            weights: vec![(2, 4000.0)],
            output: 1,
        },
    ];
    let mut s = Stepper::new(&d, &r, &r)
        .unwrap()
        .with_control(&channels)
        .unwrap();
    s.set_state(&[20.0; 4]);
    let mut t = OnOffThermostat::new(2, 1.0).unwrap();
    let mut f = [0.0; 2];
    for k in 0..12 * 48 {
        let mut u = [5.0, 0.0, 0.0, 0.0];
        s.step_on_off(
            &mut t,
            &mut u,
            &[5.0, 0.0, 0.0, 0.0],
            &[20.0, 20.0],
            &[true, true],
            &mut f,
        );
        assert_eq!(u[1], 4000.0 * f[0]);
        if k > 12 {
            assert!(
                (s.instant()[0] - 20.0).abs() < 3.0,
                "step {k}: {}",
                s.instant()[0]
            );
        }
    }
    assert!(t.switch_ons()[0] > 10, "{:?}", t.switch_ons());
}
