//! Sweep throughput: 200 variants of a shipped example (INVENTED houses in `zones-examples/`)
//! over one year hourly with the default weather and the thermostat, each variant patched,
//! compiled, discretised and run by the summary-only fast path (`dwell_studies::fastpath`) —
//! the work `dwell sweep` does per row. Criterion reports variants per second, which are
//! house-years per second (×60 for house-years a minute).
//!
//! Stages of one variant are timed apart: `patch_compile` (clone of the base JSON, three
//! pointer sets, model validation, network build with Kron reduction), `discretise` (modal
//! route, 1 h), `run_year` (discretisation, stepper, thermostat channels, warm-up and the
//! year, tables already cached) and `simulate_year` (the full `simulate` path, for the ratio).
//!
//! Variants: wall (or loft) insulation thickness × heater capacity × infiltration, 5 × 5 × 8.
//!
//! Run: `cargo bench -p dwell-studies --bench sweep -- --warm-up-time 1 --measurement-time 5`.

use std::path::PathBuf;

use criterion::{black_box, criterion_group, criterion_main, BenchmarkId, Criterion, Throughput};
use dwell_studies::fastpath::SweepContext;
use dwell_studies::sweep::{run_row, run_sweep_in, SweepRow};
use dwell_studies::{simulate, SimOptions};
use dwell_weather::default_weather;
use serde_json::{json, Value};

/// (example, insulation pointer, thicknesses (m), heater capacities (W)).
const HOUSES: [(&str, &str, [f64; 5], [f64; 5]); 2] = [
    (
        "fernhollow-cabin",
        "/constructions/0/layers/3/thickness_m",
        [0.08, 0.12, 0.16, 0.20, 0.24],
        [2000.0, 3000.0, 4500.0, 6000.0, 8000.0],
    ),
    (
        "brickworth-house",
        "/constructions/2/layers/1/thickness_m",
        [0.10, 0.15, 0.20, 0.27, 0.30],
        [4000.0, 5500.0, 7000.0, 8500.0, 10000.0],
    ),
];

/// Infiltration of the first zone (air changes per hour).
const ACH: [f64; 8] = [0.3, 0.45, 0.6, 0.8, 1.0, 1.2, 1.5, 2.0];

fn rows(insulation: &str, thick: &[f64; 5], caps: &[f64; 5]) -> Vec<SweepRow> {
    let mut out = Vec::new();
    for t in thick {
        for c in caps {
            for a in ACH {
                let index = out.len() + 1;
                out.push(SweepRow {
                    index,
                    line: index + 1,
                    name: format!("v{index}"),
                    patch: None,
                    sets: vec![
                        (insulation.to_string(), json!(t)),
                        ("/heaters/0/capacity_w".to_string(), json!(c)),
                        ("/airflows/0/air_changes_per_h".to_string(), json!(a)),
                    ],
                });
            }
        }
    }
    out
}

fn base(name: &str) -> Value {
    let p =
        PathBuf::from(env!("CARGO_MANIFEST_DIR")).join(format!("../../zones-examples/{name}.json"));
    serde_json::from_str(&std::fs::read_to_string(p).expect("example exists"))
        .expect("example is JSON")
}

fn sweep(c: &mut Criterion) {
    let weather = default_weather();
    let opts = SimOptions::default();
    let ctx = SweepContext::new(&weather, &opts);
    let mut group = c.benchmark_group("sweep");
    group.sample_size(10);
    for (name, insulation, thick, caps) in &HOUSES {
        let v = base(name);
        let rows = rows(insulation, thick, caps);
        let file = format!("{name}.json");
        // Warm the shared tables once (the sweep does this on its first rows).
        let first = run_row(&v, &file, &rows[0], &ctx);
        assert_eq!(first.status, "ok", "{}", first.status);
        let id = format!("{name}({}_states)", first.states);

        group.throughput(Throughput::Elements(rows.len() as u64));
        group.bench_function(BenchmarkId::new("200_variants_all_cores", &id), |b| {
            b.iter(|| {
                let mut sum = 0.0;
                run_sweep_in(
                    &v,
                    &file,
                    &rows,
                    &ctx,
                    |r| {
                        sum += r.heating_kwh;
                        Ok(())
                    },
                    &|| {},
                )
                .unwrap();
                black_box(sum)
            })
        });

        group.throughput(Throughput::Elements(1));
        let row = &rows[rows.len() / 2];
        let patched = || {
            let mut m = v.clone();
            for (p, x) in &row.sets {
                dwell_studies::sweep::set_pointer(&mut m, p, x.clone()).unwrap();
            }
            m
        };
        group.bench_function(BenchmarkId::new("patch_compile", &id), |b| {
            b.iter(|| {
                let m = dwell_model::from_value(patched(), &file).unwrap();
                dwell_model::compile(&m, &file).unwrap()
            })
        });
        let model = dwell_model::from_value(patched(), &file).unwrap();
        let house = dwell_model::compile(&model, &file).unwrap();
        group.bench_function(BenchmarkId::new("discretise", &id), |b| {
            b.iter(|| {
                dwell_solver::Discretization::new(
                    black_box(&house.network.system),
                    3600.0,
                    opts.route,
                )
                .unwrap()
            })
        });
        group.bench_function(BenchmarkId::new("run_year", &id), |b| {
            b.iter(|| ctx.run(black_box(&model), &house).unwrap())
        });
        group.bench_function(BenchmarkId::new("simulate_year", &id), |b| {
            b.iter(|| simulate(black_box(&model), &house, &weather, &opts).unwrap())
        });
    }
    group.finish();
}

criterion_group!(benches, sweep);
criterion_main!(benches);
