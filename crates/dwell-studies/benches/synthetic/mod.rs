//! The synthetic 200-zone building (INVENTED), shared by the `houses` bench, the
//! `building200` example (stage timings and peak memory) and the truncation tests.
#![allow(dead_code)]

use dwell_network::{Hold, Network, NetworkBuilder};
use dwell_solver::{Discretization, Readout, Route, Stepper, TruncatedModal, Truncation};

/// Zones in the synthetic building.
pub const ZONES: usize = 200;

/// An INVENTED building of `zones` similar rooms in a row: per room an air node (0.3–0.42
/// MJ/K of air and furniture), an outer wall of 4 massive nodes to
/// outdoors, a floor slab of 3 nodes to the ground, and a partition of 2 nodes to the next
/// room: 10 nodes a room. Inputs: outdoor air and ground (°C, linear), sun on the façade
/// (W, one input shared by every room) and internal gains (W, shared). Values are of the
/// order of a small office room; they only need to be physical and stiff.
pub fn synthetic_building(zones: usize) -> Network {
    let mut b = NetworkBuilder::new();
    let outdoor = b.add_input("outdoor_air_c", Hold::Linear);
    let ground = b.add_input("ground_c", Hold::Linear);
    let sun = b.add_input("sun_w", Hold::Step);
    let gains = b.add_input("gains_w", Hold::Step);
    let mut airs = Vec::with_capacity(zones);
    for z in 0..zones {
        // Slight variety so the spectrum is not degenerate.
        let f = 1.0 + 0.1 * ((z * 7) % 5) as f64;
        let air = b.add_node(&format!("air{z}"), 3.0e5 * f);
        b.link_boundary(air, outdoor, 8.0 * f, "ventilation");
        b.inject(air, gains, 0.5 * f);
        // Outer wall: 4 nodes, surface node first.
        let mut prev = air;
        for k in 0..4 {
            let node = b.add_node(&format!("wall{z}_{k}"), 1.2e6);
            b.link(prev, node, if k == 0 { 30.0 } else { 60.0 });
            prev = node;
        }
        b.link_boundary(prev, outdoor, 50.0, "walls");
        b.inject(prev, sun, 0.3);
        // Floor slab: 3 nodes to the ground.
        let mut prev = air;
        for k in 0..3 {
            let node = b.add_node(&format!("floor{z}_{k}"), 2.5e6);
            b.link(prev, node, if k == 0 { 25.0 } else { 80.0 });
            prev = node;
        }
        b.link_boundary(prev, ground, 10.0, "floor");
        airs.push(air);
    }
    // Partitions between neighbours: 2 nodes each, plus a last one on the end wall.
    for z in 0..zones {
        let mut prev = airs[z];
        for k in 0..2 {
            let node = b.add_node(&format!("part{z}_{k}"), 6.0e5);
            b.link(prev, node, 20.0);
            prev = node;
        }
        if z + 1 < zones {
            b.link(prev, airs[z + 1], 20.0);
        } else {
            b.link_boundary(prev, outdoor, 5.0, "walls");
        }
    }
    b.build().expect("synthetic building builds")
}

/// Hourly inputs `[outdoor, ground, sun, gains]` for `hours + 1` samples (deterministic):
/// outdoor 8 ± 7 °C over the year ± 4 °C over the day, ground 10 °C, sun up to 400 W (120 W
/// absorbed on each outer wall), gains 400 W by day and 100 W by night (0.5–0.7 of it into
/// each room's air).
pub fn synthetic_inputs(hours: usize) -> Vec<[f64; 4]> {
    let tau = std::f64::consts::TAU;
    (0..=hours)
        .map(|k| {
            let t = k as f64;
            let day = (tau * t / 24.0).sin();
            [
                8.0 + 7.0 * (tau * t / 8760.0 - 2.0).sin() + 4.0 * day,
                10.0,
                (400.0 * day).max(0.0),
                if (k % 24) >= 8 && (k % 24) < 18 {
                    400.0
                } else {
                    100.0
                },
            ]
        })
        .collect()
}

/// Indices of the zones' air states.
pub fn air_states(net: &Network, zones: usize) -> Vec<usize> {
    (0..zones)
        .map(|z| net.state_index(&format!("air{z}")).expect("air state"))
        .collect()
}

/// A stepper reading every zone's air temperature at step ends, started at 15 °C: the
/// full modal route (`truncation` `None`) or a truncated one.
pub fn building_stepper(net: &Network, zones: usize, truncation: Option<Truncation>) -> Stepper {
    let (n, m) = (net.states.len(), net.inputs.len());
    let rows = Readout::nodes(&air_states(net, zones), n, m);
    let x0 = vec![15.0; n];
    match truncation {
        None => {
            let disc = Discretization::new(&net.system, 3600.0, Route::Modal).expect("discretises");
            let mut st = Stepper::new(&disc, &rows, &Readout::empty(n, m)).expect("stepper");
            st.set_state(&x0);
            st
        }
        Some(t) => {
            let tm = TruncatedModal::new(&net.system, 3600.0, t).expect("discretises");
            let mut st = tm.stepper(&rows, &Readout::empty(n, m)).expect("stepper");
            st.set_state(&tm.modal_state(&x0));
            st
        }
    }
}

/// One year hourly with every zone's air temperature read each hour into the preallocated
/// `hours × zones` `table` (the hourly output); returns the mean of the table.
pub fn step_year(st: &mut Stepper, u: &[[f64; 4]], table: &mut [f64], zones: usize) -> f64 {
    // Known inputs: the readouts of each block of steps are one matrix product
    // (`Stepper::run_known`), so the 200 × 2,006 readout matrix is read once per block.
    let hours = table.len() / zones;
    st.run_known(u[..=hours].as_flattened(), table, &mut []);
    table.iter().sum::<f64>() / table.len() as f64
}

/// Build, discretise and step one year with every zone's air temperature read each hour
/// into a preallocated `hours × zones` table (the hourly output).
pub fn run_building(zones: usize, truncation: Option<Truncation>) -> f64 {
    let net = synthetic_building(zones);
    let mut st = building_stepper(&net, zones, truncation);
    let u = synthetic_inputs(8760);
    let mut table = vec![0.0; 8760 * zones];
    step_year(&mut st, &u, &mut table, zones)
}
