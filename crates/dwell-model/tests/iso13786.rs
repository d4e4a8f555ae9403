//! Periodic response of walls: ISO 13786 transfer matrices against dwell's RC discretisation.
//!
//! The reference is the standard's heat-transfer-matrix method (ISO 13786:2017 §6 and Annex A;
//! formulas as in ../shared/CHECKS.md, from memory of the standard, verified there by
//! det Z = 1 and by the invariants tested below), written here in complex arithmetic with no
//! use of the network code. dwell's side is the network the model compiler builds for the same
//! wall (nodes by the mesh rule, surface films, Kron-reduced surface nodes), whose exact
//! steady periodic response at ω = 2π/24 h comes from a complex solve of
//! `(iωC + K) x = U u` with the zone air held at a fixed temperature.

use dwell_model::{compile, parse_model};
use dwell_testkit::{record, Check};
use nalgebra::{Complex, DMatrix, DVector};

type C = Complex<f64>;
const PERIOD_S: f64 = 86_400.0;

/// A 2 × 2 complex matrix, row-major.
#[derive(Clone, Copy, Debug)]
struct Z([C; 4]);

impl Z {
    fn mul(self, o: Z) -> Z {
        let a = self.0;
        let b = o.0;
        Z([
            a[0] * b[0] + a[1] * b[2],
            a[0] * b[1] + a[1] * b[3],
            a[2] * b[0] + a[3] * b[2],
            a[2] * b[1] + a[3] * b[3],
        ])
    }
}

/// Layer matrix, ISO 13786 §6.2: ξ = d/δ, δ = √(λT/(πρc)).
fn layer(d: f64, lambda: f64, rho: f64, c: f64) -> Z {
    let delta = (lambda * PERIOD_S / (std::f64::consts::PI * rho * c)).sqrt();
    let one_i = C::new(1.0, 1.0);
    let arg = one_i * (d / delta);
    Z([
        arg.cosh(),
        -(C::new(delta / lambda, 0.0) / one_i) * arg.sinh(),
        -(one_i * (lambda / delta)) * arg.sinh(),
        arg.cosh(),
    ])
}

/// A bare resistance (surface film, air layer), ISO 13786 §6.3.
fn resistance(r: f64) -> Z {
    Z([
        C::new(1.0, 0.0),
        C::new(-r, 0.0),
        C::new(0.0, 0.0),
        C::new(1.0, 0.0),
    ])
}

/// Layers are (d, λ, ρ, c) or a resistance, listed outside first like a dwell construction.
#[derive(Clone, Copy)]
enum L {
    M(f64, f64, f64, f64),
    R(f64),
}

/// Element matrix Z = Z_se · Z_outermost · … · Z_innermost · Z_si (side 1 = inside).
fn element(layers: &[L], r_si: f64, r_se: f64) -> Z {
    let mut z = resistance(r_se);
    for l in layers {
        z = z.mul(match *l {
            L::M(d, la, r, c) => layer(d, la, r, c),
            L::R(r) => resistance(r),
        });
    }
    z.mul(resistance(r_si))
}

/// (Y₁₂ = −1/Z₁₂, Y₁₁ = −Z₁₁/Z₁₂, κ₁ = T/2π·|(Z₁₁ − 1)/Z₁₂|).
fn iso_values(z: Z) -> (C, C, f64) {
    let [z11, z12, _, _] = z.0;
    (
        -C::new(1.0, 0.0) / z12,
        -z11 / z12,
        PERIOD_S / (2.0 * std::f64::consts::PI) * ((z11 - C::new(1.0, 0.0)) / z12).norm(),
    )
}

#[test]
fn transfer_matrix_reproduces_the_reference_values() {
    // CHECKS.md [lib, computed not published]: 200 mm concrete (2.0, 2400, 1000), R_si 0.13,
    // R_se 0.04: U 3.704, f 0.5273, time shift 5.475 h, κ₁ 86.42 kJ/m²K. And det Z = 1.
    let z = element(&[L::M(0.2, 2.0, 2400.0, 1000.0)], 0.13, 0.04);
    let det = z.0[0] * z.0[3] - z.0[1] * z.0[2];
    assert!((det - C::new(1.0, 0.0)).norm() < 1e-12);
    let (y12, _, k1) = iso_values(z);
    let u: f64 = 1.0 / (0.13 + 0.1 + 0.04);
    assert!((u - 3.704).abs() < 5e-4);
    assert!(
        (y12.norm() / u - 0.5273).abs() < 5e-5,
        "f {}",
        y12.norm() / u
    );
    let lag_h = -y12.arg() * PERIOD_S / (2.0 * std::f64::consts::PI) / 3600.0;
    assert!((lag_h - 5.475).abs() < 5e-4, "lag {lag_h}");
    assert!((k1 / 1000.0 - 86.42).abs() < 5e-3, "κ₁ {k1}");
    // A very thick layer, no films: |Y₁₁| = √(2πλρc/T) = 18.6833 W/m²K for concrete, leading
    // by 3 h (CHECKS.md [lib]).
    let (_, y11, _) = iso_values(element(&[L::M(3.0, 2.0, 2400.0, 1000.0)], 0.0, 0.0));
    assert!((y11.norm() - 18.6833).abs() < 1e-4);
    assert!((y11.arg() * PERIOD_S / (2.0 * std::f64::consts::PI) / 3600.0 - 3.0).abs() < 1e-6);
}

/// dwell's periodic values for a construction JSON (layers array) with an optional node count
/// override per layer: (Y₁₂, Y₁₁, κ₁, U, states).
fn dwell_values(layers_json: &str, materials_json: &str) -> (C, C, f64, usize) {
    let text = format!(
        r#"{{
      "materials": {materials_json},
      "constructions": [{{"id": "wall", "layers": {layers_json}}}],
      "zones": [{{"id": "room", "floor_area_m2": 1, "volume_m3": 1, "furnishing_kj_m2k": 0}}],
      "opaque": [{{"id": "w", "construction": "wall", "zone": "room", "other_side": "outdoor", "area_m2": 1, "solar_absorptance": 0}}]
    }}"#
    );
    let m = parse_model(&text, "wall.json").unwrap_or_else(|e| panic!("{e}"));
    let h = compile(&m, "wall.json").unwrap();
    let sys = &h.network.system;
    let air = h.zones[0].air_state;
    let n = sys.states();
    let w: Vec<usize> = (0..n).filter(|&i| i != air).collect();
    let omega = 2.0 * std::f64::consts::PI / PERIOD_S;
    let a = DMatrix::<C>::from_fn(w.len(), w.len(), |i, j| {
        let diag = if i == j {
            C::new(0.0, omega * sys.capacitance[w[i]])
        } else {
            C::new(0.0, 0.0)
        };
        diag + C::new(sys.conductance[(w[i], w[j])], 0.0)
    });
    let lu = a.lu();
    let out = h.network.input_index("outdoor_air_c").unwrap();
    // θ₂ = 1 outside, θ₁ = 0 inside: heat into the room (ISO's Y₁₂).
    let rhs = DVector::<C>::from_fn(w.len(), |i, _| C::new(sys.input[(w[i], out)], 0.0));
    let x = lu.solve(&rhs).unwrap();
    let into_room: C = w
        .iter()
        .enumerate()
        .map(|(k, &j)| x[k] * (-sys.conductance[(air, j)]))
        .sum::<C>()
        + C::new(sys.input[(air, out)], 0.0);
    // θ₁ = 1 inside, θ₂ = 0: heat from the room into the element (Y₁₁).
    let rhs = DVector::<C>::from_fn(w.len(), |i, _| C::new(-sys.conductance[(w[i], air)], 0.0));
    let x = lu.solve(&rhs).unwrap();
    let into_wall: C = C::new(sys.conductance[(air, air)], 0.0)
        + w.iter()
            .enumerate()
            .map(|(k, &j)| x[k] * sys.conductance[(air, j)])
            .sum::<C>();
    let k1 = PERIOD_S / (2.0 * std::f64::consts::PI) * (into_wall - into_room).norm();
    (into_room, into_wall, k1, n - 1)
}

struct Wall {
    name: &'static str,
    materials: &'static str,
    /// (material id or None for a bare resistance, thickness or resistance)
    layers: &'static [(Option<&'static str>, f64)],
    props: &'static [(&'static str, f64, f64, f64)],
}

const WALLS: [Wall; 3] = [
    Wall {
        name: "light timber frame",
        materials: r#"[{"id": "softwood", "conductivity_w_mk": 0.13, "density_kg_m3": 500, "specific_heat_j_kgk": 1600},
                      {"id": "wool", "conductivity_w_mk": 0.037, "density_kg_m3": 30, "specific_heat_j_kgk": 1030},
                      {"id": "board", "conductivity_w_mk": 0.21, "density_kg_m3": 700, "specific_heat_j_kgk": 1000}]"#,
        layers: &[
            (Some("softwood"), 0.022),
            (None, 0.18),
            (Some("wool"), 0.14),
            (Some("board"), 0.0125),
        ],
        props: &[
            ("softwood", 0.13, 500.0, 1600.0),
            ("wool", 0.037, 30.0, 1030.0),
            ("board", 0.21, 700.0, 1000.0),
        ],
    },
    Wall {
        name: "insulated masonry",
        materials: r#"[{"id": "brick", "conductivity_w_mk": 0.77, "density_kg_m3": 1700, "specific_heat_j_kgk": 800},
                      {"id": "wool", "conductivity_w_mk": 0.035, "density_kg_m3": 30, "specific_heat_j_kgk": 1030},
                      {"id": "block", "conductivity_w_mk": 0.9, "density_kg_m3": 1800, "specific_heat_j_kgk": 1000},
                      {"id": "plaster", "conductivity_w_mk": 0.4, "density_kg_m3": 1000, "specific_heat_j_kgk": 1000}]"#,
        layers: &[
            (Some("brick"), 0.102),
            (Some("wool"), 0.1),
            (Some("block"), 0.14),
            (Some("plaster"), 0.013),
        ],
        props: &[
            ("brick", 0.77, 1700.0, 800.0),
            ("wool", 0.035, 30.0, 1030.0),
            ("block", 0.9, 1800.0, 1000.0),
            ("plaster", 0.4, 1000.0, 1000.0),
        ],
    },
    Wall {
        name: "heavy concrete",
        materials: r#"[{"id": "concrete", "conductivity_w_mk": 2.0, "density_kg_m3": 2400, "specific_heat_j_kgk": 1000}]"#,
        layers: &[(Some("concrete"), 0.3)],
        props: &[("concrete", 2.0, 2400.0, 1000.0)],
    },
];

fn layers_json(w: &Wall, nodes: Option<u32>) -> String {
    let parts: Vec<String> = w
        .layers
        .iter()
        .map(|(mat, v)| match (mat, nodes) {
            (Some(m), Some(n)) => {
                format!(r#"{{"material": "{m}", "thickness_m": {v}, "nodes": {n}}}"#)
            }
            (Some(m), None) => format!(r#"{{"material": "{m}", "thickness_m": {v}}}"#),
            (None, _) => format!(r#"{{"resistance_m2k_w": {v}}}"#),
        })
        .collect();
    format!("[{}]", parts.join(", "))
}

fn reference(w: &Wall) -> (C, C, f64, f64) {
    let ls: Vec<L> = w
        .layers
        .iter()
        .map(|(mat, v)| match mat {
            Some(m) => {
                let p = w.props.iter().find(|p| p.0 == *m).unwrap();
                L::M(*v, p.1, p.2, p.3)
            }
            None => L::R(*v),
        })
        .collect();
    let r: f64 = ls
        .iter()
        .map(|l| match *l {
            L::M(d, la, _, _) => d / la,
            L::R(r) => r,
        })
        .sum();
    let (y12, y11, k1) = iso_values(element(&ls, 0.13, 0.04));
    (y12, y11, k1, 1.0 / (0.13 + r + 0.04))
}

fn shift_h(y: C) -> f64 {
    y.arg() * PERIOD_S / (2.0 * std::f64::consts::PI) / 3600.0
}

#[test]
fn rc_network_matches_iso13786_and_converges_with_nodes() {
    for w in &WALLS {
        let (y12, y11, k1, u) = reference(w);
        let f_ref = y12.norm() / u;
        let mut last_err = f64::INFINITY;
        for n in [1u32, 2, 4, 8, 16] {
            let (d12, _, _, _) = dwell_values(&layers_json(w, Some(n)), w.materials);
            let err = (d12.norm() / u - f_ref).abs() / f_ref;
            // the error falls as nodes per layer rise (second-order in the sublayer thickness)
            assert!(
                err <= last_err * 1.0001 + 1e-12,
                "{}: {n} nodes error {err} > {last_err}",
                w.name
            );
            last_err = err;
        }
        assert!(
            last_err < 0.005,
            "{}: 16 nodes per layer still {last_err}",
            w.name
        );
        // the default node rule: decrement factor within 2 %, time shift within 10 minutes
        // (issue 8), κ₁ within 2 %
        let (d12, d11, dk1, states) = dwell_values(&layers_json(w, None), w.materials);
        let f = d12.norm() / u;
        let f_err = (f - f_ref).abs() / f_ref;
        let shift_err_min = (shift_h(d12) - shift_h(y12)).abs() * 60.0;
        let k_err = (dk1 - k1).abs() / k1;
        let y11_err = (d11 - y11).norm() / y11.norm();
        let pass = f_err < 0.02 && shift_err_min < 10.0 && k_err < 0.02;
        record(
            "iso13786",
            Check {
                area: "ISO 13786 periodic response (24 h)",
                what: w.name,
                source: "ISO 13786:2017 §6 transfer-matrix method, written independently (complex arithmetic)",
                tolerance: "decrement factor 2 %, time shift 10 min, κ₁ 2 %",
                obtained: format!(
                    "{states} nodes: f {f:.4} vs {f_ref:.4} ({:.2} %), shift {:.2} h vs {:.2} h ({shift_err_min:.1} min), κ₁ {:.1} vs {:.1} kJ/m²K, |ΔY₁₁| {:.2} %",
                    100.0 * f_err,
                    shift_h(d12),
                    shift_h(y12),
                    dk1 / 1000.0,
                    k1 / 1000.0,
                    100.0 * y11_err
                ),
                pass,
            },
        );
        assert!(f_err < 0.02, "{}: decrement factor {f} vs {f_ref}", w.name);
        assert!(
            shift_err_min < 10.0,
            "{}: time shift off by {shift_err_min} min",
            w.name
        );
        assert!(k_err < 0.02, "{}: κ₁ {dk1} vs {k1}", w.name);
    }
}
