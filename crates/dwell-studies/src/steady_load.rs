//! Steady design heat load per zone, in the manner of EN 12831.
//!
//! Every heated zone's air is held at its design indoor temperature θ_int (°C, the zone's
//! `design_indoor_c`); outdoor air is at the design outdoor temperature θ_e, the ground at
//! θ_g, fixed boundaries at their own temperatures; no sun, no gains. Unheated zones and every
//! other node float to the network's own steady state. With the states split into held air
//! nodes `F` and free nodes `f`, the steady network `K x = U u + P q` gives
//!
//! ```text
//! x_f = K_ff⁻¹ (U_f u − K_fF x_F)          (a Schur-complement / partitioned solve)
//! Φ_F = K_FF x_F + K_Ff x_f − U_F u        heat each held air node must receive (W)
//! ```
//!
//! so flows to and from unheated zones, and between heated zones at different design
//! temperatures, come from the network rather than from tabulated temperature-reduction
//! factors. In EN 12831 terms (EN 12831-1:2017 §6.3; clause numbers from memory), Φ_HL,i =
//! Φ_T,i + Φ_V,i where Φ_T sums H_T·(θ_int − θ_e) over elements, with the factor
//! b_u = (θ_int − θ_u)/(θ_int − θ_e) for elements to unheated spaces; here θ_u is solved, not
//! looked up. Φ_V uses the model's ρc_p = 1200 J/(m³·K) (EN 12831 uses 0.34 W·h/(m³·K) =
//! 1224 J/(m³·K): 2 % more ventilation loss). The EN 12831 ground factors f_g1 (annual swing)
//! and G_w (ground water) are not applied: the ground is a steady temperature θ_g.
//!
//! The breakdown by element uses `house.losses`: each element or airflow is a chain between
//! its zone's air and one other temperature, so in steady state its flow is `H·(θ_zone −
//! θ_other)` exactly. Heat through paths the element list cannot see (raw network nodes) is
//! the zone's remainder, `other_w`. The heat is delivered to the zone's air; a heater that
//! warms a surface (underfloor heating) loses a little more through that surface, which the
//! dynamic study sees and this one does not.

use std::collections::BTreeMap;

use dwell_model::{House, InputRole};
use nalgebra::{DMatrix, DVector};
use serde::Serialize;

use crate::StudyError;

/// Design conditions of the steady load.
#[derive(Clone, Debug, PartialEq)]
pub struct DesignConditions {
    /// Design outdoor temperature θ_e (°C).
    pub outdoor_c: f64,
    /// Ground temperature θ_g (°C) under ground floors.
    pub ground_c: f64,
}

/// Steady design heat load of one zone.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct ZoneSteadyLoad {
    /// Zone id.
    pub zone: String,
    /// Whether the zone is heated (held at its design temperature).
    pub heated: bool,
    /// Zone air temperature (°C): the design indoor temperature if heated, else the steady
    /// temperature it floats to.
    pub air_c: f64,
    /// Heat the zone's air must receive (W); 0 for unheated zones.
    pub steady_w: f64,
    /// Heat leaving through each element group to outdoors, ground or fixed boundaries (W):
    /// `walls`, `roof`, `floor_ground`, `windows`, `doors`, `ventilation`, `links`.
    pub by_group_w: BTreeMap<String, f64>,
    /// Fabric part Φ_T (W): every group but ventilation, plus heat to other zones.
    pub fabric_w: f64,
    /// Ventilation part Φ_V (W): air from outdoors.
    pub ventilation_w: f64,
    /// Heat passing to each other zone (W, negative = received), through walls, floors,
    /// openings and air exchange.
    pub to_zones_w: BTreeMap<String, f64>,
    /// Heat through paths not listed as elements (raw network nodes) (W).
    pub other_w: f64,
    /// Heat per element or airflow (W), by element id.
    pub by_element_w: BTreeMap<String, f64>,
}

/// The steady design heat load of a house.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct SteadyLoad {
    /// Design outdoor temperature (°C).
    pub outdoor_c: f64,
    /// Ground temperature (°C).
    pub ground_c: f64,
    /// Per zone, in file order.
    pub zones: Vec<ZoneSteadyLoad>,
    /// Sum over heated zones (W).
    pub total_w: f64,
    /// Heat leaving the house by element group (W), from the network's own boundary-flow
    /// readouts (equals the sum over zones of `by_group_w`).
    pub house_by_group_w: BTreeMap<String, f64>,
}

/// The input vector `u` of the design conditions: outdoor, ground and boundary temperatures;
/// every heat input 0.
pub fn design_inputs(house: &House, c: &DesignConditions) -> Vec<f64> {
    house
        .inputs
        .iter()
        .map(|r| match r {
            InputRole::OutdoorAir => c.outdoor_c,
            InputRole::Ground => c.ground_c,
            InputRole::Boundary { temperature_c } => *temperature_c,
            _ => 0.0,
        })
        .collect()
}

/// Steady state with the air of every zone in `held` fixed at the given temperature (°C) and
/// everything else free, under inputs `u`. Returns `(x, Φ)` with `Φ[k]` the heat (W) the
/// held node `k` must receive. Fails if the free part has no path to a boundary.
pub fn held_steady_state(
    house: &House,
    held: &[(usize, f64)],
    u: &[f64],
) -> Result<(Vec<f64>, Vec<f64>), StudyError> {
    let sys = &house.network.system;
    let k = &sys.conductance;
    let n = k.nrows();
    let fixed: Vec<usize> = held
        .iter()
        .map(|(zi, _)| house.zones[*zi].air_state)
        .collect();
    let free: Vec<usize> = (0..n).filter(|i| !fixed.contains(i)).collect();
    let uu = &sys.input * DVector::from_column_slice(u);
    let mut x = vec![0.0; n];
    for (&i, &(_, t)) in fixed.iter().zip(held) {
        x[i] = t;
    }
    if !free.is_empty() {
        let kff = DMatrix::from_fn(free.len(), free.len(), |a, b| k[(free[a], free[b])]);
        let rhs = DVector::from_fn(free.len(), |a, _| {
            uu[free[a]] - fixed.iter().map(|&j| k[(free[a], j)] * x[j]).sum::<f64>()
        });
        let sol = kff.lu().solve(&rhs).ok_or_else(|| {
            StudyError::Option(
                "the unheated part of the house has no steady state (a node with no path to outdoors, ground or a heated zone); run `dwell check` and connect it"
                    .into(),
            )
        })?;
        for (a, &i) in free.iter().enumerate() {
            x[i] = sol[a];
        }
    }
    let phi = fixed
        .iter()
        .map(|&i| (0..n).map(|j| k[(i, j)] * x[j]).sum::<f64>() - uu[i])
        .collect();
    Ok((x, phi))
}

/// Computes the steady design heat load of every zone.
pub fn steady_load(house: &House, c: &DesignConditions) -> Result<SteadyLoad, StudyError> {
    let u = design_inputs(house, c);
    let held: Vec<(usize, f64)> = house
        .zones
        .iter()
        .enumerate()
        .filter(|(_, z)| z.heated)
        .map(|(i, z)| (i, z.design_indoor_c))
        .collect();
    let (x, phi) = held_steady_state(house, &held, &u)?;
    let air: Vec<f64> = house.zones.iter().map(|z| x[z.air_state]).collect();
    let boundary_temp = |side: &str| -> Option<f64> {
        if side == dwell_model::OUTDOOR {
            return Some(c.outdoor_c);
        }
        if side == dwell_model::GROUND {
            return Some(c.ground_c);
        }
        if let Some(zi) = house.zones.iter().position(|z| z.id == side) {
            return Some(air[zi]);
        }
        house
            .network
            .inputs
            .iter()
            .zip(&house.inputs)
            .find_map(|(info, r)| match r {
                InputRole::Boundary { temperature_c }
                    if info.name == format!("boundary_{side}_c") =>
                {
                    Some(*temperature_c)
                }
                _ => None,
            })
    };
    let mut zones: Vec<ZoneSteadyLoad> = house
        .zones
        .iter()
        .enumerate()
        .map(|(zi, z)| ZoneSteadyLoad {
            zone: z.id.clone(),
            heated: z.heated,
            air_c: air[zi],
            steady_w: held
                .iter()
                .position(|(h, _)| *h == zi)
                .map(|k| phi[k])
                .unwrap_or(0.0),
            by_group_w: dwell_model::GROUPS
                .iter()
                .map(|g| (g.to_string(), 0.0))
                .collect(),
            fabric_w: 0.0,
            ventilation_w: 0.0,
            to_zones_w: BTreeMap::new(),
            other_w: 0.0,
            by_element_w: BTreeMap::new(),
        })
        .collect();
    for l in &house.losses {
        let Some(t_other) = boundary_temp(&l.other_side) else {
            continue;
        };
        let q = l.h_w_k * (air[l.zone] - t_other);
        let other_zone = house.zones.iter().position(|z| z.id == l.other_side);
        *zones[l.zone]
            .by_element_w
            .entry(l.id.clone())
            .or_insert(0.0) += q;
        match other_zone {
            Some(oz) => {
                *zones[l.zone]
                    .to_zones_w
                    .entry(l.other_side.clone())
                    .or_insert(0.0) += q;
                let me = house.zones[l.zone].id.clone();
                *zones[oz].to_zones_w.entry(me).or_insert(0.0) -= q;
                *zones[oz].by_element_w.entry(l.id.clone()).or_insert(0.0) -= q;
            }
            None => {
                *zones[l.zone]
                    .by_group_w
                    .entry(l.group.to_string())
                    .or_insert(0.0) += q
            }
        }
    }
    for z in &mut zones {
        z.ventilation_w = z.by_group_w["ventilation"];
        let listed: f64 = z.by_group_w.values().sum::<f64>() + z.to_zones_w.values().sum::<f64>();
        z.other_w = if z.heated {
            z.steady_w - listed
        } else {
            -listed
        };
        if z.other_w.abs() < 1e-9 * z.steady_w.abs().max(1.0) {
            z.other_w = 0.0;
        }
        z.fabric_w = z.steady_w - z.ventilation_w;
    }
    let house_by_group_w = house
        .network
        .boundary_flow
        .iter()
        .map(|(g, map)| (g.clone(), map.eval(&x, &u)))
        .collect();
    Ok(SteadyLoad {
        outdoor_c: c.outdoor_c,
        ground_c: c.ground_c,
        total_w: zones.iter().filter(|z| z.heated).map(|z| z.steady_w).sum(),
        zones,
        house_by_group_w,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn house(text: &str) -> House {
        let m = dwell_model::parse_model(text, "t.json").unwrap();
        dwell_model::compile(&m, "t.json").unwrap()
    }

    const BOX: &str = r#"{
      "materials": [
        {"id": "conc", "conductivity_w_mk": 2.0, "density_kg_m3": 2400, "specific_heat_j_kgk": 1000},
        {"id": "wool", "conductivity_w_mk": 0.04, "density_kg_m3": 30, "specific_heat_j_kgk": 1030}
      ],
      "constructions": [
        {"id": "wall", "layers": [{"material": "wool", "thickness_m": 0.1}, {"material": "conc", "thickness_m": 0.15}]},
        {"id": "roof", "layers": [{"resistance_m2k_w": 4.0}, {"material": "conc", "thickness_m": 0.1}]}
      ],
      "zones": [{"id": "room", "floor_area_m2": 25, "volume_m3": 62.5, "design_indoor_c": 20}],
      "opaque": [
        {"id": "walls", "construction": "wall", "zone": "room", "other_side": "outdoor", "area_m2": 40},
        {"id": "top", "construction": "roof", "zone": "room", "other_side": "outdoor", "area_m2": 25, "tilt_deg": 0, "kind": "roof"}
      ],
      "openings": [{"id": "win", "zone": "room", "area_m2": 4, "u_value_w_m2k": 1.2, "g_value": 0.6}],
      "airflows": [{"id": "vent", "zone": "room", "air_changes_per_h": 0.5}]
    }"#;

    #[test]
    fn single_zone_box_equals_sum_of_ua_plus_ventilation() {
        // Analytic: Φ = (Σ U·A + H_ve)(θ_i − θ_e). U from ISO 6946 surface resistances
        // (R_si 0.13 horizontal / 0.10 upward, R_se 0.04; ISO 6946:2017 Table 7):
        //   wall U = 1/(0.13 + 0.1/0.04 + 0.15/2.0 + 0.04) = 1/2.745
        //   roof U = 1/(0.10 + 4.0 + 0.1/2.0 + 0.04)     = 1/4.19
        //   window U·A = 1.2 · 4 = 4.8 W/K; H_ve = 1200 · 0.5 · 62.5 / 3600 = 10.416… W/K
        let h = house(BOX);
        let ua = 40.0 / 2.745 + 25.0 / 4.19 + 4.8;
        let hve = 1200.0 * 0.5 * 62.5 / 3600.0;
        let want = (ua + hve) * (20.0 - (-7.0));
        let s = steady_load(
            &h,
            &DesignConditions {
                outdoor_c: -7.0,
                ground_c: 10.0,
            },
        )
        .unwrap();
        let got = s.zones[0].steady_w;
        assert!(((got - want) / want).abs() < 1e-9, "{got} vs {want}");
        assert!((s.total_w - want).abs() < 1e-9 * want);
        // breakdown closes and matches the network's own boundary-flow readouts
        let z = &s.zones[0];
        assert!((z.by_group_w["walls"] - 40.0 / 2.745 * 27.0).abs() < 1e-9 * want);
        assert!((z.ventilation_w - hve * 27.0).abs() < 1e-9 * want);
        assert_eq!(z.other_w, 0.0);
        for (g, v) in &s.house_by_group_w {
            assert!(
                (v - z.by_group_w[g]).abs() < 1e-9 * want,
                "{g}: {v} vs {}",
                z.by_group_w[g]
            );
        }
    }

    const TWO: &str = r#"{
      "zones": [
        {"id": "heated", "floor_area_m2": 20, "volume_m3": 50, "design_indoor_c": 21},
        {"id": "store", "floor_area_m2": 10, "volume_m3": 25, "heated": false}
      ],
      "openings": [
        {"id": "w1", "zone": "heated", "area_m2": 5, "u_value_w_m2k": 2.0},
        {"id": "d12", "zone": "heated", "other_side": "store", "kind": "door", "area_m2": 2, "u_value_w_m2k": 3.0},
        {"id": "w2", "zone": "store", "area_m2": 3, "u_value_w_m2k": 4.0}
      ],
      "airflows": [{"id": "v1", "zone": "heated", "flow_m3_h": 30}]
    }"#;

    #[test]
    fn two_zones_with_an_unheated_store_match_the_hand_solved_network() {
        // Hand-solved (Kirchhoff at the store node): H1 = 10, H_link = 6, H3 = 12, H_ve = 10 W/K.
        // θ_u = (6·21 + 12·(−3)) / (6 + 12) = 90/18 = 5 °C  (so b_u = (21−5)/(21+3) = 2/3)
        // Φ = (10 + 10)(21 + 3) + 6 (21 − 5) = 480 + 96 = 576 W.
        let h = house(TWO);
        let s = steady_load(
            &h,
            &DesignConditions {
                outdoor_c: -3.0,
                ground_c: 10.0,
            },
        )
        .unwrap();
        assert!(
            (s.zones[1].air_c - 5.0).abs() < 1e-9,
            "{}",
            s.zones[1].air_c
        );
        assert!(
            (s.zones[0].steady_w - 576.0).abs() < 1e-9 * 576.0,
            "{}",
            s.zones[0].steady_w
        );
        assert!((s.zones[0].to_zones_w["store"] - 96.0).abs() < 1e-9);
        assert!((s.zones[1].to_zones_w["heated"] + 96.0).abs() < 1e-9);
        assert_eq!(s.zones[1].steady_w, 0.0);
        assert_eq!(s.total_w, s.zones[0].steady_w);
    }

    #[test]
    fn worked_example_in_the_manner_of_en_12831() {
        // A room 5 m × 4 m × 2.5 m (A_floor 20 m², V 50 m³), θ_int 20 °C, θ_e −10 °C, with an
        // unheated loft above. Formulas: EN 12831-1:2017 §6.3 (clause numbers and the 0.34
        // factor from memory): Φ_HL = Φ_T + Φ_V, Φ_T = Σ H_T,k (θ_int − θ_e) with
        // H_T = U·A for elements to outside and U·A·b_u to unheated spaces,
        // b_u = H_ue/(H_iu + H_ue); Φ_V = 0.34 · V̇ · (θ_int − θ_e), V̇ = max(V̇_inf, n_min·V)
        // with n_min = 0.5 h⁻¹ (from memory). Hand calculation:
        //   wall   19.5 m² (22.5 gross − 3 window), U = 1/(0.13+3.2+0.075+0.04) = 0.290276
        //          → H = 5.660377 W/K
        //   window 3 m² × 1.4 = 4.2 W/K
        //   ceiling to loft 20 m², U_iu = 1/(0.10+4.0+0.10) = 0.238095 → H_iu = 4.761905 W/K
        //   loft to outside: roof 24 m² U 2.0 = 48 W/K plus loft air 1 h⁻¹ × 20 m³ × 0.34
        //          = 6.8 W/K → H_ue = 54.8 W/K (EN uses 0.34 here too)
        //   b_u = 54.8/(4.761905+54.8) = 0.920048 → H_T,iue = 4.381184 W/K
        //   H_T = 5.660377 + 4.2 + 4.381184 = 14.241561 W/K → Φ_T = 427.247 W
        //   V̇ = 0.5 × 50 = 25 m³/h → Φ_V = 0.34 × 25 × 30 = 255.0 W
        //   Φ_HL = 682.2 W.
        // The model uses ρc_p = 1200 J/(m³K) (ISO 13790) instead of 1224 (0.34 Wh/m³K): its
        // ventilation terms are 2 % lower, so the two agree within 1 %, not exactly.
        let text = r#"{
          "materials": [{"id": "conc", "conductivity_w_mk": 2.0, "density_kg_m3": 2400, "specific_heat_j_kgk": 1000}],
          "constructions": [
            {"id": "wall", "layers": [{"resistance_m2k_w": 3.2}, {"material": "conc", "thickness_m": 0.15}]},
            {"id": "ceiling", "layers": [{"resistance_m2k_w": 4.0}], "inside_resistance_m2k_w": 0.10, "outside_resistance_m2k_w": 0.10},
            {"id": "roof", "layers": [{"resistance_m2k_w": 0.36}], "inside_resistance_m2k_w": 0.10, "outside_resistance_m2k_w": 0.04}
          ],
          "zones": [
            {"id": "room", "floor_area_m2": 20, "volume_m3": 50, "design_indoor_c": 20},
            {"id": "loft", "floor_area_m2": 20, "volume_m3": 20, "heated": false}
          ],
          "opaque": [
            {"id": "walls", "construction": "wall", "zone": "room", "other_side": "outdoor", "area_m2": 19.5},
            {"id": "ceiling", "construction": "ceiling", "zone": "room", "other_side": "loft", "area_m2": 20, "tilt_deg": 0, "kind": "roof"},
            {"id": "roof", "construction": "roof", "zone": "loft", "other_side": "outdoor", "area_m2": 24, "tilt_deg": 35, "solar_absorptance": 0}
          ],
          "openings": [{"id": "window", "zone": "room", "area_m2": 3, "u_value_w_m2k": 1.4}],
          "airflows": [
            {"id": "room_air", "zone": "room", "air_changes_per_h": 0.5},
            {"id": "loft_air", "zone": "loft", "air_changes_per_h": 1.0}
          ]
        }"#;
        let h = house(text);
        let s = steady_load(
            &h,
            &DesignConditions {
                outdoor_c: -10.0,
                ground_c: 10.0,
            },
        )
        .unwrap();
        let en12831 = 682.2; // hand calculation above
        let got = s.zones[0].steady_w;
        dwell_testkit::record("studies", dwell_testkit::Check {
            area: "Design heat load (EN 12831)",
            what: "worked single-room example with an unheated loft",
            source: "EN 12831 formulas Φ = Φ_T + Φ_V (0.34 W·h/m³K and clause numbers from memory), hand calculation",
            tolerance: "1 %",
            obtained: format!("{got:.1} W vs {en12831} W ({:.2} %)", 100.0 * (got - en12831) / en12831),
            pass: ((got - en12831) / en12831).abs() < 0.01,
        });
        assert!(
            ((got - en12831) / en12831).abs() < 0.01,
            "{got} vs {en12831}"
        );
        // and the parts: fabric within 0.5 % (only the loft's air term differs), ventilation
        // exactly 1200/1224 of EN's
        assert!(
            ((s.zones[0].fabric_w - 427.247) / 427.247).abs() < 0.005,
            "{}",
            s.zones[0].fabric_w
        );
        assert!((s.zones[0].ventilation_w - 255.0 * 1200.0 / 1224.0).abs() < 1e-6);
    }
}
