//! Charts and the client report, end to end: every chart for every shipped example, the
//! plotted data against the CSV it comes from, the report's structure, text without fonts.

use std::path::{Path, PathBuf};

use crate::util::{dwell, dwell_in, root, stderr, stdout};

/// The chart files `simulate` writes under `charts/`.
const CHARTS: [&str; 5] = ["temperatures", "heating", "monthly", "duration", "balance"];

fn examples() -> Vec<PathBuf> {
    let mut v: Vec<PathBuf> = std::fs::read_dir(root().join("zones-examples"))
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|e| e == "json"))
        .collect();
    v.sort();
    assert!(v.len() >= 4, "{v:?}");
    v
}

/// Runs `simulate` on `model` for January–February of the built-in weather into `out`.
fn simulate(model: &Path, out: &Path) {
    let o = dwell(&[
        "simulate",
        model.to_str().unwrap(),
        "--from",
        "2025-01-01",
        "--to",
        "2025-02-28",
        "--out",
        out.to_str().unwrap(),
        "--quiet",
    ]);
    assert!(o.status.success(), "{}: {}", model.display(), stderr(&o));
}

fn xml_options() -> roxmltree::ParsingOptions {
    // `<!DOCTYPE html>` is a DTD to an XML parser; allow it.
    roxmltree::ParsingOptions {
        allow_dtd: true,
        ..roxmltree::ParsingOptions::default()
    }
}

/// Decodes a PNG with the `png` crate (0.17) and returns (width, height, RGB bytes).
fn decode_png(path: &Path) -> (u32, u32, Vec<u8>) {
    let dec = png::Decoder::new(std::fs::File::open(path).unwrap());
    let mut reader = dec.read_info().unwrap();
    let mut buf = vec![0; reader.output_buffer_size()];
    let info = reader.next_frame(&mut buf).unwrap();
    assert_eq!(info.color_type, png::ColorType::Rgb, "{}", path.display());
    buf.truncate(info.buffer_size());
    (info.width, info.height, buf)
}

/// Whether the box `[x0, x1) × [y0, y1)` of an RGB image holds dark pixels (text ink).
fn dark_pixels(rgb: &[u8], width: u32, (x0, x1, y0, y1): (u32, u32, u32, u32)) -> usize {
    let mut n = 0;
    for y in y0..y1 {
        for x in x0..x1 {
            let i = ((y * width + x) * 3) as usize;
            if rgb[i] < 120 && rgb[i + 1] < 120 && rgb[i + 2] < 120 {
                n += 1;
            }
        }
    }
    n
}

#[test]
fn every_chart_and_the_report_for_every_example() {
    let tmp = tempfile::tempdir().unwrap();
    for model in examples() {
        let out = tmp.path().join(model.file_stem().unwrap());
        simulate(&model, &out);
        for name in CHARTS {
            let png = out.join("charts").join(format!("{name}.png"));
            let (w, h, rgb) = decode_png(&png);
            assert_eq!(
                (w, h),
                (dwell_charts::WIDTH, dwell_charts::HEIGHT),
                "{}",
                png.display()
            );
            // The title is drawn: dark glyph pixels in its box (24..600, 14..44 px).
            assert!(
                dark_pixels(&rgb, w, (24, 600, 14, 44)) > 200,
                "{} has no title text",
                png.display()
            );
            let svg_path = out.join("charts").join(format!("{name}.svg"));
            let svg = std::fs::read_to_string(&svg_path).unwrap();
            let doc = roxmltree::Document::parse(&svg)
                .unwrap_or_else(|e| panic!("{}: {e}", svg_path.display()));
            assert_eq!(doc.root_element().tag_name().name(), "svg");
            assert_eq!(doc.root_element().attribute("width"), Some("1000"));
            let texts: Vec<_> = doc
                .descendants()
                .filter(|n| n.has_tag_name("text"))
                .collect();
            assert!(texts.len() > 5, "{}", svg_path.display());
            assert!(
                texts
                    .iter()
                    .all(|t| t.attribute("font-family") == Some(dwell_charts::FAMILY)),
                "{}",
                svg_path.display()
            );
        }
        let html = std::fs::read_to_string(out.join("report.html")).unwrap();
        let doc = roxmltree::Document::parse_with_options(&html, xml_options())
            .unwrap_or_else(|e| panic!("{}: report.html: {e}", model.display()));
        assert!(
            !html.contains("http://") && !html.contains("https://"),
            "{}: the report names an external URL",
            model.display()
        );
        assert!(
            !html.to_lowercase().contains("<script"),
            "{}",
            model.display()
        );
        assert!(
            html.contains("@font-face") && html.contains("url(data:font/ttf;base64,"),
            "{}",
            model.display()
        );
        let sections: Vec<&str> = doc
            .descendants()
            .filter(|n| n.has_tag_name("section"))
            .filter_map(|n| n.attribute("id"))
            .collect();
        assert_eq!(
            sections,
            ["summary", "house", "results", "charts", "method", "weather", "cautions"]
        );
        let figures: Vec<&str> = doc
            .descendants()
            .filter(|n| n.has_tag_name("figure"))
            .filter_map(|n| n.attribute("id"))
            .collect();
        assert_eq!(
            figures,
            CHARTS
                .map(|c| format!("chart-{c}"))
                .iter()
                .map(String::as_str)
                .collect::<Vec<_>>()
        );
        for f in doc.descendants().filter(|n| n.has_tag_name("figure")) {
            assert!(
                f.children().any(|c| c.has_tag_name("svg")),
                "{}: {:?} has no inline SVG",
                model.display(),
                f.attribute("id")
            );
        }
        assert!(html.contains(dwell_studies::CAUTION));
        // Links only to anchors inside the page.
        for a in doc.descendants().filter(|n| n.has_tag_name("a")) {
            assert!(
                a.attribute("href").is_some_and(|h| h.starts_with('#')),
                "{:?}",
                a.attribute("href")
            );
        }
    }
}

/// Columns of a CSV written by dwell (no quoted commas in these files).
fn csv_columns(path: &Path) -> (Vec<String>, Vec<Vec<String>>) {
    let text = std::fs::read_to_string(path).unwrap();
    let mut lines = text.lines();
    let header: Vec<String> = lines.next().unwrap().split(',').map(String::from).collect();
    let mut cols = vec![Vec::new(); header.len()];
    for l in lines {
        for (c, v) in l.split(',').enumerate() {
            cols[c].push(v.to_string());
        }
    }
    (header, cols)
}

fn num(s: &str) -> f64 {
    if s.is_empty() {
        f64::NAN
    } else {
        s.parse().unwrap()
    }
}

fn same(a: &[f64], b: &[f64]) -> bool {
    a.len() == b.len()
        && a.iter()
            .zip(b)
            .all(|(x, y)| x == y || (x.is_nan() && y.is_nan()))
}

#[test]
fn plotted_series_equal_the_csv_they_come_from() {
    use dwell_charts::Chart;
    let tmp = tempfile::tempdir().unwrap();
    let out = tmp.path().join("run");
    simulate(&root().join("zones-examples/brickworth-house.json"), &out);
    let files = dwell_report::SimulationFiles::read(&out).unwrap();
    let (header, cols) = csv_columns(&out.join("hourly.csv"));
    let col = |name: &str| {
        cols[header.iter().position(|h| h == name).unwrap()]
            .iter()
            .map(|s| num(s))
            .collect::<Vec<f64>>()
    };
    let summary: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("summary.json")).unwrap()).unwrap();
    let zones: Vec<String> = header
        .iter()
        .filter_map(|h| h.strip_suffix("_heating_w"))
        .map(String::from)
        .collect();
    assert!(zones.len() >= 2, "{zones:?}");
    let rows = cols[0].len();
    let total_w: Vec<f64> = (0..rows)
        .map(|i| {
            zones
                .iter()
                .map(|z| col(&format!("{z}_heating_w"))[i])
                .sum()
        })
        .collect();

    // Temperatures: 59 days > 14, so the window is the 7 days (169 stamps) around the coldest
    // outdoor stamp; every zone column and the outdoor column over that window.
    let (a, b) = dwell_report::charts_simulate::window(&files, None, None);
    assert_eq!(b - a, 168);
    let outdoor = col("outdoor_c");
    let coldest = outdoor.iter().copied().fold(f64::INFINITY, f64::min);
    assert!(outdoor[a..=b].contains(&coldest));
    let Chart::Line(t) = dwell_report::charts_simulate::temperatures(&files, (a, b)) else {
        panic!("line chart")
    };
    for z in &zones {
        let s = t
            .series
            .iter()
            .find(|s| s.label == format!("{z} air"))
            .unwrap();
        assert!(same(&s.y, &col(&format!("{z}_c"))[a..=b]), "{z}");
        assert_eq!(s.x, (0..=168).map(|h| h as f64).collect::<Vec<_>>());
    }
    let s = t.series.iter().find(|s| s.label == "outdoor air").unwrap();
    assert!(same(&s.y, &outdoor[a..=b]));
    // Setpoints from setpoints.csv, comfort bands from summary.json.
    let (sh, scols) = csv_columns(&out.join("setpoints.csv"));
    for (h, c) in sh.iter().zip(&scols).skip(1) {
        let z = h.strip_suffix("_setpoint_c").unwrap();
        let s = t
            .series
            .iter()
            .find(|s| s.label == format!("{z} setpoint"))
            .unwrap();
        assert!(
            same(&s.y, &c[a..=b].iter().map(|v| num(v)).collect::<Vec<_>>()),
            "{z}"
        );
    }
    for z in summary["zones"].as_array().unwrap() {
        if let Some(lo) = z["comfort"]["band_min_c"].as_f64() {
            assert!(t
                .bands
                .iter()
                .any(|bd| bd.lo == lo && bd.hi == z["comfort"]["band_max_c"].as_f64().unwrap()));
        }
    }

    // Heating: the sum of the zones' heating columns; cumulative heat ends at the summary total
    // within the CSV rounding (0.05 W per zone and hour, in kWh).
    // 59 days > 14: the power is the mean over each local day of the hours beginning in it.
    let Chart::Line(h) = dwell_report::charts_simulate::heating(&files) else {
        panic!("line chart")
    };
    // (day, sum, count, hours from the first stamp to the day's first hour)
    let mut daily: Vec<(String, f64, usize, f64)> = Vec::new();
    for i in 1..rows {
        let day = cols[0][i - 1][..10].to_string();
        match daily.last_mut() {
            Some((d, s, n, _)) if *d == day => {
                *s += total_w[i];
                *n += 1;
            }
            _ => daily.push((day, total_w[i], 1, (i - 1) as f64)),
        }
    }
    assert_eq!(h.series[0].y.len(), 59);
    assert_eq!(daily[1].3, 23.0, "the run starts at 01:00 on 1 January");
    for (k, (d, s, n, x)) in daily.iter().enumerate() {
        assert!((h.series[0].y[k] - s / *n as f64).abs() < 1e-9, "{d}");
        assert_eq!(h.series[0].x[k], *x, "{d}");
    }
    let cum = &h.secondary.as_ref().unwrap().series[0].y;
    let total = summary["total_heating_kwh"].as_f64().unwrap();
    let tol = 0.05 * zones.len() as f64 * rows as f64 / 1000.0 + 1e-9;
    assert!(
        (cum[rows - 1] - total).abs() <= tol,
        "{} vs {total} (tolerance {tol})",
        cum[rows - 1]
    );
    assert!(total > 100.0, "{total}");

    // Monthly: January and February; they sum to the same total.
    let Chart::Bar(m) = dwell_report::charts_simulate::monthly(&files) else {
        panic!("bar chart")
    };
    assert_eq!(m.categories, ["Jan 2025", "Feb 2025"]);
    let jan: f64 = (1..rows)
        .filter(|&i| cols[0][i - 1].starts_with("2025-01"))
        .map(|i| total_w[i] / 1000.0)
        .sum();
    assert!((m.series[0].values[0] - jan).abs() < 1e-9);
    assert!((m.series[0].values.iter().sum::<f64>() - total).abs() <= tol);

    // Duration: the same hourly powers, sorted from the highest.
    let Chart::Line(d) = dwell_report::charts_simulate::duration(&files) else {
        panic!("line chart")
    };
    let mut sorted: Vec<f64> = total_w[1..].to_vec();
    sorted.sort_by(|x, y| y.total_cmp(x));
    assert!(same(&d.series[0].y, &sorted));
    assert!(
        (d.series[0].y[0] - summary["total_peak_heating_w"].as_f64().unwrap()).abs()
            <= 0.05 * zones.len() as f64 + 1e-9
    );

    // Balance: the ledger's terms, in and out, each from summary.json; the two bars are equal
    // up to the ledger's residual.
    let Chart::Bar(bal) = dwell_report::charts_simulate::balance(&files) else {
        panic!("bar chart")
    };
    let eb = &summary["energy_balance"];
    let heating = bal.series.iter().find(|s| s.label == "heating").unwrap();
    assert_eq!(heating.values[0], eb["heating_kwh"].as_f64().unwrap());
    for (g, v) in eb["losses_kwh"].as_object().unwrap() {
        let v = v.as_f64().unwrap();
        let label = g.replace('_', " ");
        let s = bal
            .series
            .iter()
            .find(|s| s.label == label || s.label == format!("{label} (gained)"))
            .unwrap();
        assert_eq!(if v >= 0.0 { s.values[1] } else { -s.values[0] }, v, "{g}");
    }
    let sum = |k: usize| {
        bal.series
            .iter()
            .map(|s| s.values[k])
            .filter(|v| v.is_finite())
            .sum::<f64>()
    };
    assert!(
        (sum(0) - sum(1)).abs() <= eb["residual_kwh"].as_f64().unwrap().abs() + 1e-9,
        "{} vs {}",
        sum(0),
        sum(1)
    );
}

#[test]
fn chart_redraws_a_finished_run_from_its_folder() {
    let tmp = tempfile::tempdir().unwrap();
    let out = tmp.path().join("run");
    simulate(&root().join("zones-examples/fernhollow-cabin.json"), &out);
    std::fs::remove_dir_all(out.join("charts")).unwrap();
    std::fs::remove_file(out.join("report.html")).unwrap();
    let o = dwell_in(
        tmp.path(),
        &["chart", "run", "--from", "2025-02-01", "--to", "2025-02-03"],
    );
    assert!(o.status.success(), "{}", stderr(&o));
    for name in CHARTS {
        assert!(out.join("charts").join(format!("{name}.svg")).is_file());
        assert!(out.join("charts").join(format!("{name}.png")).is_file());
    }
    assert!(out.join("report.html").is_file());
    // The chosen window: 3 days, 1 Feb 00:00 to 3 Feb 23:00 local.
    let files = dwell_report::SimulationFiles::read(&out).unwrap();
    let (a, b) = dwell_report::charts_simulate::window(
        &files,
        "2025-02-01".parse().ok(),
        "2025-02-03".parse().ok(),
    );
    assert_eq!(files.times[a].to_rfc3339(), "2025-02-01T00:00:00+00:00");
    assert_eq!(b - a, 71);
    let svg = std::fs::read_to_string(out.join("charts/temperatures.svg")).unwrap();
    assert!(
        svg.contains("1 February 2025"),
        "the title names the window's first day"
    );
}

#[test]
fn chart_on_a_folder_without_a_run_is_bad_input() {
    let tmp = tempfile::tempdir().unwrap();
    std::fs::create_dir(tmp.path().join("empty")).unwrap();
    let o = dwell_in(tmp.path(), &["chart", "empty"]);
    assert_eq!(o.status.code(), Some(2));
    assert_eq!(
        stderr(&o),
        "error: empty holds no finished run (no run.json, nor hourly.csv with summary.json): give the --out folder of a finished `dwell simulate`, `size`, `setback`, `outage` or `compare` run\n"
    );
    assert_eq!(
        std::fs::read_dir(tmp.path().join("empty")).unwrap().count(),
        0,
        "nothing written"
    );
    // A damaged hourly.csv names the file, the row and the column.
    let run = tmp.path().join("bad");
    std::fs::create_dir(&run).unwrap();
    std::fs::write(run.join("hourly.csv"), "time,outdoor_c,a_c,a_heating_w\n2025-01-01T00:00+00:00,1.0,20,\n2025-01-01T01:00+00:00,x,20,100\n").unwrap();
    std::fs::write(run.join("summary.json"), "{}").unwrap();
    let o = dwell_in(tmp.path(), &["chart", "bad"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("hourly.csv")
            && stderr(&o).contains("row 3, column outdoor_c: \"x\" is not a number"),
        "{}",
        stderr(&o)
    );
    assert!(!run.join("charts").exists() && !run.join("report.html").exists());
}

#[test]
fn text_renders_from_the_embedded_font_with_no_fonts_installed() {
    // Point fontconfig and the XDG font search at nothing: the charts must not care.
    let tmp = tempfile::tempdir().unwrap();
    let out = tmp.path().join("run");
    let o = std::process::Command::new(env!("CARGO_BIN_EXE_dwell"))
        .args([
            "simulate",
            "zones-examples/fernhollow-cabin.json",
            "--from",
            "2025-01-06",
            "--to",
            "2025-01-08",
            "--quiet",
            "--out",
        ])
        .arg(&out)
        .current_dir(root())
        .env("FONTCONFIG_FILE", "/nonexistent/fonts.conf")
        .env("FONTCONFIG_PATH", "/nonexistent")
        .env("XDG_DATA_DIRS", "/nonexistent")
        .env("HOME", tmp.path())
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    let (w, _, rgb) = decode_png(&out.join("charts/monthly.png"));
    // Title glyphs in the title box and the y-axis title (rotated) left of the plot.
    assert!(dark_pixels(&rgb, w, (24, 600, 14, 44)) > 200);
    assert!(
        dark_pixels(&rgb, w, (0, 40, 150, 500)) > 50,
        "the rotated y-axis title is drawn"
    );
    // The binary links no font library (ldd from glibc, if present).
    if let Ok(l) = std::process::Command::new("ldd")
        .arg(env!("CARGO_BIN_EXE_dwell"))
        .output()
    {
        let libs = String::from_utf8_lossy(&l.stdout).to_string();
        assert!(
            !libs.contains("fontconfig") && !libs.contains("freetype"),
            "{libs}"
        );
    }
}

#[test]
fn study_commands_write_their_charts_and_reports() {
    let tmp = tempfile::tempdir().unwrap();
    let model = "zones-examples/brickworth-house.json";
    // An invented variant for compare: tighter air (a merge patch replacing the airflows).
    let mut m: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(root().join(model)).unwrap()).unwrap();
    m["airflows"][0]["air_changes_per_h"] = 0.5.into();
    let patch = tmp.path().join("tighter.json");
    std::fs::write(
        &patch,
        serde_json::json!({ "airflows": m["airflows"] }).to_string(),
    )
    .unwrap();
    let out = |n: &str| tmp.path().join(n).to_str().unwrap().to_string();
    let runs: Vec<(Vec<String>, &str, Vec<&str>)> = vec![
        (
            vec![
                "size".into(),
                model.into(),
                "--design-temp".into(),
                "-3".into(),
                "--out".into(),
                out("size"),
            ],
            "size",
            vec!["sizing", "capacity-curve"],
        ),
        (
            vec![
                "setback".into(),
                model.into(),
                "--from".into(),
                "2025-01-13".into(),
                "--to".into(),
                "2025-01-14".into(),
                "--out".into(),
                out("setback"),
            ],
            "setback",
            vec!["setback"],
        ),
        (
            vec![
                "outage".into(),
                model.into(),
                "--start".into(),
                "2025-01-14T18:00".into(),
                "--hours".into(),
                "12".into(),
                "--out".into(),
                out("outage"),
            ],
            "outage",
            vec!["outage"],
        ),
        (
            vec![
                "compare".into(),
                model.into(),
                "--variant".into(),
                format!("tighter={}", patch.display()),
                "--from".into(),
                "2025-01-01".into(),
                "--to".into(),
                "2025-01-14".into(),
                "--out".into(),
                out("compare"),
            ],
            "compare",
            vec!["compare"],
        ),
    ];
    for (args, dir, charts) in runs {
        let mut a: Vec<&str> = args.iter().map(String::as_str).collect();
        a.push("--quiet");
        let o = dwell(&a);
        assert!(o.status.success(), "{dir}: {}", stderr(&o));
        let d = tmp.path().join(dir);
        for c in &charts {
            let (w, h, _) = decode_png(&d.join("charts").join(format!("{c}.png")));
            assert_eq!((w, h), (dwell_charts::WIDTH, dwell_charts::HEIGHT));
            roxmltree::Document::parse(
                &std::fs::read_to_string(d.join("charts").join(format!("{c}.svg"))).unwrap(),
            )
            .unwrap();
        }
        let html = std::fs::read_to_string(d.join("report.html")).unwrap();
        let doc = roxmltree::Document::parse_with_options(&html, xml_options())
            .unwrap_or_else(|e| panic!("{dir}: {e}"));
        assert!(
            !html.contains("http://") && !html.contains("https://"),
            "{dir}"
        );
        let figs = doc
            .descendants()
            .filter(|n| n.has_tag_name("figure") && n.children().any(|c| c.has_tag_name("svg")))
            .count();
        assert_eq!(figs, charts.len(), "{dir}");
        assert!(html.contains(dwell_studies::CAUTION), "{dir}");
    }
}

/// Every file under `charts/` and `report.html` of a folder, by name.
fn drawn_files(dir: &Path) -> std::collections::BTreeMap<String, Vec<u8>> {
    let mut m = std::collections::BTreeMap::new();
    for e in std::fs::read_dir(dir.join("charts")).unwrap() {
        let p = e.unwrap().path();
        m.insert(
            format!("charts/{}", p.file_name().unwrap().to_string_lossy()),
            std::fs::read(&p).unwrap(),
        );
    }
    m.insert(
        "report.html".into(),
        std::fs::read(dir.join("report.html")).unwrap(),
    );
    m
}

/// Deletes what `dwell chart` redraws.
fn delete_drawn(dir: &Path) {
    std::fs::remove_dir_all(dir.join("charts")).unwrap();
    std::fs::remove_file(dir.join("report.html")).unwrap();
}

/// Runs `dwell` in the repository root and asserts exit 2 and that nothing was redrawn in `dir`.
fn refused(dir: &Path, args: &[&str]) -> String {
    let o = dwell(args);
    assert_eq!(o.status.code(), Some(2), "{args:?}: {}", stderr(&o));
    assert!(
        !dir.join("charts").exists() && !dir.join("report.html").exists(),
        "{args:?} drew something"
    );
    stderr(&o)
}

/// Whether two JSON values are equal, numbers to within one unit in the last place: serde_json's
/// default float parser (without its `float_roundtrip` feature) may round the last bit
/// differently from the shortest representation it writes (serde_json 1.0 documentation).
fn same_json(a: &serde_json::Value, b: &serde_json::Value) -> bool {
    use serde_json::Value;
    match (a, b) {
        (Value::Number(x), Value::Number(y)) => {
            let (x, y) = (x.as_f64().unwrap(), y.as_f64().unwrap());
            x == y || (x - y).abs() <= f64::EPSILON * x.abs().max(y.abs())
        }
        (Value::Array(x), Value::Array(y)) => {
            x.len() == y.len() && x.iter().zip(y).all(|(x, y)| same_json(x, y))
        }
        (Value::Object(x), Value::Object(y)) => {
            x.len() == y.len()
                && x.iter()
                    .zip(y)
                    .all(|((k, v), (l, w))| k == l && same_json(v, w))
        }
        _ => a == b,
    }
}

#[test]
fn chart_redraws_every_study_folder_byte_for_byte() {
    let tmp = tempfile::tempdir().unwrap();
    let model = "zones-examples/brickworth-house.json";
    // An invented variant for compare: tighter air (a merge patch replacing the airflows).
    let mut m: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(root().join(model)).unwrap()).unwrap();
    m["airflows"][0]["air_changes_per_h"] = 0.5.into();
    let patch = tmp.path().join("tighter.json");
    std::fs::write(
        &patch,
        serde_json::json!({ "airflows": m["airflows"] }).to_string(),
    )
    .unwrap();
    let patch = format!("tighter={}", patch.display());
    let out = |n: &str| tmp.path().join(n).to_str().unwrap().to_string();
    let (size_dir, setback_dir, outage_dir, compare_dir, cabin_dir) = (
        out("size"),
        out("setback"),
        out("outage"),
        out("compare"),
        out("cabin-size"),
    );
    // A year of weather only for the cabin's load duration curve (the smallest example).
    let runs: Vec<(&str, Vec<&str>, Vec<&str>)> = vec![
        (
            "size",
            vec![
                "size",
                model,
                "--design-temp",
                "-3",
                "--days",
                "3",
                "--out",
                &size_dir,
            ],
            vec!["sizing", "capacity-curve"],
        ),
        (
            "size",
            vec![
                "size",
                "zones-examples/fernhollow-cabin.json",
                "--design-temp",
                "-5",
                "--days",
                "3",
                "--weather",
                "weather-samples/kolvask.csv",
                "--out",
                &cabin_dir,
            ],
            vec!["sizing", "capacity-curve", "load-duration"],
        ),
        (
            "setback",
            vec![
                "setback",
                model,
                "--from",
                "2025-01-13",
                "--to",
                "2025-01-15",
                "--out",
                &setback_dir,
            ],
            vec!["setback"],
        ),
        // Kolvask's local standard time is UTC+3: the chart's axis names the offset from run.json.
        (
            "outage",
            vec![
                "outage",
                model,
                "--weather",
                "weather-samples/kolvask.csv",
                "--start",
                "2025-01-14T18:00",
                "--hours",
                "12",
                "--after",
                "6",
                "--out",
                &outage_dir,
            ],
            vec!["outage"],
        ),
        (
            "compare",
            vec![
                "compare",
                model,
                "--variant",
                &patch,
                "--from",
                "2025-01-01",
                "--to",
                "2025-01-04",
                "--out",
                &compare_dir,
            ],
            vec!["compare"],
        ),
    ];
    for (command, args, charts) in &runs {
        let dir = Path::new(args[args.len() - 1]);
        let mut a = args.clone();
        a.push("--quiet");
        let o = dwell(&a);
        assert!(o.status.success(), "{command}: {}", stderr(&o));
        let marker: serde_json::Value =
            serde_json::from_str(&std::fs::read_to_string(dir.join("run.json")).unwrap()).unwrap();
        assert_eq!(marker["command"], *command);
        assert_eq!(marker["files_version"], 1);
        assert!(dir.join("house.json").is_file());
        let before = drawn_files(dir);
        let names: Vec<String> = charts
            .iter()
            .flat_map(|c| [format!("charts/{c}.png"), format!("charts/{c}.svg")])
            .chain(["report.html".to_string()])
            .collect();
        let mut listed: Vec<String> = before.keys().cloned().collect();
        listed.sort();
        let mut want = names.clone();
        want.sort();
        assert_eq!(listed, want, "{command}");
        delete_drawn(dir);
        let o = dwell(&["chart", args[args.len() - 1]]);
        assert!(o.status.success(), "{command}: {}", stderr(&o));
        assert!(stdout(&o).contains("report.html"), "{}", stdout(&o));
        let after = drawn_files(dir);
        // Byte for byte: nothing in the charts or the report depends on the time of drawing
        // (the report's footer names only the dwell version).
        for (name, bytes) in &before {
            assert!(
                after[name] == *bytes,
                "{command}: {name} differs after `dwell chart`"
            );
        }
        assert_eq!(after.len(), before.len(), "{command}");
    }

    let svg = std::fs::read_to_string(Path::new(&outage_dir).join("charts/outage.svg")).unwrap();
    assert!(
        svg.contains("local standard time (UTC+03:00)"),
        "the offset is read back from run.json"
    );

    // The data handed to the setback chart equals setback_path.csv column by column,
    // setpoints included.
    let sdir = Path::new(&setback_dir);
    let files =
        dwell_report::StudyFiles::read(sdir, dwell_report::RunMarker::read(sdir).unwrap().unwrap())
            .unwrap();
    let dwell_report::Study::Setback { study, zones } = &files.study else {
        panic!("setback")
    };
    let dwell_charts::Chart::Line(chart) =
        dwell_report::charts_studies::setback_chart(study, zones)
            .unwrap()
            .chart
    else {
        panic!("line chart")
    };
    let (header, cols) = csv_columns(&sdir.join("setback_path.csv"));
    let col = |name: &str| -> Vec<f64> {
        cols[header.iter().position(|h| h == name).unwrap()]
            .iter()
            .map(|s| num(s))
            .collect()
    };
    let with_setpoints: Vec<&str> = header
        .iter()
        .filter_map(|h| h.strip_suffix("_setpoint_c"))
        .collect();
    assert!(!with_setpoints.is_empty(), "{header:?}");
    for s in &chart.series {
        let y = match s.label.as_str() {
            "outdoor air" => col("outdoor_c"),
            l if l.ends_with(" air") => col(&format!("{}_c", l.trim_end_matches(" air"))),
            l => col(&format!("{}_setpoint_c", l.trim_end_matches(" setpoint"))),
        };
        // 13 Jan 00:00 … 16 Jan 00:00 in 10-min steps: 72 h → 433 stamps, all shown (≤ 7 days).
        assert_eq!(s.y.len(), 433, "{}", s.label);
        assert!(same(&s.y, &y[..s.y.len()]), "{}", s.label);
    }
    // Air per zone, a setpoint per zone with a thermostat, outdoor air.
    assert_eq!(chart.series.len(), zones.len() + with_setpoints.len() + 1);

    // Each study's JSON reads back whole: written again, it is the same text.
    for (dir, file) in [
        (&size_dir, "sizing.json"),
        (&cabin_dir, "sizing.json"),
        (&setback_dir, "setback.json"),
        (&outage_dir, "outage.json"),
        (&compare_dir, "compare.json"),
    ] {
        let d = Path::new(dir);
        let f =
            dwell_report::StudyFiles::read(d, dwell_report::RunMarker::read(d).unwrap().unwrap())
                .unwrap();
        let again = match &f.study {
            dwell_report::Study::Size(s) => serde_json::to_string_pretty(s),
            dwell_report::Study::Setback { study, .. } => serde_json::to_string_pretty(study),
            dwell_report::Study::Outage { study, .. } => serde_json::to_string_pretty(study),
            dwell_report::Study::Compare(c) => serde_json::to_string_pretty(c),
        }
        .unwrap();
        let written = std::fs::read_to_string(d.join(file)).unwrap();
        let first = again.lines().zip(written.lines()).find(|(a, b)| a != b);
        assert!(
            again.lines().count() == written.lines().count(),
            "{dir}/{file}"
        );
        assert!(
            same_json(
                &serde_json::from_str(&again).unwrap(),
                &serde_json::from_str(&written).unwrap()
            ),
            "{dir}/{file} does not read back whole: {first:?}"
        );
    }

    // Bad input: every case exits 2, names the file and draws nothing.
    delete_drawn(sdir);
    std::fs::rename(sdir.join("setback_path.csv"), sdir.join("kept.csv")).unwrap();
    let e = refused(sdir, &["chart", &setback_dir]);
    assert!(
        e.contains("cannot read ")
            && e.contains("setback_path.csv")
            && e.ends_with("run `dwell setback` again with --out on this folder to rewrite it\n"),
        "{e}"
    );
    std::fs::rename(sdir.join("kept.csv"), sdir.join("setback_path.csv")).unwrap();
    std::fs::write(sdir.join("run.json"), "{\"command\": \"setback\"").unwrap();
    let e = refused(sdir, &["chart", &setback_dir]);
    assert!(
        e.starts_with(&format!("error: {}: ", sdir.join("run.json").display()))
            && e.contains("EOF"),
        "{e}"
    );
    let zdir = Path::new(&size_dir);
    delete_drawn(zdir);
    std::fs::write(zdir.join("sizing.json"), "{\"model\": 3}").unwrap();
    let e = refused(zdir, &["chart", &size_dir]);
    assert!(
        e.contains(&format!(
            "{}: invalid type: integer `3`",
            zdir.join("sizing.json").display()
        )),
        "{e}"
    );
    assert!(e.contains("line 1 column 11"), "{e}");
    // Options for a simulate folder only.
    let odir = Path::new(&outage_dir);
    delete_drawn(odir);
    let e = refused(odir, &["chart", &outage_dir, "--from", "2025-01-14"]);
    assert_eq!(
        e,
        format!("error: --from/--to choose the days of the temperature chart of a `dwell simulate` folder; {outage_dir} holds a `dwell outage` run, whose charts show the period it studied: drop --from/--to, or run `dwell outage` again with another --start\n")
    );
    // A folder of an older dwell, without run.json.
    std::fs::remove_file(odir.join("run.json")).unwrap();
    let e = refused(odir, &["chart", &outage_dir]);
    assert_eq!(
        e,
        format!("error: {outage_dir} holds a `dwell outage` run (outage.json) from an older dwell, without the run.json and house.json its charts are drawn from; run `dwell outage` again with --out on this folder, which also draws the charts\n")
    );
}

#[test]
fn chart_refuses_a_missing_folder_and_an_unknown_command() {
    let tmp = tempfile::tempdir().unwrap();
    let o = dwell_in(tmp.path(), &["chart", "nowhere"]);
    assert_eq!(o.status.code(), Some(2));
    assert_eq!(
        stderr(&o),
        "error: nowhere is not a folder: give the --out folder of a finished `dwell simulate`, `size`, `setback`, `outage` or `compare` run\n"
    );
    assert!(
        !tmp.path().join("nowhere").exists(),
        "the folder is not created"
    );
    let d = tmp.path().join("odd");
    std::fs::create_dir(&d).unwrap();
    std::fs::write(
        d.join("run.json"),
        r#"{"command": "paint", "files_version": 1, "dwell_version": "0"}"#,
    )
    .unwrap();
    let o = dwell_in(tmp.path(), &["chart", "odd"]);
    assert_eq!(o.status.code(), Some(2));
    let e = stderr(&o);
    assert!(
        e.starts_with("error: odd/run.json: unknown variant `paint`"),
        "{e}"
    );
    assert!(e.ends_with("run.json records which command wrote the folder: run that command again with --out on this folder to rewrite it\n"), "{e}");
    assert_eq!(std::fs::read_dir(&d).unwrap().count(), 1, "nothing written");
}
