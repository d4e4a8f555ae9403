//! Irradiance on a tilted, oriented plane ("transposition").
//!
//! Conventions, everywhere in dwell: surface **tilt** from horizontal (degrees; 0 = facing up,
//! 90 = vertical, 180 = facing down); surface **azimuth** of the outward normal clockwise from
//! north (degrees; 90 = east, 180 = south, 270 = west). Sun zenith and azimuth likewise.
//!
//! Plane irradiance = beam + sky diffuse + ground reflected:
//! - beam: `DNI · max(cos θ, 0)`, θ the angle of incidence
//!   (`cos θ = cos β cos z + sin β sin z cos(γ_s − γ)`);
//! - ground reflected (isotropic ground): `GHI · ρ · (1 − cos β)/2`;
//! - sky diffuse by a [`SkyModel`].

/// Model of the sky's diffuse radiance.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum SkyModel {
    /// Uniform sky: `DHI · (1 + cos β)/2`.
    ///
    /// ## Reference
    /// B. Y. H. Liu and R. C. Jordan, *The long-term average performance of flat-plate solar
    /// energy collectors*, Solar Energy 7(2), 53–74, 1963.
    Isotropic,
    /// Isotropic background plus a circumsolar part weighted by the anisotropy index
    /// `A = DNI/E₀`: `DHI · [(1 − A)(1 + cos β)/2 + A · R_b]`, with
    /// `R_b = max(cos θ, 0) / max(cos z, 0.01745)` (the floor on cos z as in pvlib).
    ///
    /// ## Reference
    /// J. E. Hay and J. A. Davies, *Calculation of the solar radiation incident on an inclined
    /// surface*, Proc. First Canadian Solar Radiation Data Workshop, 59–72, 1980.
    #[default]
    HayDavies,
    /// Isotropic background, circumsolar disc and horizon band, weighted by brightness
    /// coefficients F1, F2 that depend on the sky's clearness ε (8 bins), brightness
    /// Δ = DHI·AM/E₀ and zenith:
    /// `DHI · [(1 − F1)(1 + cos β)/2 + F1 · max(cos θ, 0)/max(cos z, cos 85°) + F2 sin β]`,
    /// with the 1990 all-sites composite coefficients and the Kasten & Young (1989) air mass.
    /// Zero when the sun is below the horizon or DHI is 0.
    ///
    /// ## Reference
    /// R. Perez, P. Ineichen, R. Seals, J. Michalsky and R. Stewart, *Modeling daylight
    /// availability and irradiance components from direct and global irradiance*, Solar Energy
    /// 44(5), 271–289, 1990; F. Kasten and A. T. Young, *Revised optical air mass tables and
    /// approximation formula*, Applied Optics 28(22), 4735–4738, 1989.
    Perez,
}

/// Perez et al. (1990) all-sites composite coefficients: for each clearness bin (ε edges
/// 1, 1.065, 1.23, 1.5, 1.95, 2.8, 4.5, 6.2) the rows (f11, f12, f13) and (f21, f22, f23).
const PEREZ_F1: [[f64; 3]; 8] = [
    [-0.008, 0.588, -0.062],
    [0.130, 0.683, -0.151],
    [0.330, 0.487, -0.221],
    [0.568, 0.187, -0.295],
    [0.873, -0.392, -0.362],
    [1.132, -1.237, -0.412],
    [1.060, -1.600, -0.359],
    [0.678, -0.327, -0.250],
];
const PEREZ_F2: [[f64; 3]; 8] = [
    [-0.060, 0.072, -0.022],
    [-0.019, 0.066, -0.029],
    [0.055, -0.064, -0.026],
    [0.109, -0.152, -0.014],
    [0.226, -0.462, 0.001],
    [0.288, -0.823, 0.056],
    [0.264, -1.127, 0.131],
    [0.156, -1.377, 0.251],
];
const PEREZ_EPS_EDGES: [f64; 7] = [1.065, 1.23, 1.5, 1.95, 2.8, 4.5, 6.2];

/// Relative optical air mass of Kasten & Young (1989) at apparent zenith `z` (degrees):
/// `1 / (cos z + 0.50572 (96.07995 − z)^−1.6364)`; `None` when the sun is below the horizon.
pub fn air_mass_kasten_young(apparent_zenith_deg: f64) -> Option<f64> {
    let z = apparent_zenith_deg;
    if z > 90.0 {
        return None;
    }
    Some(1.0 / (z.to_radians().cos() + 0.50572 * (96.07995 - z).powf(-1.6364)))
}

fn perez_sky(tilt_deg: f64, cos_t: f64, h: &SunHour) -> f64 {
    let Some(am) = air_mass_kasten_young(h.zenith_deg) else {
        return 0.0;
    };
    if h.dhi_w_m2 <= 0.0 {
        return 0.0;
    }
    const KAPPA: f64 = 1.041; // for zenith in radians
    let z = h.zenith_deg.to_radians();
    let delta = h.dhi_w_m2 * am / h.dni_extra_w_m2;
    let eps =
        ((h.dhi_w_m2 + h.dni_w_m2) / h.dhi_w_m2 + KAPPA * z.powi(3)) / (1.0 + KAPPA * z.powi(3));
    let bin = PEREZ_EPS_EDGES.iter().filter(|&&e| eps >= e).count();
    let (c1, c2) = (PEREZ_F1[bin], PEREZ_F2[bin]);
    let f1 = (c1[0] + c1[1] * delta + c1[2] * z).max(0.0);
    let f2 = c2[0] + c2[1] * delta + c2[2] * z;
    let a = cos_t.max(0.0);
    let b = z.cos().max(85f64.to_radians().cos());
    let beta = tilt_deg.to_radians();
    (h.dhi_w_m2 * (0.5 * (1.0 - f1) * (1.0 + beta.cos()) + f1 * a / b + f2 * beta.sin())).max(0.0)
}

impl std::str::FromStr for SkyModel {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, String> {
        match s.trim().to_ascii_lowercase().replace('_', "-").as_str() {
            "isotropic" => Ok(SkyModel::Isotropic),
            "hay-davies" | "haydavies" => Ok(SkyModel::HayDavies),
            "perez" => Ok(SkyModel::Perez),
            _ => Err(format!(
                "unknown sky model `{s}`; use isotropic, hay-davies or perez"
            )),
        }
    }
}

/// Irradiance on a plane, split into its parts (W/m², means over the hour).
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct PlaneIrradiance {
    /// Beam (direct) part on the plane (W/m²).
    pub beam_w_m2: f64,
    /// Sky diffuse part on the plane (W/m²), circumsolar included.
    pub sky_diffuse_w_m2: f64,
    /// Part reflected by the ground (W/m²).
    pub ground_reflected_w_m2: f64,
    /// Angle between the sun and the plane's normal (degrees, 0 … 180); above 90 the sun is
    /// behind the plane. Use it for an incidence-angle modifier of glazing.
    pub incidence_deg: f64,
}

impl PlaneIrradiance {
    /// Beam + sky diffuse + ground reflected (W/m²).
    pub fn total_w_m2(&self) -> f64 {
        self.beam_w_m2 + self.sky_diffuse_w_m2 + self.ground_reflected_w_m2
    }
}

/// Cosine of the angle of incidence of the sun on a plane, clipped to −1 … 1 (may be negative:
/// sun behind the plane).
pub fn cos_incidence(
    tilt_deg: f64,
    azimuth_deg: f64,
    zenith_deg: f64,
    sun_azimuth_deg: f64,
) -> f64 {
    let (b, z) = (tilt_deg.to_radians(), zenith_deg.to_radians());
    let c =
        b.cos() * z.cos() + b.sin() * z.sin() * (sun_azimuth_deg - azimuth_deg).to_radians().cos();
    c.clamp(-1.0, 1.0)
}

/// One hour's sun and irradiance, the input of [`transpose`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SunHour {
    /// Apparent solar zenith (degrees).
    pub zenith_deg: f64,
    /// Solar azimuth clockwise from north (degrees).
    pub azimuth_deg: f64,
    /// Direct normal irradiance (W/m²).
    pub dni_w_m2: f64,
    /// Global horizontal irradiance (W/m²).
    pub ghi_w_m2: f64,
    /// Diffuse horizontal irradiance (W/m²).
    pub dhi_w_m2: f64,
    /// Extraterrestrial normal irradiance (W/m²), for the anisotropy index.
    pub dni_extra_w_m2: f64,
}

/// Irradiance on a plane of tilt `tilt_deg` and azimuth `azimuth_deg` (see module docs), with
/// ground reflectance `albedo` (0 … 1). Same equations as pvlib 0.16
/// `irradiance.get_total_irradiance(model='isotropic' | 'haydavies' | 'perez')` (Perez with
/// the 1990 all-sites coefficients and Kasten–Young air mass).
pub fn transpose(
    sky: SkyModel,
    tilt_deg: f64,
    azimuth_deg: f64,
    albedo: f64,
    h: &SunHour,
) -> PlaneIrradiance {
    let cos_t = cos_incidence(tilt_deg, azimuth_deg, h.zenith_deg, h.azimuth_deg);
    let cos_b = tilt_deg.to_radians().cos();
    let beam = (h.dni_w_m2 * cos_t).max(0.0);
    let ground = h.ghi_w_m2 * albedo * (1.0 - cos_b) * 0.5;
    let sky_diffuse = match sky {
        SkyModel::Isotropic => h.dhi_w_m2 * (1.0 + cos_b) * 0.5,
        SkyModel::HayDavies => {
            let rb = cos_t.max(0.0) / h.zenith_deg.to_radians().cos().max(0.01745);
            let ai = if h.dni_extra_w_m2 > 0.0 {
                h.dni_w_m2 / h.dni_extra_w_m2
            } else {
                0.0
            };
            (h.dhi_w_m2 * (1.0 - ai) * (1.0 + cos_b) * 0.5).max(0.0)
                + (h.dhi_w_m2 * ai * rb).max(0.0)
        }
        SkyModel::Perez => perez_sky(tilt_deg, cos_t, h),
    };
    PlaneIrradiance {
        beam_w_m2: beam,
        sky_diffuse_w_m2: sky_diffuse,
        ground_reflected_w_m2: ground,
        incidence_deg: cos_t.acos().to_degrees(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const CASE: SunHour = SunHour {
        zenith_deg: 60.0,
        azimuth_deg: 180.0,
        dni_w_m2: 600.0,
        ghi_w_m2: 500.0,
        dhi_w_m2: 200.0,
        dni_extra_w_m2: 1367.0,
    };

    #[test]
    fn vertical_south_isotropic_reference_case() {
        // CHECKS.md "Sun" transposition case (Liu & Jordan 1963, reproduced with pvlib 0.16):
        // beam 519.6152 + sky 100.0 + ground 50.0 = 669.6152 W/m². Closed form: 600·cos 30°.
        let p = transpose(SkyModel::Isotropic, 90.0, 180.0, 0.2, &CASE);
        assert!((p.beam_w_m2 - 519.6152).abs() < 1e-4);
        assert!((p.sky_diffuse_w_m2 - 100.0).abs() < 1e-9);
        assert!((p.ground_reflected_w_m2 - 50.0).abs() < 1e-9);
        assert!((p.total_w_m2() - 669.6152).abs() < 1e-4);
        assert!((p.incidence_deg - 30.0).abs() < 1e-9);
    }

    #[test]
    fn vertical_south_hay_davies_reference_case() {
        // CHECKS.md "Sun": Hay & Davies (1980) total 777.7689 W/m² [pvlib 0.16 haydavies].
        let p = transpose(SkyModel::HayDavies, 90.0, 180.0, 0.2, &CASE);
        assert!(
            (p.total_w_m2() - 777.7689).abs() < 1e-4,
            "{}",
            p.total_w_m2()
        );
    }

    #[test]
    fn horizontal_plane_receives_ghi() {
        // Closure: on a horizontal plane beam + isotropic sky = DNI cos z + DHI.
        let p = transpose(SkyModel::Isotropic, 0.0, 123.0, 0.2, &CASE);
        assert!((p.total_w_m2() - (600.0 * 0.5 + 200.0)).abs() < 1e-9);
    }

    #[test]
    fn sun_behind_the_plane_gives_no_beam() {
        let p = transpose(SkyModel::HayDavies, 90.0, 0.0, 0.2, &CASE);
        assert_eq!(p.beam_w_m2, 0.0);
        assert!(p.incidence_deg > 90.0);
    }
}
