//! `dwell calibrate DATA.csv --order 1|2|3 --out DIR`: fit a grey-box RC model to measured
//! indoor temperature and heating power; report HLC, time constants, aperture; write the
//! fitted model file, the fitted series and a chart.

use std::path::PathBuf;

use dwell_calibrate::{
    calibrate, model_file, read_measured, CalibrateError, FitOptions, ModelFileOptions, Order,
};
use dwell_charts::{Chart, LineChart, Series, Stroke};
use dwell_report::OutputDir;

use crate::exit::bad_input;

/// Arguments of `dwell calibrate`.
#[derive(clap::Args)]
pub struct CalibrateArgs {
    /// Measured data (CSV): time, indoor_c, outdoor_c, heating_w[, solar_w_m2]
    pub data: PathBuf,
    /// Model order: 1 (one node), 2 (air and envelope), 3 (air, envelope, interior mass)
    #[arg(long, default_value_t = 2)]
    pub order: u32,
    /// Floor area written into the fitted model (m²); does not change the fit
    #[arg(long, default_value_t = 100.0)]
    pub floor_area: f64,
    /// Heating setpoint written into the fitted model (°C)
    #[arg(long, default_value_t = 20.0)]
    pub setpoint: f64,
    /// Output folder (created if missing)
    #[arg(long)]
    pub out: PathBuf,
    /// Print nothing but errors
    #[arg(long, short)]
    pub quiet: bool,
}

/// Runs the command.
pub fn run(args: CalibrateArgs) -> anyhow::Result<()> {
    let order = Order::from_number(args.order).ok_or_else(|| {
        bad_input(format!(
            "--order {}: the order must be 1, 2 or 3",
            args.order
        ))
    })?;
    if !(args.floor_area.is_finite() && args.floor_area > 0.0) {
        return Err(bad_input(format!(
            "--floor-area {}: give a positive floor area in m²",
            args.floor_area
        )));
    }
    let data = read_measured(&args.data).map_err(bad_input)?;
    let spinner = crate::progress::spinner("fitting", args.quiet);
    let cal = calibrate(&data, order, &FitOptions::default()).map_err(|e| match e {
        CalibrateError::Solver(_) => anyhow::Error::new(e),
        other => bad_input(other),
    })?;
    spinner.finish_and_clear();
    let heater_w = (data.heating_w.iter().fold(0.0f64, |a, b| a.max(*b)) * 1.5).max(1000.0);
    let offset_h = data.start.offset().local_minus_utc() as f64 / 3600.0;
    let mopts = ModelFileOptions {
        name: format!("Fitted from {}", args.data.display()),
        floor_area_m2: args.floor_area,
        heater_capacity_w: heater_w,
        setpoint_c: args.setpoint,
        site: (51.5, 0.0, offset_h),
    };
    let model = model_file(&cal, &mopts, &args.data.display().to_string());
    let mut report = serde_json::to_value(&cal)?;
    report["source"] = serde_json::json!(args.data.display().to_string());
    report["interval_s"] = serde_json::json!(data.step_s);
    report["rows"] = serde_json::json!(data.len());
    report["filled_inputs"] = serde_json::json!(data.filled_inputs);
    report["ci_method"] = serde_json::json!("Jacobian at the optimum: cov = s²(JᵀJ)⁻¹, inflated by (1+ρ₁)/(1−ρ₁) for positive lag-1 residual autocorrelation; delta method on the logarithm for HLC and time constants; ±1.96σ");
    report["caution"] = serde_json::json!(dwell_studies::CAUTION);

    let mut csv =
        String::from("time,measured_indoor_c,fitted_indoor_c,residual_k,outdoor_c,heating_w\n");
    for k in 0..data.len() {
        let m = data.indoor_c[k];
        let (ms, rs) = if m.is_nan() {
            (String::new(), String::new())
        } else {
            (format!("{m:.3}"), format!("{:.4}", m - cal.fitted_c[k]))
        };
        csv.push_str(&format!(
            "{},{ms},{:.3},{rs},{:.2},{:.1}\n",
            dwell_weather::format_stamp(&data.time(k)),
            cal.fitted_c[k],
            data.outdoor_c[k],
            data.heating_w[k]
        ));
    }
    let hours: Vec<f64> = (0..data.len())
        .map(|k| k as f64 * data.step_s / 3600.0)
        .collect();
    let (mx, my): (Vec<f64>, Vec<f64>) = hours
        .iter()
        .zip(data.indoor_c.iter())
        .filter(|(_, y)| !y.is_nan())
        .map(|(x, y)| (*x, *y))
        .unzip();
    let chart = Chart::Line(LineChart {
        title: format!(
            "Measured and fitted indoor temperature (order {})",
            cal.order
        ),
        x_label: format!("time (UTC{})", data.start.offset()),
        y_label: "temperature (°C)".into(),
        time_origin: Some(data.start.naive_local()),
        series: vec![
            Series {
                label: "measured".into(),
                x: mx,
                y: my,
                stroke: Stroke::Solid,
                colour: Some(0),
            },
            Series {
                label: "fitted".into(),
                x: hours.clone(),
                y: cal.fitted_c.clone(),
                stroke: Stroke::Dashed,
                colour: Some(1),
            },
        ],
        bands: vec![],
        thresholds: vec![],
        secondary: None,
        y_from_zero: false,
    });
    let svg = dwell_charts::render_svg(&chart)?;

    let out = OutputDir::create(&args.out)?;
    out.write(
        "calibration.json",
        serde_json::to_string_pretty(&report)?.as_bytes(),
    )?;
    out.write(
        "model.json",
        serde_json::to_string_pretty(&model)?.as_bytes(),
    )?;
    out.write("fitted.csv", csv.as_bytes())?;
    out.write("fit.svg", svg.as_bytes())?;

    if !args.quiet {
        let h = &cal.hlc_w_k;
        println!(
            "{}: {} rows at {:.0} min, order {} ({} parameters)",
            args.data.display(),
            data.len(),
            data.step_s / 60.0,
            cal.order,
            cal.parameters.len()
        );
        println!(
            "heat-loss coefficient  {:.1} W/K  (95 % interval {:.1} … {:.1})",
            h.value, h.lo95, h.hi95
        );
        for (i, t) in cal.time_constants_h.iter().enumerate() {
            println!(
                "time constant {}        {:.1} h  (95 % interval {:.1} … {:.1})",
                i + 1,
                t.value,
                t.lo95,
                t.hi95
            );
        }
        if let Some(a) = &cal.aperture_m2 {
            println!(
                "solar aperture         {:.2} m²  (95 % interval {:.2} … {:.2})",
                a.value, a.lo95, a.hi95
            );
        }
        println!(
            "unmeasured gain        {:.0} W  (95 % interval {:.0} … {:.0})",
            cal.gain_w.value, cal.gain_w.lo95, cal.gain_w.hi95
        );
        println!(
            "fit: RMSE {:.3} K, bias {:+.3} K, lag-1 autocorrelation {:.2}",
            cal.residuals.rmse_k, cal.residuals.mean_k, cal.residuals.lag1_autocorrelation
        );
        for w in &cal.warnings {
            println!("warning: {w}");
        }
        println!("{}", dwell_studies::CAUTION);
        println!("wrote {}", args.out.display());
    }
    Ok(())
}
