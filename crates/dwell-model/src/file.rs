//! The model file: the JSON a person writes to describe a house.
//!
//! Field names carry their unit where it is not obvious (`thickness_m`, `capacity_w`). Every
//! object that others refer to has an `id`; references are by id. Unknown fields are errors.
//! Directions: azimuth in degrees clockwise from north (180 = south), tilt in degrees from
//! horizontal (0 = facing up, 90 = vertical, 180 = facing down).

use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

/// A whole model file.
#[derive(Clone, Debug, Default, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct ModelFile {
    /// Optional link to the JSON Schema (`dwell schema`), for editors.
    #[serde(rename = "$schema", default, skip_serializing_if = "Option::is_none")]
    pub schema: Option<String>,
    /// Short name of the house, shown in outputs.
    #[serde(default)]
    pub name: String,
    /// Free text: who, where, what is assumed. Say here when the house is invented.
    #[serde(default)]
    pub description: String,
    /// Where the house stands (for the sun and the time zone).
    #[serde(default)]
    pub site: Site,
    /// Materials used by constructions.
    #[serde(default)]
    pub materials: Vec<Material>,
    /// Layered constructions, listed from the outside (or the other side) to the inside.
    #[serde(default)]
    pub constructions: Vec<Construction>,
    /// Rooms or groups of rooms sharing one air temperature.
    #[serde(default)]
    pub zones: Vec<Zone>,
    /// Opaque elements: walls, roofs, floors between a zone and outdoors, ground, another zone
    /// or a fixed-temperature boundary.
    #[serde(default)]
    pub opaque: Vec<Opaque>,
    /// Heavy things inside one zone (internal walls, floors between storeys of one zone).
    #[serde(default)]
    pub internal_mass: Vec<InternalMass>,
    /// Windows and doors.
    #[serde(default)]
    pub openings: Vec<Opening>,
    /// Ventilation, infiltration and air exchange between zones.
    #[serde(default)]
    pub airflows: Vec<Airflow>,
    /// Internal heat gains (people, appliances, lighting).
    #[serde(default)]
    pub gains: Vec<Gain>,
    /// Heaters and their thermostats.
    #[serde(default)]
    pub heaters: Vec<Heater>,
    /// Weekly schedules (setpoints, gain fractions, occupancy).
    #[serde(default)]
    pub schedules: Vec<Schedule>,
    /// Boundaries held at a temperature (an adjoining dwelling, a heated stairwell).
    #[serde(default)]
    pub boundaries: Vec<FixedBoundary>,
    /// Nodes and links written directly, for people who think in networks.
    #[serde(default)]
    pub network: RawNetwork,
    /// Options of the network builder.
    #[serde(default)]
    pub mesh: Mesh,
}

/// The site.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct Site {
    /// Latitude (degrees, north positive).
    #[serde(default = "default_lat")]
    pub latitude_deg: f64,
    /// Longitude (degrees, east positive).
    #[serde(default)]
    pub longitude_deg: f64,
    /// Standard-time offset from UTC (hours), used for schedules and the sun.
    #[serde(default)]
    pub utc_offset_h: f64,
    /// Height above sea level (m).
    #[serde(default)]
    pub elevation_m: f64,
    /// Ground reflectance for the sun on tilted surfaces (1), default 0.2.
    #[serde(default = "default_albedo")]
    pub ground_albedo: f64,
    /// Deep-ground temperature (°C) under ground floors. Default: the weather file's ground
    /// column if it has one, else its annual mean air temperature.
    #[serde(default)]
    pub deep_ground_c: Option<f64>,
}

fn default_lat() -> f64 {
    50.0
}
fn default_albedo() -> f64 {
    0.2
}

impl Default for Site {
    fn default() -> Self {
        Site {
            latitude_deg: default_lat(),
            longitude_deg: 0.0,
            utc_offset_h: 0.0,
            elevation_m: 0.0,
            ground_albedo: default_albedo(),
            deep_ground_c: None,
        }
    }
}

/// A homogeneous material.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct Material {
    /// Identifier used by construction layers.
    pub id: String,
    /// Thermal conductivity λ (W/(m·K)).
    pub conductivity_w_mk: f64,
    /// Density ρ (kg/m³).
    pub density_kg_m3: f64,
    /// Specific heat capacity c (J/(kg·K)).
    pub specific_heat_j_kgk: f64,
}

/// A layered construction, layers from the outside (or the other side) to the inside.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct Construction {
    /// Identifier used by elements.
    pub id: String,
    /// Layers, outside first.
    pub layers: Vec<Layer>,
    /// Inside surface resistance (m²·K/W). Default: ISO 6946 by heat-flow direction.
    #[serde(default)]
    pub inside_resistance_m2k_w: Option<f64>,
    /// Outside surface resistance (m²·K/W). Default: ISO 6946 (0.04), or the inside value
    /// when the other side is a zone.
    #[serde(default)]
    pub outside_resistance_m2k_w: Option<f64>,
}

/// One layer: a material with a thickness, an unventilated air gap, or a bare resistance.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct Layer {
    /// Material id (with `thickness_m`).
    #[serde(default)]
    pub material: Option<String>,
    /// Thickness (m), with `material`.
    #[serde(default)]
    pub thickness_m: Option<f64>,
    /// Thickness of an unventilated air layer (m); its resistance follows ISO 6946 Annex D
    /// for the heat-flow direction, high-emissivity faces.
    #[serde(default)]
    pub air_gap_m: Option<f64>,
    /// A thermal resistance with no mass (m²·K/W), e.g. a membrane or a measured value.
    #[serde(default)]
    pub resistance_m2k_w: Option<f64>,
    /// Number of nodes in this layer, overriding the rule of `mesh`.
    #[serde(default)]
    pub nodes: Option<u32>,
}

/// A zone: a room or group of rooms with one air temperature.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct Zone {
    /// Identifier.
    pub id: String,
    /// Floor area (m²).
    pub floor_area_m2: f64,
    /// Air volume (m³).
    pub volume_m3: f64,
    /// Heat capacity of furniture and contents per floor area (kJ/(m²·K)); default 10
    /// (ISO 52016-1 default for furnishing).
    #[serde(default = "default_furnishing")]
    pub furnishing_kj_m2k: f64,
    /// Whether the zone is meant to be heated (a garage or loft space is not).
    #[serde(default = "yes")]
    pub heated: bool,
    /// Comfort band for occupied hours.
    #[serde(default)]
    pub comfort: Option<Comfort>,
    /// Schedule id whose value > 0 means occupied; default: always occupied.
    #[serde(default)]
    pub occupancy: Option<String>,
    /// Design indoor temperature for heat-load sizing (°C); default the comfort minimum, else 20.
    #[serde(default)]
    pub design_indoor_c: Option<f64>,
}

fn default_furnishing() -> f64 {
    10.0
}
fn yes() -> bool {
    true
}

/// A comfort band (°C).
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct Comfort {
    /// Lowest comfortable air temperature (°C).
    pub min_c: f64,
    /// Highest comfortable air temperature (°C).
    pub max_c: f64,
}

/// How an opaque element is classed in heat-loss summaries.
#[derive(
    Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord, Deserialize, Serialize, JsonSchema,
)]
#[serde(rename_all = "snake_case")]
pub enum OpaqueKind {
    /// A wall (tilt 60–120°).
    Wall,
    /// A roof or ceiling to a cold loft (tilt below 60°).
    Roof,
    /// A floor (tilt above 120°), including floors on the ground.
    Floor,
}

/// An opaque element between a zone and something else.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct Opaque {
    /// Identifier.
    pub id: String,
    /// Construction id (layers listed from `other_side` to `zone`).
    pub construction: String,
    /// The zone on the inside.
    pub zone: String,
    /// `outdoor`, `ground`, a zone id, or a boundary id.
    pub other_side: String,
    /// Area (m²), net of openings in it.
    pub area_m2: f64,
    /// Azimuth of the outward normal (degrees clockwise from north, 180 = south).
    #[serde(default = "south")]
    pub azimuth_deg: f64,
    /// Tilt (degrees; 0 roof facing up, 90 wall, 180 floor facing down).
    #[serde(default = "vertical")]
    pub tilt_deg: f64,
    /// Solar absorptance of the outside surface (1), default 0.6.
    #[serde(default = "default_absorptance")]
    pub solar_absorptance: f64,
    /// Wall, roof or floor; default from the tilt.
    #[serde(default)]
    pub kind: Option<OpaqueKind>,
    /// Exposed perimeter of a floor on the ground (m), ISO 13370; required for `ground`.
    #[serde(default)]
    pub exposed_perimeter_m: Option<f64>,
    /// Thickness of the walls round a ground floor (m), ISO 13370 `w`; default 0.3.
    #[serde(default)]
    pub wall_thickness_m: Option<f64>,
}

fn south() -> f64 {
    180.0
}
fn vertical() -> f64 {
    90.0
}
fn default_absorptance() -> f64 {
    0.6
}

/// Mass inside one zone, exposed to its air.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct InternalMass {
    /// Identifier.
    pub id: String,
    /// The zone.
    pub zone: String,
    /// Construction id.
    pub construction: String,
    /// Area of one face (m²).
    pub area_m2: f64,
    /// `true` (default): both faces are in the zone (an internal wall); `false`: one face, the
    /// other adiabatic (a floor slab's top face).
    #[serde(default = "yes")]
    pub both_faces: bool,
}

/// Window or door.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Deserialize, Serialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum OpeningKind {
    /// A window (default).
    #[default]
    Window,
    /// A door.
    Door,
}

/// A window or door: a conductance (no mass) plus, for glazing, solar gain.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct Opening {
    /// Identifier.
    pub id: String,
    /// The zone it lets heat and sun into.
    pub zone: String,
    /// `outdoor` (default), a zone id or a boundary id.
    #[serde(default = "outdoor")]
    pub other_side: String,
    /// Window or door.
    #[serde(default)]
    pub kind: OpeningKind,
    /// Whole area including frame (m²).
    pub area_m2: f64,
    /// Whole-element U-value including frame (W/(m²·K)).
    pub u_value_w_m2k: f64,
    /// Total solar energy transmittance of the glazing at normal incidence (1); 0 for doors.
    #[serde(default)]
    pub g_value: f64,
    /// Share of the area that is frame (1), default 0.25 for windows.
    #[serde(default)]
    pub frame_fraction: Option<f64>,
    /// Azimuth (degrees clockwise from north).
    #[serde(default = "south")]
    pub azimuth_deg: f64,
    /// Tilt (degrees; 90 vertical).
    #[serde(default = "vertical")]
    pub tilt_deg: f64,
    /// Reduction for shading by overhangs, blinds, surroundings (1), default 1 = none.
    #[serde(default = "one")]
    pub shading_factor: f64,
}

fn outdoor() -> String {
    "outdoor".into()
}
fn one() -> f64 {
    1.0
}

/// Air entering a zone: from outdoors (ventilation, infiltration) or exchanged with another zone.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct Airflow {
    /// Identifier.
    pub id: String,
    /// The zone.
    pub zone: String,
    /// `outdoor` (default) or another zone id (a balanced exchange: the same flow each way).
    #[serde(default = "outdoor")]
    pub from: String,
    /// Air changes per hour of the zone volume (1/h).
    #[serde(default)]
    pub air_changes_per_h: Option<f64>,
    /// Volume flow (m³/h).
    #[serde(default)]
    pub flow_m3_h: Option<f64>,
    /// Heat-recovery efficiency of a ventilation unit (1), default 0.
    #[serde(default)]
    pub heat_recovery: f64,
}

/// An internal heat gain into a zone's air.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct Gain {
    /// Identifier.
    pub id: String,
    /// The zone.
    pub zone: String,
    /// Peak power (W). Give this or `w_per_m2`.
    #[serde(default)]
    pub power_w: Option<f64>,
    /// Peak power per floor area of the zone (W/m²).
    #[serde(default)]
    pub w_per_m2: Option<f64>,
    /// Schedule id giving the fraction of the peak (0…1) over the week; default always 1.
    #[serde(default)]
    pub schedule: Option<String>,
}

/// A heater with its thermostat.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct Heater {
    /// Identifier.
    pub id: String,
    /// The zone whose air temperature the thermostat reads.
    pub zone: String,
    /// Largest heat output (W).
    pub capacity_w: f64,
    /// Where the heat goes: `air` (default), or the id of an opaque element or internal mass
    /// of the zone (its inside surface: underfloor or wall heating).
    #[serde(default = "air")]
    pub into: String,
    /// Constant setpoint (°C). Give this or `setpoint_schedule`.
    #[serde(default)]
    pub setpoint_c: Option<f64>,
    /// Schedule id of the setpoint (°C) over the week.
    #[serde(default)]
    pub setpoint_schedule: Option<String>,
    /// Schedule id of a prescribed heat output (W), used with `--control schedule`.
    #[serde(default)]
    pub power_schedule: Option<String>,
    /// Dead band of an on/off thermostat (K), default 1.
    #[serde(default = "one")]
    pub dead_band_k: f64,
    /// Efficiency (1) turning purchased energy into heat (a boiler 0.9, direct electric 1).
    /// Ignored when `cop_curve` is given.
    #[serde(default = "one")]
    pub efficiency: f64,
    /// Coefficient of performance of a heat pump over outdoor temperature, interpolated linearly
    /// and held at the ends.
    #[serde(default)]
    pub cop_curve: Vec<CopPoint>,
    /// Price of purchased energy (money per kWh), optional.
    #[serde(default)]
    pub price_per_kwh: Option<f64>,
}

fn air() -> String {
    "air".into()
}

/// One point of a COP curve.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct CopPoint {
    /// Outdoor air temperature (°C).
    pub outdoor_c: f64,
    /// Coefficient of performance (1).
    pub cop: f64,
}

/// A weekly schedule: a value for every moment of the week, in local standard time.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct Schedule {
    /// Identifier.
    pub id: String,
    /// Value outside every period.
    pub base: f64,
    /// Periods with another value, on chosen days of the week. Later entries win.
    #[serde(default)]
    pub periods: Vec<Period>,
    /// Date ranges (every year) with one value all day, overriding the week: holidays.
    #[serde(default)]
    pub away: Vec<Away>,
}

/// Part of a day on some days of the week.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct Period {
    /// Days: `mon`…`sun`, `weekdays`, `weekend` or `daily`, e.g. `["weekdays"]`.
    pub days: Vec<String>,
    /// Start time `HH:MM` (inclusive).
    pub from: String,
    /// End time `HH:MM` (exclusive; `24:00` for midnight; may be earlier than `from` to run
    /// past midnight).
    pub to: String,
    /// Value during the period.
    pub value: f64,
}

/// A date range every year, `MM-DD` to `MM-DD` inclusive.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct Away {
    /// First day, `MM-DD`.
    pub from: String,
    /// Last day, `MM-DD` (inclusive).
    pub to: String,
    /// Value on those days.
    pub value: f64,
}

/// A boundary held at a temperature.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct FixedBoundary {
    /// Identifier, usable as `other_side` and in network links.
    pub id: String,
    /// Temperature (°C).
    pub temperature_c: f64,
}

/// Nodes and links written directly.
#[derive(Clone, Debug, Default, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawNetwork {
    /// Nodes with a heat capacity (J/K; 0 for a massless node).
    #[serde(default)]
    pub nodes: Vec<RawNode>,
    /// Conductances between two ends. An end is a raw node id, a zone id (its air node),
    /// `outdoor`, `ground`, or a boundary id.
    #[serde(default)]
    pub links: Vec<RawLink>,
    /// Constant or scheduled heat flows into nodes.
    #[serde(default)]
    pub heat_inputs: Vec<RawHeat>,
}

/// A raw node.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawNode {
    /// Identifier.
    pub id: String,
    /// Heat capacity (J/K); 0 makes it massless.
    pub capacitance_j_k: f64,
}

/// A raw link.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawLink {
    /// Identifier.
    pub id: String,
    /// One end.
    pub from: String,
    /// The other end.
    pub to: String,
    /// Conductance (W/K).
    pub conductance_w_k: f64,
    /// Group under which heat flow to a boundary is reported; default `other`.
    #[serde(default)]
    pub group: Option<String>,
}

/// A raw heat input.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawHeat {
    /// Identifier.
    pub id: String,
    /// Node (raw node id or zone id).
    pub node: String,
    /// Power (W), multiplied by `schedule` if given.
    pub power_w: f64,
    /// Schedule id of a fraction (1), optional.
    #[serde(default)]
    pub schedule: Option<String>,
}

/// Options of the network builder.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct Mesh {
    /// Largest sublayer thickness as a multiple of the layer's penetration depth at the
    /// reference step, `√(a·Δt)` with `a = λ/(ρc)`; default 0.7 (the ISO 13786 check in
    /// docs/validation.md: decrement factor within 2 % at 24 h). Smaller is finer.
    #[serde(default = "default_depth_fraction")]
    pub depth_fraction: f64,
    /// Reference time step for the rule (s), default 3600.
    #[serde(default = "hour")]
    pub reference_step_s: f64,
    /// Most nodes per layer, default 8.
    #[serde(default = "max_nodes")]
    pub max_nodes_per_layer: u32,
    /// Layers with less heat capacity per area than this (kJ/(m²·K)) carry no node, default 1.
    #[serde(default = "one")]
    pub massless_below_kj_m2k: f64,
    /// Merge elements with the same construction, zone, other side and kind (exact for zone
    /// temperatures); default true.
    #[serde(default = "yes")]
    pub merge_alike: bool,
}

fn hour() -> f64 {
    3600.0
}
fn default_depth_fraction() -> f64 {
    0.7
}
fn max_nodes() -> u32 {
    8
}

impl Default for Mesh {
    fn default() -> Self {
        Mesh {
            depth_fraction: default_depth_fraction(),
            reference_step_s: hour(),
            max_nodes_per_layer: max_nodes(),
            massless_below_kj_m2k: 1.0,
            merge_alike: true,
        }
    }
}
