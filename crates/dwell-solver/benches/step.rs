//! Setup (discretisation) and one year of hourly steps for random stiff RC networks of 10,
//! 40, 160 and 640 states, 10 inputs (2 temperatures, 8 heat flows) and 3 outputs read both
//! at step ends and as step means, by both routes. Setup (network, input series, stepper)
//! stays outside the timed part of `year_hourly`.
//!
//! The block route's setup is one exponential of a `(2n + 2m)`-square matrix: at 640 states
//! (1,300-square) it takes seconds, so `setup/block` stops at 160 states; its stepping is
//! still measured at 640.
//!
//! `year_block` is the same year through `Stepper::run_known` (the inputs known in advance:
//! products over blocks of steps); `year_thermostat_block` through `Stepper::run_thermostat`
//! with two capacity-limited thermostats (nodes 0 and n/2, 2.5 and 1.5 kW, 20 °C).
//!
//! Run: `cargo bench -p dwell-solver --bench step -- --warm-up-time 1 --measurement-time 3`.

use criterion::{black_box, criterion_group, criterion_main, BenchmarkId, Criterion};
use dwell_solver::{ControlChannel, Discretization, Readout, Route, Stepper};

#[path = "../tests/common/mod.rs"]
mod common;

const SIZES: [usize; 4] = [10, 40, 160, 640];

/// Largest network whose block-route setup is benchmarked.
const BLOCK_SETUP_MAX: usize = 160;

fn routes() -> [(Route, &'static str); 2] {
    [(Route::Modal, "modal"), (Route::Block, "block")]
}

fn setup(c: &mut Criterion) {
    let mut group = c.benchmark_group("setup");
    group.sample_size(10);
    for n in SIZES {
        let sys = common::random_network(n as u64, n, 8, true);
        for (route, name) in routes() {
            if route == Route::Block && n > BLOCK_SETUP_MAX {
                continue;
            }
            group.bench_with_input(BenchmarkId::new(name, n), &sys, |b, sys| {
                b.iter(|| Discretization::new(black_box(sys), 3600.0, route).unwrap())
            });
        }
    }
    group.finish();
}

fn year(c: &mut Criterion) {
    let mut group = c.benchmark_group("year_hourly");
    group.sample_size(10);
    for n in SIZES {
        let sys = common::random_network(n as u64, n, 8, true);
        let m = sys.inputs();
        let series = common::input_series(n as u64, m, common::YEAR_H, 0.0, 2000.0);
        let readout = Readout::nodes(&[0, n / 2, n - 1], n, m);
        let start = vec![15.0; n];
        for (route, name) in routes() {
            let d = Discretization::new(&sys, 3600.0, route).unwrap();
            let mut s = Stepper::new(&d, &readout, &readout).unwrap();
            group.bench_with_input(BenchmarkId::new(name, n), &series, |b, series| {
                b.iter(|| {
                    s.set_state(&start);
                    let mut acc = 0.0;
                    for k in 0..common::YEAR_H {
                        s.step(&series[k], &series[k + 1]);
                        acc += s.mean()[0];
                    }
                    black_box(acc)
                })
            });
        }
    }
    group.finish();
}

fn year_block(c: &mut Criterion) {
    let mut group = c.benchmark_group("year_block");
    group.sample_size(20);
    for n in SIZES {
        let sys = common::random_network(n as u64, n, 8, true);
        let m = sys.inputs();
        let series = common::input_series(n as u64, m, common::YEAR_H, 0.0, 2000.0);
        let flat: Vec<f64> = series.iter().flatten().copied().collect();
        let readout = Readout::nodes(&[0, n / 2, n - 1], n, m);
        let start = vec![15.0; n];
        let (mut yi, mut ym) = (vec![0.0; 3 * common::YEAR_H], vec![0.0; 3 * common::YEAR_H]);
        for (route, name) in routes() {
            let d = Discretization::new(&sys, 3600.0, route).unwrap();
            let mut s = Stepper::new(&d, &readout, &readout).unwrap();
            group.bench_function(BenchmarkId::new(name, n), |b| {
                b.iter(|| {
                    s.set_state(&start);
                    s.run_known(black_box(&flat), &mut yi, &mut ym);
                    black_box(ym[0])
                })
            });
        }
    }
    group.finish();
}

fn year_thermostat_block(c: &mut Criterion) {
    let mut group = c.benchmark_group("year_thermostat_block");
    group.sample_size(20);
    for n in SIZES {
        let sys = common::random_network(n as u64, n, 8, true);
        let m = sys.inputs();
        // Heat inputs 2 and 3 drive the thermostats (no other heat in them).
        let mut series = common::input_series(n as u64, m, common::YEAR_H, 0.0, 2000.0);
        for u in &mut series {
            u[2] = 0.0;
            u[3] = 0.0;
        }
        let flat: Vec<f64> = series.iter().flatten().copied().collect();
        let readout = Readout::nodes(&[0, n / 2, n - 1], n, m);
        let channels = [
            ControlChannel {
                weights: vec![(2, 2500.0)],
                output: 0,
            },
            ControlChannel {
                weights: vec![(3, 1500.0)],
                output: 1,
            },
        ];
        let start = vec![15.0; n];
        let sets = vec![20.0; 2 * common::YEAR_H];
        let mut f = vec![0.0; 2 * common::YEAR_H];
        let (mut yi, mut ym) = (vec![0.0; 3 * common::YEAR_H], vec![0.0; 3 * common::YEAR_H]);
        let d = Discretization::new(&sys, 3600.0, Route::Modal).unwrap();
        let Ok(s) = Stepper::new(&d, &readout, &readout)
            .unwrap()
            .with_control(&channels)
        else {
            // A random network whose heater cannot reach its node within a step.
            continue;
        };
        let mut s = s;
        group.bench_function(BenchmarkId::new("modal", n), |b| {
            b.iter(|| {
                s.set_state(&start);
                s.run_thermostat(
                    black_box(&flat),
                    &sets,
                    &[true, true],
                    &mut f,
                    &mut yi,
                    &mut ym,
                );
                black_box(ym[0])
            })
        });
    }
    group.finish();
}

criterion_group!(benches, setup, year, year_block, year_thermostat_block);
criterion_main!(benches);
