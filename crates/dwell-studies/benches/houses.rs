//! Whole-house timings: for each shipped example in `zones-examples/`, parsing and compiling
//! the model (network build with Kron reduction), discretising it (modal route, 1 h), and one
//! year hourly `simulate` with the default weather and the default (thermostat) control,
//! warm-up included; stepping alone (`step_year_block`: one year hourly through
//! `Stepper::run_known`, the inputs computed beforehand from the default weather and the
//! model's schedules, every zone's air temperature read at step ends and as step means, as
//! in `examples/house_steps.rs`); then a synthetic building of 200 zones and about 2,000 nodes (INVENTED:
//! a row of similar rooms, see `synthetic/mod.rs`): each stage (build, discretise, stepper
//! construction, one year hourly with every zone's air temperature read each hour), the
//! whole (build + discretise + year), and the same with the modes faster than 360 s dropped
//! (`TruncatedModal`).
//!
//! Setup of each measured stage stays outside its timed part.
//!
//! Run: `cargo bench -p dwell-studies --bench houses -- --warm-up-time 1 --measurement-time 3`
//! (`-- building200` for the large building only).

use std::path::PathBuf;

use criterion::{black_box, criterion_group, criterion_main, BenchmarkId, Criterion};
use dwell_model::{compile, read_model};
use dwell_solver::{Discretization, Readout, Route, Stepper, TruncatedModal, Truncation};
use dwell_studies::forcing::Forcing;
use dwell_studies::{simulate, SimOptions};
use dwell_weather::{default_weather, SkyModel};

mod synthetic;
use synthetic::{
    air_states, building_stepper, run_building, step_year, synthetic_building, synthetic_inputs,
    ZONES,
};

fn examples() -> Vec<(String, PathBuf)> {
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../../zones-examples");
    let mut out: Vec<(String, PathBuf)> = std::fs::read_dir(&dir)
        .expect("zones-examples/ exists")
        .filter_map(Result::ok)
        .map(|e| e.path())
        .filter(|p| p.extension().is_some_and(|x| x == "json"))
        .map(|p| (p.file_stem().unwrap().to_string_lossy().into_owned(), p))
        .collect();
    out.sort();
    out
}

fn houses(c: &mut Criterion) {
    let weather = default_weather();
    let mut group = c.benchmark_group("house");
    group.sample_size(10);
    for (name, path) in examples() {
        let model = read_model(&path).expect("example model reads");
        let file = path.display().to_string();
        let house = compile(&model, &file).expect("example model compiles");
        let n = house.network.states.len();
        let id = format!("{name}({n}_states)");
        group.bench_function(BenchmarkId::new("parse_compile", &id), |b| {
            b.iter(|| {
                let m = read_model(black_box(&path)).unwrap();
                compile(&m, &file).unwrap()
            })
        });
        group.bench_function(BenchmarkId::new("discretise", &id), |b| {
            b.iter(|| {
                Discretization::new(black_box(&house.network.system), 3600.0, Route::Modal).unwrap()
            })
        });
        // Stepping alone: inputs beforehand, one block run over the year.
        let net = &house.network;
        let m = net.inputs.len();
        let forcing = Forcing::new(&model, &house, &weather, 3600.0, SkyModel::HayDavies);
        let hours = (forcing.hours() - 1).min(8760);
        let mut u = vec![0.0; (hours + 1) * m];
        for (k, uk) in u.chunks_exact_mut(m).enumerate() {
            forcing.fill(0, k, uk);
        }
        let air: Vec<usize> = house.zones.iter().map(|z| z.air_state).collect();
        let rows = Readout::nodes(&air, n, m);
        let disc = Discretization::new(&net.system, 3600.0, Route::Modal).unwrap();
        let mut st = Stepper::new(&disc, &rows, &rows).unwrap();
        let (mut yi, mut ym) = (vec![0.0; hours * air.len()], vec![0.0; hours * air.len()]);
        let start = vec![18.0; n];
        group.bench_function(BenchmarkId::new("step_year_block", &id), |b| {
            b.iter(|| {
                st.set_state(&start);
                st.run_known(black_box(&u), &mut yi, &mut ym);
                black_box(ym[0])
            })
        });
        let opts = SimOptions::default();
        group.bench_function(BenchmarkId::new("simulate_year", &id), |b| {
            b.iter(|| simulate(&model, &house, black_box(&weather), &opts).unwrap())
        });
    }
    group.finish();
}

/// The threshold of the truncated runs (s): a tenth of the step.
const DROP_FASTER_THAN_S: f64 = 360.0;

fn building(c: &mut Criterion) {
    let mut group = c.benchmark_group("building200");
    group.sample_size(10);
    let net = synthetic_building(ZONES);
    let (n, m) = (net.states.len(), net.inputs.len());
    let rows = Readout::nodes(&air_states(&net, ZONES), n, m);
    let cut = Truncation::new(DROP_FASTER_THAN_S).unwrap();
    group.bench_function(BenchmarkId::new("build", n), |b| {
        b.iter(|| synthetic_building(black_box(ZONES)))
    });
    group.bench_function(BenchmarkId::new("discretise", n), |b| {
        b.iter(|| Discretization::new(black_box(&net.system), 3600.0, Route::Modal).unwrap())
    });
    let disc = Discretization::new(&net.system, 3600.0, Route::Modal).unwrap();
    group.bench_function(BenchmarkId::new("stepper_new", n), |b| {
        b.iter(|| Stepper::new(black_box(&disc), &rows, &Readout::empty(n, m)).unwrap())
    });
    let u = synthetic_inputs(8760);
    let mut table = vec![0.0; 8760 * ZONES];
    let mut st = building_stepper(&net, ZONES, None);
    group.bench_function(BenchmarkId::new("step_year", n), |b| {
        b.iter(|| step_year(&mut st, black_box(&u), &mut table, ZONES))
    });
    group.bench_function(BenchmarkId::new("build_discretise_year", n), |b| {
        b.iter(|| run_building(black_box(ZONES), None))
    });
    group.bench_function(BenchmarkId::new("discretise_truncated", n), |b| {
        b.iter(|| TruncatedModal::new(black_box(&net.system), 3600.0, cut).unwrap())
    });
    let mut st = building_stepper(&net, ZONES, Some(cut));
    group.bench_function(BenchmarkId::new("step_year_truncated", n), |b| {
        b.iter(|| step_year(&mut st, black_box(&u), &mut table, ZONES))
    });
    group.bench_function(
        BenchmarkId::new("build_discretise_year_truncated", n),
        |b| b.iter(|| run_building(black_box(ZONES), Some(cut))),
    );
    group.finish();
}

criterion_group!(benches, houses, building);
criterion_main!(benches);
