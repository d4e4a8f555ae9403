//! Indoor temperature predicted by a candidate model over measured inputs (an output-error
//! simulation), stepped exactly by `dwell_solver`.
//!
//! Step `k → k+1` holds the heat input `P_{k+1} + A_s·I_{k+1} + Q₀` (W) over the interval —
//! the data give heating and irradiance as means over the interval ending at the stamp — and
//! takes the outdoor temperature linear from `To_k` to `To_{k+1}` (first-order hold). With
//! these inputs the discrete model is exact ([`dwell_solver::Discretization`], modal route).

use dwell_solver::{Discretization, Readout, Route, Stepper};

use crate::data::MeasuredData;
use crate::error::CalibrateError;
use crate::structure::RcParams;

/// Predicted indoor air temperature at every instant of `data` (°C), starting from the first
/// measured indoor temperature and the parameters' initial mass temperatures.
pub fn predict(p: &RcParams, data: &MeasuredData) -> Result<Vec<f64>, CalibrateError> {
    let mut out = vec![0.0; data.len()];
    predict_into(p, data, &mut out)?;
    Ok(out)
}

/// As [`predict`], into `out` (length `data.len()`).
pub fn predict_into(
    p: &RcParams,
    data: &MeasuredData,
    out: &mut [f64],
) -> Result<(), CalibrateError> {
    let sys = p.system()?;
    let disc = Discretization::new(&sys, data.step_s, Route::Modal)?;
    let n = sys.states();
    let mut stepper = Stepper::new(&disc, &Readout::nodes(&[0], n, 2), &Readout::empty(n, 2))?;
    let mut x0 = vec![data.indoor_c[0]];
    x0.extend(p.initial_c.iter().copied());
    stepper.set_state(&x0);
    out[0] = data.indoor_c[0];
    let mut uk = [0.0; 2];
    let mut un = [0.0; 2];
    for k in 0..data.len() - 1 {
        let sun = data.solar_w_m2.as_ref().map_or(0.0, |s| s[k + 1]);
        let heat = data.heating_w[k + 1] + p.aperture_m2 * sun + p.gain_w;
        uk[0] = data.outdoor_c[k];
        uk[1] = heat;
        un[0] = data.outdoor_c[k + 1];
        un[1] = heat;
        stepper.step(&uk, &un);
        out[k + 1] = stepper.instant()[0];
    }
    Ok(())
}

/// Time constants of a parameter set (s), longest first.
pub fn time_constants_s(p: &RcParams, step_s: f64) -> Result<Vec<f64>, CalibrateError> {
    let sys = p.system()?;
    Ok(Discretization::new(&sys, step_s, Route::Modal)?.time_constants_s())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::structure::Order;

    #[test]
    fn one_node_free_cooling_matches_closed_form() {
        // One node, H = 200 W/K, C = 20 MJ/K, 20 °C start, 0 °C outside, no heat:
        // T(8 h) = 20·exp(−8·3600·200/20e6) = 14.99523 °C (analytic; also CHECKS.md [lib]).
        let p = RcParams {
            order: Order::One,
            h_ie_w_k: 200.0,
            h_eo_w_k: 0.0,
            h_im_w_k: 0.0,
            c_i_j_k: 20e6,
            c_e_j_k: 0.0,
            c_m_j_k: 0.0,
            aperture_m2: 0.0,
            gain_w: 0.0,
            initial_c: vec![],
        };
        let mut text = String::from("time,indoor_c,outdoor_c,heating_w\n");
        for h in 0..=8 {
            text.push_str(&format!(
                "2025-01-06T{h:02}:00+00:00,{},0,0\n",
                if h == 0 { "20" } else { "" }
            ));
        }
        let d = crate::data::parse_measured(&text, "t").unwrap();
        let y = predict(&p, &d).unwrap();
        assert!((y[8] - 20.0 * (-8.0f64 * 3600.0 * 200.0 / 20e6).exp()).abs() < 1e-9);
        assert!((y[8] - 14.99523).abs() < 1e-5);
    }
}
