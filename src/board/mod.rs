//! Board files (files.md): read, merge each stage over the defaults, resolve into typed stages.

mod raw;
mod resolve;

pub use raw::{Grade, RawBoard, RawClamp, RawLoad, RawStage};
pub use resolve::{flag_for, resolve_stage, Origin};

use std::path::Path;

use crate::error::{parse_json, Error, Result};
use crate::parts::Library;
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
    let text = std::fs::read_to_string(path).map_err(|source| Error::Io {
        path: path.to_path_buf(),
        source,
    })?;
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
