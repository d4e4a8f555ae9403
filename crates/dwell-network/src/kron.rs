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
//! The network is held sparsely (one adjacency list per node) until the reduced `K'` is
//! written, once, as the dense `n × n` matrix the solver takes: no `total × total` matrix is
//! formed. Massless nodes joined by links form *pieces* (a wall's two surface nodes, a pane);
//! no link joins two pieces, so `K_mm` is block diagonal over them and the Schur complement
//! is a sum of one small term per piece, over the kept nodes next to it:
//!
//! ```text
//! K'[N, N] −= K_NP K_PP⁻¹ K_PN        U'[N, :] −= K_NP K_PP⁻¹ U_P
//! ```
//!
//! with `P` the piece and `N` its kept neighbours (each `K_PP` factorised by Cholesky). The
//! readout of an eliminated node then only involves the states of `N`.
//!
//! Reference: G. Kron, *Tensor Analysis of Networks* (1939); F. Dörfler and F. Bullo, "Kron
//! reduction of graphs with applications to electrical networks", IEEE TCAS-I 60(1), 2013.

use std::collections::BTreeMap;

use dwell_solver::RcSystem;
use nalgebra::DMatrix;

use crate::builder::NetworkBuilder;
use crate::error::NetworkError;
use crate::network::{LinearMap, Network, NodeMap};

/// Marks a node that is not (yet) in a state, a piece or a neighbour list.
const NONE: usize = usize::MAX;

pub(crate) fn reduce(b: &NetworkBuilder) -> Result<Network, NetworkError> {
    let total = b.nodes.len();
    let m_in = b.inputs.len();
    // Sparse K: diagonal and one adjacency list per node (parallel links stay separate and
    // add up where they are accumulated); U by rows (`total × m`, m is a handful).
    let mut diag = vec![0.0; total];
    let mut adj: Vec<Vec<(usize, f64)>> = vec![Vec::new(); total];
    for l in &b.links {
        diag[l.a] += l.conductance;
        diag[l.b] += l.conductance;
        adj[l.a].push((l.b, l.conductance));
        adj[l.b].push((l.a, l.conductance));
    }
    let mut u = vec![0.0; total * m_in];
    for bl in &b.boundaries {
        diag[bl.node] += bl.conductance;
        u[bl.node * m_in + bl.input] += bl.conductance;
    }
    for j in &b.injections {
        u[j.node * m_in + j.input] += j.coefficient;
    }

    let kept: Vec<usize> = (0..total)
        .filter(|&i| b.nodes[i].capacitance > 0.0)
        .collect();
    let n = kept.len();
    let mut state_of = vec![NONE; total];
    for (s, &i) in kept.iter().enumerate() {
        state_of[i] = s;
    }
    // K_kk and U_k, written straight into the reduced matrices.
    let mut k_red = DMatrix::<f64>::zeros(n, n);
    let mut u_red = DMatrix::<f64>::zeros(n, m_in);
    for (s, &i) in kept.iter().enumerate() {
        k_red[(s, s)] = diag[i];
        for &(j, g) in &adj[i] {
            if state_of[j] != NONE {
                k_red[(s, state_of[j])] -= g;
            }
        }
        for j in 0..m_in {
            u_red[(s, j)] = u[i * m_in + j];
        }
    }

    // Eliminate the massless pieces one by one.
    let mut maps: Vec<Option<NodeMap>> = vec![None; total];
    let mut in_piece = vec![NONE; total];
    let mut near = vec![NONE; total];
    let mut eliminated = 0;
    for start in 0..total {
        if state_of[start] != NONE || in_piece[start] != NONE {
            continue;
        }
        // The piece: massless nodes reachable from `start` through massless nodes, in node
        // order (so each piece's Cholesky factor is the matching block of `K_mm`'s).
        let mut piece = vec![start];
        in_piece[start] = 0;
        let mut next = 0;
        while next < piece.len() {
            let a = piece[next];
            next += 1;
            for &(j, _) in &adj[a] {
                if state_of[j] == NONE && in_piece[j] == NONE {
                    in_piece[j] = 0;
                    piece.push(j);
                }
            }
        }
        piece.sort_unstable();
        for (r, &a) in piece.iter().enumerate() {
            in_piece[a] = r;
        }
        // Its kept neighbours, in node order.
        let mut nbrs: Vec<usize> = piece
            .iter()
            .flat_map(|&a| adj[a].iter().map(|&(j, _)| j))
            .filter(|&j| state_of[j] != NONE)
            .collect();
        nbrs.sort_unstable();
        nbrs.dedup();
        for (c, &j) in nbrs.iter().enumerate() {
            near[j] = c;
        }
        let (p, q) = (piece.len(), nbrs.len());
        let mut k_pp = DMatrix::<f64>::zeros(p, p);
        let mut k_pn = DMatrix::<f64>::zeros(p, q);
        let u_p = DMatrix::from_fn(p, m_in, |r, j| u[piece[r] * m_in + j]);
        for (r, &a) in piece.iter().enumerate() {
            k_pp[(r, r)] = diag[a];
            for &(j, g) in &adj[a] {
                if state_of[j] == NONE {
                    k_pp[(r, in_piece[j])] -= g;
                } else {
                    k_pn[(r, near[j])] -= g;
                }
            }
        }
        let chol = k_pp.cholesky().ok_or_else(|| NetworkError::Isolated {
            nodes: piece.iter().map(|&i| b.nodes[i].name.clone()).collect(),
        })?;
        // x_P = R_x x_N + R_u u
        let r_x = -chol.solve(&k_pn);
        let r_u = chol.solve(&u_p);
        let dk = k_pn.tr_mul(&r_x);
        let du = k_pn.tr_mul(&r_u);
        for (c, &jc) in nbrs.iter().enumerate() {
            for (a, &ja) in nbrs.iter().enumerate() {
                k_red[(state_of[ja], state_of[jc])] += dk[(a, c)];
            }
            for j in 0..m_in {
                u_red[(state_of[jc], j)] -= du[(c, j)];
            }
        }
        for (r, &a) in piece.iter().enumerate() {
            maps[a] = Some(NodeMap {
                x: nbrs
                    .iter()
                    .enumerate()
                    .map(|(c, &j)| (state_of[j], r_x[(r, c)]))
                    .collect(),
                u: r_u.row(r).iter().copied().collect(),
            });
        }
        for &j in &nbrs {
            near[j] = NONE;
        }
        eliminated += p;
    }
    // Symmetrise away rounding (in place) so the solver's symmetry check sees an exactly
    // symmetric K.
    for j in 0..n {
        for i in j + 1..n {
            let v = 0.5 * (k_red[(i, j)] + k_red[(j, i)]);
            k_red[(i, j)] = v;
            k_red[(j, i)] = v;
        }
    }

    for (s, &i) in kept.iter().enumerate() {
        maps[i] = Some(NodeMap {
            x: vec![(s, 1.0)],
            u: vec![0.0; m_in],
        });
    }
    let maps: Vec<NodeMap> = maps
        .into_iter()
        .map(|m| m.expect("every node is kept or in a piece"))
        .collect();
    let mut boundary_flow: BTreeMap<String, LinearMap> = BTreeMap::new();
    for bl in &b.boundaries {
        let entry = boundary_flow
            .entry(bl.group.clone())
            .or_insert_with(|| LinearMap {
                x: vec![0.0; n],
                u: vec![0.0; m_in],
            });
        maps[bl.node].add_scaled_to(entry, bl.conductance);
        entry.u[bl.input] -= bl.conductance;
    }
    let node_temperature: BTreeMap<String, NodeMap> = b
        .nodes
        .iter()
        .map(|node| node.name.clone())
        .zip(maps)
        .collect();

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
        eliminated,
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
