//! `dwell chart DIR`: redraw the charts and the report of a finished run from its output
//! folder, reading only the files the run wrote.

use std::path::{Path, PathBuf};

use chrono::NaiveDate;
use dwell_report::{OutputDir, SimulationFiles};

use crate::exit::bad_input;

/// Arguments of `dwell chart`.
#[derive(clap::Args)]
pub struct ChartArgs {
    /// Output folder of a finished `dwell simulate` run
    pub dir: PathBuf,
    /// First local day of the temperature chart, YYYY-MM-DD (default: the coldest week, or the whole run if 14 days or shorter)
    #[arg(long)]
    pub from: Option<NaiveDate>,
    /// Last local day of the temperature chart, inclusive, YYYY-MM-DD
    #[arg(long)]
    pub to: Option<NaiveDate>,
    /// Print nothing but errors
    #[arg(long, short)]
    pub quiet: bool,
}

/// Draws the charts and the report of the simulation whose files are in `out`.
pub fn draw_simulation(
    out: &OutputDir,
    from: Option<NaiveDate>,
    to: Option<NaiveDate>,
    quiet: bool,
) -> anyhow::Result<Vec<PathBuf>> {
    let files = read_run(out.path())?;
    let pb = crate::progress::spinner("drawing charts and report", quiet);
    let written = dwell_report::write_simulation_report_for(out, &files, from, to);
    pb.finish_and_clear();
    Ok(written?)
}

fn read_run(dir: &Path) -> anyhow::Result<SimulationFiles> {
    if !dir.join("hourly.csv").is_file() || !dir.join("summary.json").is_file() {
        return Err(bad_input(format!(
            "{} holds no hourly.csv and summary.json: give the --out folder of a finished `dwell simulate` run",
            dir.display()
        )));
    }
    SimulationFiles::read(dir).map_err(|e| {
        bad_input(format!(
            "{e}; run `dwell simulate` again to rewrite the folder"
        ))
    })
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
    let out = OutputDir::create(&args.dir)?;
    let written = draw_simulation(&out, args.from, args.to, args.quiet)?;
    if !args.quiet {
        for w in &written {
            println!("wrote {}", w.display());
        }
    }
    Ok(())
}
