//! Floors on the ground, ISO 13370 (simplified, steady part).
//!
//! For a slab on ground with characteristic dimension `B' = A/(0.5·P)` (A floor area, P exposed
//! perimeter) and equivalent thickness `d_t = w + λ_g·(R_si + R_f + R_se)`:
//!
//! ```text
//! d_t < B':  U = 2λ_g / (π·B' + d_t) · ln(π·B'/d_t + 1)
//! d_t ≥ B':  U = λ_g / (0.457·B' + d_t)
//! ```
//!
//! (ISO 13370:2017 §8.1, equations for slab-on-ground floors; formulas from memory of the
//! standard, checked in the tests against independent arithmetic.) Soil defaults to the
//! standard's "unknown soil" values λ_g = 2.0 W/(m·K), ρc = 2.0 MJ/(m³·K) [from memory].
//!
//! In the network the soil's steady resistance `1/U − R_si − R_f` sits between the floor's
//! outer face and a deep-ground temperature; the first part of it is a soil layer with mass
//! (0.5 m of soil, or less if the resistance is small), so the slab and the ground beneath it
//! store heat. The periodic (annual) part of ISO 13370 is not modelled; the deep-ground
//! temperature is constant.

/// Soil conductivity λ_g (W/(m·K)) when the soil is unknown.
pub const SOIL_CONDUCTIVITY: f64 = 2.0;
/// Soil heat capacity per volume ρc (J/(m³·K)) when the soil is unknown.
pub const SOIL_HEAT_CAPACITY: f64 = 2.0e6;
/// Thickness of the soil layer with mass under a floor (m).
pub const SOIL_LAYER_M: f64 = 0.5;

/// U-value (W/(m²·K)) of a slab on ground, ISO 13370 §8.1.
///
/// `area_m2` floor area, `perimeter_m` exposed perimeter, `wall_m` wall thickness `w`,
/// `r_floor` the floor construction's resistance (m²·K/W), `r_si` inside (0.17), `r_se` outside
/// (0.04) surface resistances.
pub fn slab_u_value(
    area_m2: f64,
    perimeter_m: f64,
    wall_m: f64,
    r_floor: f64,
    r_si: f64,
    r_se: f64,
) -> f64 {
    let lambda = SOIL_CONDUCTIVITY;
    let b = area_m2 / (0.5 * perimeter_m);
    let dt = wall_m + lambda * (r_si + r_floor + r_se);
    if dt < b {
        2.0 * lambda / (std::f64::consts::PI * b + dt) * (std::f64::consts::PI * b / dt + 1.0).ln()
    } else {
        lambda / (0.457 * b + dt)
    }
}

/// Split of the soil resistance between a soil layer with mass and a bare remainder.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SoilSplit {
    /// Thickness of the soil layer with mass (m).
    pub layer_m: f64,
    /// Resistance from the soil layer to the deep-ground temperature (m²·K/W).
    pub remainder_m2k_w: f64,
}

/// Splits the soil resistance `r_soil` (m²·K/W) into a layer with mass and a remainder.
pub fn split_soil(r_soil: f64) -> SoilSplit {
    let full = SOIL_LAYER_M / SOIL_CONDUCTIVITY;
    if r_soil > 2.0 * full {
        SoilSplit {
            layer_m: SOIL_LAYER_M,
            remainder_m2k_w: r_soil - full,
        }
    } else {
        let half = 0.5 * r_soil;
        SoilSplit {
            layer_m: half * SOIL_CONDUCTIVITY,
            remainder_m2k_w: half,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn slab_formula_by_hand() {
        // 10 m × 10 m slab, all four sides exposed (P = 40 m): B' = 100/20 = 5 m. Uninsulated
        // 150 mm concrete (λ 2.0 → R_f 0.075), w = 0.3: d_t = 0.3 + 2·(0.17+0.075+0.04) = 0.87.
        // U = 2·2/(π·5 + 0.87)·ln(π·5/0.87 + 1) = 4/16.5780·ln(19.0553) = 0.71103 (hand
        // arithmetic of the ISO 13370 §8.1 formula).
        let u = slab_u_value(100.0, 40.0, 0.3, 0.075, 0.17, 0.04);
        let b = 5.0f64;
        let dt = 0.87f64;
        let by_hand =
            4.0 / (std::f64::consts::PI * b + dt) * (std::f64::consts::PI * b / dt + 1.0).ln();
        assert!((u - by_hand).abs() < 1e-12);
        assert!((u - 0.711).abs() < 0.001, "{u}");
        // Well insulated: d_t ≥ B' branch, 3 × 3 m with P = 12 → B' = 1.5, R_f = 5 → d_t = 10.72.
        let u2 = slab_u_value(9.0, 12.0, 0.3, 5.0, 0.17, 0.04);
        assert!((u2 - 2.0 / (0.457 * 1.5 + 10.72)).abs() < 1e-12);
    }

    #[test]
    fn soil_split_keeps_the_total_resistance() {
        for r in [0.1, 0.4, 0.5, 0.6, 3.0] {
            let s = split_soil(r);
            let total = s.layer_m / SOIL_CONDUCTIVITY + s.remainder_m2k_w;
            assert!((total - r).abs() < 1e-12);
            assert!(s.layer_m > 0.0 && s.remainder_m2k_w > 0.0);
        }
    }
}
