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
