//! `dwell outage MODEL --start … --hours N`: heating off, how fast each zone cools.

use std::path::PathBuf;

use chrono::{NaiveDateTime, NaiveTime};
use dwell_studies::outage::{outage, OutageOptions, OutageStudy};

use super::model_io;
use super::setback::study_weather;
use crate::exit::bad_input;

/// Arguments of `dwell outage`.
#[derive(clap::Args)]
pub struct OutageArgs {
    /// Model file (JSON)
    pub model: PathBuf,
    /// Start, local standard time: YYYY-MM-DDTHH:MM, or HH:MM on the first day of a design spell
    #[arg(long)]
    pub start: String,
    /// Length of the outage (h)
    #[arg(long)]
    pub hours: f64,
    /// Weather file; default the built-in invented climate
    #[arg(long, conflicts_with = "design_temp")]
    pub weather: Option<PathBuf>,
    /// Use a design cold spell at this minimum outdoor temperature (°C) instead of weather
    #[arg(long, allow_hyphen_values = true)]
    pub design_temp: Option<f64>,
    /// Damp-risk threshold (°C), common practice
    #[arg(long, default_value_t = 12.0, allow_hyphen_values = true)]
    pub damp_below: f64,
    /// Pipe-freeze threshold (°C), common practice
    #[arg(long, default_value_t = 5.0, allow_hyphen_values = true)]
    pub frost_below: f64,
    /// Hours shown after power returns
    #[arg(long, default_value_t = 24.0)]
    pub after: f64,
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

fn parse_start(s: &str, design: bool) -> anyhow::Result<NaiveDateTime> {
    if let Ok(t) = NaiveDateTime::parse_from_str(s, "%Y-%m-%dT%H:%M") {
        return Ok(t);
    }
    if let Ok(t) = NaiveTime::parse_from_str(s, "%H:%M") {
        if design {
            return Ok(dwell_studies::design_weather::spell_start_day().and_time(t));
        }
        return Err(bad_input(format!(
            "--start {s} has no date; give YYYY-MM-DDTHH:MM within the weather, or use --design-temp"
        )));
    }
    Err(bad_input(format!(
        "--start {s} is not a time; give YYYY-MM-DDTHH:MM (local standard time) or HH:MM with --design-temp"
    )))
}

/// Runs the command.
pub fn run(args: OutageArgs) -> anyhow::Result<()> {
    let (model, house) = model_io::load_house(&args.model)?;
    let start = parse_start(&args.start, args.design_temp.is_some())?;
    let days = if args.design_temp.is_some() {
        ((args.hours + args.after) / 24.0).ceil() as usize + 2
    } else {
        0
    };
    let weather = study_weather(&model, &args.weather, args.design_temp, days.clamp(1, 60))?;
    let opts = OutageOptions {
        after_h: args.after,
        step_s: args.step as f64 * 60.0,
        damp_below_c: args.damp_below,
        frost_below_c: args.frost_below,
        ..OutageOptions::new(start, args.hours)
    };
    let spinner = crate::progress::spinner("simulating the outage", args.quiet);
    let study = outage(&model, &house, &weather, &opts).map_err(super::size::study_error)?;
    spinner.finish_and_clear();
    let out = dwell_report::OutputDir::create(&args.out)?;
    let mut written = dwell_report::write_outage(&out, &study, &house)?;
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

fn opt(v: Option<f64>) -> String {
    v.map(|x| format!("{x:.1}")).unwrap_or_else(|| "-".into())
}

fn table(s: &OutageStudy) -> String {
    let mut o = format!(
        "{}: heating off {} h from {} to {} (local standard time)\nweather: {}\n\n",
        s.model, s.hours, s.start, s.end, s.weather
    );
    o.push_str(&format!(
        "{:<14}{:>9}{:>9}{:>9}{:>15}{:>12}{:>12}{:>12}\n",
        "zone",
        "start °C",
        "end °C",
        "low °C",
        "h to < comfort",
        format!("h to < {}", s.damp_below_c),
        format!("h to < {}", s.frost_below_c),
        "recover h"
    ));
    for z in &s.zones {
        o.push_str(&format!(
            "{:<14}{:>9.1}{:>9.1}{:>9.1}{:>15}{:>12}{:>12}{:>12}\n",
            z.zone,
            z.start_c,
            z.end_c,
            z.lowest_c,
            opt(z.hours_to_below_comfort_h),
            opt(z.hours_to_damp_risk_h),
            opt(z.hours_to_frost_risk_h),
            opt(z.recovered_after_h)
        ));
    }
    o.push_str(&format!(
        "thresholds: damp risk below {} °C, pipe freezing below {} °C — {}\n",
        s.damp_below_c, s.frost_below_c, s.thresholds_note
    ));
    for c in &s.cautions {
        o.push_str(&format!("caution: {c}\n"));
    }
    o
}
