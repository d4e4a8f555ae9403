//! `dwell sweep` with shards and merge.

use crate::util::{dwell_in, root, stderr};

#[test]
fn two_shards_merge_to_the_unsharded_results() {
    let tmp = tempfile::tempdir().unwrap();
    let d = tmp.path();
    std::fs::write(d.join("rows.csv"), "variant,/heaters/0/capacity_w,/network/links/5/conductance_w_k\nbase,,\nsmall,8000,\nleaky,,160\n").unwrap();
    let model = root().join("zones-examples/raw-two-mass.json");
    let m = model.to_str().unwrap();
    let common = [
        "--model",
        m,
        "--from",
        "2025-01-01",
        "--to",
        "2025-01-14",
        "-q",
    ];
    let run = |extra: &[&str]| {
        let mut a = vec!["sweep", "rows.csv"];
        a.extend_from_slice(&common);
        a.extend_from_slice(extra);
        dwell_in(d, &a)
    };
    for o in [
        run(&["--out", "all"]),
        run(&["--shard", "1/2", "--out", "s1"]),
        run(&["--shard", "2/2", "--out", "s2"]),
    ] {
        assert!(o.status.success(), "{}", stderr(&o));
    }
    let o = dwell_in(d, &["sweep", "merge", "s2", "s1", "--out", "merged"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let all = std::fs::read_to_string(d.join("all/results.csv")).unwrap();
    assert_eq!(
        std::fs::read_to_string(d.join("merged/results.csv")).unwrap(),
        all
    );
    // More air leakage (160 vs 80 W/K) needs more heat; a smaller heater cannot need more.
    let heat: Vec<f64> = all
        .lines()
        .skip(1)
        .map(|l| l.split(',').nth(4).unwrap().parse().unwrap())
        .collect();
    assert!(heat[2] > heat[0] && heat[1] <= heat[0] + 1e-6, "{heat:?}");
    // Merging one shard alone is refused.
    let o = dwell_in(d, &["sweep", "merge", "s1", "--out", "bad"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("shards 2 of 2 are missing"),
        "{}",
        stderr(&o)
    );
}

/// A sweep row is `dwell simulate`'s summary: for every shipped example, an unchanged row and
/// a changed one (a smaller first heater) agree with `simulate` run on the same model (the
/// changed one written out as a file) to the CSV's printed precision (3 decimals for kWh,
/// 1 for W, 2 for °C; the library test `fastpath::tests` checks 1e-9 relative).
#[test]
fn sweep_rows_equal_simulate_summaries_for_every_example() {
    let tmp = tempfile::tempdir().unwrap();
    let d = tmp.path();
    let period = ["--from", "2025-01-20", "--to", "2025-02-02"];
    for ex in [
        "fernhollow-cabin",
        "brickworth-house",
        "sunbank-bungalow",
        "raw-two-mass",
    ] {
        let model_path = root().join(format!("zones-examples/{ex}.json"));
        let mut model: serde_json::Value =
            serde_json::from_str(&std::fs::read_to_string(&model_path).unwrap()).unwrap();
        let cap = model["heaters"][0]["capacity_w"].as_f64().unwrap();
        let small = (cap * 0.4).round();
        model["heaters"][0]["capacity_w"] = serde_json::json!(small);
        let small_path = d.join(format!("{ex}-small.json"));
        std::fs::write(&small_path, model.to_string()).unwrap();
        std::fs::write(
            d.join("rows.csv"),
            format!("variant,/heaters/0/capacity_w\nbase,\nsmall,{small}\n"),
        )
        .unwrap();
        let out = format!("sweep-{ex}");
        let mut a = vec![
            "sweep",
            "rows.csv",
            "--model",
            model_path.to_str().unwrap(),
            "--out",
            &out,
            "-q",
        ];
        a.extend_from_slice(&period);
        let o = dwell_in(d, &a);
        assert!(o.status.success(), "{ex}: {}", stderr(&o));
        let results = std::fs::read_to_string(d.join(&out).join("results.csv")).unwrap();
        let rows: Vec<Vec<String>> = results
            .lines()
            .skip(1)
            .map(|l| l.split(',').map(String::from).collect())
            .collect();
        for (row, path) in rows.iter().zip([&model_path, &small_path]) {
            let sim = d.join(format!("sim-{ex}-{}", row[1]));
            let mut a = vec![
                "simulate",
                path.to_str().unwrap(),
                "--out",
                sim.to_str().unwrap(),
            ];
            a.extend_from_slice(&period);
            let o = dwell_in(d, &a);
            assert!(o.status.success(), "{ex}: {}", stderr(&o));
            let s: serde_json::Value =
                serde_json::from_slice(&std::fs::read(sim.join("summary.json")).unwrap()).unwrap();
            let min_air = s["zones"]
                .as_array()
                .unwrap()
                .iter()
                .map(|z| z["min_c"].as_f64().unwrap())
                .fold(f64::INFINITY, f64::min);
            assert_eq!(row[2], "\"ok\"", "{ex}: {row:?}");
            let expect = [
                format!("{:.3}", s["total_heating_kwh"].as_f64().unwrap()),
                format!("{:.1}", s["total_peak_heating_w"].as_f64().unwrap()),
                format!("{:.3}", s["total_purchased_kwh"].as_f64().unwrap()),
                format!("{min_air:.2}"),
                s["hours"].to_string(),
            ];
            assert_eq!(row[4..], expect[..], "{ex} {}: sweep vs simulate", row[1]);
        }
    }
}
