//! The shipped example houses against SciPy: Φ against `scipy.linalg.expm`, Γ₀ against
//! `scipy.signal.cont2discrete(method='zoh')`, a year of FOH/ZOH steps against SciPy's own
//! discrete simulation (its `foh` form is state-shifted, so trajectories are compared), and a
//! free-floating year against `scipy.integrate.solve_ivp(method='Radau', rtol=1e-10)`.
//!
//! Fixtures: `scripts/ref_solver.py --house` (scipy 1.17.1, pinned in scripts/requirements.txt) on `dwell network MODEL --json`,
//! rerun by `.ci/run` so the comparison is live. Each fixture records the state space it was
//! made from; a test fails if the house has changed since (rerun the script).

use std::path::PathBuf;

use dwell_solver::{Discretization, InputKind, RcSystem, Readout, Route, Stepper};
use dwell_testkit::{record, Check};
use nalgebra::DMatrix;
use serde_json::Value;

const HOURS: usize = 8760;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../..")
}

fn matrix(v: &Value) -> DMatrix<f64> {
    let rows: Vec<Vec<f64>> = serde_json::from_value(v.clone()).expect("a matrix");
    let n = rows.len();
    let m = rows.first().map_or(0, |r| r.len());
    DMatrix::from_fn(n, m, |i, j| rows[i][j])
}

fn rel(a: &DMatrix<f64>, b: &DMatrix<f64>) -> f64 {
    (a - b).amax() / b.amax().max(f64::MIN_POSITIVE)
}

/// The closed-form input series of `scripts/ref_solver.py::house_input_series`.
fn inputs(hold: &[InputKind]) -> Vec<Vec<f64>> {
    use std::f64::consts::PI;
    (0..=HOURS)
        .map(|t| {
            let tf = t as f64;
            let d = (tf / 24.0).floor();
            hold.iter()
                .enumerate()
                .map(|(j, k)| match k {
                    InputKind::Temperature => {
                        let s = tf - 3.0 * j as f64;
                        10.0 + 8.0 * (2.0 * PI * s / 8760.0 - 2.0).sin()
                            + 5.0 * (2.0 * PI * s / 24.0 - 1.0).sin()
                    }
                    InputKind::HeatFlow => 300.0 * (1.0 + (2.0 * PI * d / 7.0 + j as f64).sin()),
                })
                .collect()
        })
        .collect()
}

fn check_house(stem: &str) {
    let path = root().join(format!(
        "crates/dwell-solver/tests/reference/{stem}_ref.json"
    ));
    let text = std::fs::read_to_string(&path).unwrap_or_else(|e| {
        panic!(
            "{}: {e}; run `.ci/run` or `scripts/ref_solver.py --house` (see DEVELOPERS.md)",
            path.display()
        )
    });
    let fx: Value = serde_json::from_str(&text).unwrap();
    let model =
        dwell_model::read_model(&root().join(format!("zones-examples/{stem}.json"))).unwrap();
    let house = dwell_model::compile(&model, stem).unwrap();
    let sys: &RcSystem = &house.network.system;
    // the fixture must describe this very house
    let a_fx = matrix(&fx["a"]);
    let b_fx = matrix(&fx["b"]);
    assert!(
        rel(&sys.a(), &a_fx) < 1e-14,
        "{stem}: A changed since the fixture was made; rerun the script"
    );
    assert!(
        rel(&sys.b(), &b_fx) < 1e-14,
        "{stem}: B changed since the fixture was made; rerun the script"
    );
    let expm = matrix(&fx["expm_ha"]);
    let zoh_b = matrix(&fx["zoh_bd"]);
    let n = sys.states();
    let m = sys.inputs();
    let u = inputs(&sys.input_kinds);
    let x0: Vec<f64> = serde_json::from_value(fx["x0"].clone()).unwrap();
    let every = fx["sample_every_h"].as_u64().unwrap() as usize;
    let disc_fx = matrix(&fx["discrete_states"]);
    let ivp_fx = fx.get("ivp_states").map(matrix);
    for route in [Route::Modal, Route::Block] {
        let d = Discretization::new(sys, 3600.0, route).unwrap();
        // scipy.linalg.expm and cont2discrete('zoh'): 1e-10 relative (issue 4)
        assert!(
            rel(&d.phi(), &expm) < 1e-10,
            "{stem} {route:?}: Φ vs expm {:e}",
            rel(&d.phi(), &expm)
        );
        assert!(
            rel(&d.gamma0(), &zoh_b) < 1e-10,
            "{stem} {route:?}: Γ₀ vs zoh {:e}",
            rel(&d.gamma0(), &zoh_b)
        );
        let all: Vec<usize> = (0..n).collect();
        let mut st = Stepper::new(&d, &Readout::nodes(&all, n, m), &Readout::empty(n, m)).unwrap();
        st.set_state(&x0);
        let mut x = vec![0.0; n];
        let mut worst_disc = 0.0f64;
        let mut worst_ivp = 0.0f64;
        for k in 0..HOURS {
            st.step(&u[k], &u[k + 1]);
            if (k + 1) % every == 0 {
                st.state_into(&mut x);
                let row = (k + 1) / every;
                let scale = (0..n).map(|i| disc_fx[(row, i)].abs()).fold(1.0, f64::max);
                for i in 0..n {
                    worst_disc = worst_disc.max((x[i] - disc_fx[(row, i)]).abs() / scale);
                    if let Some(ivp) = &ivp_fx {
                        worst_ivp = worst_ivp.max((x[i] - ivp[(row, i)]).abs());
                    }
                }
            }
        }
        // SciPy's exact FOH+ZOH trajectory: 1e-10 relative; Radau at rtol 1e-10: 1e-6 K.
        let generator = fx["generator"]
            .as_str()
            .unwrap_or("scripts/ref_solver.py")
            .to_string();
        let phi_err = rel(&d.phi(), &expm);
        let g_err = rel(&d.gamma0(), &zoh_b);
        record(
            "scipy",
            Check {
                area: "Exact discretisation against SciPy",
                what: &format!("{stem}, {route:?} route: Φ, Γ₀ and a year of FOH/ZOH steps"),
                source: &format!(
                    "scipy.linalg.expm, scipy.signal.cont2discrete zoh/foh ({generator})"
                ),
                tolerance: "1e-10 relative",
                obtained: format!("Φ {phi_err:.1e}, Γ₀ {g_err:.1e}, trajectory {worst_disc:.1e}"),
                pass: phi_err < 1e-10 && g_err < 1e-10 && worst_disc < 1e-10,
            },
        );
        if ivp_fx.is_some() {
            record(
                "scipy",
                Check {
                    area: "Exact discretisation against SciPy",
                    what: &format!("{stem}, {route:?} route: a free-floating year vs Radau"),
                    source: &format!("scipy.integrate.solve_ivp Radau, rtol 1e-10 ({generator})"),
                    tolerance: "1e-6 K",
                    obtained: format!("{worst_ivp:.1e} K"),
                    pass: worst_ivp < 1e-6,
                },
            );
        }
        assert!(
            worst_disc < 1e-10,
            "{stem} {route:?}: vs scipy discrete {worst_disc:e}"
        );
        assert!(
            worst_ivp < 1e-6,
            "{stem} {route:?}: vs solve_ivp {worst_ivp:e} K"
        );
    }
}

#[test]
fn fernhollow_cabin_matches_scipy() {
    check_house("fernhollow-cabin");
}

#[test]
fn brickworth_house_matches_scipy() {
    check_house("brickworth-house");
}

#[test]
fn sunbank_bungalow_matches_scipy() {
    check_house("sunbank-bungalow");
}

#[test]
fn raw_two_mass_matches_scipy() {
    check_house("raw-two-mass");
}
