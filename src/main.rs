//! `dwell`: the command line. Parses arguments, calls a library function, prints, exits.
//!
//! Exit codes: 0 success; 1 the run failed for a reason other than the input (for example an
//! output folder could not be written); 2 bad input (a model, weather file, variant or option
//! the user must fix). Errors are printed once, on standard error, prefixed `error:`.

use std::process::ExitCode;

use clap::{Parser, Subcommand};

mod cmd;
mod exit;
mod progress;

/// Model a small building as a thermal RC network and integrate it exactly.
#[derive(Parser)]
#[command(name = "dwell", version, about, long_about = None)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Validate a model and print its heat-loss summary
    Check(cmd::check::CheckArgs),
    /// Print the state space (A, B) of a model
    Network(cmd::network::NetworkArgs),
    /// Print the JSON Schema of the model file
    Schema(cmd::schema::SchemaArgs),
    /// Read, check, summarise and synthesise weather files
    #[command(subcommand)]
    Weather(cmd::weather::WeatherCommand),
    /// Simulate a model over a period and write hourly results
    Simulate(cmd::simulate::SimulateArgs),
    /// Redraw the charts and report of a finished run from its output folder
    Chart(cmd::chart::ChartArgs),
    /// Size heaters: steady design load, dynamic requirement, recommendation
    Size(cmd::size::SizeArgs),
    /// Night setback night by night against a continuous setpoint
    Setback(cmd::setback::SetbackArgs),
    /// Heating off for some hours: how fast each zone cools
    Outage(cmd::outage::OutageArgs),
    /// Compare variants of a model (JSON Merge Patches) side by side
    Compare(cmd::compare::CompareArgs),
    /// Fit a grey-box RC model to measured indoor temperature and heating power
    Calibrate(cmd::calibrate::CalibrateArgs),
    /// Run many variants from a CSV of rows on all cores; `sweep merge` joins shards
    Sweep(cmd::sweep::SweepArgs),
}

fn main() -> ExitCode {
    // Writing to a closed pipe (`dwell check m.json | head`) should end the process quietly,
    // as other command-line tools do, not panic inside `print!`.
    #[cfg(unix)]
    // SAFETY: restoring the default disposition of SIGPIPE before any thread is started.
    unsafe {
        libc::signal(libc::SIGPIPE, libc::SIG_DFL);
    }
    let cli = Cli::parse();
    let result = match cli.command {
        Command::Check(a) => cmd::check::run(a),
        Command::Network(a) => cmd::network::run(a),
        Command::Schema(a) => cmd::schema::run(a),
        Command::Weather(a) => cmd::weather::run(a),
        Command::Simulate(a) => cmd::simulate::run(a),
        Command::Chart(a) => cmd::chart::run(a),
        Command::Size(a) => cmd::size::run(a),
        Command::Setback(a) => cmd::setback::run(a),
        Command::Outage(a) => cmd::outage::run(a),
        Command::Compare(a) => cmd::compare::run(a),
        Command::Calibrate(a) => cmd::calibrate::run(a),
        Command::Sweep(a) => cmd::sweep::run(a),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => exit::report(&e),
    }
}
