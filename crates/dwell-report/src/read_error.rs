//! Failure to read back the files of a finished run.

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
    pub(crate) fn content(path: &std::path::Path, message: impl Into<String>) -> ReadError {
        ReadError::Content {
            path: path.display().to_string(),
            message: message.into(),
        }
    }
}

/// Reads a whole text file.
pub(crate) fn read_text(path: &std::path::Path) -> Result<String, ReadError> {
    std::fs::read_to_string(path).map_err(|source| ReadError::Io {
        path: path.display().to_string(),
        source,
    })
}
