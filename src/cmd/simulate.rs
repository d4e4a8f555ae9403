//! `dwell simulate MODEL`: simulate a period and write hourly results.

use std::path::PathBuf;

use dwell_studies::{simulate, Control, SimOptions};

use super::model_io;
use crate::exit::bad_input;

/// Control of the heaters.
#[derive(Clone, Copy, Debug, clap::ValueEnum)]
pub enum ControlArg {
    /// No heating: the house floats
    Free,
    /// Capacity-limited thermostats reaching the setpoint at each step's end
    Thermostat,
    /// On/off thermostats with a dead band (use a short --step)
    Onoff,
    /// Heaters follow their power_schedule
    Schedule,
}

/// Discretisation route.
#[derive(Clone, Copy, Debug, clap::ValueEnum)]
pub enum RouteArg {
    /// Symmetric eigen-decomposition (default, faster)
    Modal,
    /// Block-matrix exponential (cross-check)
    Block,
}

/// Sky model for diffuse irradiance on tilted planes.
#[derive(Clone, Copy, Debug, clap::ValueEnum)]
pub enum SkyArg {
    /// Isotropic sky (Liu and Jordan)
    Isotropic,
    /// Hay and Davies anisotropic sky (default)
    HayDavies,
}

/// Arguments of `dwell simulate`.
#[derive(clap::Args)]
pub struct SimulateArgs {
    /// Model file (JSON)
    pub model: PathBuf,
    #[command(flatten)]
    pub period: super::period::PeriodArgs,
    /// How the heaters are driven
    #[arg(long, value_enum, default_value = "thermostat")]
    pub control: ControlArg,
    /// Start every node at this temperature (°C) instead of a warm-up
    #[arg(long)]
    pub initial: Option<f64>,
    /// Output folder (created if missing)
    #[arg(long)]
    pub out: PathBuf,
    /// Discretisation route
    #[arg(long, value_enum, default_value = "modal")]
    pub route: RouteArg,
    /// Sky model for diffuse irradiance
    #[arg(long, value_enum, default_value = "hay-davies")]
    pub sky: SkyArg,
    /// Print nothing but errors
    #[arg(long, short)]
    pub quiet: bool,
}

/// Loads the weather named on the command line, or the built-in default.
pub fn load_weather(path: &Option<PathBuf>) -> anyhow::Result<dwell_weather::WeatherSeries> {
    match path {
        None => Ok(dwell_weather::default_weather()),
        Some(p) => dwell_weather::read_weather(p, &dwell_weather::ReadOptions::default())
            .map_err(bad_input),
    }
}

/// Runs the command.
pub fn run(args: SimulateArgs) -> anyhow::Result<()> {
    let (model, house) = model_io::load_house(&args.model)?;
    let weather = load_weather(&args.period.weather)?;
    let opts = SimOptions {
        step_s: args.period.step as f64 * 60.0,
        control: match args.control {
            ControlArg::Free => Control::Free,
            ControlArg::Thermostat => Control::Thermostat,
            ControlArg::Onoff => Control::OnOff,
            ControlArg::Schedule => Control::Schedule,
        },
        initial_c: args.initial,
        from: args.period.from,
        to: args.period.to,
        route: match args.route {
            RouteArg::Modal => dwell_solver::Route::Modal,
            RouteArg::Block => dwell_solver::Route::Block,
        },
        sky: match args.sky {
            SkyArg::Isotropic => dwell_weather::SkyModel::Isotropic,
            SkyArg::HayDavies => dwell_weather::SkyModel::HayDavies,
        },
        ..SimOptions::default()
    };
    if let Some(t) = opts.initial_c {
        if !(-50.0..=60.0).contains(&t) {
            return Err(bad_input(format!("--initial {t} °C is outside -50…60 °C")));
        }
    }
    let spinner = crate::progress::spinner("simulating", args.quiet);
    let result = simulate(&model, &house, &weather, &opts).map_err(|e| match e {
        dwell_studies::StudyError::Option(_) => bad_input(e),
        other => anyhow::Error::new(other),
    });
    spinner.finish_and_clear();
    let result = result?;
    let out = dwell_report::OutputDir::create(&args.out)?;
    let mut written = dwell_report::write_simulation(&out, &result)?;
    written.extend(dwell_report::write_simulation_inputs(
        &out, &model, &house, &result,
    )?);
    written.extend(super::chart::draw_simulation(&out, None, None, args.quiet)?);
    if !args.quiet {
        print!("{}", table(&result.summary));
        for w in &written {
            println!("wrote {}", w.display());
        }
    }
    Ok(())
}

fn table(s: &dwell_studies::simulate::Summary) -> String {
    let mut o = String::new();
    o.push_str(&format!(
        "{}: {} h from {} to {}, step {} min, control {:?}\n",
        s.model,
        s.hours,
        s.from,
        s.to,
        s.step_s / 60.0,
        s.control
    ));
    o.push_str(&format!("weather: {}\n{}\n\n", s.weather, s.start));
    o.push_str(&format!(
        "{:<16}{:>12}{:>11}{:>9}{:>9}{:>9}{:>13}\n",
        "zone", "heat kWh", "peak W", "min °C", "mean °C", "max °C", "h below band"
    ));
    for z in &s.zones {
        o.push_str(&format!(
            "{:<16}{:>12.1}{:>11.0}{:>9.1}{:>9.1}{:>9.1}{:>13}\n",
            z.zone,
            z.heating_kwh,
            z.peak_heating_w,
            z.min_c,
            z.mean_c,
            z.max_c,
            z.comfort
                .as_ref()
                .map(|c| c.hours_below.to_string())
                .unwrap_or_else(|| "-".into())
        ));
    }
    o.push_str(&format!(
        "{:<16}{:>12.1}{:>11.0}\n",
        "whole house", s.total_heating_kwh, s.total_peak_heating_w
    ));
    o.push_str(&format!(
        "purchased energy {:.1} kWh",
        s.total_purchased_kwh
    ));
    if let Some(c) = s.total_cost {
        o.push_str(&format!(", cost {c:.2}"));
    }
    let b = &s.energy_balance;
    o.push_str(&format!(
        "\nenergy balance (kWh): heating {:.1} + gains {:.1} + sun {:.1} + other {:.1} = losses {:.1} + stored {:.1} (residual {:.2e})\n",
        b.heating_kwh,
        b.internal_gains_kwh,
        b.solar_kwh,
        b.other_heat_kwh,
        b.losses_kwh.values().sum::<f64>(),
        b.stored_change_kwh,
        b.residual_kwh
    ));
    o.push_str("losses by group (kWh):");
    for (g, v) in &b.losses_kwh {
        o.push_str(&format!(" {g} {v:.1};"));
    }
    o.push('\n');
    for w in &s.warnings {
        o.push_str(&format!("warning: {w}\n"));
    }
    for c in &s.cautions {
        o.push_str(&format!("caution: {c}\n"));
    }
    o
}
