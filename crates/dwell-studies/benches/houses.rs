//! Whole-house timings: for each shipped example in `zones-examples/`, parsing and compiling
//! the model (network build with Kron reduction), discretising it (modal route, 1 h), and one
//! year hourly `simulate` with the default weather and the default (thermostat) control,
//! warm-up included; then a synthetic building of 200 zones and about 2,000 nodes (INVENTED:
//! a row of identical rooms, see [`synthetic_building`]): build + discretise + one year hourly
//! with every zone's air temperature read each hour.
//!
//! Setup of each measured stage stays outside its timed part.
//!
//! Run: `cargo bench -p dwell-studies --bench houses -- --warm-up-time 1 --measurement-time 3`.

use std::path::PathBuf;

use criterion::{black_box, criterion_group, criterion_main, BenchmarkId, Criterion};
use dwell_model::{compile, read_model};
use dwell_network::{Hold, Network, NetworkBuilder};
use dwell_solver::{Discretization, Readout, Route, Stepper};
use dwell_studies::{simulate, SimOptions};
use dwell_weather::default_weather;

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
        let opts = SimOptions::default();
        group.bench_function(BenchmarkId::new("simulate_year", &id), |b| {
            b.iter(|| simulate(&model, &house, black_box(&weather), &opts).unwrap())
        });
    }
    group.finish();
}

/// Zones in the synthetic building.
pub const ZONES: usize = 200;

/// An INVENTED building of `zones` similar rooms in a row: per room an air node (0.3–0.42
/// MJ/K of air and furniture), an outer wall of 4 massive nodes to
/// outdoors, a floor slab of 3 nodes to the ground, and a partition of 2 nodes to the next
/// room: 10 nodes a room. Inputs: outdoor air and ground (°C, linear), sun on the façade
/// (W, one input shared by every room) and internal gains (W, shared). Values are of the
/// order of a small office room; they only need to be physical and stiff.
pub fn synthetic_building(zones: usize) -> Network {
    let mut b = NetworkBuilder::new();
    let outdoor = b.add_input("outdoor_air_c", Hold::Linear);
    let ground = b.add_input("ground_c", Hold::Linear);
    let sun = b.add_input("sun_w", Hold::Step);
    let gains = b.add_input("gains_w", Hold::Step);
    let mut airs = Vec::with_capacity(zones);
    for z in 0..zones {
        // Slight variety so the spectrum is not degenerate.
        let f = 1.0 + 0.1 * ((z * 7) % 5) as f64;
        let air = b.add_node(&format!("air{z}"), 3.0e5 * f);
        b.link_boundary(air, outdoor, 8.0 * f, "ventilation");
        b.inject(air, gains, 0.5 * f);
        // Outer wall: 4 nodes, surface node first.
        let mut prev = air;
        for k in 0..4 {
            let node = b.add_node(&format!("wall{z}_{k}"), 1.2e6);
            b.link(prev, node, if k == 0 { 30.0 } else { 60.0 });
            prev = node;
        }
        b.link_boundary(prev, outdoor, 50.0, "walls");
        b.inject(prev, sun, 0.3);
        // Floor slab: 3 nodes to the ground.
        let mut prev = air;
        for k in 0..3 {
            let node = b.add_node(&format!("floor{z}_{k}"), 2.5e6);
            b.link(prev, node, if k == 0 { 25.0 } else { 80.0 });
            prev = node;
        }
        b.link_boundary(prev, ground, 10.0, "floor");
        airs.push(air);
    }
    // Partitions between neighbours: 2 nodes each, plus a last one on the end wall.
    for z in 0..zones {
        let mut prev = airs[z];
        for k in 0..2 {
            let node = b.add_node(&format!("part{z}_{k}"), 6.0e5);
            b.link(prev, node, 20.0);
            prev = node;
        }
        if z + 1 < zones {
            b.link(prev, airs[z + 1], 20.0);
        } else {
            b.link_boundary(prev, outdoor, 5.0, "walls");
        }
    }
    b.build().expect("synthetic building builds")
}

/// Hourly inputs `[outdoor, ground, sun, gains]` for `hours + 1` samples (deterministic).
fn synthetic_inputs(hours: usize) -> Vec<[f64; 4]> {
    let tau = std::f64::consts::TAU;
    (0..=hours)
        .map(|k| {
            let t = k as f64;
            let day = (tau * t / 24.0).sin();
            [
                8.0 + 7.0 * (tau * t / 8760.0 - 2.0).sin() + 4.0 * day,
                10.0,
                (400.0 * day).max(0.0) * 200.0,
                if (k % 24) >= 8 && (k % 24) < 18 {
                    40_000.0
                } else {
                    5_000.0
                },
            ]
        })
        .collect()
}

/// Build, discretise and step one year with every zone's air temperature read each hour
/// into a preallocated `hours × zones` table (the hourly output).
pub fn run_building(zones: usize) -> f64 {
    let net = synthetic_building(zones);
    let (n, m) = (net.states.len(), net.inputs.len());
    let airs: Vec<usize> = (0..zones)
        .map(|z| net.state_index(&format!("air{z}")).expect("air state"))
        .collect();
    let disc = Discretization::new(&net.system, 3600.0, Route::Modal).expect("discretises");
    let mut st =
        Stepper::new(&disc, &Readout::nodes(&airs, n, m), &Readout::empty(n, m)).expect("stepper");
    st.set_state(&vec![15.0; n]);
    let u = synthetic_inputs(8760);
    let mut table = vec![0.0; 8760 * zones];
    for (k, row) in table.chunks_exact_mut(zones).enumerate() {
        st.step(&u[k], &u[k + 1]);
        row.copy_from_slice(st.instant());
    }
    table.iter().sum::<f64>() / table.len() as f64
}

fn building(c: &mut Criterion) {
    let mut group = c.benchmark_group("building200");
    group.sample_size(10);
    let net = synthetic_building(ZONES);
    let n = net.states.len();
    group.bench_function(BenchmarkId::new("build", n), |b| {
        b.iter(|| synthetic_building(black_box(ZONES)))
    });
    group.bench_function(BenchmarkId::new("discretise", n), |b| {
        b.iter(|| Discretization::new(black_box(&net.system), 3600.0, Route::Modal).unwrap())
    });
    group.bench_function(BenchmarkId::new("build_discretise_year", n), |b| {
        b.iter(|| run_building(black_box(ZONES)))
    });
    group.finish();
}

criterion_group!(benches, houses, building);
criterion_main!(benches);
