//! Writing what the studies computed: CSV a spreadsheet opens, JSON with units in its keys.
//! This crate computes no physics.
//!
//! Every file is written to a temporary name in the output folder and renamed into place, so
//! a run that fails midway never leaves a half-written file.
#![deny(missing_docs)]

mod outdir;
mod simulate;

pub use outdir::{OutputDir, ReportError};
pub use simulate::{hourly_csv, inputs_csv, write_simulation};
