//! The library's one error type. Input errors carry the file, position, key and a kind; numerical
//! failures carry their diagnostics.
use std::path::PathBuf;

/// Where in an input file a problem sits.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Location {
    /// File name as given by the user ("command line" for flags).
    pub file: String,
    /// 1-based line, 0 when unknown.
    pub line: usize,
    /// 1-based column, 0 when unknown.
    pub column: usize,
}

impl Location {
    /// Location of byte offset `offset` in `src`.
    pub fn from_offset(file: &str, src: &str, offset: usize) -> Self {
        let mut off = offset.min(src.len());
        while !src.is_char_boundary(off) {
            off -= 1;
        }
        let upto = &src[..off];
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

/// What is wrong with an input, for callers that act on the kind rather than the words.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "snake_case")]
pub enum InputKind {
    /// Not valid TOML or CSV, or a value of the wrong type.
    Syntax,
    /// A required key or value is absent.
    Missing,
    /// A value lies outside its allowed range.
    OutOfRange,
    /// A name that is not one of the known names.
    UnknownName,
    /// Keys that exclude each other, or a key not used where it is given.
    Conflict,
    /// Construction parts that overlap or leave the domain.
    Geometry,
    /// A referenced file that cannot be read.
    Unreadable,
    /// A state the model does not cover (permafrost, frost reaching the domain bottom).
    OutOfScope,
    /// A directory or file that is not a frostline result.
    NotAResult,
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
        /// What kind of problem.
        kind: InputKind,
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
    /// The steady (Picard) solve did not converge.
    #[error(
        "steady state: no convergence after {iterations} Picard iterations (largest change {change_k:.3e} K)"
    )]
    SteadyNoConvergence {
        /// Picard iterations done.
        iterations: usize,
        /// Largest temperature change of the last iteration, K.
        change_k: f64,
    },
    /// A method failed on its own terms (e.g. the sizing's monotonicity check).
    #[error("{0}")]
    Method(String),
    /// Output could not be encoded.
    #[error("output: {0}")]
    Output(String),
    /// Several independent input errors of one file, in file order (each an [`Error::Input`]).
    #[error("{}", .0.iter().map(|e| e.to_string()).collect::<Vec<_>>().join("\n"))]
    Inputs(Vec<Error>),
}

/// Independent input errors gathered so that they are reported together, in file order, instead
/// of one per attempt.
#[derive(Default)]
pub struct Gather(Vec<Error>);

impl Gather {
    /// The value of `r`, or None with its error kept.
    pub fn take<T>(&mut self, r: Result<T>) -> Option<T> {
        match r {
            Ok(v) => Some(v),
            Err(Error::Inputs(v)) => {
                self.0.extend(v);
                None
            }
            Err(e) => {
                self.0.push(e);
                None
            }
        }
    }

    /// Ok when nothing was gathered; else the one error, or all of them ordered by file, line
    /// and column (errors without a position last).
    pub fn finish(mut self) -> Result<()> {
        match self.0.len() {
            0 => Ok(()),
            1 => Err(self.0.remove(0)),
            _ => {
                // Files in the order they first appear, then positions within each file.
                let mut files: Vec<String> = Vec::new();
                let key = |e: &Error, files: &mut Vec<String>| match e {
                    Error::Input { location: l, .. } => {
                        let f = files.iter().position(|f| *f == l.file).unwrap_or_else(|| {
                            files.push(l.file.clone());
                            files.len() - 1
                        });
                        (f, l.line == 0, l.line, l.column)
                    }
                    _ => (usize::MAX, true, 0, 0),
                };
                let mut keyed: Vec<_> = self
                    .0
                    .into_iter()
                    .map(|e| (key(&e, &mut files), e))
                    .collect();
                keyed.sort_by_key(|(k, _)| *k);
                Err(Error::Inputs(keyed.into_iter().map(|(_, e)| e).collect()))
            }
        }
    }
}

impl Error {
    /// An input error at `location`.
    pub fn input(
        location: Location,
        key: &str,
        kind: InputKind,
        message: impl Into<String>,
    ) -> Self {
        Error::Input {
            location,
            key: key.to_string(),
            kind,
            message: message.into(),
        }
    }

    /// An input error in a command-line flag `key` (e.g. `--margin`).
    pub fn command_line(key: &str, kind: InputKind, message: impl Into<String>) -> Self {
        Self::input(Location::file_only("command line"), key, kind, message)
    }

    /// An input error naming only a file.
    pub fn in_file(file: &str, key: &str, kind: InputKind, message: impl Into<String>) -> Self {
        Self::input(Location::file_only(file), key, kind, message)
    }

    /// True for errors caused by the user's input (exit code 2).
    pub fn is_input(&self) -> bool {
        matches!(self, Error::Input { .. } | Error::Inputs(_))
    }

    /// Each error on its own: the list of [`Error::Inputs`], else this one.
    pub fn each(&self) -> Vec<&Error> {
        match self {
            Error::Inputs(v) => v.iter().collect(),
            e => vec![e],
        }
    }

    /// The error as a JSON object for tools (`--error-format json`): `class` (input, io,
    /// numerical, method, output), the message, and for input errors `file`, `line`, `column`
    /// (0 when not known), `key`, `kind` and `allowed` (the message's "allowed: …" part, if any);
    /// for I/O errors `path`.
    pub fn to_json(&self) -> serde_json::Value {
        use serde_json::json;
        match self {
            Error::Input {
                location,
                key,
                kind,
                message,
            } => {
                let allowed = message.split_once("allowed: ").map(|(_, a)| a.trim());
                json!({
                    "class": "input",
                    "file": location.file,
                    "line": location.line,
                    "column": location.column,
                    "key": key,
                    "kind": kind,
                    "message": message,
                    "allowed": allowed,
                })
            }
            Error::Io { path, source } => json!({
                "class": "io",
                "path": path.display().to_string(),
                "message": source.to_string(),
            }),
            Error::Inputs(v) => v.first().map_or(json!({"class": "input"}), Error::to_json),
            Error::Method(m) => json!({"class": "method", "message": m}),
            Error::Output(m) => json!({"class": "output", "message": m}),
            other => json!({"class": "numerical", "message": other.to_string()}),
        }
    }

    /// The kind of an input error, if it is one.
    pub fn input_kind(&self) -> Option<InputKind> {
        match self {
            Error::Input { kind, .. } => Some(*kind),
            Error::Inputs(v) => v.first().and_then(Error::input_kind),
            _ => None,
        }
    }

    /// An I/O error on `path`.
    pub fn io(path: impl Into<PathBuf>, source: std::io::Error) -> Self {
        Error::Io {
            path: path.into(),
            source,
        }
    }
}

/// Result with the library error.
pub type Result<T> = std::result::Result<T, Error>;

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn location_counts_lines_and_characters() {
        let src = "a = 1\nbé = 2\n";
        let l = Location::from_offset("f.toml", src, src.find('2').unwrap());
        assert_eq!((l.line, l.column), (2, 6));
        assert_eq!(l.to_string(), "f.toml:2:6");
        // An offset inside a multi-byte character does not panic.
        let l = Location::from_offset("f.toml", src, src.find('é').unwrap() + 1);
        assert_eq!(l.line, 2);
    }

    #[test]
    fn input_errors_carry_their_kind() {
        let e = Error::command_line("--margin", InputKind::OutOfRange, "9 m is out of range");
        assert!(e.is_input());
        assert_eq!(e.input_kind(), Some(InputKind::OutOfRange));
        assert_eq!(e.to_string(), "command line: --margin: 9 m is out of range");
    }
}
