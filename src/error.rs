//! Errors of the library: every message says what was wrong, where (flag, file, JSON path) and
//! what is accepted. All of them mean "the input could not be used" (exit code 2).

use std::path::PathBuf;

use crate::quantity::ParseValueError;

/// Result alias of the library.
pub type Result<T> = std::result::Result<T, Error>;

/// Anything that stops the tool from using its input.
#[derive(Debug, thiserror::Error)]
pub enum Error {
    /// A typed value (flag) could not be read.
    #[error("{flag}: {source}")]
    Value {
        /// The flag, e.g. `--supply`.
        flag: String,
        /// What the parser said.
        source: ParseValueError,
    },
    /// A file could not be read from disk.
    #[error("{}: cannot read the file: {source}", path.display())]
    Io {
        /// The file.
        path: PathBuf,
        /// The operating system's reason.
        source: std::io::Error,
    },
    /// A file (or standard output) could not be written.
    #[error("{}: cannot write: {source}", path.display())]
    Write {
        /// The file, or `<standard output>`.
        path: PathBuf,
        /// The operating system's reason.
        source: std::io::Error,
    },
    /// Standard output was closed by its reader (`pinlow audit b.json | head -1`): not a fault
    /// of the input; the binary ends quietly with status 141, as a process ended by SIGPIPE.
    #[error("standard output was closed")]
    OutputClosed,
    /// An error met while using a source that the message must name first, e.g.
    /// `PINLOW_PARTS entry 2 (/x/y): ...`.
    #[error("{context}: {source}")]
    Context {
        /// What was being read.
        context: String,
        /// What went wrong there.
        source: Box<Error>,
    },
    /// A JSON file is malformed or does not fit its schema (unknown key, wrong type, missing field).
    #[error("{file}: {location}{message}")]
    Json {
        /// The file (or `<flags>`).
        file: String,
        /// `line L, column C, at PATH: ` or `at PATH: `.
        location: String,
        /// What serde said, lightly reworded.
        message: String,
    },
    /// A value is out of its allowed range or inconsistent with another.
    #[error("{place}: {message}")]
    Invalid {
        /// Where: `FILE: stages[2].load.coil_ohms` or a flag such as `--coil-resistance`.
        place: String,
        /// What is wrong and what is accepted.
        message: String,
    },
    /// A stage names a part that no library holds.
    #[error("{place}: unknown part `{id}`; known parts: {known}")]
    UnknownPart {
        /// Where the part was named.
        place: String,
        /// The id asked for.
        id: String,
        /// The ids that exist, comma separated.
        known: String,
    },
    /// Two part files in one folder claim the same id.
    #[error("part `{id}` is defined twice: {first} and {second}")]
    DuplicatePart {
        /// The id.
        id: String,
        /// First file.
        first: String,
        /// Second file.
        second: String,
    },
    /// Several independent problems (one per file checked).
    #[error("{}", .0.iter().map(ToString::to_string).collect::<Vec<_>>().join("\npinlow: error: "))]
    Many(Vec<Error>),
    /// A usage problem with the command line that clap cannot see (flags that do not fit together).
    #[error("{0}")]
    Usage(String),
}

impl Error {
    /// Shorthand for [`Error::Invalid`].
    pub fn invalid(place: impl Into<String>, message: impl Into<String>) -> Self {
        Error::Invalid {
            place: place.into(),
            message: message.into(),
        }
    }

    /// Add the line and column of the JSON path an error names, when `text` (the contents of
    /// `file`) holds it: `FILE: stages[0].x` becomes `FILE: line L, column C, at stages[0].x`.
    pub fn with_position(self, file: &str, text: &str) -> Self {
        self.with_locator(file, &|path| crate::jsonpos::locate(text, path))
    }

    /// As [`Error::with_position`], with `locate` giving the (line, column) of a JSON path of
    /// `file` (for a file read piece by piece, see `board::stream`).
    pub fn with_locator(self, file: &str, locate: &dyn Fn(&str) -> Option<(usize, usize)>) -> Self {
        let locate = |place: &str| -> Option<String> {
            let path = place.strip_prefix(file)?.strip_prefix(": ")?;
            let (line, column) = locate(path)?;
            Some(format!("{file}: line {line}, column {column}, at {path}"))
        };
        match self {
            Error::Invalid { place, message } => Error::Invalid {
                place: locate(&place).unwrap_or(place),
                message,
            },
            Error::UnknownPart { place, id, known } => Error::UnknownPart {
                place: locate(&place).unwrap_or(place),
                id,
                known,
            },
            other => other,
        }
    }

    /// Turn a serde_json error met while reading `file` at `path` into an [`Error::Json`] that
    /// gives line, column and JSON path.
    pub fn from_json(file: &str, path: &str, err: &serde_json::Error) -> Self {
        Self::from_json_at(file, path, (err.line(), err.column()), err)
    }

    /// As [`Error::from_json`], with the (line, column) to name given (line 0: none).
    pub fn from_json_at(
        file: &str,
        path: &str,
        (line, column): (usize, usize),
        err: &serde_json::Error,
    ) -> Self {
        let mut location = String::new();
        if line > 0 {
            location.push_str(&format!("line {line}, column {column}"));
        }
        let path = path.trim_end_matches(".?").trim_end_matches('?');
        if !path.is_empty() && path != "." {
            if !location.is_empty() {
                location.push_str(", ");
            }
            location.push_str(&format!("at {path}"));
        }
        if !location.is_empty() {
            location.push_str(": ");
        }
        // serde appends " at line L column C" to its message; we already said where.
        let text = err.to_string();
        let message = match text.rfind(" at line ") {
            Some(i) => text.get(..i).unwrap_or(&text).to_string(),
            None => text,
        };
        Error::Json {
            file: file.to_string(),
            location,
            message,
        }
    }
}

/// Deserialize `text` (the contents of `file`) into `T`, with errors that name line, column and
/// JSON path.
pub fn parse_json<T: serde::de::DeserializeOwned>(file: &str, text: &str) -> Result<T> {
    parse_json_at(file, text, "", &|line, column| (line, column))
}

/// Deserialize `text`, one value of a larger file, into `T`: `prefix` is the value's JSON path
/// in the file (`stages[7]`, empty for the whole file) and `shift` turns a (line, column) inside
/// `text` into one of the file.
pub fn parse_json_at<T: serde::de::DeserializeOwned>(
    file: &str,
    text: &str,
    prefix: &str,
    shift: &dyn Fn(usize, usize) -> (usize, usize),
) -> Result<T> {
    let at = |e: &serde_json::Error| match e.line() {
        0 => (0, 0),
        line => shift(line, e.column()),
    };
    let mut de = serde_json::Deserializer::from_str(text);
    let value: T = serde_path_to_error::deserialize(&mut de).map_err(|e| {
        let path = join_path(prefix, &e.path().to_string());
        let mut err = Error::from_json_at(file, &path, at(e.inner()), e.inner());
        if let Error::Json { message, .. } = &mut err {
            if non_finite_at(text, e.inner().line(), e.inner().column()) {
                message.push_str(" (JSON has no NaN or Infinity: give a finite number)");
            }
        }
        err
    })?;
    de.end()
        .map_err(|e| Error::from_json_at(file, prefix, at(&e), &e))?;
    Ok(value)
}

/// `stages[2]` + `load.coil_ohms` -> `stages[2].load.coil_ohms` (serde_path_to_error writes the
/// root as `.`).
fn join_path(prefix: &str, path: &str) -> String {
    let path = path.trim_end_matches(".?").trim_end_matches('?');
    match (prefix.is_empty(), path) {
        (true, _) => path.to_string(),
        (false, "" | ".") => prefix.to_string(),
        (false, p) if p.starts_with('[') => format!("{prefix}{p}"),
        (false, p) => format!("{prefix}.{p}"),
    }
}

/// True when the text at a 1-based line and column starts a NaN or Infinity token.
fn non_finite_at(text: &str, line: usize, column: usize) -> bool {
    let Some(l) = text.lines().nth(line.saturating_sub(1)) else {
        return false;
    };
    let start = l
        .char_indices()
        .nth(column.saturating_sub(1))
        .map(|(i, _)| i)
        .unwrap_or(l.len());
    let rest = l.get(start..).unwrap_or_default().trim_start_matches('-');
    rest.starts_with("NaN") || rest.starts_with("Infinity") || rest.starts_with("inf")
}
