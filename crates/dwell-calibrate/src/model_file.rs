//! The fitted model as a dwell model file: one zone (the air node), the masses as a raw
//! `network`, a heater and, where fitted, a horizontal glazed opening carrying the aperture.
//!
//! The zone's air capacitance in a model file is `1200·V + 1000·furnishing·A` (J/K,
//! `dwell_model` compile); the writer keeps the floor area given, takes a volume of 2.5 m per
//! m² of floor (less if the fitted air capacitance is smaller than that air alone) and puts
//! the rest into the furnishing capacity so that the sum equals the fitted `C_i`. The
//! aperture becomes a horizontal opening with `g = 1`, no frame, area `A_s` and a
//! negligible U-value (10⁻⁶ W/m²K), since the data's irradiance is global horizontal; an
//! unmeasured gain becomes a raw heat input.

use serde_json::{json, Value};

use crate::fit::Calibration;
use crate::structure::Order;

/// Options of the written model.
#[derive(Clone, Debug)]
pub struct ModelFileOptions {
    /// Name of the model.
    pub name: String,
    /// Floor area (m²) of the one zone.
    pub floor_area_m2: f64,
    /// Heater capacity (W).
    pub heater_capacity_w: f64,
    /// Setpoint of the heater (°C).
    pub setpoint_c: f64,
    /// Site: latitude (°), longitude (°), UTC offset (h).
    pub site: (f64, f64, f64),
}

/// The model file (JSON) of a calibration.
pub fn model_file(cal: &Calibration, opts: &ModelFileOptions, source: &str) -> Value {
    let p = &cal.params;
    let area = opts.floor_area_m2;
    let mut volume = 2.5 * area;
    if 1200.0 * volume > p.c_i_j_k {
        volume = 0.9 * p.c_i_j_k / 1200.0;
    }
    let furnishing = (p.c_i_j_k - 1200.0 * volume) / (1000.0 * area);
    let mut nodes = Vec::new();
    let mut links = Vec::new();
    match p.order {
        Order::One => {
            links.push(json!({"id": "air_to_outdoor", "from": "house", "to": "outdoor", "conductance_w_k": p.h_ie_w_k, "group": "walls"}));
        }
        Order::Two | Order::Three => {
            nodes.push(json!({"id": "envelope", "capacitance_j_k": p.c_e_j_k}));
            links.push(json!({"id": "air_to_envelope", "from": "house", "to": "envelope", "conductance_w_k": p.h_ie_w_k}));
            links.push(json!({"id": "envelope_to_outdoor", "from": "envelope", "to": "outdoor", "conductance_w_k": p.h_eo_w_k, "group": "walls"}));
            if p.order == Order::Three {
                nodes.push(json!({"id": "interior", "capacitance_j_k": p.c_m_j_k}));
                links.push(json!({"id": "air_to_interior", "from": "house", "to": "interior", "conductance_w_k": p.h_im_w_k}));
            }
        }
    }
    let mut network = json!({"nodes": nodes, "links": links});
    if p.gain_w > 0.0 {
        network["heat_inputs"] =
            json!([{"id": "unmeasured_gains", "node": "house", "power_w": p.gain_w}]);
    }
    let mut m = json!({
        "name": opts.name,
        "description": format!(
            "Fitted by dwell calibrate (order {}) from {source}: HLC {:.1} W/K (95 % {:.1} … {:.1}), RMSE {:.3} K. A grey-box model of the whole house as one zone; its parameters are estimates, not a survey.",
            cal.order, cal.hlc_w_k.value, cal.hlc_w_k.lo95, cal.hlc_w_k.hi95, cal.residuals.rmse_k
        ),
        "site": {"latitude_deg": opts.site.0, "longitude_deg": opts.site.1, "utc_offset_h": opts.site.2},
        "zones": [{"id": "house", "floor_area_m2": area, "volume_m3": volume, "furnishing_kj_m2k": furnishing}],
        "network": network,
        "heaters": [{"id": "heater", "zone": "house", "capacity_w": opts.heater_capacity_w, "setpoint_c": opts.setpoint_c}],
    });
    if p.aperture_m2 > 0.0 {
        m["openings"] = json!([{
            "id": "solar_aperture", "zone": "house", "other_side": "outdoor", "kind": "window",
            "area_m2": p.aperture_m2, "u_value_w_m2k": 1e-6, "g_value": 1.0, "frame_fraction": 0.0,
            "azimuth_deg": 180.0, "tilt_deg": 0.0
        }]);
    }
    m
}
