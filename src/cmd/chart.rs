//! `dwell chart DIR`: redraw the charts and the report of a finished run from its output
//! folder, reading only the files the run wrote.
//!
//! The command that wrote the folder is read from its `run.json`
//! ([`dwell_report::RunMarker`]); a folder without one is a `simulate` run if it holds
//! `hourly.csv` and `summary.json` (as written before the marker existed). The commands
//! themselves draw through the same functions, after writing their files, so a redraw equals
//! what the run drew.

use std::path::{Path, PathBuf};

use chrono::NaiveDate;
use dwell_report::{OutputDir, RunCommand, RunMarker, SimulationFiles, StudyFiles};

use crate::exit::bad_input;

/// Arguments of `dwell chart`.
#[derive(clap::Args)]
#[command(
    after_help = "The command that wrote DIR is read from its run.json. Folders of `size`, `setback`, `outage` and `compare` written by an older dwell lack the files the charts are drawn from: run the command again. --from/--to apply to `simulate` folders only."
)]
pub struct ChartArgs {
    /// Output folder of a finished `dwell simulate`, `size`, `setback`, `outage` or `compare` run
    pub dir: PathBuf,
    /// First local day of the temperature chart of a `simulate` folder, YYYY-MM-DD (default: the coldest week, or the whole run if 14 days or shorter)
    #[arg(long)]
    pub from: Option<NaiveDate>,
    /// Last local day of the temperature chart of a `simulate` folder, inclusive, YYYY-MM-DD
    #[arg(long)]
    pub to: Option<NaiveDate>,
    /// Print nothing but errors
    #[arg(long, short)]
    pub quiet: bool,
}

/// Draws the charts and the report of the simulation whose files are in `out`, and marks the
/// folder as a `simulate` run (`run.json`).
pub fn draw_simulation(
    out: &OutputDir,
    from: Option<NaiveDate>,
    to: Option<NaiveDate>,
    quiet: bool,
) -> anyhow::Result<Vec<PathBuf>> {
    let files = read_simulation(out.path())?;
    RunMarker::new(RunCommand::Simulate).write(out)?;
    let pb = crate::progress::spinner("drawing charts and report", quiet);
    let written = dwell_report::write_simulation_report_for(out, &files, from, to);
    pb.finish_and_clear();
    Ok(written?)
}

/// Draws the charts and the report of the study whose files (and `run.json`) are in `out`.
pub fn draw_study(out: &OutputDir, quiet: bool) -> anyhow::Result<Vec<PathBuf>> {
    let dir = out.path();
    let marker = read_marker(dir)?.ok_or_else(|| {
        bad_input(format!(
            "{} holds no {}; rerun the study with --out {0}",
            dir.display(),
            dwell_report::run_marker::RUN_FILE
        ))
    })?;
    let command = marker.command;
    let files = StudyFiles::read(dir, marker).map_err(|e| bad_input(rerun(e, command)))?;
    let pb = crate::progress::spinner("drawing charts and report", quiet);
    let written = dwell_report::write_study_report(out, &files);
    pb.finish_and_clear();
    Ok(written?)
}

/// An error reading a folder, with what to do.
fn rerun(e: impl std::fmt::Display, command: RunCommand) -> String {
    format!("{e}; run `dwell {command}` again with --out on this folder to rewrite it")
}

fn read_marker(dir: &Path) -> anyhow::Result<Option<RunMarker>> {
    RunMarker::read(dir).map_err(|e| {
        bad_input(format!(
            "{e}; run.json records which command wrote the folder: run that command again with --out on this folder to rewrite it"
        ))
    })
}

fn read_simulation(dir: &Path) -> anyhow::Result<SimulationFiles> {
    if !dir.join("hourly.csv").is_file() || !dir.join("summary.json").is_file() {
        return Err(bad_input(format!(
            "{} holds no hourly.csv and summary.json: give the --out folder of a finished `dwell simulate` run",
            dir.display()
        )));
    }
    SimulationFiles::read(dir).map_err(|e| bad_input(rerun(e, RunCommand::Simulate)))
}

/// The command that wrote `dir`, or an error saying what to do.
fn command_of(dir: &Path) -> anyhow::Result<RunCommand> {
    if let Some(m) = read_marker(dir)? {
        return Ok(m.command);
    }
    if dir.join("hourly.csv").is_file() && dir.join("summary.json").is_file() {
        return Ok(RunCommand::Simulate);
    }
    for c in RunCommand::ALL {
        if let Some(j) = c.study_json() {
            if dir.join(j).is_file() {
                return Err(bad_input(format!(
                    "{} holds a `dwell {c}` run ({j}) from an older dwell, without the run.json and house.json its charts are drawn from; run `dwell {c}` again with --out on this folder, which also draws the charts",
                    dir.display()
                )));
            }
        }
    }
    Err(bad_input(format!(
        "{} holds no finished run (no run.json, nor hourly.csv with summary.json): give the --out folder of a finished `dwell simulate`, `size`, `setback`, `outage` or `compare` run",
        dir.display()
    )))
}

/// What to do instead of `--from/--to` on a study's folder.
fn window_hint(c: RunCommand) -> &'static str {
    match c {
        RunCommand::Setback => {
            ", or run `dwell setback` again with --from/--to to study other nights"
        }
        RunCommand::Compare => {
            ", or run `dwell compare` again with --from/--to to compare over other days"
        }
        RunCommand::Outage => ", or run `dwell outage` again with another --start",
        RunCommand::Size | RunCommand::Simulate => "",
    }
}

/// Runs the command.
pub fn run(args: ChartArgs) -> anyhow::Result<()> {
    if let (Some(a), Some(b)) = (args.from, args.to) {
        if b < a {
            return Err(bad_input(format!(
                "--to {b} is before --from {a}; swap them"
            )));
        }
    }
    if !args.dir.is_dir() {
        return Err(bad_input(format!(
            "{} is not a folder: give the --out folder of a finished `dwell simulate`, `size`, `setback`, `outage` or `compare` run",
            args.dir.display()
        )));
    }
    let command = command_of(&args.dir)?;
    let out = OutputDir::create(&args.dir)?;
    let written = match command {
        RunCommand::Simulate => draw_simulation(&out, args.from, args.to, args.quiet)?,
        c => {
            if args.from.is_some() || args.to.is_some() {
                return Err(bad_input(format!(
                    "--from/--to choose the days of the temperature chart of a `dwell simulate` folder; {} holds a `dwell {c}` run, whose charts show the period it studied: drop --from/--to{}",
                    args.dir.display(),
                    window_hint(c)
                )));
            }
            draw_study(&out, args.quiet)?
        }
    };
    if !args.quiet {
        for w in &written {
            println!("wrote {}", w.display());
        }
    }
    Ok(())
}
