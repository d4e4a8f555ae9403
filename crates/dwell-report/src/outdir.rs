//! An output folder with atomic file writes.

use std::io::Write;
use std::path::{Path, PathBuf};

/// Failure to write outputs.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum ReportError {
    /// A file or folder could not be written.
    #[error("cannot write {path}: {source}; check the folder exists and is writable, or choose another --out")]
    Io {
        /// The path.
        path: String,
        /// Why.
        source: std::io::Error,
    },
    /// Data could not be serialised.
    #[error("cannot format {what}: {message}")]
    Format {
        /// Which output.
        what: String,
        /// Why.
        message: String,
    },
}

/// A folder receiving outputs.
#[derive(Debug, Clone)]
pub struct OutputDir {
    dir: PathBuf,
}

impl OutputDir {
    /// Creates the folder (and parents) if needed.
    pub fn create(dir: &Path) -> Result<OutputDir, ReportError> {
        std::fs::create_dir_all(dir).map_err(|source| ReportError::Io {
            path: dir.display().to_string(),
            source,
        })?;
        Ok(OutputDir {
            dir: dir.to_path_buf(),
        })
    }

    /// The folder.
    pub fn path(&self) -> &Path {
        &self.dir
    }

    /// Writes `bytes` to `name` in the folder: first to a hidden temporary file, flushed to
    /// disk, then renamed over the final name.
    pub fn write(&self, name: &str, bytes: &[u8]) -> Result<PathBuf, ReportError> {
        let target = self.dir.join(name);
        let tmp = self.dir.join(format!(".{name}.tmp-{}", std::process::id()));
        let io = |source, p: &Path| ReportError::Io {
            path: p.display().to_string(),
            source,
        };
        let result = (|| {
            let mut f = std::fs::File::create(&tmp)?;
            f.write_all(bytes)?;
            f.sync_all()?;
            std::fs::rename(&tmp, &target)
        })();
        if let Err(e) = result {
            let _ = std::fs::remove_file(&tmp);
            return Err(io(e, &target));
        }
        Ok(target)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn writes_atomically_and_leaves_no_temporary() {
        let d = tempfile::tempdir().unwrap();
        let out = OutputDir::create(&d.path().join("a/b")).unwrap();
        out.write("x.csv", b"1,2\n").unwrap();
        out.write("x.csv", b"3,4\n").unwrap();
        let names: Vec<_> = std::fs::read_dir(out.path())
            .unwrap()
            .map(|e| e.unwrap().file_name())
            .collect();
        assert_eq!(names, vec![std::ffi::OsString::from("x.csv")]);
        assert_eq!(std::fs::read(out.path().join("x.csv")).unwrap(), b"3,4\n");
    }

    #[test]
    fn a_failed_write_names_the_path() {
        let d = tempfile::tempdir().unwrap();
        let out = OutputDir::create(d.path()).unwrap();
        std::fs::create_dir(d.path().join("taken")).unwrap();
        std::fs::write(d.path().join("taken/f"), b"").unwrap();
        let e = out.write("taken", b"x").unwrap_err();
        assert!(e.to_string().contains("taken"));
        let left: Vec<_> = std::fs::read_dir(d.path())
            .unwrap()
            .map(|e| e.unwrap().file_name().into_string().unwrap())
            .collect();
        assert!(left.iter().all(|n| !n.contains(".tmp-")), "{left:?}");
    }
}
