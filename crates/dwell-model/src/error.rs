//! Errors of reading and checking a model file.

use std::fmt;

/// One problem in a model file, at a JSON path such as `$.zones[2].floor_area_m2`.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Problem {
    /// Where: a JSON path (`$` is the whole file).
    pub path: String,
    /// What is wrong and what to do.
    pub message: String,
}

impl fmt::Display for Problem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "at {}: {}", self.path, self.message)
    }
}

/// A model file that cannot be used.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum ModelError {
    /// The file could not be read.
    #[error("cannot read model file {file}: {source}")]
    Io {
        /// The file.
        file: String,
        /// Why.
        source: std::io::Error,
    },
    /// The text is not valid JSON.
    #[error("{file}:{line}:{column}: not valid JSON: {message}")]
    Syntax {
        /// The file.
        file: String,
        /// Line (1-based).
        line: usize,
        /// Column (1-based).
        column: usize,
        /// What the JSON reader said.
        message: String,
    },
    /// The JSON is valid but describes an impossible or incomplete house.
    #[error("{file}: {} problem{} in the model:\n{}", .problems.len(), if .problems.len() == 1 { "" } else { "s" }, list(.problems))]
    Invalid {
        /// The file.
        file: String,
        /// Every problem found, in file order.
        problems: Vec<Problem>,
    },
}

fn list(p: &[Problem]) -> String {
    p.iter()
        .map(|p| format!("  {p}"))
        .collect::<Vec<_>>()
        .join("\n")
}

impl ModelError {
    /// The problems of an invalid model (empty for other kinds of error).
    pub fn problems(&self) -> &[Problem] {
        match self {
            ModelError::Invalid { problems, .. } => problems,
            _ => &[],
        }
    }
}

/// The closest of `candidates` to `word`, if it is close enough to be a likely typo.
pub fn suggest<'a>(word: &str, candidates: impl IntoIterator<Item = &'a str>) -> Option<&'a str> {
    let mut best: Option<(&str, f64)> = None;
    for c in candidates {
        let score = strsim::jaro_winkler(&word.to_lowercase(), &c.to_lowercase());
        if score > 0.8 && best.is_none_or(|(_, s)| score > s) {
            best = Some((c, score));
        }
    }
    best.map(|(c, _)| c)
}
