//! `dwell size MODEL --design-temp C`: steady and dynamic heat load, recommended capacities.

use std::path::PathBuf;

use dwell_studies::size::{size, SizeOptions, Sizing};

use super::model_io;
use super::simulate::load_weather;
use crate::exit::bad_input;

/// Arguments of `dwell size`.
#[derive(clap::Args)]
pub struct SizeArgs {
    /// Model file (JSON)
    pub model: PathBuf,
    /// Design outdoor temperature (°C): the daily minimum of the design spell
    #[arg(long, allow_hyphen_values = true)]
    pub design_temp: f64,
    /// Weather year for the load duration curve (and the ground temperature); none by default
    #[arg(long)]
    pub weather: Option<PathBuf>,
    /// Daily swing of the design spell above the design temperature (K)
    #[arg(long, default_value_t = 4.0)]
    pub swing: f64,
    /// Length of the design spell (days); it is repeated until the house settles
    #[arg(long, default_value_t = 7)]
    pub days: usize,
    /// Ground temperature (°C); default the model's deep_ground_c, else the weather's annual mean
    #[arg(long, allow_hyphen_values = true)]
    pub ground_temp: Option<f64>,
    /// Keep the model's internal gains in the design spell (default: none)
    #[arg(long)]
    pub with_gains: bool,
    /// Time allowed for the morning recovery (h)
    #[arg(long, default_value_t = 2.0)]
    pub recovery: f64,
    /// Margin on the larger of steady and dynamic (1.1 adds 10 %)
    #[arg(long, default_value_t = 1.1)]
    pub margin: f64,
    /// Round recommendations up to a multiple of this (W)
    #[arg(long, default_value_t = 250.0)]
    pub size_step: f64,
    /// Time step in minutes, a divisor of 60
    #[arg(long, default_value_t = 60)]
    pub step: u32,
    /// Output folder (created if missing)
    #[arg(long)]
    pub out: PathBuf,
    /// Print nothing but errors
    #[arg(long, short)]
    pub quiet: bool,
}

/// Runs the command.
pub fn run(args: SizeArgs) -> anyhow::Result<()> {
    let (model, house) = model_io::load_house(&args.model)?;
    let year = match &args.weather {
        Some(_) => Some(load_weather(&args.weather)?),
        None => None,
    };
    let opts = SizeOptions {
        design_c: args.design_temp,
        swing_k: args.swing,
        days: args.days,
        ground_c: args.ground_temp,
        with_gains: args.with_gains,
        recovery_h: args.recovery,
        margin: args.margin,
        size_step_w: args.size_step,
        step_s: args.step as f64 * 60.0,
    };
    let spinner = crate::progress::spinner("sizing", args.quiet);
    let sizing = size(&model, &house, year.as_ref(), &opts).map_err(super::size::study_error)?;
    spinner.finish_and_clear();
    let out = dwell_report::OutputDir::create(&args.out)?;
    let mut written = dwell_report::write_sizing(&out, &sizing, &house)?;
    // Drawn from the files just written, as `dwell chart` redraws them.
    written.extend(super::chart::draw_study(&out, args.quiet)?);
    if !args.quiet {
        print!("{}", table(&sizing));
        for w in &written {
            println!("wrote {}", w.display());
        }
    }
    Ok(())
}

fn opt(v: Option<f64>, d: usize) -> String {
    v.map(|x| format!("{x:.d$}")).unwrap_or_else(|| "-".into())
}

fn table(s: &Sizing) -> String {
    let mut o = format!(
        "{}: design outdoor {} °C, ground {:.1} °C, recovery within {} h, margin {}, step {} W\n{}\n\n",
        s.model, s.design_outdoor_c, s.ground_c, s.recovery_h, s.margin, s.size_step_w, s.design_spell
    );
    o.push_str(&format!(
        "{:<16}{:>10}{:>11}{:>9}{:>9}{:>14}{:>11}{:>10}\n",
        "zone", "steady W", "dynamic W", "hold W", "reheat", "recommended W", "installed", "ratio"
    ));
    for z in &s.zones {
        o.push_str(&format!(
            "{:<16}{:>10.0}{:>11}{:>9}{:>9}{:>14.0}{:>11}{:>10}\n",
            z.zone,
            z.steady_w,
            opt(z.dynamic_w, 0),
            opt(z.hold_w, 0),
            z.reheat_share
                .map(|r| format!("{:.0} %", r * 100.0))
                .unwrap_or_else(|| "-".into()),
            z.recommended_w,
            opt(z.installed_w, 0),
            opt(z.oversizing_ratio, 2)
        ));
    }
    let t = &s.total;
    o.push_str(&format!(
        "{:<16}{:>10.0}{:>11.0}{:>9}{:>9}{:>14.0}{:>11.0}\n",
        "whole house", t.steady_w, t.dynamic_w, "", "", t.recommended_w, t.installed_w
    ));
    o.push_str("steady loss by group (W):");
    for (g, v) in &t.by_group_w {
        o.push_str(&format!(" {g} {v:.0};"));
    }
    o.push('\n');
    if let Some(l) = &s.load_duration {
        o.push_str(&format!(
            "load duration ({} h, {:.0} kWh):",
            l.hours, l.annual_kwh
        ));
        for p in &l.points {
            o.push_str(&format!(
                " {} h ≥ {:.0} W;",
                p.hours_at_or_above_h, p.load_w
            ));
        }
        o.push('\n');
    }
    for w in &s.warnings {
        o.push_str(&format!("warning: {w}\n"));
    }
    for c in &s.cautions {
        o.push_str(&format!("caution: {c}\n"));
    }
    o
}

/// Option errors of a study are the user's input (exit 2); solver failures are not.
pub fn study_error(e: dwell_studies::StudyError) -> anyhow::Error {
    match e {
        dwell_studies::StudyError::Option(_) => bad_input(e),
        other => anyhow::Error::new(other),
    }
}
