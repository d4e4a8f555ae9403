//! Draws two sample charts of invented data into the folder given as the first argument, to
//! look at the dwell style: `cargo run -p dwell-charts --example sample -- /tmp/charts`.

use dwell_charts::*;

fn main() {
    let dir = std::path::PathBuf::from(std::env::args().nth(1).unwrap_or_else(|| ".".into()));
    std::fs::create_dir_all(&dir).expect("folder");
    let x: Vec<f64> = (0..=168).map(|h| h as f64).collect();
    let wave = |a: f64, m: f64| {
        x.iter()
            .map(|h| m + a * (h / 24.0 * std::f64::consts::TAU).sin())
            .collect::<Vec<_>>()
    };
    let line = Chart::Line(LineChart {
        title: "Invented week: living room and bedroom".into(),
        x_label: "local time".into(),
        y_label: "air temperature (°C)".into(),
        time_origin: chrono::NaiveDate::from_ymd_opt(2025, 1, 13)
            .and_then(|d| d.and_hms_opt(0, 0, 0)),
        series: vec![
            Series {
                label: "living".into(),
                x: x.clone(),
                y: wave(1.0, 20.0),
                stroke: Stroke::Solid,
                colour: Some(0),
            },
            Series {
                label: "bedroom".into(),
                x: x.clone(),
                y: wave(1.5, 18.0),
                stroke: Stroke::Solid,
                colour: Some(1),
            },
            Series {
                label: "setpoint living".into(),
                x: x.clone(),
                y: x.iter()
                    .map(|h| if (h % 24.0) < 7.0 { 16.0 } else { 20.0 })
                    .collect(),
                stroke: Stroke::Step,
                colour: Some(2),
            },
            Series {
                label: "outdoor".into(),
                x: x.clone(),
                y: wave(4.0, 1.0),
                stroke: Stroke::Dashed,
                colour: None,
            },
        ],
        bands: vec![Band {
            label: "comfort band".into(),
            lo: 19.0,
            hi: 24.0,
            colour: None,
        }],
        thresholds: vec![],
        secondary: None,
        y_from_zero: false,
    });
    let bar = Chart::Bar(BarChart {
        title: "Where the heat goes".into(),
        x_label: "".into(),
        y_label: "heat (kWh)".into(),
        categories: vec!["heat in".into(), "heat out".into()],
        series: vec![
            BarSeries {
                label: "heating".into(),
                values: vec![5000.0, f64::NAN],
                colour: 1,
            },
            BarSeries {
                label: "walls".into(),
                values: vec![f64::NAN, 3000.0],
                colour: 0,
            },
            BarSeries {
                label: "windows".into(),
                values: vec![f64::NAN, 2000.0],
                colour: 2,
            },
        ],
        stacked: true,
    });
    for (name, c) in [("line", line), ("bar", bar)] {
        std::fs::write(
            dir.join(format!("{name}.svg")),
            render_svg(&c).expect("svg"),
        )
        .expect("write");
        std::fs::write(
            dir.join(format!("{name}.png")),
            render_png(&c).expect("png"),
        )
        .expect("write");
    }
}
