//! Exact elimination of massless nodes (Kron reduction).
//!
//! With kept nodes `k` and massless nodes `m`, the massless rows of `C ẋ = −K x + U u` read
//! `0 = −K_mk x_k − K_mm x_m + U_m u`, so `x_m = K_mm⁻¹ (U_m u − K_mk x_k)` and
//!
//! ```text
//! K' = K_kk − K_km K_mm⁻¹ K_mk        U' = U_k − K_km K_mm⁻¹ U_m
//! ```
//!
//! (the Schur complement of `K_mm`). The result is exact: the steady state and the dynamics of
//! the kept nodes are unchanged. `K_mm` is symmetric positive definite when every massless node
//! reaches a boundary or a kept node, which [`crate::NetworkBuilder::build`] checks first.
//!
//! Reference: G. Kron, *Tensor Analysis of Networks* (1939); F. Dörfler and F. Bullo, "Kron
//! reduction of graphs with applications to electrical networks", IEEE TCAS-I 60(1), 2013.

use std::collections::BTreeMap;

use dwell_solver::RcSystem;
use nalgebra::DMatrix;

use crate::builder::NetworkBuilder;
use crate::error::NetworkError;
use crate::network::{LinearMap, Network};

pub(crate) fn reduce(b: &NetworkBuilder) -> Result<Network, NetworkError> {
    let total = b.nodes.len();
    let m_in = b.inputs.len();
    // Full conductance and input matrices over all nodes.
    let mut k = DMatrix::<f64>::zeros(total, total);
    for l in &b.links {
        k[(l.a, l.a)] += l.conductance;
        k[(l.b, l.b)] += l.conductance;
        k[(l.a, l.b)] -= l.conductance;
        k[(l.b, l.a)] -= l.conductance;
    }
    let mut u = DMatrix::<f64>::zeros(total, m_in);
    for bl in &b.boundaries {
        k[(bl.node, bl.node)] += bl.conductance;
        u[(bl.node, bl.input)] += bl.conductance;
    }
    for j in &b.injections {
        u[(j.node, j.input)] += j.coefficient;
    }

    let kept: Vec<usize> = (0..total)
        .filter(|&i| b.nodes[i].capacitance > 0.0)
        .collect();
    let mass: Vec<usize> = (0..total)
        .filter(|&i| b.nodes[i].capacitance == 0.0)
        .collect();
    let n = kept.len();
    let nm = mass.len();
    let sub = |rows: &[usize], cols: &[usize], a: &DMatrix<f64>| {
        DMatrix::from_fn(rows.len(), cols.len(), |i, j| a[(rows[i], cols[j])])
    };
    let sub_u = |rows: &[usize]| DMatrix::from_fn(rows.len(), m_in, |i, j| u[(rows[i], j)]);

    let k_kk = sub(&kept, &kept, &k);
    let u_k = sub_u(&kept);
    // Maps of the eliminated node temperatures: x_m = R_x x_k + R_u u.
    let (k_red, u_red, r_x, r_u) = if nm == 0 {
        (k_kk, u_k, DMatrix::zeros(0, n), DMatrix::zeros(0, m_in))
    } else {
        let k_km = sub(&kept, &mass, &k);
        let k_mk = sub(&mass, &kept, &k);
        let k_mm = sub(&mass, &mass, &k);
        let u_m = sub_u(&mass);
        let chol = k_mm.cholesky().ok_or_else(|| NetworkError::Isolated {
            nodes: mass.iter().map(|&i| b.nodes[i].name.clone()).collect(),
        })?;
        let r_x = -chol.solve(&k_mk);
        let r_u = chol.solve(&u_m);
        let k_red = &k_kk + &k_km * &r_x;
        let u_red = &u_k - &k_km * &r_u;
        (k_red, u_red, r_x, r_u)
    };
    // Symmetrise away rounding so the solver's symmetry check sees an exactly symmetric K.
    let k_red = DMatrix::from_fn(n, n, |i, j| 0.5 * (k_red[(i, j)] + k_red[(j, i)]));

    let mut node_temperature = BTreeMap::new();
    let mut maps: Vec<LinearMap> = vec![
        LinearMap {
            x: vec![],
            u: vec![]
        };
        total
    ];
    for (s, &i) in kept.iter().enumerate() {
        let mut x = vec![0.0; n];
        x[s] = 1.0;
        maps[i] = LinearMap {
            x,
            u: vec![0.0; m_in],
        };
    }
    for (r, &i) in mass.iter().enumerate() {
        maps[i] = LinearMap {
            x: r_x.row(r).iter().copied().collect(),
            u: r_u.row(r).iter().copied().collect(),
        };
    }
    for (i, node) in b.nodes.iter().enumerate() {
        node_temperature.insert(node.name.clone(), maps[i].clone());
    }
    let mut boundary_flow: BTreeMap<String, LinearMap> = BTreeMap::new();
    for bl in &b.boundaries {
        let entry = boundary_flow
            .entry(bl.group.clone())
            .or_insert_with(|| LinearMap {
                x: vec![0.0; n],
                u: vec![0.0; m_in],
            });
        entry.add_scaled(&maps[bl.node], bl.conductance);
        entry.u[bl.input] -= bl.conductance;
    }

    let system = RcSystem::new(
        kept.iter().map(|&i| b.nodes[i].capacitance).collect(),
        k_red,
        u_red,
        b.inputs.iter().map(|i| i.hold.into()).collect(),
    )
    .map_err(|e| NetworkError::BadValue {
        what: "reduced system",
        name: e.to_string(),
        value: f64::NAN,
    })?;

    Ok(Network {
        states: kept.iter().map(|&i| b.nodes[i].name.clone()).collect(),
        inputs: b.inputs.clone(),
        system,
        node_temperature,
        boundary_flow,
        eliminated: nm,
        injected: (0..m_in)
            .map(|j| {
                b.injections
                    .iter()
                    .filter(|i| i.input == j)
                    .map(|i| i.coefficient)
                    .sum()
            })
            .collect(),
    })
}
