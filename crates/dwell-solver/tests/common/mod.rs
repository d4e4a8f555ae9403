//! Test helpers: seeded random RC networks and input series.
#![allow(dead_code)]

use dwell_solver::{InputKind, RcSystem};
use nalgebra::DMatrix;
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;

/// Hours in a (non-leap) year.
pub const YEAR_H: usize = 8760;

fn log_uniform(rng: &mut ChaCha8Rng, lo: f64, hi: f64) -> f64 {
    (rng.random_range(lo.ln()..hi.ln())).exp()
}

/// A random stiff RC network with `n` nodes and inputs `[outdoor (°C), ground (°C), heat… (W)]`.
///
/// Capacitances are log-uniform in 1e4 ..= 5e7 J/K and conductances in 0.5 ..= 200 W/K, so
/// single-node time constants run from about a minute to three years. Every node is joined
/// to an earlier one (a random tree) plus `n/2` random extra links. With `boundary`, about a
/// quarter of the nodes are joined to outdoor air and node 0 to the ground; without, the two
/// temperature columns are zero and `K` is singular.
pub fn random_network(seed: u64, n: usize, heat_inputs: usize, boundary: bool) -> RcSystem {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let m = 2 + heat_inputs;
    let mut k = DMatrix::<f64>::zeros(n, n);
    let link = |k: &mut DMatrix<f64>, i: usize, j: usize, g: f64| {
        k[(i, i)] += g;
        k[(j, j)] += g;
        k[(i, j)] -= g;
        k[(j, i)] -= g;
    };
    for i in 1..n {
        let j = rng.random_range(0..i);
        let g = log_uniform(&mut rng, 0.5, 200.0);
        link(&mut k, i, j, g);
    }
    for _ in 0..n / 2 {
        let i = rng.random_range(0..n);
        let j = rng.random_range(0..n);
        if i != j {
            let g = log_uniform(&mut rng, 0.5, 200.0);
            link(&mut k, i, j, g);
        }
    }
    let c: Vec<f64> = (0..n).map(|_| log_uniform(&mut rng, 1e4, 5e7)).collect();
    let mut u = DMatrix::<f64>::zeros(n, m);
    if boundary {
        for i in 0..n {
            if i == n - 1 || rng.random_bool(0.25) {
                u[(i, 0)] = log_uniform(&mut rng, 0.5, 50.0);
            }
        }
        u[(0, 1)] = log_uniform(&mut rng, 5.0, 50.0);
        for i in 0..n {
            k[(i, i)] += u[(i, 0)] + u[(i, 1)];
        }
    }
    for j in 2..m {
        let a = rng.random_range(0..n);
        let b = rng.random_range(0..n);
        u[(a, j)] += 0.6;
        u[(b, j)] += 0.4;
    }
    let mut kinds = vec![InputKind::Temperature, InputKind::Temperature];
    kinds.extend(std::iter::repeat_n(InputKind::HeatFlow, heat_inputs));
    RcSystem::new(c, k, u, kinds).expect("generated network is valid")
}

/// Hourly input samples `u_0 … u_hours` for a system from [`random_network`]: outdoor
/// `10 + 8 sin(annual) + 5 sin(daily)` (°C), ground `10 + 2 sin(annual)` (°C), heat inputs
/// piecewise constant, uniform in `heat_lo ..= heat_hi` (W), redrawn every hour.
pub fn input_series(
    seed: u64,
    m: usize,
    hours: usize,
    heat_lo: f64,
    heat_hi: f64,
) -> Vec<Vec<f64>> {
    let mut rng = ChaCha8Rng::seed_from_u64(seed ^ 0x5eed);
    let tau = std::f64::consts::TAU;
    (0..=hours)
        .map(|k| {
            let t = k as f64;
            let mut u = vec![
                10.0 + 8.0 * (tau * t / 8760.0 - 2.0).sin() + 5.0 * (tau * t / 24.0 - 1.0).sin(),
                10.0 + 2.0 * (tau * t / 8760.0 - 2.5).sin(),
            ];
            u.extend((2..m).map(|_| rng.random_range(heat_lo..=heat_hi)));
            u
        })
        .collect()
}

/// Largest absolute entry of `a − b`.
pub fn max_abs_diff(a: &DMatrix<f64>, b: &DMatrix<f64>) -> f64 {
    (a - b).amax()
}

/// Largest `|a − b|` relative to the largest entry of either.
pub fn max_rel_diff(a: &DMatrix<f64>, b: &DMatrix<f64>) -> f64 {
    (a - b).amax() / a.amax().max(b.amax()).max(f64::MIN_POSITIVE)
}

/// A one-node system: `H` (W/K) to outdoors, capacitance `C` (J/K), inputs
/// `[outdoor (°C), heat (W)]`.
pub fn one_node(h_w_k: f64, c_j_k: f64) -> RcSystem {
    RcSystem::new(
        vec![c_j_k],
        DMatrix::from_element(1, 1, h_w_k),
        DMatrix::from_row_slice(1, 2, &[h_w_k, 1.0]),
        vec![InputKind::Temperature, InputKind::HeatFlow],
    )
    .unwrap()
}
