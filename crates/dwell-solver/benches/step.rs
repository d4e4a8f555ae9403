//! Setup (discretisation) and one year of hourly steps for random stiff RC networks of 10,
//! 40 and 160 states, 10 inputs (2 temperatures, 8 heat flows) and 3 outputs, by both routes.

use criterion::{black_box, criterion_group, criterion_main, BenchmarkId, Criterion};
use dwell_solver::{Discretization, Readout, Route, Stepper};

#[path = "../tests/common/mod.rs"]
mod common;

const SIZES: [usize; 3] = [10, 40, 160];

fn routes() -> [(Route, &'static str); 2] {
    [(Route::Modal, "modal"), (Route::Block, "block")]
}

fn setup(c: &mut Criterion) {
    let mut group = c.benchmark_group("setup");
    for n in SIZES {
        let sys = common::random_network(n as u64, n, 8, true);
        for (route, name) in routes() {
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
        for (route, name) in routes() {
            let d = Discretization::new(&sys, 3600.0, route).unwrap();
            let mut s = Stepper::new(&d, &readout, &readout).unwrap();
            group.bench_with_input(BenchmarkId::new(name, n), &series, |b, series| {
                b.iter(|| {
                    s.set_state(&vec![15.0; n]);
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

criterion_group!(benches, setup, year);
criterion_main!(benches);
