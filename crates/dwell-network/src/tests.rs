//! Structural checks of the builder and the Kron reduction.

use nalgebra::{DMatrix, DVector};
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;

use crate::{Hold, NetworkBuilder, NetworkError};

/// A random connected ladder network: some massless nodes, two boundaries, two heat inputs.
fn random_builder(seed: u64, nodes: usize) -> NetworkBuilder {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let mut b = NetworkBuilder::new();
    let out = b.add_input("outdoor_air_c", Hold::Linear);
    let gr = b.add_input("ground_c", Hold::Linear);
    let q1 = b.add_input("heat_a_w", Hold::Step);
    let q2 = b.add_input("sun_w_m2", Hold::Step);
    let ids: Vec<_> = (0..nodes)
        .map(|i| {
            let c = if i % 3 == 1 {
                0.0
            } else {
                10f64.powf(rng.random_range(3.0..7.0))
            };
            b.add_node(&format!("n{i}"), c)
        })
        .collect();
    for i in 1..nodes {
        let j = rng.random_range(0..i);
        b.link(ids[i], ids[j], 10f64.powf(rng.random_range(-1.0..2.0)));
    }
    for _ in 0..nodes / 2 {
        let i = rng.random_range(0..nodes);
        let j = rng.random_range(0..nodes);
        if i != j {
            b.link(ids[i], ids[j], rng.random_range(0.1..20.0));
        }
    }
    b.link_boundary(ids[0], out, 15.0, "walls");
    b.link_boundary(ids[nodes - 1], gr, 5.0, "ground");
    b.link_boundary(ids[1], out, 7.5, "windows");
    b.inject(ids[2], q1, 1.0);
    b.inject(ids[1], q2, 3.2); // into a massless node: shared out by the reduction
    b
}

#[test]
fn reduced_conductance_is_symmetric_with_row_sums_equal_to_boundary_conductance() {
    for seed in 0..20 {
        let net = random_builder(seed, 12).build().unwrap();
        let k = &net.system.conductance;
        let u = &net.system.input;
        let n = k.nrows();
        for i in 0..n {
            for j in 0..n {
                assert_eq!(k[(i, j)], k[(j, i)], "K symmetric");
                if i != j {
                    assert!(
                        k[(i, j)] <= 1e-12,
                        "off-diagonal of K is a negative conductance"
                    );
                }
            }
            // Row sum of K = conductance from node i to all boundaries = sum of the
            // temperature-input columns of U in row i (a uniform temperature carries no heat).
            let row: f64 = (0..n).map(|j| k[(i, j)]).sum();
            let bsum = u[(i, 0)] + u[(i, 1)];
            assert!(
                (row - bsum).abs() <= 1e-10 * k[(i, i)].abs().max(1.0),
                "row {i}: {row} vs {bsum}"
            );
        }
        // total boundary conductance is conserved: Σ_i (row sums) = equivalent conductance seen
        // from the boundaries, bounded by the sum of the original boundary links (15+5+7.5)
        let total: f64 = (0..n).map(|i| u[(i, 0)] + u[(i, 1)]).sum();
        assert!(total <= 27.5 + 1e-9 && total > 0.0);
    }
}

#[test]
fn eigenvalues_of_a_are_real_and_negative_when_connected() {
    for seed in 0..10 {
        let net = random_builder(seed, 15).build().unwrap();
        let tau = net.time_constants_s();
        assert!(tau.iter().all(|t| t.is_finite() && *t > 0.0), "{tau:?}");
        // cross-check against the general (non-symmetric) eigenvalues of A = −C⁻¹K
        let a = net.system.a();
        let ev = a.complex_eigenvalues();
        for z in ev.iter() {
            assert!(
                z.im.abs() < 1e-9 * z.re.abs().max(1e-12),
                "eigenvalue {z} not real"
            );
            assert!(z.re < 0.0, "eigenvalue {z} not negative");
        }
    }
}

#[test]
fn kron_reduction_leaves_the_steady_state_unchanged() {
    // Solve the full network (massless nodes kept, tiny algebraic rows) and the reduced one for
    // the same constant inputs: every node temperature must agree.
    for seed in 0..10 {
        let b = random_builder(seed, 14);
        let net = b.build().unwrap();
        let u = [3.0, 9.0, 500.0, 120.0];
        let x = net.steady_state(&u).unwrap();
        // Full system: K_full T = U_full u.
        let total = b.nodes.len();
        let mut k = DMatrix::<f64>::zeros(total, total);
        let mut rhs = DVector::<f64>::zeros(total);
        for l in &b.links {
            k[(l.a, l.a)] += l.conductance;
            k[(l.b, l.b)] += l.conductance;
            k[(l.a, l.b)] -= l.conductance;
            k[(l.b, l.a)] -= l.conductance;
        }
        for bl in &b.boundaries {
            k[(bl.node, bl.node)] += bl.conductance;
            rhs[bl.node] += bl.conductance * u[bl.input];
        }
        for j in &b.injections {
            rhs[j.node] += j.coefficient * u[j.input];
        }
        let full = k.lu().solve(&rhs).unwrap();
        for (i, node) in b.nodes.iter().enumerate() {
            let t = net.node_temperature[&node.name].eval(&x, &u);
            assert!(
                (t - full[i]).abs() < 1e-9,
                "node {}: {t} vs {}",
                node.name,
                full[i]
            );
        }
        // And the energy balance at steady state: heat in = heat out through the boundaries.
        let out: f64 = net.boundary_flow.values().map(|f| f.eval(&x, &u)).sum();
        assert!(
            (out - (500.0 + 3.2 * 120.0)).abs() < 1e-8 * 884.0,
            "steady balance {out}"
        );
    }
}

#[test]
fn series_conductances_through_a_massless_node_combine() {
    let mut b = NetworkBuilder::new();
    let out = b.add_input("outdoor_air_c", Hold::Linear);
    let a = b.add_node("air", 1e5);
    let s = b.add_node("surface", 0.0);
    b.link(a, s, 3.0);
    b.link_boundary(s, out, 6.0, "walls");
    let net = b.build().unwrap();
    assert!((net.system.conductance[(0, 0)] - 2.0).abs() < 1e-14); // 1/(1/3 + 1/6)
    assert!((net.system.input[(0, 0)] - 2.0).abs() < 1e-14);
}

#[test]
fn isolated_nodes_are_named() {
    let mut b = NetworkBuilder::new();
    let out = b.add_input("outdoor_air_c", Hold::Linear);
    let a = b.add_node("hall.air", 1e5);
    let _lost = b.add_node("attic.air", 1e5);
    b.link_boundary(a, out, 6.0, "walls");
    match b.build() {
        Err(NetworkError::Isolated { nodes }) => assert_eq!(nodes, vec!["attic.air".to_string()]),
        other => panic!("expected an isolation error, got {other:?}"),
    }
}

#[test]
fn negative_values_and_empty_networks_are_refused() {
    let mut b = NetworkBuilder::new();
    let out = b.add_input("outdoor_air_c", Hold::Linear);
    let a = b.add_node("air", -1.0);
    b.link_boundary(a, out, 6.0, "walls");
    assert!(matches!(
        b.build(),
        Err(NetworkError::BadValue {
            what: "capacitance",
            ..
        })
    ));
    let mut b = NetworkBuilder::new();
    let out = b.add_input("outdoor_air_c", Hold::Linear);
    let a = b.add_node("air", 0.0);
    b.link_boundary(a, out, 6.0, "walls");
    assert!(matches!(b.build(), Err(NetworkError::Empty)));
}

#[test]
fn an_eliminated_node_reads_only_the_states_next_to_its_piece() {
    // Two rooms, each with a wall of two massless surface nodes to outdoors: the pieces are
    // the walls; a surface temperature depends on its own room's air only.
    let mut b = NetworkBuilder::new();
    let out = b.add_input("outdoor_air_c", Hold::Linear);
    let a = b.add_node("a.air", 1e5);
    let c = b.add_node("c.air", 2e5);
    b.link(a, c, 4.0);
    for (room, name) in [(a, "a"), (c, "c")] {
        let s1 = b.add_node(&format!("{name}.in"), 0.0);
        let s2 = b.add_node(&format!("{name}.out"), 0.0);
        b.link(room, s1, 8.0);
        b.link(s1, s2, 2.0);
        b.link_boundary(s2, out, 25.0, "walls");
    }
    let net = b.build().unwrap();
    assert_eq!((net.states.len(), net.eliminated), (2, 4));
    let map = &net.node_temperature["c.in"];
    assert_eq!(map.x.len(), 1, "{map:?}");
    assert_eq!(map.x[0].0, net.state_index("c.air").unwrap());
    // Series 8, 2, 25 W/K: the inner surface sits at (1/2 + 1/25)/(1/8 + 1/2 + 1/25) of the
    // way from outdoors to the air (voltage divider).
    let share = (1.0 / 2.0 + 1.0 / 25.0) / (1.0 / 8.0 + 1.0 / 2.0 + 1.0 / 25.0);
    assert!((map.x[0].1 - share).abs() < 1e-14, "{map:?}");
    assert!((map.u[0] - (1.0 - share)).abs() < 1e-14, "{map:?}");
    // The dense form evaluates the same.
    let (x, u) = ([21.0, 19.0], [-5.0]);
    let dense = map.to_dense(2);
    assert!((dense.eval(&x, &u) - map.eval(&x, &u)).abs() < 1e-12);
    assert_eq!(net.node_temperature["a.air"].x, vec![(0, 1.0)]);
}
