//! Mesh convergence (issue 8): each example's annual heating with the default node rule against
//! a refined mesh (sublayers a quarter of the penetration depth, up to 24 nodes a layer) — the
//! default within 1 %.

use std::path::PathBuf;

use dwell_studies::{simulate, SimOptions};
use dwell_testkit::{record, Check};

#[test]
fn default_mesh_is_within_one_percent_of_a_refined_mesh() {
    let w = dwell_weather::default_weather();
    for stem in ["fernhollow-cabin", "brickworth-house", "sunbank-bungalow"] {
        let path = PathBuf::from(env!("CARGO_MANIFEST_DIR"))
            .join(format!("../../zones-examples/{stem}.json"));
        let m = dwell_model::read_model(&path).unwrap();
        let mut fine = m.clone();
        fine.mesh.depth_fraction = 0.25;
        fine.mesh.max_nodes_per_layer = 24;
        let hd = dwell_model::compile(&m, stem).unwrap();
        let hf = dwell_model::compile(&fine, stem).unwrap();
        assert!(hf.network.states.len() > hd.network.states.len() + 10);
        let ed = simulate(&m, &hd, &w, &SimOptions::default())
            .unwrap()
            .summary
            .total_heating_kwh;
        let ef = simulate(&fine, &hf, &w, &SimOptions::default())
            .unwrap()
            .summary
            .total_heating_kwh;
        let err = (ed - ef).abs() / ef;
        record(
            "convergence",
            Check {
                area: "Mesh convergence (annual heating)",
                what: stem,
                source: "refined mesh (f = 0.25, up to 24 nodes a layer) as the reference",
                tolerance: "1 %",
                obtained: format!(
                    "{:.1} kWh ({} states) vs {:.1} kWh ({} states): {:.3} %",
                    ed,
                    hd.network.states.len(),
                    ef,
                    hf.network.states.len(),
                    100.0 * err
                ),
                pass: err < 0.01,
            },
        );
        assert!(err < 0.01, "{stem}: default {ed} kWh vs refined {ef} kWh");
    }
}
