//! One year hourly of the synthetic 200-zone building (INVENTED, `benches/synthetic/mod.rs`),
//! once, with the time of each stage: for peak-memory measurement
//! (`/usr/bin/time -v target/release/examples/building200`) and a single-shot check of the
//! criterion figures (docs/performance.md).
//!
//! Usage: `cargo run --release -p dwell-studies --example building200 [-- DROP_FASTER_THAN_S]`
//! (without an argument, the full modal route; with one, the modes with a time constant below
//! that many seconds are dropped).

use std::time::Instant;

use dwell_solver::{Discretization, Readout, Route, Stepper, TruncatedModal, Truncation};

#[path = "../benches/synthetic/mod.rs"]
mod synthetic;
use synthetic::{air_states, step_year, synthetic_building, synthetic_inputs, ZONES};

/// CPU time of the whole process, all threads (s), from `/proc/self/stat` (Linux; 0 where
/// that is missing). On the shared development machine wall-clock times include waiting
/// for a core; CPU times do not.
fn cpu_s() -> f64 {
    let stat = std::fs::read_to_string("/proc/self/stat").unwrap_or_default();
    let after = stat.rsplit_once(')').map(|(_, r)| r).unwrap_or("");
    let f: Vec<f64> = after
        .split_whitespace()
        .map(|v| v.parse().unwrap_or(0.0))
        .collect();
    // Fields 14 and 15 of the file (utime, stime) in clock ticks of 1/100 s.
    f.get(11)
        .zip(f.get(12))
        .map_or(0.0, |(u, s)| (u + s) / 100.0)
}

/// Peak resident memory so far (MB), from `/proc/self/status` (Linux; 0 where missing).
fn peak_mb() -> f64 {
    std::fs::read_to_string("/proc/self/status")
        .unwrap_or_default()
        .lines()
        .find_map(|l| l.strip_prefix("VmHWM:"))
        .and_then(|v| v.trim().trim_end_matches("kB").trim().parse::<f64>().ok())
        .map_or(0.0, |kb| kb / 1024.0)
}

fn main() {
    let cut: Option<f64> = std::env::args().nth(1).map(|a| a.parse().expect("seconds"));
    let (t0, c0) = (Instant::now(), cpu_s());
    let net = synthetic_building(ZONES);
    let t_build = t0.elapsed();
    let (n, m) = (net.states.len(), net.inputs.len());
    let rows = Readout::nodes(&air_states(&net, ZONES), n, m);
    let x0 = vec![15.0; n];
    let peak_build = peak_mb();
    let (t1, c1) = (Instant::now(), cpu_s());
    let (mut st, kept) = match cut {
        None => {
            // By value: S is formed in K's storage (32 MB less at the peak).
            let disc = Discretization::from_system(net.system, 3600.0, Route::Modal).unwrap();
            let t_disc = t1.elapsed();
            let peak_disc = peak_mb();
            let mut st = Stepper::new(&disc, &rows, &Readout::empty(n, m)).unwrap();
            st.set_state(&x0);
            eprintln!(
                "discretise {:.3} s, peak memory after it {peak_disc:.0} MB",
                t_disc.as_secs_f64()
            );
            (st, n)
        }
        Some(s) => {
            // By value, as the full route (S in K's storage).
            let tm = TruncatedModal::from_system(net.system, 3600.0, Truncation::new(s).unwrap())
                .unwrap();
            let t_disc = t1.elapsed();
            let mut st = tm.stepper(&rows, &Readout::empty(n, m)).unwrap();
            st.set_state(&tm.modal_state(&x0));
            eprintln!("discretise (truncated) {:.3} s", t_disc.as_secs_f64());
            (st, tm.kept_modes())
        }
    };
    let t_setup = t1.elapsed();
    let u = synthetic_inputs(8760);
    let mut table = vec![0.0; 8760 * ZONES];
    let peak_setup = peak_mb();
    let (t2, c2) = (Instant::now(), cpu_s());
    let mean = step_year(&mut st, &u, &mut table, ZONES);
    let t_step = t2.elapsed();
    let c3 = cpu_s();
    println!(
        "states {n}, modes stepped {kept}, build {:.3} s, discretise + stepper {:.3} s, \
         year {:.3} s, total {:.3} s (mean air {mean:.4} °C); CPU time: build {:.2} s, \
         setup {:.2} s, year {:.2} s, total {:.2} s; peak memory after build {:.0} MB, \
         after setup {:.0} MB, at the end {:.0} MB",
        t_build.as_secs_f64(),
        t_setup.as_secs_f64(),
        t_step.as_secs_f64(),
        t0.elapsed().as_secs_f64(),
        c1 - c0,
        c2 - c1,
        c3 - c2,
        c3 - c0,
        peak_build,
        peak_setup,
        peak_mb()
    );
}
