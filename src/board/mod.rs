//! Board files (files.md): read, merge each stage over the defaults, resolve into typed stages.

mod raw;
mod resolve;

pub use raw::{Grade, RawStage, STAGE_KEYS};
pub use resolve::{flag_for, resolve_stage, resolve_with, AMBIENT_RANGE_C};

use std::path::Path;
use std::sync::Arc;

use serde_json::Value;

use crate::error::{from_value, parse_value_text, Error, Place, Result};
use crate::fields::{json_type, Origin};
use crate::parts::{is_control, Library};
use crate::read::{read_text, BOARD_FILE_LIMIT};
use crate::stage::Stage;

/// A board ready for the engine.
#[derive(Clone, Debug)]
pub struct Board {
    /// The board's name, when the file gives one.
    pub name: Option<String>,
    /// The stages, in file order.
    pub stages: Vec<Stage>,
}

/// Read a board file from disk.
pub fn read_board(path: &Path, lib: &Library) -> Result<Board> {
    let text = read_text(path, BOARD_FILE_LIMIT)?;
    parse_board(&path.display().to_string(), &text, lib)
}

/// Parse a board file's text (`file` names it in errors).
pub fn parse_board(file: &str, text: &str, lib: &Library) -> Result<Board> {
    let value = parse_value_text(file, text)?;
    let text = crate::error::strip_bom(text);
    board_from_value(file, &value, lib).map_err(|e| e.with_position(file, text))
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

/// A stage (or the defaults) as a raw stage: an object without nulls except `pull_down_ohms`.
pub fn raw_stage(file: &str, path: &str, value: &Value, what: &str) -> Result<RawStage> {
    crate::shape::object(value, file, path, what)?;
    crate::shape::no_nulls(value, file, path, &["pull_down_ohms"])?;
    from_value(file, path, value)
}

fn board_from_value(file: &str, value: &Value, lib: &Library) -> Result<Board> {
    let Value::Object(map) = value else {
        return Err(Error::Json {
            place: Place::json(file, ""),
            message: format!(
                "a board file holds one object with `stages` (and optionally `board` and `defaults`), not {}",
                json_type(value)
            ),
        });
    };
    for key in map.keys() {
        if !BOARD_KEYS.contains(&key.as_str()) {
            return Err(Error::Json {
                place: Place::json(file, key.clone()),
                message: format!(
                    "unknown key `{key}`; a board file takes board, defaults and stages"
                ),
            });
        }
    }
    let name = board_name(file, map.get("board"))?;
    let defaults = match map.get("defaults") {
        Some(v) => raw_stage(file, "defaults", v, "the defaults")?,
        None => RawStage::default(),
    };
    let defaults = Arc::new(defaults);
    let stages = match map.get("stages") {
        Some(Value::Array(items)) => items,
        Some(other) => {
            return Err(Error::Json {
                place: Place::json(file, "stages"),
                message: format!(
                    "stages takes an array of stage objects; got {}",
                    json_type(other)
                ),
            })
        }
        None => {
            return Err(Error::invalid(
                Place::json(file, ""),
                "missing `stages` (the list of stages to audit)",
            ))
        }
    };
    if stages.is_empty() {
        return Err(Error::invalid(
            Place::json(file, "stages"),
            "the board has no stage to audit",
        ));
    }
    let origin = Origin::File(file.to_string());
    let stages = stages
        .iter()
        .enumerate()
        .map(|(index, v)| {
            let raw = raw_stage(file, &format!("stages[{index}]"), v, "a stage")?;
            resolve_stage(&raw, &defaults, &origin, index, lib)
        })
        .collect::<Result<Vec<_>>>()?;
    Ok(Board { name, stages })
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
            (r#"{"stages": [], "extra": 1}"#, "unknown key `extra`"),
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
