//! The library's error type.
//!
//! Every error names the file (and line, where there is one) or the well, horizon
//! or project key it is about, and says what was expected. The binary prints the
//! message and exits non-zero; the library never panics on bad input.

use std::fmt;
use std::path::{Path, PathBuf};

/// Result alias used throughout the library.
pub type Result<T> = std::result::Result<T, Error>;

/// Where in an input a problem was found.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Location {
    /// The file the problem is in.
    pub path: PathBuf,
    /// 1-based line number, where the format has lines.
    pub line: Option<usize>,
}

impl fmt::Display for Location {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.line {
            Some(l) => write!(f, "{}:{}", self.path.display(), l),
            None => write!(f, "{}", self.path.display()),
        }
    }
}

/// All errors the library reports.
#[derive(Debug, thiserror::Error)]
pub enum Error {
    /// The operating system refused to read or write a file.
    #[error("{path}: {source}", path = .path.display())]
    Io {
        /// File being read or written.
        path: PathBuf,
        /// The underlying error.
        #[source]
        source: std::io::Error,
    },
    /// The content of an input file is wrong (bad syntax, bad value, missing section).
    #[error("{loc}: {msg}")]
    Input {
        /// File and line.
        loc: Location,
        /// What is wrong and what was expected.
        msg: String,
    },
    /// A valid file uses a feature this program does not read.
    #[error("{loc}: not supported: {msg}")]
    Unsupported {
        /// File and line.
        loc: Location,
        /// What is not supported.
        msg: String,
    },
    /// The project file is wrong: unknown key, bad value, inconsistent settings.
    #[error("{path}: {msg}", path = .path.display())]
    Project {
        /// The project file.
        path: PathBuf,
        /// What is wrong, naming the key.
        msg: String,
    },
    /// Inputs that are each valid but do not fit together (a well outside the
    /// survey, a volume on another grid, a top on a horizon that does not exist).
    #[error("{0}")]
    Inconsistent(String),
}

impl Error {
    /// An [`Error::Input`] at `path`, optionally at 1-based `line`.
    pub fn input(path: impl AsRef<Path>, line: Option<usize>, msg: impl Into<String>) -> Self {
        Error::Input {
            loc: Location {
                path: path.as_ref().to_path_buf(),
                line,
            },
            msg: msg.into(),
        }
    }

    /// An [`Error::Unsupported`] at `path`, optionally at 1-based `line`.
    pub fn unsupported(
        path: impl AsRef<Path>,
        line: Option<usize>,
        msg: impl Into<String>,
    ) -> Self {
        Error::Unsupported {
            loc: Location {
                path: path.as_ref().to_path_buf(),
                line,
            },
            msg: msg.into(),
        }
    }

    /// An [`Error::Io`] for `path`.
    pub fn io(path: impl AsRef<Path>, source: std::io::Error) -> Self {
        Error::Io {
            path: path.as_ref().to_path_buf(),
            source,
        }
    }

    /// An [`Error::Project`] for the project file at `path`.
    pub fn project(path: impl AsRef<Path>, msg: impl Into<String>) -> Self {
        Error::Project {
            path: path.as_ref().to_path_buf(),
            msg: msg.into(),
        }
    }

    /// An [`Error::Inconsistent`].
    pub fn inconsistent(msg: impl Into<String>) -> Self {
        Error::Inconsistent(msg.into())
    }
}
