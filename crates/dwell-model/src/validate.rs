//! Checks of a parsed model file that types cannot express: ranges, references and ids.
//! Every problem is collected, in file order, with its JSON path.

use std::collections::{HashMap, HashSet};

use crate::error::{suggest, Problem};
use crate::file::*;
use crate::schedule::WeeklySchedule;

/// Names reserved for the outdoor air and the ground.
pub const OUTDOOR: &str = "outdoor";
/// The deep ground under ground floors.
pub const GROUND: &str = "ground";

struct Checker {
    problems: Vec<Problem>,
}

impl Checker {
    fn push(&mut self, path: String, message: impl Into<String>) {
        self.problems.push(Problem {
            path,
            message: message.into(),
        });
    }

    /// `value` must be finite and `> 0` (or `≥ 0` with `allow_zero`).
    fn positive(&mut self, path: String, what: &str, value: f64, allow_zero: bool) {
        let ok = value.is_finite() && (value > 0.0 || (allow_zero && value == 0.0));
        if !ok {
            let need = if allow_zero {
                "zero or positive"
            } else {
                "positive"
            };
            self.push(path, format!("{what} is {value}; it must be {need}"));
        }
    }

    fn within(&mut self, path: String, what: &str, value: f64, lo: f64, hi: f64) {
        if !(value.is_finite() && value >= lo && value <= hi) {
            self.push(
                path,
                format!("{what} is {value}; it must lie between {lo} and {hi}"),
            );
        }
    }

    fn reference(&mut self, path: String, what: &str, id: &str, known: &HashSet<&str>) {
        if !known.contains(id) {
            let mut msg = format!("unknown {what} `{id}`");
            if let Some(s) = suggest(id, known.iter().copied()) {
                msg.push_str(&format!("; did you mean `{s}`?"));
            } else if known.is_empty() {
                msg.push_str(&format!("; the model defines no {what}"));
            }
            self.push(path, msg);
        }
    }
}

/// Ids of one kind, with duplicates reported.
fn ids<'a>(c: &mut Checker, list: &str, items: impl Iterator<Item = &'a str>) -> HashSet<&'a str> {
    let mut seen: HashMap<&str, usize> = HashMap::new();
    for (i, id) in items.enumerate() {
        if id.trim().is_empty() {
            c.push(
                format!("$.{list}[{i}].id"),
                "the id is empty; give every item a name",
            );
        } else if let Some(first) = seen.insert(id, i) {
            c.push(
                format!("$.{list}[{i}].id"),
                format!("duplicate id `{id}` (first used at $.{list}[{first}])"),
            );
        }
    }
    seen.into_keys().collect()
}

/// All problems of a model, empty when it is usable.
pub fn validate(m: &ModelFile) -> Vec<Problem> {
    let mut c = Checker {
        problems: Vec::new(),
    };
    let materials = ids(
        &mut c,
        "materials",
        m.materials.iter().map(|x| x.id.as_str()),
    );
    let constructions = ids(
        &mut c,
        "constructions",
        m.constructions.iter().map(|x| x.id.as_str()),
    );
    let zones = ids(&mut c, "zones", m.zones.iter().map(|x| x.id.as_str()));
    let schedules = ids(
        &mut c,
        "schedules",
        m.schedules.iter().map(|x| x.id.as_str()),
    );
    let boundaries = ids(
        &mut c,
        "boundaries",
        m.boundaries.iter().map(|x| x.id.as_str()),
    );
    let raw_nodes = ids(
        &mut c,
        "network.nodes",
        m.network.nodes.iter().map(|x| x.id.as_str()),
    );
    // Elements, openings, airflows, gains, heaters and raw links and heat inputs share one
    // namespace: their ids name network nodes and inputs in every output.
    let mut element_ids: HashMap<&str, String> = HashMap::new();
    let lists: [(&str, Vec<&str>); 8] = [
        ("opaque", m.opaque.iter().map(|x| x.id.as_str()).collect()),
        (
            "internal_mass",
            m.internal_mass.iter().map(|x| x.id.as_str()).collect(),
        ),
        (
            "openings",
            m.openings.iter().map(|x| x.id.as_str()).collect(),
        ),
        (
            "airflows",
            m.airflows.iter().map(|x| x.id.as_str()).collect(),
        ),
        ("gains", m.gains.iter().map(|x| x.id.as_str()).collect()),
        ("heaters", m.heaters.iter().map(|x| x.id.as_str()).collect()),
        (
            "network.links",
            m.network.links.iter().map(|x| x.id.as_str()).collect(),
        ),
        (
            "network.heat_inputs",
            m.network
                .heat_inputs
                .iter()
                .map(|x| x.id.as_str())
                .collect(),
        ),
    ];
    for (list, items) in &lists {
        for (i, id) in items.iter().enumerate() {
            let here = format!("$.{list}[{i}]");
            if id.trim().is_empty() {
                c.push(
                    format!("{here}.id"),
                    "the id is empty; give every item a name",
                );
            } else if let Some(first) = element_ids.get(id) {
                c.push(format!("{here}.id"), format!("duplicate id `{id}` (first used at {first}); element, opening, airflow, gain, heater and link ids must all differ"));
            } else {
                element_ids.insert(id, here);
            }
        }
    }

    // Names that may stand on the far side of an element: one namespace.
    let mut sides: HashSet<&str> = HashSet::from([OUTDOOR, GROUND]);
    for (list, set) in [
        ("zones", &zones),
        ("boundaries", &boundaries),
        ("network.nodes", &raw_nodes),
    ] {
        for id in set.iter() {
            if !sides.insert(id) {
                c.push(format!("$.{list}"), format!("id `{id}` is used by more than one zone, boundary or node (or is reserved: outdoor, ground); rename one"));
            }
        }
    }

    if m.zones.is_empty() && m.network.nodes.is_empty() {
        c.push(
            "$".into(),
            "the model is empty: it has no zones and no network nodes; add at least one zone",
        );
    }

    check_site(&mut c, &m.site);
    for (i, x) in m.materials.iter().enumerate() {
        let p = |f: &str| format!("$.materials[{i}].{f}");
        c.positive(
            p("conductivity_w_mk"),
            "conductivity",
            x.conductivity_w_mk,
            false,
        );
        c.positive(p("density_kg_m3"), "density", x.density_kg_m3, false);
        c.positive(
            p("specific_heat_j_kgk"),
            "specific heat",
            x.specific_heat_j_kgk,
            false,
        );
    }
    for (i, x) in m.constructions.iter().enumerate() {
        check_construction(&mut c, i, x, &materials);
    }
    for (i, s) in m.schedules.iter().enumerate() {
        if let Err(errs) = WeeklySchedule::new(s) {
            for (f, e) in errs {
                c.push(format!("$.schedules[{i}].{f}"), e);
            }
        }
    }
    for (i, z) in m.zones.iter().enumerate() {
        let p = |f: &str| format!("$.zones[{i}].{f}");
        c.positive(p("floor_area_m2"), "floor area", z.floor_area_m2, false);
        c.positive(p("volume_m3"), "volume", z.volume_m3, false);
        c.positive(
            p("furnishing_kj_m2k"),
            "furnishing heat capacity",
            z.furnishing_kj_m2k,
            true,
        );
        if let Some(b) = &z.comfort {
            c.within(p("comfort.min_c"), "comfort minimum", b.min_c, -20.0, 40.0);
            c.within(p("comfort.max_c"), "comfort maximum", b.max_c, -20.0, 45.0);
            if b.min_c >= b.max_c {
                c.push(
                    p("comfort"),
                    format!(
                        "the comfort band {}…{} °C is empty; min_c must be below max_c",
                        b.min_c, b.max_c
                    ),
                );
            }
        }
        if let Some(s) = &z.occupancy {
            c.reference(p("occupancy"), "schedule", s, &schedules);
        }
        if let Some(t) = z.design_indoor_c {
            c.within(
                p("design_indoor_c"),
                "design indoor temperature",
                t,
                0.0,
                35.0,
            );
        }
    }
    let zone_or_outdoor: HashSet<&str> = zones.iter().copied().chain([OUTDOOR]).collect();
    for (i, e) in m.opaque.iter().enumerate() {
        let p = |f: &str| format!("$.opaque[{i}].{f}");
        c.reference(
            p("construction"),
            "construction",
            &e.construction,
            &constructions,
        );
        c.reference(p("zone"), "zone", &e.zone, &zones);
        check_side(
            &mut c,
            p("other_side"),
            &e.other_side,
            &e.zone,
            &zones,
            &boundaries,
            true,
        );
        c.positive(p("area_m2"), "area", e.area_m2, false);
        c.within(p("azimuth_deg"), "azimuth", e.azimuth_deg, 0.0, 360.0);
        c.within(p("tilt_deg"), "tilt", e.tilt_deg, 0.0, 180.0);
        c.within(
            p("solar_absorptance"),
            "solar absorptance",
            e.solar_absorptance,
            0.0,
            1.0,
        );
        if e.other_side == GROUND {
            match e.exposed_perimeter_m {
                None => c.push(
                    p("exposed_perimeter_m"),
                    "a floor on the ground needs its exposed perimeter (m) for ISO 13370",
                ),
                Some(v) => c.positive(p("exposed_perimeter_m"), "exposed perimeter", v, false),
            }
            if let Some(w) = e.wall_thickness_m {
                c.positive(p("wall_thickness_m"), "wall thickness", w, false);
            }
        }
    }
    for (i, e) in m.internal_mass.iter().enumerate() {
        let p = |f: &str| format!("$.internal_mass[{i}].{f}");
        c.reference(p("zone"), "zone", &e.zone, &zones);
        c.reference(
            p("construction"),
            "construction",
            &e.construction,
            &constructions,
        );
        c.positive(p("area_m2"), "area", e.area_m2, false);
    }
    for (i, o) in m.openings.iter().enumerate() {
        let p = |f: &str| format!("$.openings[{i}].{f}");
        c.reference(p("zone"), "zone", &o.zone, &zones);
        check_side(
            &mut c,
            p("other_side"),
            &o.other_side,
            &o.zone,
            &zones,
            &boundaries,
            false,
        );
        c.positive(p("area_m2"), "area", o.area_m2, false);
        c.positive(p("u_value_w_m2k"), "U-value", o.u_value_w_m2k, false);
        c.within(p("g_value"), "g-value", o.g_value, 0.0, 1.0);
        if let Some(f) = o.frame_fraction {
            c.within(p("frame_fraction"), "frame fraction", f, 0.0, 1.0);
        }
        c.within(
            p("shading_factor"),
            "shading factor",
            o.shading_factor,
            0.0,
            1.0,
        );
        c.within(p("azimuth_deg"), "azimuth", o.azimuth_deg, 0.0, 360.0);
        c.within(p("tilt_deg"), "tilt", o.tilt_deg, 0.0, 180.0);
    }
    for (i, a) in m.airflows.iter().enumerate() {
        let p = |f: &str| format!("$.airflows[{i}].{f}");
        c.reference(p("zone"), "zone", &a.zone, &zones);
        c.reference(p("from"), "zone (or `outdoor`)", &a.from, &zone_or_outdoor);
        if a.from == a.zone {
            c.push(p("from"), "air cannot flow from a zone into itself");
        }
        match (a.air_changes_per_h, a.flow_m3_h) {
            (Some(v), None) => c.positive(p("air_changes_per_h"), "air change rate", v, true),
            (None, Some(v)) => c.positive(p("flow_m3_h"), "air flow", v, true),
            _ => c.push(
                format!("$.airflows[{i}]"),
                "give exactly one of air_changes_per_h and flow_m3_h",
            ),
        }
        c.within(
            p("heat_recovery"),
            "heat-recovery efficiency",
            a.heat_recovery,
            0.0,
            0.99,
        );
        if a.from != OUTDOOR && a.heat_recovery != 0.0 {
            c.push(
                p("heat_recovery"),
                "heat recovery applies only to air from outdoors",
            );
        }
    }
    for (i, g) in m.gains.iter().enumerate() {
        let p = |f: &str| format!("$.gains[{i}].{f}");
        c.reference(p("zone"), "zone", &g.zone, &zones);
        match (g.power_w, g.w_per_m2) {
            (Some(v), None) => c.positive(p("power_w"), "gain", v, true),
            (None, Some(v)) => c.positive(p("w_per_m2"), "gain per area", v, true),
            _ => c.push(
                format!("$.gains[{i}]"),
                "give exactly one of power_w and w_per_m2",
            ),
        }
        if let Some(s) = &g.schedule {
            c.reference(p("schedule"), "schedule", s, &schedules);
        }
    }
    for (i, h) in m.heaters.iter().enumerate() {
        check_heater(&mut c, i, h, m, &zones, &schedules);
    }
    for (i, b) in m.boundaries.iter().enumerate() {
        c.within(
            format!("$.boundaries[{i}].temperature_c"),
            "boundary temperature",
            b.temperature_c,
            -60.0,
            80.0,
        );
    }
    let ends: HashSet<&str> = sides.clone();
    let nodes_or_zones: HashSet<&str> = raw_nodes.iter().chain(zones.iter()).copied().collect();
    for (i, n) in m.network.nodes.iter().enumerate() {
        c.positive(
            format!("$.network.nodes[{i}].capacitance_j_k"),
            "capacitance",
            n.capacitance_j_k,
            true,
        );
    }
    for (i, l) in m.network.links.iter().enumerate() {
        let p = |f: &str| format!("$.network.links[{i}].{f}");
        c.reference(p("from"), "node, zone or boundary", &l.from, &ends);
        c.reference(p("to"), "node, zone or boundary", &l.to, &ends);
        c.positive(
            p("conductance_w_k"),
            "conductance",
            l.conductance_w_k,
            false,
        );
        if l.from == l.to {
            c.push(p("to"), "a link cannot join a node to itself");
        }
        let boundary = |s: &str| s == OUTDOOR || s == GROUND || boundaries.contains(s);
        if boundary(&l.from) && boundary(&l.to) {
            c.push(
                p("to"),
                "a link between two boundaries carries no heat the model can use",
            );
        }
    }
    for (i, h) in m.network.heat_inputs.iter().enumerate() {
        let p = |f: &str| format!("$.network.heat_inputs[{i}].{f}");
        c.reference(p("node"), "node or zone", &h.node, &nodes_or_zones);
        if !h.power_w.is_finite() {
            c.push(p("power_w"), "must be a finite number");
        }
        if let Some(s) = &h.schedule {
            c.reference(p("schedule"), "schedule", s, &schedules);
        }
    }
    let mesh = &m.mesh;
    c.positive(
        "$.mesh.depth_fraction".into(),
        "depth fraction",
        mesh.depth_fraction,
        false,
    );
    c.within(
        "$.mesh.reference_step_s".into(),
        "reference step",
        mesh.reference_step_s,
        1.0,
        86400.0,
    );
    if mesh.max_nodes_per_layer == 0 || mesh.max_nodes_per_layer > 64 {
        c.push(
            "$.mesh.max_nodes_per_layer".into(),
            format!("{} nodes per layer; allowed 1…64", mesh.max_nodes_per_layer),
        );
    }
    c.positive(
        "$.mesh.massless_below_kj_m2k".into(),
        "massless threshold",
        mesh.massless_below_kj_m2k,
        true,
    );
    c.problems
}

fn check_site(c: &mut Checker, s: &Site) {
    c.within(
        "$.site.latitude_deg".into(),
        "latitude",
        s.latitude_deg,
        -90.0,
        90.0,
    );
    c.within(
        "$.site.longitude_deg".into(),
        "longitude",
        s.longitude_deg,
        -180.0,
        180.0,
    );
    c.within(
        "$.site.utc_offset_h".into(),
        "UTC offset",
        s.utc_offset_h,
        -12.0,
        14.0,
    );
    c.within(
        "$.site.elevation_m".into(),
        "elevation",
        s.elevation_m,
        -500.0,
        9000.0,
    );
    c.within(
        "$.site.ground_albedo".into(),
        "ground albedo",
        s.ground_albedo,
        0.0,
        1.0,
    );
    if let Some(t) = s.deep_ground_c {
        c.within(
            "$.site.deep_ground_c".into(),
            "deep-ground temperature",
            t,
            -30.0,
            40.0,
        );
    }
}

fn check_construction(c: &mut Checker, i: usize, x: &Construction, materials: &HashSet<&str>) {
    if x.layers.is_empty() {
        c.push(
            format!("$.constructions[{i}].layers"),
            "a construction needs at least one layer",
        );
    }
    for (j, l) in x.layers.iter().enumerate() {
        let p = |f: &str| format!("$.constructions[{i}].layers[{j}].{f}");
        let kinds = [
            l.material.is_some() || l.thickness_m.is_some(),
            l.air_gap_m.is_some(),
            l.resistance_m2k_w.is_some(),
        ];
        if kinds.iter().filter(|k| **k).count() != 1 {
            c.push(format!("$.constructions[{i}].layers[{j}]"), "a layer is one of: `material` with `thickness_m`, `air_gap_m`, or `resistance_m2k_w`");
            continue;
        }
        if let Some(mat) = &l.material {
            c.reference(p("material"), "material", mat, materials);
            match l.thickness_m {
                Some(d) => c.positive(p("thickness_m"), "thickness", d, false),
                None => c.push(p("thickness_m"), "a material layer needs `thickness_m`"),
            }
        } else if l.thickness_m.is_some() {
            c.push(p("material"), "`thickness_m` needs a `material`");
        }
        if let Some(d) = l.air_gap_m {
            c.within(p("air_gap_m"), "air-gap thickness (m)", d, 1e-4, 0.3);
        }
        if let Some(r) = l.resistance_m2k_w {
            c.positive(p("resistance_m2k_w"), "resistance", r, true);
        }
        if let Some(n) = l.nodes {
            if n > 64 {
                c.push(p("nodes"), format!("{n} nodes in one layer; allowed 0…64"));
            }
        }
    }
    if let Some(r) = x.inside_resistance_m2k_w {
        c.positive(
            format!("$.constructions[{i}].inside_resistance_m2k_w"),
            "inside surface resistance",
            r,
            true,
        );
    }
    if let Some(r) = x.outside_resistance_m2k_w {
        c.positive(
            format!("$.constructions[{i}].outside_resistance_m2k_w"),
            "outside surface resistance",
            r,
            true,
        );
    }
}

fn check_side(
    c: &mut Checker,
    path: String,
    side: &str,
    zone: &str,
    zones: &HashSet<&str>,
    boundaries: &HashSet<&str>,
    ground_ok: bool,
) {
    if side == zone {
        c.push(path, format!("the other side is the element's own zone `{zone}`; use internal_mass for mass inside a zone"));
        return;
    }
    if side == OUTDOOR || (ground_ok && side == GROUND) {
        return;
    }
    let known: HashSet<&str> = zones
        .iter()
        .chain(boundaries.iter())
        .copied()
        .chain([OUTDOOR])
        .chain(if ground_ok { Some(GROUND) } else { None })
        .collect();
    c.reference(
        path,
        "other side (outdoor, ground, a zone or a boundary)",
        side,
        &known,
    );
}

fn check_heater(
    c: &mut Checker,
    i: usize,
    h: &Heater,
    m: &ModelFile,
    zones: &HashSet<&str>,
    schedules: &HashSet<&str>,
) {
    let p = |f: &str| format!("$.heaters[{i}].{f}");
    c.reference(p("zone"), "zone", &h.zone, zones);
    c.positive(p("capacity_w"), "capacity", h.capacity_w, false);
    if h.into != "air" {
        let targets: HashSet<&str> = m
            .opaque
            .iter()
            .filter(|e| e.zone == h.zone)
            .map(|e| e.id.as_str())
            .chain(
                m.internal_mass
                    .iter()
                    .filter(|e| e.zone == h.zone)
                    .map(|e| e.id.as_str()),
            )
            .chain(["air"])
            .collect();
        c.reference(
            p("into"),
            "heat target (`air`, or an element of the heater's zone)",
            &h.into,
            &targets,
        );
    }
    match (&h.setpoint_c, &h.setpoint_schedule) {
        (Some(_), Some(_)) => c.push(
            format!("$.heaters[{i}]"),
            "give setpoint_c or setpoint_schedule, not both",
        ),
        (Some(t), None) => c.within(p("setpoint_c"), "setpoint", *t, 0.0, 35.0),
        (None, Some(s)) => c.reference(p("setpoint_schedule"), "schedule", s, schedules),
        (None, None) => {
            if h.power_schedule.is_none() {
                c.push(
                    format!("$.heaters[{i}]"),
                    "a heater needs setpoint_c, setpoint_schedule or power_schedule",
                );
            }
        }
    }
    if let Some(s) = &h.power_schedule {
        c.reference(p("power_schedule"), "schedule", s, schedules);
    }
    c.positive(p("dead_band_k"), "dead band", h.dead_band_k, false);
    c.within(p("efficiency"), "efficiency", h.efficiency, 0.05, 1.5);
    for (j, pt) in h.cop_curve.iter().enumerate() {
        c.within(
            format!("$.heaters[{i}].cop_curve[{j}].cop"),
            "COP",
            pt.cop,
            0.5,
            15.0,
        );
        c.within(
            format!("$.heaters[{i}].cop_curve[{j}].outdoor_c"),
            "outdoor temperature",
            pt.outdoor_c,
            -60.0,
            60.0,
        );
        if j > 0 && pt.outdoor_c <= h.cop_curve[j - 1].outdoor_c {
            c.push(
                format!("$.heaters[{i}].cop_curve[{j}].outdoor_c"),
                "COP points must be in rising order of outdoor temperature",
            );
        }
    }
    if let Some(pr) = h.price_per_kwh {
        c.positive(p("price_per_kwh"), "price", pr, true);
    }
}
