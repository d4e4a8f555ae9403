//! From a validated model file to the RC network.
//!
//! * Each layered construction becomes a chain: outside surface node (massless) → layer nodes →
//!   inside surface node (massless) → zone air. A layer of thickness `d` with diffusivity
//!   `a = λ/(ρc)` gets `N = clamp(⌈d / (f·√(a·Δt))⌉, 1, N_max)` nodes (`f` =
//!   `mesh.depth_fraction`, `Δt` = `mesh.reference_step_s`), each holding `ρ·c·d·A/N` at the
//!   centre of its sublayer, joined by the sublayer resistances; a layer storing less than
//!   `mesh.massless_below_kj_m2k` is a bare resistance. See docs/method.md.
//! * Surface films are conductances `A/R_s` (ISO 6946 by heat-flow direction); windows and
//!   doors are conductances `U·A`; ventilation is `H = ρc_p·q·(1 − η)` with ρc_p = 1200
//!   J/(m³·K) (ISO 13790:2008 §9.3.1); floors on the ground follow [`crate::ground`].
//! * Elements with the same construction, zone, other side and kind are merged into one chain
//!   of the summed area (exact for the zone temperatures: each chain is linear and sees the same
//!   two temperatures, so the sum of the responses equals the response of the sum; the sun on
//!   each part is injected separately). Heater targets and ground floors are not merged.
//! * Massless nodes are removed exactly by `dwell-network`'s Kron reduction.

use std::collections::BTreeMap;

use dwell_network::{Hold, InputId, Network, NetworkBuilder, NetworkError, NodeId};

use crate::error::{ModelError, Problem};
use crate::file::*;
use crate::ground;
use crate::iso6946::{self, FlowDirection};
use crate::validate::{GROUND, OUTDOOR};

/// Volumetric heat capacity of air ρ·c_p (J/(m³·K)), ISO 13790:2008 §9.3.1.
pub const AIR_HEAT_CAPACITY_J_M3K: f64 = 1200.0;

/// What an input of the network stands for, so a study can fill it from weather and schedules.
#[derive(Clone, Debug, PartialEq)]
pub enum InputRole {
    /// Outdoor air temperature (°C).
    OutdoorAir,
    /// Deep-ground temperature (°C).
    Ground,
    /// A fixed-temperature boundary (°C).
    Boundary {
        /// The boundary's temperature (°C).
        temperature_c: f64,
    },
    /// Total irradiance on a plane (W/m²); the network's column holds the absorbing areas.
    SolarPlane {
        /// Tilt (degrees).
        tilt_deg: f64,
        /// Azimuth (degrees clockwise from north).
        azimuth_deg: f64,
    },
    /// Internal gains of a zone (W), the sum of its `gains` with their schedules.
    Gains {
        /// Zone index.
        zone: usize,
    },
    /// A heater's output (W).
    Heater {
        /// Heater index (in the model file's order).
        heater: usize,
    },
    /// A raw heat input (W).
    RawHeat {
        /// Power (W).
        power_w: f64,
        /// Optional fraction schedule.
        schedule: Option<String>,
    },
}

/// A zone of the compiled house.
#[derive(Clone, Debug)]
pub struct ZoneInfo {
    /// Zone id.
    pub id: String,
    /// Index of its air node among the network states.
    pub air_state: usize,
    /// Whether it is meant to be heated.
    pub heated: bool,
    /// Floor area (m²).
    pub floor_area_m2: f64,
    /// Comfort band (°C) for occupied hours.
    pub comfort: Option<(f64, f64)>,
    /// Design indoor temperature (°C).
    pub design_indoor_c: f64,
}

/// Element group for heat-loss summaries and the energy ledger.
pub const GROUPS: [&str; 7] = [
    "walls",
    "roof",
    "floor_ground",
    "windows",
    "doors",
    "ventilation",
    "links",
];

/// The steady conductance of one element (or airflow) from its zone to what lies beyond.
#[derive(Clone, Debug)]
pub struct ElementLoss {
    /// Element id.
    pub id: String,
    /// Zone index.
    pub zone: usize,
    /// Group (one of [`GROUPS`]).
    pub group: &'static str,
    /// What is on the other side (`outdoor`, `ground`, a zone or boundary id).
    pub other_side: String,
    /// Area (m²), zero for airflows.
    pub area_m2: f64,
    /// U-value (W/(m²·K)), zero for airflows.
    pub u_value_w_m2k: f64,
    /// Steady conductance H (W/K).
    pub h_w_k: f64,
}

/// A construction's U-value as used in the model.
#[derive(Clone, Debug)]
pub struct ConstructionU {
    /// Construction id.
    pub id: String,
    /// Heat-flow direction of its use ("up", "horizontal", "down").
    pub direction: &'static str,
    /// U-value (W/(m²·K)) with the surface resistances of that use.
    pub u_value_w_m2k: f64,
    /// Heat capacity per area (kJ/(m²·K)).
    pub areal_capacity_kj_m2k: f64,
}

/// A compiled house: the network and what its parts mean.
#[derive(Clone, Debug)]
pub struct House {
    /// Name from the model file.
    pub name: String,
    /// The reduced network.
    pub network: Network,
    /// Zones in file order.
    pub zones: Vec<ZoneInfo>,
    /// Role of each network input, in input order.
    pub inputs: Vec<InputRole>,
    /// Steady conductances of every element and airflow.
    pub losses: Vec<ElementLoss>,
    /// U-values of the constructions as used.
    pub constructions: Vec<ConstructionU>,
    /// Index of each heater's input.
    pub heater_inputs: Vec<usize>,
    /// Where the sun of each solar input lands: `(input, group, m²)`; group `windows` is
    /// transmitted by glazing, the others are absorbed on the outer surface of that group's
    /// opaque elements (most of which leaves again through the outside film).
    pub solar_targets: Vec<(usize, &'static str, f64)>,
}

enum Piece {
    R(f64),
    C(f64, String),
}

enum End {
    Boundary(InputId, f64, &'static str),
    Node(NodeId, f64),
    Adiabatic,
}

fn direction_of(kind: OpaqueKind) -> FlowDirection {
    match kind {
        OpaqueKind::Wall => FlowDirection::Horizontal,
        OpaqueKind::Roof => FlowDirection::Up,
        OpaqueKind::Floor => FlowDirection::Down,
    }
}

fn direction_name(d: FlowDirection) -> &'static str {
    match d {
        FlowDirection::Up => "up",
        FlowDirection::Horizontal => "horizontal",
        FlowDirection::Down => "down",
    }
}

/// Kind of an opaque element: given, or from its tilt (< 60° roof, > 120° floor, else wall).
pub fn opaque_kind(e: &Opaque) -> OpaqueKind {
    e.kind.unwrap_or(if e.tilt_deg < 60.0 {
        OpaqueKind::Roof
    } else if e.tilt_deg > 120.0 {
        OpaqueKind::Floor
    } else {
        OpaqueKind::Wall
    })
}

fn group_of(kind: OpaqueKind) -> &'static str {
    match kind {
        OpaqueKind::Wall => "walls",
        OpaqueKind::Roof => "roof",
        OpaqueKind::Floor => "floor_ground",
    }
}

/// Number of nodes for a material layer under the mesh rule (0 = massless).
pub fn layer_nodes(
    mat: &Material,
    thickness_m: f64,
    override_nodes: Option<u32>,
    mesh: &Mesh,
) -> u32 {
    if let Some(n) = override_nodes {
        return n;
    }
    let areal_kj = mat.density_kg_m3 * mat.specific_heat_j_kgk * thickness_m / 1000.0;
    if areal_kj < mesh.massless_below_kj_m2k {
        return 0;
    }
    let a = mat.conductivity_w_mk / (mat.density_kg_m3 * mat.specific_heat_j_kgk);
    let depth = mesh.depth_fraction * (a * mesh.reference_step_s).sqrt();
    ((thickness_m / depth).ceil() as u32).clamp(1, mesh.max_nodes_per_layer)
}

struct Compiler<'a> {
    m: &'a ModelFile,
    b: NetworkBuilder,
    materials: BTreeMap<&'a str, &'a Material>,
    constructions: BTreeMap<&'a str, &'a Construction>,
    zone_index: BTreeMap<&'a str, usize>,
    zone_air: Vec<NodeId>,
    roles: Vec<InputRole>,
    problems: Vec<Problem>,
    losses: Vec<ElementLoss>,
    /// Inside surface node of each element id (for heaters `into` an element).
    inside_surface: BTreeMap<String, NodeId>,
    solar_targets: Vec<(usize, &'static str, f64)>,
}

impl<'a> Compiler<'a> {
    fn input(&mut self, name: &str, hold: Hold, role: InputRole) -> InputId {
        let id = self.b.add_input(name, hold);
        if id.0 == self.roles.len() {
            self.roles.push(role);
        }
        id
    }

    fn outdoor(&mut self) -> InputId {
        self.input("outdoor_air_c", Hold::Linear, InputRole::OutdoorAir)
    }

    fn boundary_input(&mut self, side: &str) -> Option<InputId> {
        if side == OUTDOOR {
            return Some(self.outdoor());
        }
        if side == GROUND {
            return Some(self.input("ground_c", Hold::Linear, InputRole::Ground));
        }
        let b = self.m.boundaries.iter().find(|b| b.id == side)?;
        Some(self.input(
            &format!("boundary_{}_c", b.id),
            Hold::Linear,
            InputRole::Boundary {
                temperature_c: b.temperature_c,
            },
        ))
    }

    fn solar(&mut self, tilt: f64, azimuth: f64) -> InputId {
        let az = if tilt == 0.0 { 0.0 } else { azimuth };
        let name = format!("sun_tilt{}_az{}_w_m2", fmt_angle(tilt), fmt_angle(az));
        self.input(
            &name,
            Hold::Step,
            InputRole::SolarPlane {
                tilt_deg: tilt,
                azimuth_deg: az,
            },
        )
    }

    /// Resistance/capacity pieces of a construction, outside first; also its bare resistance.
    fn pieces(&self, con: &Construction, dir: FlowDirection) -> (Vec<Piece>, f64, f64) {
        let mut out = Vec::new();
        let mut r_total = 0.0;
        let mut c_total = 0.0;
        for (li, l) in con.layers.iter().enumerate() {
            if let Some(d) = l.air_gap_m {
                let r = iso6946::air_layer_resistance(d, dir);
                out.push(Piece::R(r));
                r_total += r;
            } else if let Some(r) = l.resistance_m2k_w {
                out.push(Piece::R(r));
                r_total += r;
            } else if let (Some(mid), Some(d)) = (&l.material, l.thickness_m) {
                let mat = self.materials[mid.as_str()];
                let r = d / mat.conductivity_w_mk;
                r_total += r;
                let cap = mat.density_kg_m3 * mat.specific_heat_j_kgk * d;
                let n = layer_nodes(mat, d, l.nodes, &self.m.mesh);
                if n == 0 {
                    out.push(Piece::R(r));
                    continue;
                }
                c_total += cap;
                let nf = n as f64;
                for k in 0..n {
                    out.push(Piece::R(r / nf / 2.0));
                    let name = if n == 1 {
                        format!("l{}_{}", li + 1, mid)
                    } else {
                        format!("l{}_{}.{}", li + 1, mid, k + 1)
                    };
                    out.push(Piece::C(cap / nf, name));
                    out.push(Piece::R(r / nf / 2.0));
                }
            }
        }
        (out, r_total, c_total)
    }

    /// Builds a chain of `pieces` over `area` between `outer` and `inner`; returns the outside
    /// and inside surface nodes.
    fn chain(
        &mut self,
        name: &str,
        pieces: &[Piece],
        area: f64,
        outer: End,
        inner: End,
    ) -> (NodeId, NodeId) {
        let outside = self.b.add_node(&format!("{name}.outside"), 0.0);
        match outer {
            End::Boundary(input, r, group) => self.b.link_boundary(outside, input, area / r, group),
            End::Node(node, r) => self.b.link(node, outside, area / r),
            End::Adiabatic => {}
        }
        let mut prev = outside;
        let mut acc = 0.0;
        for p in pieces {
            match p {
                Piece::R(r) => acc += r,
                Piece::C(c, n) => {
                    let node = self.b.add_node(&format!("{name}.{n}"), c * area);
                    self.b.link(prev, node, area / acc);
                    prev = node;
                    acc = 0.0;
                }
            }
        }
        let inside = self.b.add_node(&format!("{name}.inside"), 0.0);
        self.b.link(prev, inside, area / acc);
        match inner {
            End::Boundary(input, r, group) => self.b.link_boundary(inside, input, area / r, group),
            End::Node(node, r) => self.b.link(inside, node, area / r),
            End::Adiabatic => {}
        }
        (outside, inside)
    }
}

fn fmt_angle(a: f64) -> String {
    let r = (a * 10.0).round() / 10.0;
    if r.fract() == 0.0 {
        format!("{}", r as i64)
    } else {
        format!("{r}").replace('.', "p")
    }
}

/// Compiles a validated model into a [`House`]. `file` names the model in errors.
pub fn compile(m: &ModelFile, file: &str) -> Result<House, ModelError> {
    let mut c = Compiler {
        m,
        b: NetworkBuilder::new(),
        materials: m.materials.iter().map(|x| (x.id.as_str(), x)).collect(),
        constructions: m.constructions.iter().map(|x| (x.id.as_str(), x)).collect(),
        zone_index: m
            .zones
            .iter()
            .enumerate()
            .map(|(i, z)| (z.id.as_str(), i))
            .collect(),
        zone_air: Vec::new(),
        roles: Vec::new(),
        problems: Vec::new(),
        losses: Vec::new(),
        inside_surface: BTreeMap::new(),
        solar_targets: Vec::new(),
    };
    c.outdoor(); // always input 0
    for z in &m.zones {
        let cap =
            AIR_HEAT_CAPACITY_J_M3K * z.volume_m3 + 1000.0 * z.furnishing_kj_m2k * z.floor_area_m2;
        let node = c.b.add_node(&format!("{}.air", z.id), cap);
        c.zone_air.push(node);
    }
    // Raw nodes exist before elements so links can name them.
    for n in &m.network.nodes {
        c.b.add_node(&n.id, n.capacitance_j_k);
    }

    compile_opaque(&mut c);
    compile_internal_mass(&mut c);
    compile_openings(&mut c);
    compile_airflows(&mut c);
    // Gains: one input per zone that has any.
    for (zi, z) in m.zones.iter().enumerate() {
        if m.gains.iter().any(|g| g.zone == z.id) {
            let inp = c.input(
                &format!("gains_{}_w", z.id),
                Hold::Step,
                InputRole::Gains { zone: zi },
            );
            c.b.inject(c.zone_air[zi], inp, 1.0);
        }
    }
    let mut heater_inputs = Vec::new();
    for (hi, h) in m.heaters.iter().enumerate() {
        let inp = c.input(
            &format!("heater_{}_w", h.id),
            Hold::Step,
            InputRole::Heater { heater: hi },
        );
        heater_inputs.push(inp.0);
        let zi = c.zone_index[h.zone.as_str()];
        let node = if h.into == "air" {
            c.zone_air[zi]
        } else {
            c.inside_surface[&h.into]
        };
        c.b.inject(node, inp, 1.0);
    }
    compile_raw(&mut c);

    let problems = std::mem::take(&mut c.problems);
    if !problems.is_empty() {
        return Err(ModelError::Invalid {
            file: file.to_string(),
            problems,
        });
    }
    let network = c.b.build().map_err(|e| network_error(e, m, file))?;
    let zones = m
        .zones
        .iter()
        .map(|z| ZoneInfo {
            id: z.id.clone(),
            air_state: network
                .state_index(&format!("{}.air", z.id))
                .expect("zone air has capacity"),
            heated: z.heated,
            floor_area_m2: z.floor_area_m2,
            comfort: z.comfort.as_ref().map(|b| (b.min_c, b.max_c)),
            design_indoor_c: z
                .design_indoor_c
                .or(z.comfort.as_ref().map(|b| b.min_c))
                .unwrap_or(20.0),
        })
        .collect();
    let constructions = construction_table(&c);
    Ok(House {
        name: m.name.clone(),
        network,
        zones,
        inputs: c.roles,
        losses: c.losses,
        constructions,
        heater_inputs,
        solar_targets: c.solar_targets,
    })
}

fn network_error(e: NetworkError, m: &ModelFile, file: &str) -> ModelError {
    let problems = match e {
        NetworkError::Isolated { nodes } => {
            // Name zones by their air node; other nodes by the element they belong to.
            let mut out = Vec::new();
            for n in nodes {
                if let Some(z) = n.strip_suffix(".air") {
                    if let Some(i) = m.zones.iter().position(|x| x.id == z) {
                        out.push(Problem {
                            path: format!("$.zones[{i}]"),
                            message: format!("zone `{z}` has no path to outdoor air, the ground or a boundary: give it an element, opening, airflow or link to one, or to a zone that has one"),
                        });
                        continue;
                    }
                }
                if let Some(i) = m.network.nodes.iter().position(|x| x.id == n) {
                    out.push(Problem {
                        path: format!("$.network.nodes[{i}]"),
                        message: format!("node `{n}` has no path to any boundary: add a link"),
                    });
                    continue;
                }
                if !n.contains(".air") {
                    let owner = n.split('.').next().unwrap_or(&n).to_string();
                    if out
                        .iter()
                        .any(|p: &Problem| p.message.contains(&format!("`{owner}`")))
                    {
                        continue;
                    }
                    out.push(Problem {
                        path: "$".into(),
                        message: format!("element `{owner}` has no path to any boundary"),
                    });
                }
            }
            out
        }
        other => vec![Problem {
            path: "$".into(),
            message: other.to_string(),
        }],
    };
    ModelError::Invalid {
        file: file.to_string(),
        problems,
    }
}

fn compile_opaque(c: &mut Compiler) {
    let m = c.m;
    // Group mergeable elements: same construction, zone, other side, kind; not heater targets
    // and not on the ground.
    let targets: Vec<&str> = m.heaters.iter().map(|h| h.into.as_str()).collect();
    let mut groups: Vec<Vec<&Opaque>> = Vec::new();
    for e in &m.opaque {
        let mergeable =
            m.mesh.merge_alike && e.other_side != GROUND && !targets.contains(&e.id.as_str());
        let key = |x: &Opaque| {
            (
                x.construction.clone(),
                x.zone.clone(),
                x.other_side.clone(),
                opaque_kind(x),
            )
        };
        if mergeable {
            if let Some(g) = groups.iter_mut().find(|g| {
                let f = g[0];
                f.other_side != GROUND && !targets.contains(&f.id.as_str()) && key(f) == key(e)
            }) {
                g.push(e);
                continue;
            }
        }
        groups.push(vec![e]);
    }
    for g in groups {
        let first = g[0];
        let kind = opaque_kind(first);
        let dir = direction_of(kind);
        let con = c.constructions[first.construction.as_str()];
        let zi = c.zone_index[first.zone.as_str()];
        let area: f64 = g.iter().map(|e| e.area_m2).sum();
        let name = if g.len() == 1 {
            first.id.clone()
        } else {
            format!("{}+{}", first.id, g.len() - 1)
        };
        let (mut pieces, r_layers, _) = c.pieces(con, dir);
        let r_in = con
            .inside_resistance_m2k_w
            .unwrap_or(iso6946::inside_resistance(dir));
        let group = group_of(kind);
        let outer;
        let u;
        let side = first.other_side.as_str();
        if side == GROUND {
            let p = first.exposed_perimeter_m.unwrap_or(1.0);
            let w = first.wall_thickness_m.unwrap_or(0.3);
            u = ground::slab_u_value(area, p, w, r_layers, r_in, iso6946::OUTSIDE_RESISTANCE);
            let r_soil = 1.0 / u - r_in - r_layers;
            let split = ground::split_soil(r_soil);
            let nodes = layer_nodes(
                &Material {
                    id: "soil".into(),
                    conductivity_w_mk: ground::SOIL_CONDUCTIVITY,
                    density_kg_m3: ground::SOIL_HEAT_CAPACITY / 1000.0,
                    specific_heat_j_kgk: 1000.0,
                },
                split.layer_m,
                None,
                &m.mesh,
            )
            .clamp(1, 4);
            let r_soil_layer = split.layer_m / ground::SOIL_CONDUCTIVITY;
            let cap = ground::SOIL_HEAT_CAPACITY * split.layer_m;
            let mut soil = Vec::new();
            let nf = nodes as f64;
            for k in 0..nodes {
                soil.push(Piece::R(r_soil_layer / nf / 2.0));
                soil.push(Piece::C(
                    cap / nf,
                    if nodes == 1 {
                        "soil".into()
                    } else {
                        format!("soil.{}", k + 1)
                    },
                ));
                soil.push(Piece::R(r_soil_layer / nf / 2.0));
            }
            soil.append(&mut pieces);
            pieces = soil;
            let inp = c.boundary_input(GROUND).expect("ground");
            outer = End::Boundary(inp, split.remainder_m2k_w, "floor_ground");
        } else if let Some(&oz) = c.zone_index.get(side) {
            let r_out = con
                .outside_resistance_m2k_w
                .unwrap_or(iso6946::inside_resistance(dir));
            u = 1.0 / (r_in + r_layers + r_out);
            outer = End::Node(c.zone_air[oz], r_out);
        } else {
            let outdoor = side == OUTDOOR;
            let default_out = if outdoor {
                iso6946::OUTSIDE_RESISTANCE
            } else {
                iso6946::inside_resistance(dir)
            };
            let r_out = con.outside_resistance_m2k_w.unwrap_or(default_out);
            u = 1.0 / (r_in + r_layers + r_out);
            let inp = c.boundary_input(side).expect("validated boundary");
            outer = End::Boundary(inp, r_out, group);
        }
        if !(u.is_finite() && u > 0.0) || r_layers + r_in <= 0.0 {
            let i = m.opaque.iter().position(|e| e.id == first.id).unwrap_or(0);
            c.problems.push(Problem {
                path: format!("$.opaque[{i}].construction"),
                message: format!("construction `{}` has no thermal resistance; give its layers a thickness or resistance", con.id),
            });
            continue;
        }
        let (outside, inside) =
            c.chain(&name, &pieces, area, outer, End::Node(c.zone_air[zi], r_in));
        for e in &g {
            c.inside_surface.insert(e.id.clone(), inside);
            if side == OUTDOOR && e.solar_absorptance > 0.0 {
                let inp = c.solar(e.tilt_deg, e.azimuth_deg);
                c.b.inject(outside, inp, e.solar_absorptance * e.area_m2);
                c.solar_targets
                    .push((inp.0, group, e.solar_absorptance * e.area_m2));
            }
            c.losses.push(ElementLoss {
                id: e.id.clone(),
                zone: zi,
                group: if c.zone_index.contains_key(side) {
                    "links"
                } else {
                    group
                },
                other_side: side.to_string(),
                area_m2: e.area_m2,
                u_value_w_m2k: u,
                h_w_k: u * e.area_m2,
            });
        }
    }
}

fn compile_internal_mass(c: &mut Compiler) {
    let m = c.m;
    for e in &m.internal_mass {
        let con = c.constructions[e.construction.as_str()];
        let zi = c.zone_index[e.zone.as_str()];
        let dir = FlowDirection::Horizontal;
        let (pieces, _, _) = c.pieces(con, dir);
        let r_in = con
            .inside_resistance_m2k_w
            .unwrap_or(iso6946::inside_resistance(dir));
        let air = c.zone_air[zi];
        let outer = if e.both_faces {
            End::Node(air, con.outside_resistance_m2k_w.unwrap_or(r_in))
        } else {
            End::Adiabatic
        };
        let (_, inside) = c.chain(&e.id, &pieces, e.area_m2, outer, End::Node(air, r_in));
        c.inside_surface.insert(e.id.clone(), inside);
    }
}

fn compile_openings(c: &mut Compiler) {
    let m = c.m;
    for o in &m.openings {
        let zi = c.zone_index[o.zone.as_str()];
        let air = c.zone_air[zi];
        let h = o.u_value_w_m2k * o.area_m2;
        let group = match o.kind {
            OpeningKind::Window => "windows",
            OpeningKind::Door => "doors",
        };
        if let Some(&oz) = c.zone_index.get(o.other_side.as_str()) {
            let other = c.zone_air[oz];
            c.b.link(air, other, h);
        } else {
            let inp = c.boundary_input(&o.other_side).expect("validated");
            c.b.link_boundary(air, inp, h, group);
            let frame = o.frame_fraction.unwrap_or(match o.kind {
                OpeningKind::Window => 0.25,
                OpeningKind::Door => 1.0,
            });
            let aperture = o.area_m2 * (1.0 - frame) * o.g_value * o.shading_factor;
            if o.other_side == OUTDOOR && aperture > 0.0 {
                let s = c.solar(o.tilt_deg, o.azimuth_deg);
                c.b.inject(air, s, aperture);
                c.solar_targets.push((s.0, "windows", aperture));
            }
        }
        let internal = c.zone_index.contains_key(o.other_side.as_str());
        c.losses.push(ElementLoss {
            id: o.id.clone(),
            zone: zi,
            group: if internal { "links" } else { group },
            other_side: o.other_side.clone(),
            area_m2: o.area_m2,
            u_value_w_m2k: o.u_value_w_m2k,
            h_w_k: h,
        });
    }
}

/// Volume flow of an airflow (m³/s).
pub fn airflow_m3_s(a: &Airflow, zone: &Zone) -> f64 {
    match (a.air_changes_per_h, a.flow_m3_h) {
        (Some(n), _) => n * zone.volume_m3 / 3600.0,
        (_, Some(q)) => q / 3600.0,
        _ => 0.0,
    }
}

fn compile_airflows(c: &mut Compiler) {
    let m = c.m;
    for a in &m.airflows {
        let zi = c.zone_index[a.zone.as_str()];
        let q = airflow_m3_s(a, &m.zones[zi]);
        let h = AIR_HEAT_CAPACITY_J_M3K * q * (1.0 - a.heat_recovery);
        let air = c.zone_air[zi];
        if a.from == OUTDOOR {
            let inp = c.outdoor();
            c.b.link_boundary(air, inp, h, "ventilation");
        } else {
            let oz = c.zone_index[a.from.as_str()];
            let other = c.zone_air[oz];
            c.b.link(air, other, h);
        }
        c.losses.push(ElementLoss {
            id: a.id.clone(),
            zone: zi,
            group: if a.from == OUTDOOR {
                "ventilation"
            } else {
                "links"
            },
            other_side: a.from.clone(),
            area_m2: 0.0,
            u_value_w_m2k: 0.0,
            h_w_k: h,
        });
    }
}

fn compile_raw(c: &mut Compiler) {
    let m = c.m;
    let resolve = |c: &mut Compiler, end: &str| -> Result<NodeId, InputId> {
        if let Some(&zi) = c.zone_index.get(end) {
            return Ok(c.zone_air[zi]);
        }
        if let Some(n) = c.b.node(end) {
            if m.network.nodes.iter().any(|x| x.id == end) {
                return Ok(n);
            }
        }
        Err(c.boundary_input(end).expect("validated end"))
    };
    for l in &m.network.links {
        let group: &str = l.group.as_deref().unwrap_or("links");
        let group: &'static str = GROUPS
            .iter()
            .find(|g| **g == group)
            .copied()
            .unwrap_or("links");
        let a = resolve(c, &l.from);
        let b = resolve(c, &l.to);
        match (a, b) {
            (Ok(x), Ok(y)) => c.b.link(x, y, l.conductance_w_k),
            (Ok(x), Err(inp)) | (Err(inp), Ok(x)) => {
                c.b.link_boundary(x, inp, l.conductance_w_k, group)
            }
            (Err(_), Err(_)) => {}
        }
        if let (Some(zi), true) = (
            c.zone_index
                .get(l.from.as_str())
                .or(c.zone_index.get(l.to.as_str()))
                .copied(),
            [&l.from, &l.to].iter().any(|s| {
                s.as_str() == OUTDOOR
                    || s.as_str() == GROUND
                    || m.boundaries.iter().any(|b| &b.id == *s)
            }),
        ) {
            c.losses.push(ElementLoss {
                id: l.id.clone(),
                zone: zi,
                group,
                other_side: if c.zone_index.contains_key(l.from.as_str()) {
                    l.to.clone()
                } else {
                    l.from.clone()
                },
                area_m2: 0.0,
                u_value_w_m2k: 0.0,
                h_w_k: l.conductance_w_k,
            });
        }
    }
    for h in &m.network.heat_inputs {
        let inp = c.input(
            &format!("heat_{}_w", h.id),
            Hold::Step,
            InputRole::RawHeat {
                power_w: h.power_w,
                schedule: h.schedule.clone(),
            },
        );
        let node = match c.zone_index.get(h.node.as_str()) {
            Some(&zi) => c.zone_air[zi],
            None => c.b.node(&h.node).expect("validated node"),
        };
        c.b.inject(node, inp, 1.0);
    }
}

fn construction_table(c: &Compiler) -> Vec<ConstructionU> {
    let mut out = Vec::new();
    let m = c.m;
    for con in &m.constructions {
        let mut dirs: Vec<(FlowDirection, bool)> = m
            .opaque
            .iter()
            .filter(|e| e.construction == con.id)
            .map(|e| {
                (
                    direction_of(opaque_kind(e)),
                    e.other_side == OUTDOOR || e.other_side == GROUND,
                )
            })
            .collect();
        if dirs.is_empty() {
            dirs.push((FlowDirection::Horizontal, false));
        }
        dirs.sort();
        dirs.dedup_by_key(|d| d.0);
        for (dir, outside) in dirs {
            let (_, r, cap) = c.pieces(con, dir);
            let r_in = con
                .inside_resistance_m2k_w
                .unwrap_or(iso6946::inside_resistance(dir));
            let r_out = con.outside_resistance_m2k_w.unwrap_or(if outside {
                iso6946::OUTSIDE_RESISTANCE
            } else {
                iso6946::inside_resistance(dir)
            });
            out.push(ConstructionU {
                id: con.id.clone(),
                direction: direction_name(dir),
                u_value_w_m2k: 1.0 / (r_in + r + r_out),
                areal_capacity_kj_m2k: cap / 1000.0,
            });
        }
    }
    out
}
