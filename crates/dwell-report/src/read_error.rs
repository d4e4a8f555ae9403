//! Failure to read back the files of a finished run, and the readers that report it.

use std::path::Path;

/// A file of an output folder could not be read back (by `dwell chart`, or by a study drawing
/// its charts from what it has just written). The message names the file and, where it can,
/// the row, column or JSON place; the caller adds what to do (rerun the command).
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum ReadError {
    /// The file is missing or unreadable.
    #[error("cannot read {path}: {source}")]
    Io {
        /// The path.
        path: String,
        /// Why.
        source: std::io::Error,
    },
    /// The file is there but its content is not what the run writes.
    #[error("{path}: {message}")]
    Content {
        /// The path.
        path: String,
        /// What is wrong, and where in the file.
        message: String,
    },
}

impl ReadError {
    /// A content error in `path`.
    pub(crate) fn content(path: &Path, message: impl Into<String>) -> ReadError {
        ReadError::Content {
            path: path.display().to_string(),
            message: message.into(),
        }
    }
}

/// Reads a whole text file.
pub(crate) fn read_text(path: &Path) -> Result<String, ReadError> {
    std::fs::read_to_string(path).map_err(|source| ReadError::Io {
        path: path.display().to_string(),
        source,
    })
}

/// Header and text columns of a CSV file.
pub(crate) fn read_csv(path: &Path) -> Result<(Vec<String>, Vec<Vec<String>>), ReadError> {
    let text = read_text(path)?;
    let mut r = csv::Reader::from_reader(text.as_bytes());
    let header: Vec<String> = r
        .headers()
        .map_err(|e| ReadError::content(path, e.to_string()))?
        .iter()
        .map(String::from)
        .collect();
    let mut cols = vec![Vec::new(); header.len()];
    for (i, rec) in r.records().enumerate() {
        let rec = rec.map_err(|e| ReadError::content(path, format!("row {}: {e}", i + 2)))?;
        for (c, v) in rec.iter().enumerate().take(header.len()) {
            cols[c].push(v.to_string());
        }
    }
    Ok((header, cols))
}

/// Numbers of a column; an empty cell is NaN (how the writers leave a missing value).
pub(crate) fn numbers(path: &Path, name: &str, col: &[String]) -> Result<Vec<f64>, ReadError> {
    col.iter()
        .enumerate()
        .map(|(i, v)| {
            if v.is_empty() {
                Ok(f64::NAN)
            } else {
                v.parse::<f64>().map_err(|_| {
                    ReadError::content(
                        path,
                        format!("row {}, column {name}: {v:?} is not a number", i + 2),
                    )
                })
            }
        })
        .collect()
}
