//! Writing what the studies computed: CSV a spreadsheet opens, JSON with units in its keys,
//! charts (drawn by `dwell-charts`) and a self-contained HTML report. This crate computes no
//! physics.
//!
//! Every file is written to a temporary name in the output folder and renamed into place, so
//! a run that fails midway never leaves a half-written file.
//!
//! Charts and the report are built from the files a run wrote ([`SimulationFiles`] for
//! `simulate`, [`StudyFiles`] for the other studies, [`RunMarker`] naming the command), so
//! `dwell chart DIR` redraws exactly what the run drew.
#![deny(missing_docs)]

pub mod charts_simulate;
pub mod charts_studies;
pub mod compare;
mod csvtext;
pub mod html;
pub mod outage;
mod outdir;
pub mod read_error;
pub mod report_simulate;
pub mod report_studies;
pub mod run_files;
pub mod run_marker;
pub mod setback;
mod simulate;
pub mod size;
pub mod study_files;

pub use charts_simulate::NamedChart;
pub use compare::write_compare;
pub use outage::write_outage;
pub use outdir::{OutputDir, ReportError};
pub use read_error::ReadError;
pub use report_simulate::{
    write_charts, write_simulation_inputs, write_simulation_report_for, DrawnChart,
};
pub use report_studies::{
    write_compare_report, write_outage_report, write_setback_report, write_sizing_report,
    write_study_report,
};
pub use run_files::SimulationFiles;
pub use run_marker::{RunCommand, RunMarker};
pub use setback::write_setback;
pub use simulate::{hourly_csv, inputs_csv, write_simulation};
pub use size::write_sizing;
pub use study_files::{Study, StudyFiles};
