//! Levenberg–Marquardt least squares on nalgebra, with a forward-difference Jacobian.
//!
//! Minimises `½‖r(θ)‖²`. Each iteration solves `(JᵀJ + μ·diag(JᵀJ)) δ = −Jᵀr` (Marquardt's
//! scaled damping) and updates `μ` by the gain ratio ρ as in Nielsen (1999), *Damping
//! parameter in Marquardt's method*, IMM-REP-1999-05, DTU (cited from memory): on success
//! `μ ← μ·max(1/3, 1 − (2ρ − 1)³)`, on failure `μ ← μ·ν`, `ν ← 2ν`.
//!
//! Why our own rather than the `levenberg-marquardt` crate: that crate is generic over
//! nalgebra's storage and pins its own nalgebra major version, which would put a second
//! nalgebra in the build next to the workspace's 0.34 (as far as we know its latest release
//! depends on 0.33 — from memory, unverified); we also need the Jacobian at the optimum for
//! the covariance, a residual that may fail (a candidate the solver refuses counts as a
//! rejected step) and no more than ~80 lines of code. The Jacobian is by forward
//! differences because each residual is a full simulation and the model has ≤ 10 parameters.

use nalgebra::{DMatrix, DVector};

/// The result of a fit.
#[derive(Clone, Debug)]
pub struct LmResult {
    /// Parameters at the optimum.
    pub theta: Vec<f64>,
    /// Residuals at the optimum.
    pub residuals: Vec<f64>,
    /// Jacobian of the residuals at the optimum (rows: residuals, columns: parameters).
    pub jacobian: DMatrix<f64>,
    /// Iterations used.
    pub iterations: usize,
    /// True if a convergence test was met (not stopped by the iteration limit).
    pub converged: bool,
}

fn jacobian<F>(f: &mut F, th: &[f64], r0: &[f64]) -> Option<DMatrix<f64>>
where
    F: FnMut(&[f64]) -> Option<Vec<f64>>,
{
    let mut j = DMatrix::zeros(r0.len(), th.len());
    let mut t = th.to_vec();
    for c in 0..th.len() {
        let h = 1e-6 * th[c].abs().max(1.0);
        t[c] = th[c] + h;
        let r = f(&t)?;
        for i in 0..r0.len() {
            j[(i, c)] = (r[i] - r0[i]) / h;
        }
        t[c] = th[c];
    }
    Some(j)
}

fn ssq(r: &[f64]) -> f64 {
    r.iter().map(|x| x * x).sum()
}

/// Minimises the sum of squares of `f(θ)` from `theta0`; `f` returns `None` for a θ that
/// cannot be evaluated. Returns `None` if `f(theta0)` cannot be evaluated.
pub fn levenberg_marquardt<F>(mut f: F, theta0: &[f64], max_iter: usize) -> Option<LmResult>
where
    F: FnMut(&[f64]) -> Option<Vec<f64>>,
{
    let p = theta0.len();
    let mut th = theta0.to_vec();
    let mut r = f(&th)?;
    let mut j = jacobian(&mut f, &th, &r)?;
    let mut mu = 1e-3;
    let mut nu = 2.0;
    let mut converged = false;
    let mut it = 0;
    while it < max_iter {
        it += 1;
        let jtj = j.transpose() * &j;
        let g = j.transpose() * DVector::from_column_slice(&r);
        if g.amax() < 1e-12 * (1.0 + ssq(&r)) {
            converged = true;
            break;
        }
        let mut a = jtj.clone();
        for d in 0..p {
            a[(d, d)] += mu * jtj[(d, d)].max(1e-12);
        }
        let Some(delta) = a.clone().cholesky().map(|c| c.solve(&(-&g))) else {
            mu *= nu;
            nu *= 2.0;
            continue;
        };
        let cand: Vec<f64> = th.iter().zip(delta.iter()).map(|(a, b)| a + b).collect();
        let f0 = ssq(&r);
        match f(&cand) {
            Some(rc) if ssq(&rc).is_finite() => {
                let f1 = ssq(&rc);
                // Predicted decrease: δᵀ(μ·D δ − g) (Nielsen 1999).
                let mut pred = 0.0;
                for d in 0..p {
                    pred += delta[d] * (mu * jtj[(d, d)].max(1e-12) * delta[d] - g[d]);
                }
                let rho = (f0 - f1) / pred.max(1e-300);
                if rho > 0.0 {
                    let small_step = delta
                        .iter()
                        .zip(th.iter())
                        .all(|(d, t)| d.abs() <= 1e-9 * (t.abs() + 1e-6));
                    let small_gain = (f0 - f1) <= 1e-12 * f0;
                    th = cand;
                    r = rc;
                    j = jacobian(&mut f, &th, &r)?;
                    mu *= (1.0f64 / 3.0).max(1.0 - (2.0 * rho - 1.0).powi(3));
                    nu = 2.0;
                    if small_step || small_gain {
                        converged = true;
                        break;
                    }
                } else {
                    mu *= nu;
                    nu *= 2.0;
                }
            }
            _ => {
                mu *= nu;
                nu *= 2.0;
            }
        }
        if mu > 1e16 {
            converged = true;
            break;
        }
    }
    Some(LmResult {
        theta: th,
        residuals: r,
        jacobian: j,
        iterations: it,
        converged,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rosenbrock_minimum() {
        // Rosenbrock as least squares r = (10(y − x²), 1 − x): minimum at (1, 1) (analytic).
        let res = levenberg_marquardt(
            |t| Some(vec![10.0 * (t[1] - t[0] * t[0]), 1.0 - t[0]]),
            &[-1.2, 1.0],
            200,
        )
        .unwrap();
        assert!(
            (res.theta[0] - 1.0).abs() < 1e-6 && (res.theta[1] - 1.0).abs() < 1e-6,
            "{:?}",
            res.theta
        );
        assert!(res.converged);
    }

    #[test]
    fn exponential_decay_fit() {
        // y = 3·exp(−0.5 t) sampled exactly: recovered to 1e-6 (analytic).
        let ts: Vec<f64> = (0..20).map(|i| i as f64 * 0.25).collect();
        let res = levenberg_marquardt(
            |t| {
                Some(
                    ts.iter()
                        .map(|x| t[0] * (-t[1] * x).exp() - 3.0 * (-0.5 * x).exp())
                        .collect(),
                )
            },
            &[1.0, 0.1],
            200,
        )
        .unwrap();
        assert!((res.theta[0] - 3.0).abs() < 1e-6 && (res.theta[1] - 0.5).abs() < 1e-6);
    }
}
