//! `dwell schema`: the JSON Schema of the model file.

/// Arguments of `dwell schema`.
#[derive(clap::Args)]
pub struct SchemaArgs {}

/// Runs the command.
pub fn run(_args: SchemaArgs) -> anyhow::Result<()> {
    println!(
        "{}",
        serde_json::to_string_pretty(&dwell_model::json_schema())?
    );
    Ok(())
}
