//! Board files (files.md): read as a stream (`stream`), each stage checked for its shape, merged
//! over the defaults and resolved into a typed stage, one at a time.

mod raw;
mod resolve;
pub mod stream;

pub use raw::{Grade, RawStage, NEEDED_KEYS, STAGE_KEYS};
pub use resolve::{flag_for, resolve_stage, resolve_with, AMBIENT_RANGE_C, OVERDRIVE};
pub use stream::{BoardStream, RawElement, RawText, STDIN_LABEL};

use std::path::Path;
use std::sync::Arc;

use serde_json::Value;

use crate::error::{from_value, Error, Place, Result};
use crate::fields::{json_type, Origin};
use crate::parts::{is_control, Library};
use crate::stage::Stage;

/// A board ready for the engine, held whole (small boards, tests).
#[derive(Clone, Debug)]
pub struct Board {
    /// The board's name, when the file gives one.
    pub name: Option<String>,
    /// The stages, in file order.
    pub stages: Vec<Stage>,
}

/// A board file opened for reading its stages one at a time, as often as asked: its name and
/// defaults are read, the stages are not held.
#[derive(Debug)]
pub struct BoardReader {
    stream: BoardStream,
    name: Option<String>,
    defaults: Arc<RawStage>,
}

impl BoardReader {
    /// Open a board file (`-`: standard input) and read its name and defaults.
    pub fn open(path: &Path) -> Result<BoardReader> {
        BoardReader::from_stream(BoardStream::open(path)?)
    }

    /// A board held in memory; `file` names it in errors.
    pub fn from_text(file: &str, text: &str) -> Result<BoardReader> {
        BoardReader::from_stream(BoardStream::from_bytes(file, text.as_bytes().to_vec())?)
    }

    /// Read the name and defaults of an opened stream.
    pub fn from_stream(stream: BoardStream) -> Result<BoardReader> {
        let label = stream.label().to_string();
        let locator = stream.locator();
        let locate =
            |e: Error| e.locate_with(&|_: &str, path: &str| locator.locate_token(None, path));
        let name = match stream.board() {
            Some(raw) => {
                board_name(&label, Some(&raw.parse::<Value>(&label, "board")?)).map_err(locate)?
            }
            None => None,
        };
        let defaults = match stream.defaults() {
            Some(raw) => {
                let v = raw.parse::<Value>(&label, "defaults")?;
                raw_stage(&label, "defaults", &v, "the defaults").map_err(locate)?
            }
            None => RawStage::default(),
        };
        Ok(BoardReader {
            stream,
            name,
            defaults: Arc::new(defaults),
        })
    }

    /// The file as messages name it (`<stdin>` for standard input).
    pub fn label(&self) -> &str {
        self.stream.label()
    }

    /// The board's name, when the file gives one.
    pub fn name(&self) -> Option<&str> {
        self.name.as_deref()
    }

    /// Number of stages (at least one).
    pub fn len(&self) -> usize {
        self.stream.len()
    }

    /// Never true: a board without stages is refused when it is opened.
    pub fn is_empty(&self) -> bool {
        self.stream.is_empty()
    }

    /// The board's defaults as written.
    pub fn defaults(&self) -> &Arc<RawStage> {
        &self.defaults
    }

    /// The stages from the first as written: each checked for its shape and parsed, not
    /// resolved (its part need not be in any library), with its index in `stages`.
    pub fn raw_stages(&mut self) -> Result<impl Iterator<Item = Result<(usize, RawStage)>> + '_> {
        let label = self.stream.label().to_string();
        let locator = self.stream.locator();
        let elements = self.stream.stages()?;
        Ok(elements.map(move |element| {
            let element = element?;
            let path = element.path();
            let value: Value = element.raw.parse(&label, &path)?;
            let raw = raw_stage(&label, &path, &value, "a stage").map_err(|e| {
                e.locate_with(&|_: &str, p: &str| locator.locate_token(Some(&element), p))
            })?;
            Ok((element.index, raw))
        }))
    }

    /// The stages from the first, each checked, parsed and resolved over the defaults when it
    /// is reached; errors name the file, the JSON path, the line and the column, and quote the
    /// value as typed.
    pub fn stages<'a>(
        &'a mut self,
        lib: &'a Library,
    ) -> Result<impl Iterator<Item = Result<Stage>> + 'a> {
        Ok(self.stages_with_raw(lib)?.map(|r| r.map(|(s, _)| s)))
    }

    /// As [`BoardReader::stages`], each stage with its element as written (for `pinlow fix`,
    /// which rewrites stages keeping their keys in order).
    pub fn stages_with_raw<'a>(
        &'a mut self,
        lib: &'a Library,
    ) -> Result<impl Iterator<Item = Result<(Stage, RawElement)>> + 'a> {
        let BoardReader {
            stream, defaults, ..
        } = self;
        let label = stream.label().to_string();
        let locator = stream.locator();
        let origin = Origin::File(label.clone());
        let elements = stream.stages()?;
        Ok(elements.map(move |element| {
            let element = element?;
            let path = element.path();
            let located = |e: Error| {
                e.locate_with(&|_: &str, p: &str| locator.locate_token(Some(&element), p))
            };
            let value: Value = element.raw.parse(&label, &path)?;
            let raw = raw_stage(&label, &path, &value, "a stage").map_err(located)?;
            let stage =
                resolve_stage(&raw, defaults, &origin, element.index, lib).map_err(located)?;
            Ok((stage, element))
        }))
    }

    /// The board's name and defaults as written, when the file gives them.
    pub fn head_raw(&self) -> (Option<&RawText>, Option<&RawText>) {
        (self.stream.board(), self.stream.defaults())
    }
}

/// Read a board file whole (`-`: standard input).
pub fn read_board(path: &Path, lib: &Library) -> Result<Board> {
    collect(BoardReader::open(path)?, lib)
}

/// Parse a board file's text (`file` names it in errors).
pub fn parse_board(file: &str, text: &str, lib: &Library) -> Result<Board> {
    collect(BoardReader::from_text(file, text)?, lib)
}

fn collect(mut reader: BoardReader, lib: &Library) -> Result<Board> {
    let stages = reader.stages(lib)?.collect::<Result<Vec<_>>>()?;
    if stages.is_empty() {
        return Err(Error::invalid(
            Place::json(reader.label(), "stages"),
            "the board has no stage to audit",
        ));
    }
    Ok(Board {
        name: reader.name.take(),
        stages,
    })
}

/// The top-level keys of a board file (`$schema` is accepted and ignored).
pub const BOARD_KEYS: &[&str] = &["board", "defaults", "stages", "$schema"];

/// The board's name, checked (a string without control characters).
pub fn board_name(file: &str, value: Option<&Value>) -> Result<Option<String>> {
    match value {
        None => Ok(None),
        Some(Value::String(s)) => {
            if let Some(c) = s.chars().find(|c| is_control(*c)) {
                return Err(Error::invalid(
                    Place::json(file, "board"),
                    format!(
                        "holds the control character U+{:04X}; names may hold printable characters only",
                        u32::from(c)
                    ),
                ));
            }
            Ok(Some(s.clone()))
        }
        Some(other) => Err(Error::Json {
            place: Place::json(file, "board"),
            message: format!(
                "board takes a string, the board's name; got {}",
                json_type(other)
            ),
        }),
    }
}

/// The only stage key that may be `null` (it means: no pull-down).
pub const NULL_KEYS: &[&str] = &["pull_down_ohms"];

/// A stage (or the defaults) as a raw stage: an object without nulls except [`NULL_KEYS`].
pub fn raw_stage(file: &str, path: &str, value: &Value, what: &str) -> Result<RawStage> {
    crate::shape::object(value, file, path, what)?;
    crate::shape::no_nulls(value, file, path, NULL_KEYS)?;
    from_value(file, path, value)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn lib() -> Library {
        Library::builtin().expect("shipped parts load")
    }

    fn relay_board(coil: &str, ambient: &str) -> String {
        format!(
            r#"{{"stages": [{{"name": "K1", "part": "demo-npn-40v", "supply_v": 12,
                "logic_high_v": 3.3, "ambient_c": {ambient},
                "load": {{"kind": "relay", "coil_ohms": {coil}}}, "clamp": {{"kind": "diode"}}}}]}}"#
        )
    }

    #[test]
    fn huge_and_tiny_numbers_are_refused_with_their_path() {
        // Regression: 1e300 ohms used to reach the engine, where the load current underflowed to
        // nothing and the stage could read as a pass.
        let err = parse_board("b.json", &relay_board("1e300", "[0, 70]"), &lib())
            .expect_err("refused")
            .to_string();
        assert!(
            err.contains(
                "b.json: line 3, column 56, at stages[0].load.coil_ohms: 1e300 is not allowed"
            ) && err.contains("pinlow accepts"),
            "{err}"
        );
        let text = r#"{"stages": [{"name": "S", "part": "demo-npn-40v", "supply_v": 12,
            "logic_high_v": 3.3, "load": {"kind": "current", "current_a": 1e-400}}]}"#;
        let err = parse_board("b.json", text, &lib())
            .expect_err("refused")
            .to_string();
        // The value is echoed as typed, not as what the parser made of it (0).
        assert!(
            err.contains("load.current_a: 1e-400 is not allowed"),
            "{err}"
        );
    }

    #[test]
    fn ambient_below_the_copper_model_is_refused() {
        // Regression: at -250 C the linear copper model (IEC 60028, alpha 0.00393/K) gives a
        // negative coil resistance, read as a coil drawing no current: a silent pass.
        let err = parse_board("b.json", &relay_board("400", "[-250, 25]"), &lib())
            .expect_err("refused")
            .to_string();
        assert!(
            err.contains("stages[0].ambient_c") && err.contains("-100 to 250"),
            "{err}"
        );
        assert!(parse_board("b.json", &relay_board("400", "[-100, 250]"), &lib()).is_ok());
    }

    #[test]
    fn objects_only_where_the_format_has_objects_and_null_only_for_the_pull_down() {
        let cases = [
            (
                r#"{"stages": [["K1", "demo-npn-40v"]]}"#,
                "stages[0]: a stage is written as an object",
            ),
            (
                r#"{"stages": [{"name": "K1", "part": "demo-npn-40v", "supply_v": 12, "logic_high_v": 3.3, "load": ["relay", 400]}]}"#,
                "load takes an object",
            ),
            (
                r#"{"stages": [{"name": "K1", "part": "demo-npn-40v", "supply_v": 12, "logic_high_v": 3.3, "load": {"kind": "current", "current_a": 0.1}, "clamp": null}]}"#,
                "stages[0].clamp: null is not allowed",
            ),
            (
                r#"{"stages": [{"name": "K1", "part": "demo-npn-40v", "supply_v": 12, "logic_high_v": 3.3, "load": {"kind": "current", "current_a": 0.1}, "base_resistor_ohms": null}]}"#,
                "stages[0].base_resistor_ohms: null is not allowed",
            ),
            (
                r#"{"stages": [{"name": "K1", "part": "demo-npn-40v", "supply_v": 12, "logic_high_v": 3.3, "load": {"kind": "relay", "coil_ohms": 400}, "clamp": {"kind": "none", "typo_key": 1, "zener_v": 24}}]}"#,
                "unknown key `typo_key` for a none clamp",
            ),
            (r#"{"stages": [{}], "extra": 1}"#, "extra"),
        ];
        for (text, needle) in cases {
            let err = parse_board("b.json", text, &lib())
                .expect_err(needle)
                .to_string();
            assert!(err.contains(needle), "{needle}: {err}");
        }
        let ok = r#"{"$schema": "x", "stages": [{"name": "K1", "part": "demo-npn-40v", "supply_v": 12, "logic_high_v": 3.3, "load": {"kind": "current", "current_a": 0.1}, "pull_down_ohms": null}]}"#;
        assert!(parse_board("b.json", ok, &lib()).is_ok());
    }

    #[test]
    fn a_key_of_the_other_drive_kind_names_the_right_one() {
        let text = r#"{"stages": [{"name": "K1", "part": "demo-npn-40v", "supply_v": 12, "logic_high_v": 3.3,
            "load": {"kind": "current", "current_a": 0.1}, "gate_resistor_ohms": 100}]}"#;
        let err = parse_board("b.json", text, &lib())
            .expect_err("npn has no gate")
            .to_string();
        assert!(err.contains("give `base_resistor_ohms`"), "{err}");
    }
}
