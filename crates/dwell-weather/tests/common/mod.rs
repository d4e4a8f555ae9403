//! Test-only helpers: reading the CSV fixtures written by `scripts/ref_sun.py`.
#![allow(dead_code)]

use std::collections::HashMap;
use std::path::PathBuf;

/// `crates/dwell-weather/tests/reference/NAME`.
pub fn reference(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests")
        .join("reference")
        .join(name)
}

/// `tests/generated/NAME` at the repository root (git-ignored, made by `scripts/ref_sun.py`).
pub fn generated(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("../../tests/generated")
        .join(name)
}

/// One fixture row: column name → text.
pub struct Row(pub HashMap<String, String>);

impl Row {
    /// A numeric field.
    pub fn f(&self, k: &str) -> f64 {
        self.0[k]
            .parse()
            .unwrap_or_else(|_| panic!("field {k} = {} is a number", self.0[k]))
    }
    /// A text field.
    pub fn s(&self, k: &str) -> &str {
        &self.0[k]
    }
}

/// Reads a fixture CSV (lines starting with `#` skipped, first other line the header).
pub fn read_fixture(path: &std::path::Path) -> Vec<Row> {
    let text = std::fs::read_to_string(path)
        .unwrap_or_else(|e| panic!("{}: {e}; run `python3 scripts/ref_sun.py`", path.display()));
    let mut lines = text
        .lines()
        .filter(|l| !l.starts_with('#') && !l.is_empty());
    let header: Vec<String> = lines
        .next()
        .expect("header")
        .split(',')
        .map(String::from)
        .collect();
    lines
        .map(|l| {
            Row(header
                .iter()
                .cloned()
                .zip(l.split(',').map(String::from))
                .collect())
        })
        .collect()
}

/// Absolute difference of two angles in degrees, modulo 360.
pub fn angle_diff(a: f64, b: f64) -> f64 {
    let d = (a - b).rem_euclid(360.0);
    d.min(360.0 - d)
}
