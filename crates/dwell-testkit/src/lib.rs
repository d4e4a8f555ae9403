//! Test-only helpers shared by the crates' tests.
//!
//! [`record`] appends one line per external check (what is compared, the source, the
//! tolerance, the figure obtained, pass or fail) to `$DWELL_VALIDATION_DIR/<file>.jsonl` when
//! that variable is set; `scripts/validation_report.py` turns the lines into
//! `docs/validation.md`. Without the variable it does nothing, so tests behave the same.
#![deny(missing_docs)]

use std::io::Write;

/// One external check as it appears in the validation report.
pub struct Check<'a> {
    /// Area of the check (e.g. "ISO 13786 periodic response").
    pub area: &'a str,
    /// What is compared.
    pub what: &'a str,
    /// The outside reference: standard and clause, handbook, paper, library and version.
    pub source: &'a str,
    /// The tolerance, in words with units.
    pub tolerance: &'a str,
    /// The figure obtained, in words with units.
    pub obtained: String,
    /// Whether the check passed.
    pub pass: bool,
}

/// Records a check (see the crate docs). Call it before asserting, so failures are reported.
pub fn record(file: &str, c: Check<'_>) {
    let Ok(dir) = std::env::var("DWELL_VALIDATION_DIR") else {
        return;
    };
    let _ = std::fs::create_dir_all(&dir);
    let line = serde_json::json!({
        "area": c.area, "what": c.what, "source": c.source, "tolerance": c.tolerance,
        "obtained": c.obtained, "pass": c.pass,
    });
    if let Ok(mut f) = std::fs::OpenOptions::new()
        .create(true)
        .append(true)
        .open(std::path::Path::new(&dir).join(format!("{file}.jsonl")))
    {
        let _ = writeln!(f, "{line}");
    }
}
