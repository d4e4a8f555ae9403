//! `dwell network MODEL --json`: the state space of a model.

use std::collections::BTreeMap;
use std::path::PathBuf;

use serde::Serialize;

use super::model_io;

/// Arguments of `dwell network`.
#[derive(clap::Args)]
pub struct NetworkArgs {
    /// Model file (JSON)
    pub model: PathBuf,
    /// Print the state space as JSON (the only format so far; accepted for clarity)
    #[arg(long)]
    pub json: bool,
}

/// The state space as written by `dwell network --json`.
#[derive(Serialize)]
pub struct StateSpaceJson<'a> {
    /// State names (nodes with heat capacity).
    pub states: &'a [String],
    /// Input names, with unit suffixes.
    pub inputs: Vec<&'a str>,
    /// Per input: `linear` (first-order hold, temperatures) or `step` (zero-order hold, heat).
    pub input_hold: Vec<&'static str>,
    /// `A = −C⁻¹K` (1/s), row-major.
    pub a: Vec<Vec<f64>>,
    /// `B = C⁻¹U`, row-major: (1/s) for temperatures, (K/J) for heat, (K·m²/J) for irradiance.
    pub b: Vec<Vec<f64>>,
    /// Node capacitances (J/K).
    pub capacitance_j_k: &'a [f64],
    /// Zone id → index of its air node in `states`.
    pub zone_states: BTreeMap<&'a str, usize>,
}

/// Runs the command.
pub fn run(args: NetworkArgs) -> anyhow::Result<()> {
    let (_, house) = model_io::load_house(&args.model)?;
    let net = &house.network;
    let a = net.system.a();
    let b = net.system.b();
    let rows = |m: &nalgebra::DMatrix<f64>| -> Vec<Vec<f64>> {
        (0..m.nrows())
            .map(|i| m.row(i).iter().copied().collect())
            .collect()
    };
    let out = StateSpaceJson {
        states: &net.states,
        inputs: net.inputs.iter().map(|i| i.name.as_str()).collect(),
        input_hold: net
            .inputs
            .iter()
            .map(|i| match i.hold {
                dwell_network::Hold::Linear => "linear",
                dwell_network::Hold::Step => "step",
            })
            .collect(),
        a: rows(&a),
        b: rows(&b),
        capacitance_j_k: &net.system.capacitance,
        zone_states: house
            .zones
            .iter()
            .map(|z| (z.id.as_str(), z.air_state))
            .collect(),
    };
    let _ = args.json;
    println!("{}", serde_json::to_string(&out)?);
    Ok(())
}
