//! The dwell model file: reading, checking and compiling a house description into an RC network.
//!
//! * [`file`]: the JSON structure a person writes (materials, constructions, zones, elements,
//!   openings, airflows, gains, heaters, schedules, boundaries, and a raw network section);
//! * [`read_model`] / [`parse_model`]: read with the place of every error (line and column for
//!   syntax, a JSON path and a "did you mean" for the rest);
//! * [`compile`]: build the RC network ([`House`]) with ISO 6946 surface resistances, a
//!   penetration-depth mesh rule, ISO 13370 ground floors, exact merging and Kron reduction;
//! * [`summary`]: the practitioner's check sheet (heat-loss coefficients, U-values, time
//!   constants);
//! * [`schedule`]: weekly schedules;
//! * [`patch`]: JSON Merge Patch (RFC 7386) for variants.
//!
//! ```
//! let text = r#"{
//!   "materials": [{"id": "brick", "conductivity_w_mk": 0.77, "density_kg_m3": 1700, "specific_heat_j_kgk": 800}],
//!   "constructions": [{"id": "solid", "layers": [{"material": "brick", "thickness_m": 0.22}]}],
//!   "zones": [{"id": "room", "floor_area_m2": 20, "volume_m3": 50}],
//!   "opaque": [{"id": "walls", "construction": "solid", "zone": "room", "other_side": "outdoor", "area_m2": 40}]
//! }"#;
//! let model = dwell_model::parse_model(text, "example.json").unwrap();
//! let house = dwell_model::compile(&model, "example.json").unwrap();
//! assert_eq!(house.zones[0].id, "room");
//! ```
#![deny(missing_docs)]

mod compile;
mod error;
pub mod file;
pub mod ground;
pub mod iso6946;
mod load;
pub mod patch;
pub mod schedule;
pub mod summary;
mod validate;

pub use compile::{
    airflow_m3_s, compile, layer_nodes, opaque_kind, ConstructionU, ElementLoss, House, InputRole,
    ZoneInfo, AIR_HEAT_CAPACITY_J_M3K, GROUPS,
};
pub use error::{suggest, ModelError, Problem};
pub use file::ModelFile;
pub use load::{from_value, parse_model, read_model};
pub use validate::{validate, GROUND, OUTDOOR};

/// The JSON Schema of the model file (draft 2020-12), for editors.
pub fn json_schema() -> serde_json::Value {
    let schema = schemars::schema_for!(ModelFile);
    serde_json::to_value(schema).expect("a schema is valid JSON")
}
