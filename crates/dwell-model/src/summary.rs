//! The check sheet a practitioner reads: heat-loss coefficients by zone and element group,
//! U-values of constructions, size of the network and its time constants.

use serde::Serialize;

use crate::compile::House;

/// Heat-loss coefficients of one zone (W/K), by element group, to outdoors, ground and fixed
/// boundaries. Conductances to other zones are listed apart: they move heat inside the house.
#[derive(Clone, Debug, Default, Serialize)]
pub struct ZoneLoss {
    /// Zone id.
    pub zone: String,
    /// Whether the zone is heated.
    pub heated: bool,
    /// Floor area (m²).
    pub floor_area_m2: f64,
    /// Walls (W/K).
    pub walls_w_k: f64,
    /// Roofs and ceilings to outside (W/K).
    pub roof_w_k: f64,
    /// Floors, on the ground or over outside air (W/K).
    pub floor_ground_w_k: f64,
    /// Windows (W/K).
    pub windows_w_k: f64,
    /// Doors (W/K).
    pub doors_w_k: f64,
    /// Ventilation and infiltration (W/K).
    pub ventilation_w_k: f64,
    /// Raw network links to boundaries (W/K).
    pub links_w_k: f64,
    /// Total to outdoors, ground and boundaries (W/K).
    pub total_w_k: f64,
    /// Conductance to other zones (W/K).
    pub to_other_zones_w_k: f64,
}

/// U-value of a construction as used.
#[derive(Clone, Debug, Serialize)]
pub struct ConstructionLine {
    /// Construction id.
    pub construction: String,
    /// Heat-flow direction of its use.
    pub direction: String,
    /// U-value (W/(m²·K)).
    pub u_value_w_m2k: f64,
    /// Heat capacity per area (kJ/(m²·K)).
    pub areal_capacity_kj_m2k: f64,
}

/// The whole check sheet.
#[derive(Clone, Debug, Serialize)]
pub struct CheckSummary {
    /// House name.
    pub name: String,
    /// Per zone.
    pub zones: Vec<ZoneLoss>,
    /// Sum over zones.
    pub total: ZoneLoss,
    /// Constructions.
    pub constructions: Vec<ConstructionLine>,
    /// Number of states (nodes with heat capacity).
    pub states: usize,
    /// Number of inputs.
    pub inputs: usize,
    /// Massless nodes removed by Kron reduction.
    pub eliminated_nodes: usize,
    /// Longest time constant (h).
    pub longest_time_constant_h: f64,
    /// Shortest time constant (h).
    pub shortest_time_constant_h: f64,
    /// Total heat capacity of the states (MJ/K).
    pub heat_capacity_mj_k: f64,
}

/// Builds the check sheet of a compiled house.
pub fn check_summary(house: &House) -> CheckSummary {
    let mut zones: Vec<ZoneLoss> = house
        .zones
        .iter()
        .map(|z| ZoneLoss {
            zone: z.id.clone(),
            heated: z.heated,
            floor_area_m2: z.floor_area_m2,
            ..Default::default()
        })
        .collect();
    for l in &house.losses {
        if let Some(other) = house.zones.iter().position(|x| x.id == l.other_side) {
            zones[l.zone].to_other_zones_w_k += l.h_w_k;
            zones[other].to_other_zones_w_k += l.h_w_k;
            continue;
        }
        let z = &mut zones[l.zone];
        match l.group {
            "walls" => z.walls_w_k += l.h_w_k,
            "roof" => z.roof_w_k += l.h_w_k,
            "floor_ground" => z.floor_ground_w_k += l.h_w_k,
            "windows" => z.windows_w_k += l.h_w_k,
            "doors" => z.doors_w_k += l.h_w_k,
            "ventilation" => z.ventilation_w_k += l.h_w_k,
            _ => z.links_w_k += l.h_w_k,
        }
        z.total_w_k += l.h_w_k;
    }
    // Paths the element list cannot see (raw links through raw nodes) come from the network's
    // own steady state: with every zone's air 1 K above every boundary, the heat leaving each
    // zone is its heat-loss coefficient. For element-only models this equals the element sum.
    if let Some(h) = zone_steady_conductance(house) {
        for (z, h) in zones.iter_mut().zip(h) {
            let extra = h - z.total_w_k;
            if extra.abs() > 1e-9 * h.abs().max(1.0) {
                z.links_w_k += extra;
                z.total_w_k = h;
            }
        }
    }
    let mut total = ZoneLoss {
        zone: "total".into(),
        heated: true,
        ..Default::default()
    };
    for z in &zones {
        total.floor_area_m2 += z.floor_area_m2;
        total.walls_w_k += z.walls_w_k;
        total.roof_w_k += z.roof_w_k;
        total.floor_ground_w_k += z.floor_ground_w_k;
        total.windows_w_k += z.windows_w_k;
        total.doors_w_k += z.doors_w_k;
        total.ventilation_w_k += z.ventilation_w_k;
        total.links_w_k += z.links_w_k;
        total.total_w_k += z.total_w_k;
    }
    let tau = house.network.time_constants_s();
    CheckSummary {
        name: house.name.clone(),
        zones,
        total,
        constructions: house
            .constructions
            .iter()
            .map(|c| ConstructionLine {
                construction: c.id.clone(),
                direction: c.direction.to_string(),
                u_value_w_m2k: c.u_value_w_m2k,
                areal_capacity_kj_m2k: c.areal_capacity_kj_m2k,
            })
            .collect(),
        states: house.network.states.len(),
        inputs: house.network.inputs.len(),
        eliminated_nodes: house.network.eliminated,
        longest_time_constant_h: tau.first().copied().unwrap_or(0.0) / 3600.0,
        shortest_time_constant_h: tau.last().copied().unwrap_or(0.0) / 3600.0,
        heat_capacity_mj_k: house.network.system.capacitance.iter().sum::<f64>() / 1e6,
    }
}

/// Heat-loss coefficient of each zone (W/K) from the network's steady state: every zone air node
/// held 1 K above all boundaries (other states free, no heat inputs); the heat each zone's air
/// node must receive is its coefficient. `None` if the free part is singular.
pub fn zone_steady_conductance(house: &House) -> Option<Vec<f64>> {
    let k = &house.network.system.conductance;
    let n = k.nrows();
    let fixed: Vec<usize> = house.zones.iter().map(|z| z.air_state).collect();
    let free: Vec<usize> = (0..n).filter(|i| !fixed.contains(i)).collect();
    let mut x = vec![0.0; n];
    for &i in &fixed {
        x[i] = 1.0;
    }
    if !free.is_empty() {
        let kff = nalgebra::DMatrix::from_fn(free.len(), free.len(), |a, b| k[(free[a], free[b])]);
        let rhs = nalgebra::DVector::from_fn(free.len(), |a, _| {
            -fixed.iter().map(|&j| k[(free[a], j)]).sum::<f64>()
        });
        // K_ff is symmetric positive definite when every free node reaches a boundary or a
        // zone's air: Cholesky (blocked) from CHOLESKY_FROM unknowns, where nalgebra's
        // unblocked LU took 1.5 s at 2,000 states (docs/performance.md); LU below.
        let sol: Vec<f64> = if free.len() >= dwell_solver::CHOLESKY_FROM {
            dwell_solver::cholesky_solve(kff, rhs.as_slice())?
        } else {
            kff.lu().solve(&rhs)?.as_slice().to_vec()
        };
        for (a, &i) in free.iter().enumerate() {
            x[i] = sol[a];
        }
    }
    Some(
        fixed
            .iter()
            .map(|&i| (0..n).map(|j| k[(i, j)] * x[j]).sum())
            .collect(),
    )
}
