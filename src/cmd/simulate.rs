//! `dwell simulate` (being written).

/// Arguments of `dwell simulate`.
#[derive(clap::Args)]
pub struct SimulateArgs {}

/// Runs the command.
pub fn run(_args: SimulateArgs) -> anyhow::Result<()> {
    anyhow::bail!("not yet available")
}
