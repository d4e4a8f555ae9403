//! Test-only networks shared by the unit tests of several modules (INVENTED values: they only
//! need to be physical and stiff).

use nalgebra::DMatrix;

use crate::{InputKind, RcSystem};

/// Adds a conductance `g` (W/K) between states `a` and `b` to the conductance matrix `k`.
pub(crate) fn link(k: &mut DMatrix<f64>, a: usize, b: usize, g: f64) {
    k[(a, a)] += g;
    k[(b, b)] += g;
    k[(a, b)] -= g;
    k[(b, a)] -= g;
}

/// A chain of `n` states (conductances 2–8 W/K, capacitances 1–3 × 10⁵ J/K), state 0 held to
/// an outdoor temperature input through 4 W/K, a heat input into state `n/2`: from 48 states
/// it takes faer's path.
pub(crate) fn chain_system(n: usize) -> RcSystem {
    let mut k = DMatrix::<f64>::zeros(n, n);
    for i in 0..n - 1 {
        link(&mut k, i, i + 1, 2.0 + (i % 7) as f64);
    }
    k[(0, 0)] += 4.0;
    let mut u = DMatrix::<f64>::zeros(n, 2);
    u[(0, 0)] = 4.0;
    u[(n / 2, 1)] = 1.0;
    let c: Vec<f64> = (0..n).map(|i| 1e5 * (1.0 + (i % 3) as f64)).collect();
    let kinds = vec![InputKind::Temperature, InputKind::HeatFlow];
    RcSystem::new(c, k, u, kinds).expect("a valid chain")
}
