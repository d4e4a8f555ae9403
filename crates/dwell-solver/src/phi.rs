//! The scalar φ-functions of `z = −λh ≤ 0`, computed without cancellation.
//!
//! ```text
//! φ₀(z) = e^z,   φ_{k+1}(z) = (φ_k(z) − 1/k!) / z,   φ_k(0) = 1/k!
//! φ_k(z) = ∫₀¹ e^{(1−θ) z} θ^{k−1}/(k−1)! dθ = Σ_{j≥0} z^j / (j+k)!
//! ```
//!
//! For `|z| < 1` the Taylor series is summed (24 terms: the remainder is below
//! `1/26! ≈ 2.5e-27` relative); otherwise `φ₁ = −expm1(−μ)/μ` and the recurrence, which loses
//! at most a factor 4 of accuracy at `|z| = 1` and less beyond. Exact at `λ = 0`.
//!
//! ## Reference
//!
//! M. Hochbruck and A. Ostermann, "Exponential integrators", Acta Numerica 19, 209–286
//! (2010), §2.1 (definition and recurrence of the φ-functions).

/// `[φ₀(−μ), φ₁(−μ), φ₂(−μ), φ₃(−μ)]` for `μ = λh ≥ 0` (dimensionless).
pub(crate) fn phi0123(mu: f64) -> [f64; 4] {
    debug_assert!(mu >= 0.0, "mu = {mu} must be non-negative");
    if mu < 1.0 {
        by_series(mu)
    } else {
        by_recurrence(mu)
    }
}

/// Taylor series branch (accurate for `μ < 1`).
fn by_series(mu: f64) -> [f64; 4] {
    let z = -mu;
    let mut out = [0.0; 4];
    for (k, slot) in out.iter_mut().enumerate() {
        // Horner on Σ_{j=0}^{23} z^j/(j+k)!  =  1/k! (1 + z/(k+1) (1 + z/(k+2) (…))).
        let mut acc = 1.0;
        for j in (1..=24).rev() {
            acc = 1.0 + acc * z / (k + j) as f64;
        }
        *slot = acc / factorial(k);
    }
    out
}

/// `expm1` and recurrence branch (accurate for `μ ≥ 1`, within a factor 10 of it below).
fn by_recurrence(mu: f64) -> [f64; 4] {
    let z = -mu;
    let p0 = (-mu).exp();
    let p1 = -(-mu).exp_m1() / mu;
    let p2 = (p1 - 1.0) / z;
    let p3 = (p2 - 0.5) / z;
    [p0, p1, p2, p3]
}

fn factorial(k: usize) -> f64 {
    (1..=k).map(|i| i as f64).product()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn values_at_zero_are_inverse_factorials() {
        assert_eq!(phi0123(0.0), [1.0, 1.0, 0.5, 1.0 / 6.0]);
    }

    #[test]
    fn branches_agree_near_the_switch_point() {
        // Both branches evaluated at the same μ on either side of the switch at μ = 1.
        for mu in [0.9, 1.0, 1.1] {
            let below = by_series(mu);
            let above = by_recurrence(mu);
            for k in 0..4 {
                assert!(
                    (below[k] - above[k]).abs() < 2e-15,
                    "μ={mu} φ_{k}: {} vs {}",
                    below[k],
                    above[k]
                );
            }
        }
    }

    #[test]
    fn closed_forms_at_moderate_and_large_arguments() {
        // φ₂(−μ) = (e^{−μ} − 1 + μ)/μ², φ₃(−μ) = (μ²/2 − μ + 1 − e^{−μ})/μ³, exact in f64 at
        // μ = 30 to about 1e-15 relative (no cancellation there).
        for mu in [3.0_f64, 30.0, 1e6] {
            let e = (-mu).exp();
            let want = [
                e,
                (1.0 - e) / mu,
                (e - 1.0 + mu) / (mu * mu),
                (mu * mu / 2.0 - mu + 1.0 - e) / mu.powi(3),
            ];
            let got = phi0123(mu);
            for k in 0..4 {
                assert!(
                    (got[k] - want[k]).abs() <= 1e-14 * want[k].abs(),
                    "μ={mu} φ_{k}: {} vs {}",
                    got[k],
                    want[k]
                );
            }
        }
    }

    #[test]
    fn small_arguments_match_the_series_leading_terms() {
        // φ_k(−μ) ≈ 1/k! − μ/(k+1)! for μ = 1e-9 (next term ~1e-18, below the tolerance).
        let mu = 1e-9;
        let got = phi0123(mu);
        let want = [
            1.0 - mu,
            1.0 - mu / 2.0,
            0.5 - mu / 6.0,
            1.0 / 6.0 - mu / 24.0,
        ];
        for k in 0..4 {
            assert!(
                (got[k] - want[k]).abs() < 1e-16,
                "φ_{k}: {} vs {}",
                got[k],
                want[k]
            );
        }
    }
}
