//! Loading a model file for a command: read, validate, compile; errors become bad input.

use std::path::Path;

use dwell_model::{House, ModelFile};

use crate::exit::bad_input;

/// Reads and validates a model file.
pub fn load(path: &Path) -> anyhow::Result<ModelFile> {
    dwell_model::read_model(path).map_err(|e| match e {
        dwell_model::ModelError::Io { .. } => bad_input(format!("{e}; check the path")),
        other => bad_input(other),
    })
}

/// Reads, validates and compiles a model file.
pub fn load_house(path: &Path) -> anyhow::Result<(ModelFile, House)> {
    let model = load(path)?;
    let house = dwell_model::compile(&model, &path.display().to_string()).map_err(bad_input)?;
    Ok((model, house))
}
