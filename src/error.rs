//! The library's one error type. Input errors carry the file, position and key; numerical failures
//! carry their diagnostics.
use std::path::PathBuf;

/// Where in an input file a problem sits.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Location {
    /// File name as given by the user.
    pub file: String,
    /// 1-based line, 0 when unknown.
    pub line: usize,
    /// 1-based column, 0 when unknown.
    pub column: usize,
}

impl Location {
    /// Location of byte offset `offset` in `src`.
    pub fn from_offset(file: &str, src: &str, offset: usize) -> Self {
        let upto = &src[..offset.min(src.len())];
        let line = upto.matches('\n').count() + 1;
        let column = upto
            .rsplit('\n')
            .next()
            .map(|s| s.chars().count())
            .unwrap_or(0)
            + 1;
        Location {
            file: file.to_string(),
            line,
            column,
        }
    }

    /// A location naming only the file.
    pub fn file_only(file: &str) -> Self {
        Location {
            file: file.to_string(),
            line: 0,
            column: 0,
        }
    }
}

impl std::fmt::Display for Location {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        if self.line > 0 {
            write!(f, "{}:{}:{}", self.file, self.line, self.column)
        } else {
            write!(f, "{}", self.file)
        }
    }
}

/// Every failure the library reports.
#[derive(Debug, thiserror::Error)]
pub enum Error {
    /// The input is wrong: the message names the key, the bad value and what is allowed.
    #[error("{location}: {key}: {message}")]
    Input {
        /// File and position.
        location: Location,
        /// Dotted key path, e.g. `footing.width_m`.
        key: String,
        /// What is wrong and what is allowed.
        message: String,
    },
    /// A file could not be read or written.
    #[error("{}: {source}", path.display())]
    Io {
        /// The file.
        path: PathBuf,
        /// The operating-system error.
        source: std::io::Error,
    },
    /// The linear system was not symmetric positive definite (an assembly bug, please report).
    #[error("linear solver: matrix not positive definite ({0}); this is a bug in assembly")]
    NotPositiveDefinite(String),
    /// Newton iteration failed even after step halving.
    #[error(
        "no convergence at step {step} (t = {time_s:.0} s): {iterations} Newton iterations, \
         residual {residual_k:.3e} K after {halvings} step halvings"
    )]
    NoConvergence {
        /// Time-step index.
        step: usize,
        /// Simulation time at the start of the step, s.
        time_s: f64,
        /// Iterations in the last attempt.
        iterations: usize,
        /// Last residual, as a temperature-equivalent (K).
        residual_k: f64,
        /// How many times the step was halved.
        halvings: usize,
    },
    /// Output could not be encoded.
    #[error("output: {0}")]
    Output(String),
}

impl Error {
    /// True for errors caused by the user's input (exit code 2).
    pub fn is_input(&self) -> bool {
        matches!(self, Error::Input { .. })
    }
}

/// Result with the library error.
pub type Result<T> = std::result::Result<T, Error>;
