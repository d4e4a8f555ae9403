//! Stepping only, for each shipped example house: one year hourly with the default weather,
//! inputs computed beforehand, every zone's air temperature read at each step end and as a
//! step mean. Two controls: free-floating and the capacity-limited thermostat at 20 °C in
//! every heated zone, each run step by step (`Stepper::step`, `Stepper::step_thermostat`)
//! and as a block run over the known inputs (`Stepper::run_known`,
//! `Stepper::run_thermostat`). Timed by the
//! fastest of many repeats, which a busy machine disturbs far less than a mean; setup
//! (discretisation and stepper) is timed once per house.
//!
//! Run: `cargo run --release -p dwell-studies --example house_steps [-- REPEATS]`.

use std::hint::black_box;
use std::path::PathBuf;
use std::time::Instant;

use dwell_model::{compile, read_model};
use dwell_solver::{Discretization, Readout, Route, Stepper};
use dwell_studies::forcing::Forcing;
use dwell_studies::simulate::thermostat_channels;
use dwell_weather::{default_weather, SkyModel};

fn fastest(reps: usize, mut f: impl FnMut()) -> f64 {
    let mut best = f64::INFINITY;
    for _ in 0..reps {
        let t = Instant::now();
        f();
        best = best.min(t.elapsed().as_secs_f64() * 1e3);
    }
    best
}

fn main() {
    let reps: usize = std::env::args()
        .nth(1)
        .and_then(|a| a.parse().ok())
        .unwrap_or(200);
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../../zones-examples");
    let mut paths: Vec<PathBuf> = std::fs::read_dir(&dir)
        .expect("zones-examples/ exists")
        .filter_map(Result::ok)
        .map(|e| e.path())
        .filter(|p| p.extension().is_some_and(|x| x == "json"))
        .collect();
    paths.sort();
    let weather = default_weather();
    println!(
        "house                  states inputs zones  setup_ms  free_year_ms  free_block_ms  thermostat_year_ms  thermostat_block_ms  (fastest of {reps})"
    );
    for path in paths {
        let model = read_model(&path).expect("example reads");
        let house = compile(&model, &path.display().to_string()).expect("example compiles");
        let net = &house.network;
        let (n, m) = (net.states.len(), net.inputs.len());
        let forcing = Forcing::new(&model, &house, &weather, 3600.0, SkyModel::HayDavies);
        let hours = (forcing.hours() - 1).min(8760);
        let mut u = vec![vec![0.0; m]; hours + 1];
        for (k, uk) in u.iter_mut().enumerate() {
            forcing.fill(0, k, uk);
        }
        let air: Vec<usize> = house.zones.iter().map(|z| z.air_state).collect();
        let rows = Readout::nodes(&air, n, m);
        let t0 = Instant::now();
        let disc = Discretization::new(&net.system, 3600.0, Route::Modal).unwrap();
        let mut free = Stepper::new(&disc, &rows, &rows).unwrap();
        let setup_ms = t0.elapsed().as_secs_f64() * 1e3;
        let tc = thermostat_channels(&model, &house, &|_| true);
        let q = tc.channels.len();
        let mut ctl = Stepper::new(&disc, &rows, &rows).unwrap();
        if q > 0 {
            ctl = ctl.with_control(&tc.channels).unwrap();
        }
        let start = vec![18.0; n];
        let free_ms = fastest(reps, || {
            free.set_state(&start);
            let mut acc = 0.0;
            for k in 0..hours {
                free.step(&u[k], &u[k + 1]);
                acc += free.mean()[0];
            }
            black_box(acc);
        });
        let (setpoint, enabled) = (vec![20.0; q], vec![true; q]);
        let mut fraction = vec![0.0; q];
        let mut uk = vec![0.0; m];
        let ctl_ms = fastest(reps, || {
            ctl.set_state(&start);
            let mut acc = 0.0;
            for k in 0..hours {
                uk.copy_from_slice(&u[k]);
                if q > 0 {
                    ctl.step_thermostat(&mut uk, &u[k + 1], &setpoint, &enabled, &mut fraction);
                } else {
                    ctl.step(&uk, &u[k + 1]);
                }
                acc += ctl.mean()[0];
            }
            black_box(acc);
        });
        // The same two years as block runs over the inputs, known in advance.
        let flat: Vec<f64> = u.iter().flatten().copied().collect();
        let p = air.len();
        let (mut yi, mut ym) = (vec![0.0; hours * p], vec![0.0; hours * p]);
        let free_block_ms = fastest(reps, || {
            free.set_state(&start);
            free.run_known(&flat, &mut yi, &mut ym);
            black_box(ym[0]);
        });
        let sets = vec![20.0; hours * q];
        let mut fractions = vec![0.0; hours * q];
        let ctl_block_ms = fastest(reps, || {
            ctl.set_state(&start);
            if q > 0 {
                ctl.run_thermostat(&flat, &sets, &enabled, &mut fractions, &mut yi, &mut ym);
            } else {
                ctl.run_known(&flat, &mut yi, &mut ym);
            }
            black_box(ym[0]);
        });
        let name = path.file_stem().unwrap().to_string_lossy();
        println!(
            "{name:<22} {n:>6} {m:>6} {:>5}  {setup_ms:>8.3}  {free_ms:>12.3}  {free_block_ms:>13.3}  {ctl_ms:>18.3}  {ctl_block_ms:>19.3}",
            house.zones.len()
        );
    }
}
