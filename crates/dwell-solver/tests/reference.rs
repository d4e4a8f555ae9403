//! Comparison with SciPy fixtures written by `scripts/ref_solver.py`:
//! `scipy.linalg.expm` (Al-Mohy & Higham 2009), `scipy.signal.cont2discrete` (zoh, foh) and
//! `scipy.integrate.solve_ivp(Radau, rtol = atol = 1e-10)`.

use std::path::PathBuf;

use dwell_solver::{Discretization, InputKind, RcSystem, Readout, Route, Stepper};
use nalgebra::DMatrix;
use serde_json::Value;

fn reference_dir() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests")
        .join("reference")
}

fn matrix(v: &Value) -> DMatrix<f64> {
    let rows: Vec<Vec<f64>> = serde_json::from_value(v.clone()).expect("a matrix as nested lists");
    let ncols = rows.first().map_or(0, Vec::len);
    DMatrix::from_fn(rows.len(), ncols, |i, j| rows[i][j])
}

fn fixtures() -> Vec<(String, Value)> {
    let dir = reference_dir();
    let synthetic = dir.join("synthetic_ref.json");
    assert!(
        synthetic.exists(),
        "missing fixture {}: run `python3 scripts/ref_solver.py` from the repository root",
        synthetic.display()
    );
    let mut out = Vec::new();
    for entry in std::fs::read_dir(&dir).unwrap() {
        let path = entry.unwrap().path();
        let name = path.file_name().unwrap().to_string_lossy().to_string();
        if name.ends_with("_ref.json") {
            let v: Value = serde_json::from_str(&std::fs::read_to_string(&path).unwrap()).unwrap();
            // House fixtures (`--house`) carry no input table: their inputs are a closed form
            // checked by crates/dwell-studies/tests/scipy_reference.rs.
            if v.get("input_formula").is_none() {
                out.push((name, v));
            }
        }
    }
    out
}

fn kinds(v: &Value) -> Vec<InputKind> {
    v["input_hold"]
        .as_array()
        .unwrap()
        .iter()
        .map(|h| match h.as_str().unwrap() {
            "linear" => InputKind::Temperature,
            "step" => InputKind::HeatFlow,
            other => panic!("unknown input_hold {other:?}"),
        })
        .collect()
}

fn rel(a: &DMatrix<f64>, b: &DMatrix<f64>) -> f64 {
    (a - b).amax() / a.amax().max(b.amax())
}

/// The discretisations to check: the block route from (A, B), and, where the fixture has
/// C, K, U, both routes from the RC system.
fn discretizations(v: &Value) -> Vec<(String, Discretization)> {
    let h = v["step_s"].as_f64().unwrap();
    let mut out = vec![(
        "state space".to_string(),
        Discretization::from_state_space(&matrix(&v["a"]), &matrix(&v["b"]), kinds(v), h).unwrap(),
    )];
    if v.get("capacitance").is_some() {
        let c: Vec<f64> = serde_json::from_value(v["capacitance"].clone()).unwrap();
        let sys =
            RcSystem::new(c, matrix(&v["conductance"]), matrix(&v["input"]), kinds(v)).unwrap();
        for route in [Route::Modal, Route::Block] {
            out.push((
                format!("{route:?}"),
                Discretization::new(&sys, h, route).unwrap(),
            ));
        }
    }
    out
}

#[test]
fn matrices_match_scipy_expm_and_zoh() {
    for (name, v) in fixtures() {
        let (phi_ref, bd_ref) = (matrix(&v["expm_ha"]), matrix(&v["zoh_bd"]));
        for (route, d) in discretizations(&v) {
            let e = rel(&d.phi(), &phi_ref);
            assert!(e < 1e-10, "{name} {route}: Φ vs scipy expm, relative {e:e}");
            for j in 0..bd_ref.ncols() {
                let (g, r) = (
                    d.gamma0().column(j).into_owned(),
                    bd_ref.column(j).into_owned(),
                );
                let e = (&g - &r).amax() / r.amax();
                assert!(
                    e < 1e-10,
                    "{name} {route}: Γ₀ column {j} vs scipy zoh, relative {e:e}"
                );
            }
        }
    }
}

#[test]
fn year_trajectories_match_scipy_discrete_and_radau() {
    for (name, v) in fixtures() {
        let inputs = matrix(&v["inputs"]);
        let every = v["sample_every_h"].as_u64().unwrap() as usize;
        let (disc_ref, ivp_ref) = (matrix(&v["discrete_states"]), matrix(&v["ivp_states"]));
        let x0: Vec<f64> = serde_json::from_value(v["x0"].clone()).unwrap();
        let (n, m) = (x0.len(), inputs.ncols());
        for (route, d) in discretizations(&v) {
            let mut s = Stepper::new(&d, &Readout::empty(n, m), &Readout::empty(n, m)).unwrap();
            s.set_state(&x0);
            let mut x = vec![0.0; n];
            let (mut worst_disc, mut worst_ivp) = (0.0_f64, 0.0_f64);
            let u = |k: usize| -> Vec<f64> { inputs.row(k).iter().copied().collect() };
            for k in 0..inputs.nrows() - 1 {
                s.step(&u(k), &u(k + 1));
                if (k + 1) % every == 0 {
                    s.state_into(&mut x);
                    let row = (k + 1) / every;
                    for i in 0..n {
                        let scale = disc_ref[(row, i)].abs().max(1.0);
                        worst_disc = worst_disc.max((x[i] - disc_ref[(row, i)]).abs() / scale);
                        worst_ivp = worst_ivp.max((x[i] - ivp_ref[(row, i)]).abs());
                    }
                }
            }
            assert!(
                worst_disc < 1e-10,
                "{name} {route}: vs scipy zoh/foh simulation, relative {worst_disc:e}"
            );
            assert!(
                worst_ivp < 1e-6,
                "{name} {route}: vs solve_ivp Radau, {worst_ivp:e} K"
            );
        }
    }
}
