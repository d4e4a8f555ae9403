//! `dwell setback MODEL`: night by night, what the setback does to each zone.

use std::path::PathBuf;

use chrono::{NaiveDate, NaiveTime};
use dwell_studies::setback::{setback, SetbackOptions, SetbackStudy};

use super::model_io;
use super::simulate::load_weather;
use crate::exit::bad_input;

/// Arguments of `dwell setback`.
#[derive(clap::Args)]
pub struct SetbackArgs {
    /// Model file (JSON)
    pub model: PathBuf,
    /// Weather file; default the built-in invented climate
    #[arg(long, conflicts_with = "design_temp")]
    pub weather: Option<PathBuf>,
    /// Use a design cold spell at this minimum outdoor temperature (°C) instead of weather
    #[arg(long, allow_hyphen_values = true)]
    pub design_temp: Option<f64>,
    /// Days of the design spell
    #[arg(long, default_value_t = 7)]
    pub days: usize,
    /// First local day, YYYY-MM-DD
    #[arg(long)]
    pub from: Option<NaiveDate>,
    /// Last local day, inclusive, YYYY-MM-DD
    #[arg(long)]
    pub to: Option<NaiveDate>,
    /// Be at the morning setpoint by this local time, HH:MM (default: the scheduled rise)
    #[arg(long)]
    pub ready_by: Option<NaiveTime>,
    /// Time step in minutes, a divisor of 60
    #[arg(long, default_value_t = 10)]
    pub step: u32,
    /// Output folder (created if missing)
    #[arg(long)]
    pub out: PathBuf,
    /// Print nothing but errors
    #[arg(long, short)]
    pub quiet: bool,
}

/// The weather of a study: a design spell, a file, or the built-in default.
pub fn study_weather(
    model: &dwell_model::ModelFile,
    weather: &Option<PathBuf>,
    design: Option<f64>,
    days: usize,
) -> anyhow::Result<dwell_weather::WeatherSeries> {
    match design {
        Some(t) => {
            let opts = dwell_studies::size::SizeOptions {
                design_c: t,
                swing_k: 4.0,
                days,
                ..Default::default()
            };
            dwell_studies::size::design_spell(model, None, &opts).map_err(bad_input)
        }
        None => load_weather(weather),
    }
}

/// Runs the command.
pub fn run(args: SetbackArgs) -> anyhow::Result<()> {
    let (model, house) = model_io::load_house(&args.model)?;
    let weather = study_weather(&model, &args.weather, args.design_temp, args.days)?;
    let opts = SetbackOptions {
        from: args.from,
        to: args.to,
        step_s: args.step as f64 * 60.0,
        ready_by: args.ready_by,
        ..Default::default()
    };
    let spinner = crate::progress::spinner("simulating nights", args.quiet);
    let study = setback(&model, &house, &weather, &opts).map_err(super::size::study_error)?;
    spinner.finish_and_clear();
    let out = dwell_report::OutputDir::create(&args.out)?;
    let mut written = dwell_report::write_setback(&out, &study, &house)?;
    // Drawn from the files just written, as `dwell chart` redraws them.
    written.extend(super::chart::draw_study(&out, args.quiet)?);
    if !args.quiet {
        print!("{}", table(&study));
        for w in &written {
            println!("wrote {}", w.display());
        }
    }
    Ok(())
}

fn opt(v: Option<f64>, d: usize) -> String {
    v.map(|x| format!("{x:.d$}")).unwrap_or_else(|| "-".into())
}

fn table(s: &SetbackStudy) -> String {
    let mut o = format!(
        "{}: night setback against a continuous setpoint, step {} min\nweather: {}\n\n",
        s.model,
        s.step_s / 60.0,
        s.weather
    );
    o.push_str(&format!(
        "{:<12}{:<14}{:>9}{:>8}{:>11}{:>10}{:>10}{:>9}{:>9}{:>13}\n",
        "night",
        "zone",
        "setback",
        "low °C",
        "reached h",
        "recover h",
        "save kWh",
        "save %",
        "miss h",
        "latest start"
    ));
    for n in &s.nights {
        for z in &n.zones {
            o.push_str(&format!(
                "{:<12}{:<14}{:>9}{:>8.1}{:>11}{:>10}{:>10.2}{:>9}{:>9.1}{:>13}\n",
                n.night,
                z.zone,
                opt(z.setback_c, 1),
                z.lowest_c,
                z.hours_to_setback_h
                    .map(|h| format!("{h:.1}"))
                    .unwrap_or_else(|| if z.setback_c.is_some() {
                        "not".into()
                    } else {
                        "-".into()
                    }),
                opt(z.recovery_h, 2),
                z.saving_kwh,
                opt(z.saving_pct, 1),
                z.occupied_hours_below_h,
                z.latest_start.as_deref().map(|t| &t[11..]).unwrap_or("-")
            ));
        }
    }
    o.push_str(&format!(
        "\n{:<14}{:>12}{:>16}{:>10}{:>9}{:>12}\n",
        "zone", "heat kWh", "continuous kWh", "save kWh", "save %", "max recov h"
    ));
    for t in &s.totals {
        o.push_str(&format!(
            "{:<14}{:>12.1}{:>16.1}{:>10.1}{:>9}{:>12}\n",
            t.zone,
            t.heat_kwh,
            t.continuous_kwh,
            t.saving_kwh,
            opt(t.saving_pct, 1),
            opt(t.longest_recovery_h, 2)
        ));
    }
    o.push_str(&format!(
        "whole house saving {:.1} kWh ({} %)\n",
        s.total_saving_kwh,
        opt(s.total_saving_pct, 1)
    ));
    for c in &s.cautions {
        o.push_str(&format!("caution: {c}\n"));
    }
    o
}
