//! Board files (files.md): read as a stream (`stream`), each stage merged over the defaults and
//! resolved into a typed stage, one at a time.

mod fields;
mod raw;
mod resolve;
pub mod stream;

pub use fields::flag_for;
pub use raw::{Grade, RawBoard, RawClamp, RawLoad, RawStage};
pub use resolve::{resolve_stage, Origin};
pub use stream::{BoardStream, RawElement, RawText, STDIN_LABEL};

use std::path::Path;

use crate::error::{Error, Result};
use crate::parts::Library;
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
    defaults: RawStage,
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
        let label = stream.label();
        let name = match stream.board() {
            Some(raw) => raw.parse::<Option<String>>(label, "board")?,
            None => None,
        };
        let defaults = match stream.defaults() {
            Some(raw) => raw.parse::<RawStage>(label, "defaults")?,
            None => RawStage::default(),
        };
        Ok(BoardReader {
            stream,
            name,
            defaults,
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

    /// The stages from the first, each parsed and resolved over the defaults when it is
    /// reached; errors name the file, the JSON path, the line and the column.
    pub fn stages<'a>(
        &'a mut self,
        lib: &'a Library,
    ) -> Result<impl Iterator<Item = Result<Stage>> + 'a> {
        let BoardReader {
            stream, defaults, ..
        } = self;
        let label = stream.label().to_string();
        let locator = stream.locator();
        let elements = stream.stages()?;
        Ok(elements.map(move |element| {
            let element = element?;
            let raw: RawStage = element.raw.parse(&label, &element.path())?;
            let origin = Origin::File {
                file: label.clone(),
                index: element.index,
            };
            resolve_stage(&raw, defaults, &origin, lib)
                .map_err(|e| e.with_locator(&label, &|path| locator.locate(Some(&element), path)))
        }))
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
            format!("{}: stages", reader.label()),
            "the board has no stage to audit",
        ));
    }
    Ok(Board {
        name: reader.name.take(),
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
