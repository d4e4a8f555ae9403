//! `dwell check`, `dwell network` and `dwell schema` end to end, and the model-file errors.

use crate::util::*;

const EXAMPLES: [&str; 4] = [
    "zones-examples/fernhollow-cabin.json",
    "zones-examples/brickworth-house.json",
    "zones-examples/sunbank-bungalow.json",
    "zones-examples/raw-two-mass.json",
];

#[test]
fn check_runs_on_every_example() {
    for ex in EXAMPLES {
        let o = dwell(&["check", ex]);
        assert!(o.status.success(), "{ex}: {}", stderr(&o));
        let out = stdout(&o);
        assert!(
            out.contains("model is valid") && out.contains("time constants"),
            "{out}"
        );
        let o = dwell(&["check", ex, "--json"]);
        assert!(o.status.success());
        let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
        assert!(v["total"]["total_w_k"].as_f64().unwrap() > 0.0);
        assert!(
            v["longest_time_constant_h"].as_f64().unwrap()
                > v["shortest_time_constant_h"].as_f64().unwrap()
        );
    }
}

#[test]
fn network_json_is_a_consistent_state_space() {
    for ex in EXAMPLES {
        let o = dwell(&["network", ex, "--json"]);
        assert!(o.status.success(), "{ex}: {}", stderr(&o));
        let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
        let n = v["states"].as_array().unwrap().len();
        let m = v["inputs"].as_array().unwrap().len();
        assert_eq!(v["a"].as_array().unwrap().len(), n);
        assert_eq!(v["b"].as_array().unwrap().len(), n);
        assert_eq!(v["b"][0].as_array().unwrap().len(), m);
        assert_eq!(v["input_hold"].as_array().unwrap().len(), m);
        assert_eq!(v["capacitance_j_k"].as_array().unwrap().len(), n);
        assert_eq!(v["inputs"][0], "outdoor_air_c");
        assert_eq!(v["input_hold"][0], "linear");
        // A = −C⁻¹K: C·A is symmetric with non-positive row sums (K row sums = boundary G ≥ 0)
        let c: Vec<f64> = v["capacitance_j_k"]
            .as_array()
            .unwrap()
            .iter()
            .map(|x| x.as_f64().unwrap())
            .collect();
        let a = |i: usize, j: usize| v["a"][i][j].as_f64().unwrap();
        for i in 0..n {
            let mut row = 0.0;
            for j in 0..n {
                let kij = -c[i] * a(i, j);
                let kji = -c[j] * a(j, i);
                assert!(
                    (kij - kji).abs() <= 1e-9 * kij.abs().max(1e-6),
                    "{ex}: K not symmetric at {i},{j}"
                );
                row += kij;
            }
            assert!(
                row >= -1e-9 * c[i] * a(i, i).abs(),
                "{ex}: row sum of K negative at {i}"
            );
        }
        for (zone, idx) in v["zone_states"].as_object().unwrap() {
            let i = idx.as_u64().unwrap() as usize;
            assert_eq!(v["states"][i].as_str().unwrap(), format!("{zone}.air"));
        }
    }
}

#[test]
fn schema_is_json_and_closed() {
    let o = dwell(&["schema"]);
    assert!(o.status.success());
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(v["additionalProperties"], false);
    for key in [
        "materials",
        "constructions",
        "zones",
        "opaque",
        "openings",
        "airflows",
        "heaters",
        "schedules",
        "network",
    ] {
        assert!(v["properties"][key].is_object(), "schema lacks {key}");
    }
}

const GOOD: &str = r#"{
  "materials": [{"id": "brick", "conductivity_w_mk": 0.77, "density_kg_m3": 1700, "specific_heat_j_kgk": 800}],
  "constructions": [{"id": "solid", "layers": [{"material": "brick", "thickness_m": 0.22}]}],
  "zones": [{"id": "room", "floor_area_m2": 20, "volume_m3": 50}],
  "opaque": [{"id": "walls", "construction": "solid", "zone": "room", "other_side": "outdoor", "area_m2": 40}],
  "openings": [{"id": "win", "zone": "room", "area_m2": 2, "u_value_w_m2k": 1.4, "g_value": 0.6}]
}"#;

/// Writes `text` as a model, runs `dwell check` on it and asserts exit code 2 with every
/// `expect` fragment on standard error.
fn bad(text: &str, expect: &[&str]) {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("model.json");
    std::fs::write(&path, text).unwrap();
    let o = dwell_in(dir.path(), &["check", "model.json"]);
    let err = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "stderr: {err}");
    assert!(err.starts_with("error: "), "{err}");
    assert!(err.contains("model.json"), "file not named: {err}");
    for e in expect {
        assert!(err.contains(e), "expected `{e}` in: {err}");
    }
    assert!(!err.contains("panicked"), "{err}");
}

fn edit(from: &str, to: &str) -> String {
    assert!(GOOD.contains(from), "{from}");
    GOOD.replacen(from, to, 1)
}

#[test]
fn the_good_model_passes() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("m.json"), GOOD).unwrap();
    assert!(dwell_in(dir.path(), &["check", "m.json"]).status.success());
}

#[test]
fn unknown_field_is_named_with_a_suggestion() {
    bad(
        &edit("\"thickness_m\"", "\"thicknes_m\""),
        &[
            "$.constructions[0].layers[0].thicknes_m",
            "did you mean `thickness_m`?",
        ],
    );
}

#[test]
fn unknown_id_is_named_with_a_suggestion() {
    bad(
        &edit("\"construction\": \"solid\"", "\"construction\": \"sold\""),
        &[
            "$.opaque[0].construction",
            "unknown construction `sold`",
            "did you mean `solid`?",
        ],
    );
}

#[test]
fn duplicate_id_is_named() {
    bad(
        &edit("\"id\": \"win\"", "\"id\": \"walls\""),
        &[
            "$.openings[0].id",
            "duplicate id `walls` (first used at $.opaque[0])",
        ],
    );
    bad(
        &edit("{\"id\": \"room\", \"floor_area_m2\": 20, \"volume_m3\": 50}", "{\"id\": \"room\", \"floor_area_m2\": 20, \"volume_m3\": 50}, {\"id\": \"room\", \"floor_area_m2\": 2, \"volume_m3\": 5}"),
        &["$.zones[1].id", "duplicate id `room`"],
    );
}

#[test]
fn missing_required_value_is_named() {
    bad(
        &edit("\"volume_m3\": 50", "\"volume\": 50"),
        &["$.zones[0]", "volume"],
    );
    bad(
        &edit(", \"u_value_w_m2k\": 1.4", ""),
        &["$.openings[0]", "missing field `u_value_w_m2k`"],
    );
}

#[test]
fn wrong_type_is_named() {
    bad(
        &edit("\"area_m2\": 40", "\"area_m2\": \"40\""),
        &["$.opaque[0].area_m2", "invalid type"],
    );
}

#[test]
fn zero_or_negative_thickness_is_refused() {
    bad(
        &edit("\"thickness_m\": 0.22", "\"thickness_m\": 0"),
        &[
            "$.constructions[0].layers[0].thickness_m",
            "must be positive",
        ],
    );
    bad(
        &edit("\"thickness_m\": 0.22", "\"thickness_m\": -0.1"),
        &["thickness is -0.1"],
    );
}

#[test]
fn non_positive_conductivity_is_refused() {
    bad(
        &edit(
            "\"conductivity_w_mk\": 0.77",
            "\"conductivity_w_mk\": -0.77",
        ),
        &["$.materials[0].conductivity_w_mk", "must be positive"],
    );
}

#[test]
fn zero_area_is_refused() {
    bad(
        &edit("\"area_m2\": 40", "\"area_m2\": 0"),
        &["$.opaque[0].area_m2", "area is 0"],
    );
}

#[test]
fn negative_capacitance_is_refused() {
    bad(
        &edit("\"openings\"", "\"network\": {\"nodes\": [{\"id\": \"mass\", \"capacitance_j_k\": -5}], \"links\": [{\"id\": \"l\", \"from\": \"mass\", \"to\": \"room\", \"conductance_w_k\": 3}]}, \"openings\""),
        &["$.network.nodes[0].capacitance_j_k", "capacitance is -5"],
    );
}

#[test]
fn g_value_outside_unit_interval_is_refused() {
    bad(
        &edit("\"g_value\": 0.6", "\"g_value\": 1.6"),
        &["$.openings[0].g_value", "between 0 and 1"],
    );
}

#[test]
fn zone_with_no_path_to_a_boundary_is_named() {
    bad(
        &edit("{\"id\": \"room\", \"floor_area_m2\": 20, \"volume_m3\": 50}", "{\"id\": \"room\", \"floor_area_m2\": 20, \"volume_m3\": 50}, {\"id\": \"cellar\", \"floor_area_m2\": 10, \"volume_m3\": 20}"),
        &["$.zones[1]", "zone `cellar` has no path to outdoor air"],
    );
}

#[test]
fn node_with_no_path_to_a_boundary_is_named() {
    bad(&edit("\"openings\"", "\"network\": {\"nodes\": [{\"id\": \"lost_mass\", \"capacitance_j_k\": 5000}]}, \"openings\""), &["$.network.nodes[0]", "node `lost_mass` has no path"]);
}

#[test]
fn empty_model_is_refused() {
    bad("{}", &["the model is empty"]);
}

#[test]
fn syntax_error_gives_line_and_column() {
    bad(
        "{\n  \"zones\": [\n    {\"id\": \"a\",,}\n  ]\n}",
        &["model.json:3:16", "not valid JSON"],
    );
}

#[test]
fn every_problem_is_reported_at_once() {
    let text = edit("\"g_value\": 0.6", "\"g_value\": 1.6").replacen(
        "\"area_m2\": 40",
        "\"area_m2\": -1",
        1,
    );
    bad(
        &text,
        &["2 problems", "$.opaque[0].area_m2", "$.openings[0].g_value"],
    );
}

#[test]
fn missing_file_is_bad_input() {
    let o = dwell(&["check", "no/such/model.json"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("no/such/model.json"));
}
