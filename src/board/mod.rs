//! Board files (files.md): read, merge each stage over the defaults, resolve into typed stages.

mod fields;
mod raw;
mod resolve;

pub use fields::flag_for;
pub use raw::{Grade, RawBoard, RawClamp, RawLoad, RawStage};
pub use resolve::{resolve_stage, Origin};

use std::path::Path;

use crate::error::{parse_json, Error, Result};
use crate::parts::Library;
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
    let raw: RawBoard = parse_json(file, text)?;
    if raw.stages.is_empty() {
        return Err(
            Error::invalid(format!("{file}: stages"), "the board has no stage to audit")
                .with_position(file, text),
        );
    }
    let stages = raw
        .stages
        .iter()
        .enumerate()
        .map(|(index, s)| {
            let origin = Origin::File {
                file: file.to_string(),
                index,
            };
            resolve_stage(s, &raw.defaults, &origin, lib).map_err(|e| e.with_position(file, text))
        })
        .collect::<Result<Vec<_>>>()?;
    Ok(Board {
        name: raw.board,
        stages,
    })
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
            err.contains("b.json: line 3, column 56, at stages[0].load.coil_ohms")
                && err.contains("pinlow accepts"),
            "{err}"
        );
        let text = r#"{"stages": [{"name": "S", "part": "demo-npn-40v", "supply_v": 12,
            "logic_high_v": 3.3, "load": {"kind": "current", "current_a": 1e-300}}]}"#;
        let err = parse_board("b.json", text, &lib())
            .expect_err("refused")
            .to_string();
        assert!(err.contains("load.current_a"), "{err}");
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
    fn deeply_nested_json_fails_cleanly() {
        // 100 000 levels: as the stage list the wrong type stops the read at once; inside a load
        // (an internally tagged enum, which serde buffers as a whole value first) serde_json
        // stops at its recursion limit of 128 with an error rather than overflowing the stack.
        let depth = 100_000;
        let nest = format!("{}{}", "[".repeat(depth), "]".repeat(depth));
        let boards = [
            (format!(r#"{{"stages": {nest}}}"#), "expected a string"),
            (
                format!(
                    r#"{{"stages": [{{"name": "S", "load": {{"kind": "current", "current_a": {nest}}}}}]}}"#
                ),
                "recursion limit exceeded",
            ),
        ];
        for (text, needle) in boards {
            let err = parse_board("deep.json", &text, &lib()).expect_err("refused");
            assert!(matches!(err, Error::Json { .. }), "{err}");
            let err = err.to_string();
            assert!(err.contains("deep.json") && err.contains(needle), "{err}");
        }
    }
}
