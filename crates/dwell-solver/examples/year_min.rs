//! One year of hourly steps, timed by the fastest of many repeats: a figure that a busy,
//! shared machine disturbs far less than a mean (another process can only add time).
//! Same networks, inputs and readouts as `benches/step.rs` (`year_hourly`).
//!
//! Run: `cargo run --release -p dwell-solver --example year_min [-- REPEATS [STATES]]`.

use std::hint::black_box;
use std::time::Instant;

use dwell_solver::{Discretization, Readout, Route, Stepper};

#[path = "../tests/common/mod.rs"]
mod common;

fn main() {
    let repeats: usize = std::env::args()
        .nth(1)
        .and_then(|a| a.parse().ok())
        .unwrap_or(300);
    // An optional second argument keeps one size only (for profiling).
    let only: Option<usize> = std::env::args().nth(2).and_then(|a| a.parse().ok());
    println!(
        "states  route  fastest_ms  median_ms  ns_per_step  known_fastest_ms  known_ns_per_step  (fastest of {repeats}; known = run_known)"
    );
    for n in [10, 40, 160, 640] {
        if only.is_some_and(|o| o != n) {
            continue;
        }
        let sys = common::random_network(n as u64, n, 8, true);
        let m = sys.inputs();
        let series = common::input_series(n as u64, m, common::YEAR_H, 0.0, 2000.0);
        let readout = Readout::nodes(&[0, n / 2, n - 1], n, m);
        let start = vec![15.0; n];
        for (route, name) in [(Route::Modal, "modal"), (Route::Block, "block")] {
            if route == Route::Block && n > 160 {
                continue;
            }
            let d = Discretization::new(&sys, 3600.0, route).unwrap();
            let mut s = Stepper::new(&d, &readout, &readout).unwrap();
            let reps = if n > 160 { repeats / 10 + 1 } else { repeats };
            let mut times = Vec::with_capacity(reps);
            for _ in 0..reps {
                let t = Instant::now();
                s.set_state(&start);
                let mut acc = 0.0;
                for k in 0..common::YEAR_H {
                    s.step(&series[k], &series[k + 1]);
                    acc += s.mean()[0];
                }
                black_box(acc);
                times.push(t.elapsed().as_secs_f64() * 1e3);
            }
            times.sort_by(|a, b| a.total_cmp(b));
            // The same year through `run_known` (inputs known in advance).
            let flat: Vec<f64> = series.iter().flatten().copied().collect();
            let (mut yi, mut ym) = (vec![0.0; common::YEAR_H * 3], vec![0.0; common::YEAR_H * 3]);
            let mut known = Vec::with_capacity(reps);
            for _ in 0..reps {
                let t = Instant::now();
                s.set_state(&start);
                s.run_known(&flat, &mut yi, &mut ym);
                black_box(ym[0]);
                known.push(t.elapsed().as_secs_f64() * 1e3);
            }
            known.sort_by(|a, b| a.total_cmp(b));
            println!(
                "{n:>6}  {name:>5}  {:>10.3}  {:>9.3}  {:>11.1}  {:>16.3}  {:>17.1}",
                times[0],
                times[reps / 2],
                times[0] * 1e6 / common::YEAR_H as f64,
                known[0],
                known[0] * 1e6 / common::YEAR_H as f64
            );
        }
    }
}
