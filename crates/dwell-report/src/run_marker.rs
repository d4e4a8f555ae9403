//! `run.json`: which command wrote an output folder, so `dwell chart DIR` knows which charts
//! and report to redraw, and from which files.
//!
//! A study writes it last, after every file its charts and report are drawn from; a folder
//! with a `run.json` therefore holds everything `dwell chart` needs. Example:
//!
//! ```json
//! { "command": "setback", "files_version": 1, "dwell_version": "0.1.0", "utc_offset": "+00:00" }
//! ```

use std::path::{Path, PathBuf};

use chrono::{DateTime, FixedOffset};
use serde::{Deserialize, Serialize};

use crate::outdir::{OutputDir, ReportError};
use crate::read_error::{read_text, ReadError};

/// Name of the marker file in an output folder.
pub const RUN_FILE: &str = "run.json";

/// Version of the set of files a run writes for its charts; a reader refuses a newer one.
pub const FILES_VERSION: u32 = 1;

/// The command that wrote an output folder.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum RunCommand {
    /// `dwell simulate`: `hourly.csv`, `summary.json`, `setpoints.csv`, `house.json`.
    Simulate,
    /// `dwell size`: `sizing.json`, `load_duration.csv` (with a weather year), `house.json`.
    Size,
    /// `dwell setback`: `setback.json`, `setback_path.csv`, `house.json`.
    Setback,
    /// `dwell outage`: `outage.json`, `outage_path.csv`, `house.json`.
    Outage,
    /// `dwell compare`: `compare.json`, `house.json` (of the base).
    Compare,
}

impl RunCommand {
    /// The subcommand's name, as typed after `dwell`.
    pub fn name(self) -> &'static str {
        match self {
            RunCommand::Simulate => "simulate",
            RunCommand::Size => "size",
            RunCommand::Setback => "setback",
            RunCommand::Outage => "outage",
            RunCommand::Compare => "compare",
        }
    }

    /// The main JSON output of a study, by which a folder written before `run.json` existed
    /// is recognised (`None` for `simulate`, recognised by `hourly.csv` and `summary.json`).
    pub fn study_json(self) -> Option<&'static str> {
        match self {
            RunCommand::Simulate => None,
            RunCommand::Size => Some("sizing.json"),
            RunCommand::Setback => Some("setback.json"),
            RunCommand::Outage => Some("outage.json"),
            RunCommand::Compare => Some("compare.json"),
        }
    }

    /// Every command, in the order of the help text.
    pub const ALL: [RunCommand; 5] = [
        RunCommand::Simulate,
        RunCommand::Size,
        RunCommand::Setback,
        RunCommand::Outage,
        RunCommand::Compare,
    ];
}

impl std::fmt::Display for RunCommand {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.name())
    }
}

/// The content of `run.json`.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct RunMarker {
    /// The command that wrote the folder.
    pub command: RunCommand,
    /// [`FILES_VERSION`] of the writer.
    pub files_version: u32,
    /// Version of dwell that wrote the folder (for people; not checked).
    pub dwell_version: String,
    /// Offset from UTC of the local standard time of the run's weather, `+hh:mm`: the
    /// setback and outage paths are written in local time, and their charts name the offset.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub utc_offset: Option<String>,
}

impl RunMarker {
    /// The marker of a run of `command` by this version of dwell.
    pub fn new(command: RunCommand) -> RunMarker {
        RunMarker {
            command,
            files_version: FILES_VERSION,
            dwell_version: env!("CARGO_PKG_VERSION").to_string(),
            utc_offset: None,
        }
    }

    /// With the offset of local standard time.
    pub fn with_offset(mut self, offset: FixedOffset) -> RunMarker {
        self.utc_offset = Some(offset.to_string());
        self
    }

    /// The text of `run.json`.
    pub fn to_json(&self) -> Result<String, ReportError> {
        serde_json::to_string_pretty(self)
            .map(|s| s + "\n")
            .map_err(|e| ReportError::Format {
                what: RUN_FILE.into(),
                message: e.to_string(),
            })
    }

    /// Writes `run.json` into `out`.
    pub fn write(&self, out: &OutputDir) -> Result<PathBuf, ReportError> {
        out.write(RUN_FILE, self.to_json()?.as_bytes())
    }

    /// Reads `run.json` from `dir`: `Ok(None)` if there is none (a folder of an older dwell,
    /// or no run at all).
    pub fn read(dir: &Path) -> Result<Option<RunMarker>, ReadError> {
        let path = dir.join(RUN_FILE);
        if !path.exists() {
            return Ok(None);
        }
        let m: RunMarker = serde_json::from_str(&read_text(&path)?)
            .map_err(|e| ReadError::content(&path, e.to_string()))?;
        if m.files_version > FILES_VERSION {
            return Err(ReadError::content(
                &path,
                format!(
                    "files version {} was written by dwell {}, newer than this one (reads version {FILES_VERSION})",
                    m.files_version, m.dwell_version
                ),
            ));
        }
        Ok(Some(m))
    }

    /// The offset of local standard time, if recorded.
    pub fn offset(&self, dir: &Path) -> Result<Option<FixedOffset>, ReadError> {
        let Some(s) = &self.utc_offset else {
            return Ok(None);
        };
        DateTime::parse_from_str(&format!("2000-01-01T00:00{s}"), "%Y-%m-%dT%H:%M%:z")
            .map(|t| Some(*t.offset()))
            .map_err(|_| {
                ReadError::content(
                    &dir.join(RUN_FILE),
                    format!("utc_offset {s:?} is not an offset like +01:00"),
                )
            })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_marker_round_trips_and_an_absent_one_is_none() {
        let d = tempfile::tempdir().unwrap();
        assert_eq!(RunMarker::read(d.path()).unwrap(), None);
        let out = OutputDir::create(d.path()).unwrap();
        let m = RunMarker::new(RunCommand::Outage)
            .with_offset(FixedOffset::west_opt(5 * 3600).unwrap());
        m.write(&out).unwrap();
        let text = std::fs::read_to_string(d.path().join(RUN_FILE)).unwrap();
        assert!(text.contains("\"command\": \"outage\""), "{text}");
        assert!(text.contains("\"utc_offset\": \"-05:00\""), "{text}");
        let back = RunMarker::read(d.path()).unwrap().unwrap();
        assert_eq!(back, m);
        assert_eq!(
            back.offset(d.path()).unwrap(),
            FixedOffset::west_opt(5 * 3600)
        );
    }

    #[test]
    fn unknown_commands_newer_versions_and_bad_offsets_name_the_file() {
        let d = tempfile::tempdir().unwrap();
        let p = d.path().join(RUN_FILE);
        std::fs::write(
            &p,
            r#"{"command": "paint", "files_version": 1, "dwell_version": "0"}"#,
        )
        .unwrap();
        let e = RunMarker::read(d.path()).unwrap_err().to_string();
        assert!(
            e.contains("run.json") && e.contains("unknown variant `paint`"),
            "{e}"
        );
        std::fs::write(
            &p,
            r#"{"command": "size", "files_version": 9, "dwell_version": "9.0"}"#,
        )
        .unwrap();
        let e = RunMarker::read(d.path()).unwrap_err().to_string();
        assert!(
            e.contains("files version 9 was written by dwell 9.0"),
            "{e}"
        );
        std::fs::write(&p, r#"{"command": "size", "files_version": 1, "dwell_version": "0", "utc_offset": "noon"}"#).unwrap();
        let m = RunMarker::read(d.path()).unwrap().unwrap();
        let e = m.offset(d.path()).unwrap_err().to_string();
        assert!(e.contains("run.json") && e.contains("\"noon\""), "{e}");
    }
}
