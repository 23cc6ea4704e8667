//! Errors of the library: every message says what was wrong, where (a flag, or a file with the
//! JSON path, line and column) and what is accepted. All of them mean "the input could not be
//! used" (exit code 2). Places are typed ([`Place`]): nothing parses a message back apart.

use std::fmt;
use std::path::PathBuf;

use crate::quantity::ParseValueError;

/// Result alias of the library.
pub type Result<T> = std::result::Result<T, Error>;

/// Where a value stands.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Place {
    /// A command-line flag (`--coil`).
    Flag(String),
    /// A JSON path inside a file, with its line and column when known.
    Json {
        /// The file as named by the user (or `<stdin>`).
        file: String,
        /// The JSON path (`stages[2].load.coil_ohms`); empty for the whole document.
        path: String,
        /// 1-based line and column of the value, when known.
        line_col: Option<(usize, usize)>,
    },
    /// Anything else, in words (`PINLOW_PARTS entry 2 (/x)`, a file as a whole).
    Text(String),
}

impl Place {
    /// A JSON path in a file, position not yet known.
    pub fn json(file: impl Into<String>, path: impl Into<String>) -> Place {
        Place::Json {
            file: file.into(),
            path: path.into(),
            line_col: None,
        }
    }
}

impl fmt::Display for Place {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Place::Flag(flag) => f.write_str(flag),
            Place::Text(t) => f.write_str(t),
            Place::Json {
                file,
                path,
                line_col,
            } => match (line_col, path.is_empty()) {
                (Some((l, c)), false) => write!(f, "{file}: line {l}, column {c}, at {path}"),
                (Some((l, c)), true) => write!(f, "{file}: line {l}, column {c}"),
                (None, false) => write!(f, "{file}: {path}"),
                (None, true) => f.write_str(file),
            },
        }
    }
}

impl From<&str> for Place {
    fn from(s: &str) -> Place {
        Place::Text(s.to_string())
    }
}

impl From<String> for Place {
    fn from(s: String) -> Place {
        Place::Text(s)
    }
}

/// The position of a JSON path in a text, and the value there as typed.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Located {
    /// 1-based line.
    pub line: usize,
    /// 1-based column (characters).
    pub column: usize,
    /// The scalar token at that place as written (`1e-400`), when it is one.
    pub token: Option<String>,
}

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
    /// A JSON file is malformed or does not fit its form (unknown key, wrong type, missing field).
    #[error("{place}: {message}")]
    Json {
        /// Where.
        place: Place,
        /// What is wrong, and the accepted form.
        message: String,
    },
    /// A number outside what pinlow accepts there.
    #[error("{place}: {shown} is not allowed: {reason}")]
    Range {
        /// Where.
        place: Place,
        /// The value as typed (from the file text when known).
        shown: String,
        /// What is accepted.
        reason: String,
    },
    /// A value is inconsistent with another, or otherwise unusable.
    #[error("{place}: {message}")]
    Invalid {
        /// Where.
        place: Place,
        /// What is wrong and what is accepted.
        message: String,
    },
    /// A stage names a part that no library holds.
    #[error("{place}: unknown part `{id}`; {hint}")]
    UnknownPart {
        /// Where the part was named.
        place: Place,
        /// The id asked for.
        id: String,
        /// The nearest ids, or every id.
        hint: String,
    },
    /// Two part files claim the same id.
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
    pub fn invalid(place: impl Into<Place>, message: impl Into<String>) -> Self {
        Error::Invalid {
            place: place.into(),
            message: message.into(),
        }
    }

    /// Shorthand for [`Error::Range`].
    pub fn range(
        place: impl Into<Place>,
        shown: impl Into<String>,
        reason: impl Into<String>,
    ) -> Self {
        Error::Range {
            place: place.into(),
            shown: shown.into(),
            reason: reason.into(),
        }
    }

    /// The place the error names, when it names one.
    pub fn place_mut(&mut self) -> Option<&mut Place> {
        match self {
            Error::Json { place, .. }
            | Error::Range { place, .. }
            | Error::Invalid { place, .. }
            | Error::UnknownPart { place, .. } => Some(place),
            _ => None,
        }
    }

    /// Fill in the line and column (and the value as typed) of a JSON place that has none yet,
    /// with `locate(file, path)`.
    pub fn locate_with(mut self, locate: &dyn Fn(&str, &str) -> Option<Located>) -> Self {
        if let Error::Many(errors) = self {
            return Error::Many(errors.into_iter().map(|e| e.locate_with(locate)).collect());
        }
        if let Error::Context { context, source } = self {
            return Error::Context {
                context,
                source: Box::new(source.locate_with(locate)),
            };
        }
        let mut token = None;
        if let Some(Place::Json {
            file,
            path,
            line_col,
        }) = self.place_mut()
        {
            if line_col.is_none() {
                if let Some(found) = locate(file, path) {
                    *line_col = Some((found.line, found.column));
                    token = found.token;
                }
            }
        }
        if let (Error::Range { shown, .. }, Some(t)) = (&mut self, token) {
            *shown = t;
        }
        self
    }

    /// [`Error::locate_with`] over the whole text of `file`.
    pub fn with_position(self, file: &str, text: &str) -> Self {
        self.locate_with(&|f: &str, path: &str| {
            if f != file {
                return None;
            }
            crate::jsonpos::locate_token(text, path)
        })
    }

    /// Turn a serde_json error met while reading `file` at `path` into an [`Error::Json`] that
    /// gives line, column and JSON path, and says which form the key takes.
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
        let path = path.trim_end_matches(".?").trim_end_matches('?');
        let path = if path == "." { "" } else { path };
        let line_col = (line > 0).then_some((line, column));
        // serde appends " at line L column C" to its message; the place says where already.
        let text = err.to_string();
        let mut message = match text.rfind(" at line ") {
            Some(i) => text.get(..i).unwrap_or(&text).to_string(),
            None => text,
        };
        if message.starts_with("invalid type") {
            let key = path.rsplit('.').next().unwrap_or(path);
            let key = key.split('[').next().unwrap_or(key);
            if let Some(form) = crate::fields::form_of_key(key) {
                let got = message
                    .strip_prefix("invalid type: ")
                    .and_then(|m| m.split(", expected").next())
                    .unwrap_or("another type")
                    .to_string();
                message = format!("{key} takes {form}; got {got}");
            }
        }
        Error::Json {
            place: Place::Json {
                file: file.to_string(),
                path: path.to_string(),
                line_col,
            },
            message,
        }
    }
}

/// The text with a leading UTF-8 byte-order mark taken off (editors on some systems write one).
pub fn strip_bom(text: &str) -> &str {
    text.strip_prefix('\u{feff}').unwrap_or(text)
}

/// Parse `text` (the contents of `file`) as one JSON value, with errors that name line and column.
pub fn parse_value_text(file: &str, text: &str) -> Result<serde_json::Value> {
    let text = strip_bom(text);
    let mut de = serde_json::Deserializer::from_str(text);
    let value = serde::Deserialize::deserialize(&mut de).map_err(|e: serde_json::Error| {
        let mut err = Error::from_json(file, "", &e);
        if let Error::Json { message, .. } = &mut err {
            if non_finite_at(text, e.line(), e.column()) {
                message.push_str(" (JSON has no NaN or Infinity: give a finite number)");
            }
        }
        err
    })?;
    de.end().map_err(|e| Error::from_json(file, "", &e))?;
    Ok(value)
}

/// Deserialize a JSON value read from `file` into `T`, with errors that name the JSON path under
/// `prefix` (position filled in later by [`Error::locate_with`]).
pub fn from_value<T: serde::de::DeserializeOwned>(
    file: &str,
    prefix: &str,
    value: &serde_json::Value,
) -> Result<T> {
    // The plain reader first (it is several times faster); only a value it refuses is read
    // again with the path tracked, for the error (the same value fails the same way).
    if let Ok(v) = T::deserialize(value) {
        return Ok(v);
    }
    serde_path_to_error::deserialize(value).map_err(|e| {
        let inner = e.path().to_string();
        let path = join_path(prefix, inner.trim_end_matches(".?").trim_end_matches('?'));
        let mut err = Error::from_json(file, &path, e.inner());
        if let Some(Place::Json { line_col, .. }) = err.place_mut() {
            // A value deserializer knows no lines: the caller locates the path.
            *line_col = None;
        }
        err
    })
}

/// `prefix.inner`, `prefix[0]` or either alone.
pub fn join_path(prefix: &str, inner: &str) -> String {
    let inner = if inner == "." { "" } else { inner };
    match (prefix.is_empty(), inner.is_empty()) {
        (true, _) => inner.to_string(),
        (false, true) => prefix.to_string(),
        (false, false) if inner.starts_with('[') => format!("{prefix}{inner}"),
        (false, false) => format!("{prefix}.{inner}"),
    }
}

/// Deserialize `text` (the contents of `file`) into `T`, with errors that name line, column and
/// JSON path.
pub fn parse_json<T: serde::de::DeserializeOwned>(file: &str, text: &str) -> Result<T> {
    parse_json_at(file, strip_bom(text), "", &|line, column| (line, column))
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
        let path = join_path(
            prefix,
            e.path()
                .to_string()
                .trim_end_matches(".?")
                .trim_end_matches('?'),
        );
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

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn places_print_as_users_read_them() {
        assert_eq!(Place::Flag("--coil".into()).to_string(), "--coil");
        let p = Place::Json {
            file: "b.json".into(),
            path: "stages[0].load".into(),
            line_col: Some((3, 9)),
        };
        assert_eq!(p.to_string(), "b.json: line 3, column 9, at stages[0].load");
        assert_eq!(Place::json("b.json", "x").to_string(), "b.json: x");
        assert_eq!(Place::json("b.json", "").to_string(), "b.json");
    }

    #[test]
    fn range_errors_echo_the_value_as_typed() {
        let text = "{\"a\": {\"b\": 1e-400}}";
        let err = Error::range(
            Place::json("f.json", "a.b"),
            "0",
            "a positive number is needed",
        )
        .with_position("f.json", text)
        .to_string();
        assert_eq!(
            err,
            "f.json: line 1, column 13, at a.b: 1e-400 is not allowed: a positive number is needed"
        );
    }

    #[test]
    fn type_errors_name_the_form_of_the_key() {
        #[derive(Debug, serde::Deserialize)]
        struct S {
            #[allow(dead_code)]
            supply_v: f64,
        }
        let err = parse_json::<S>("f.json", "{\"supply_v\": \"12\"}")
            .expect_err("a string is no number")
            .to_string();
        assert!(
            err.contains(
                "at supply_v: supply_v takes a number of volts, e.g. 12; got string \"12\""
            ),
            "{err}"
        );
    }

    #[test]
    fn a_byte_order_mark_is_skipped() {
        let v = parse_value_text("f.json", "\u{feff}{\"a\": 1}").expect("BOM skipped");
        assert_eq!(v["a"], 1);
    }

    #[test]
    fn paths_join() {
        assert_eq!(
            join_path("stages[2]", "load.coil_ohms"),
            "stages[2].load.coil_ohms"
        );
        assert_eq!(join_path("stages", "[2]"), "stages[2]");
        assert_eq!(join_path("", "x"), "x");
        assert_eq!(join_path("a", ""), "a");
    }
}
