//! The text of `pinlow --version`: the program's version, the stage model it follows and the
//! number of parts it ships.

use std::sync::OnceLock;

use crate::parts::builtin_sources;
use crate::report::MODEL_VERSION;

/// `0.1.0 (stage model 2, 16 shipped parts)`; clap puts `pinlow ` before it.
pub fn text() -> &'static str {
    static TEXT: OnceLock<String> = OnceLock::new();
    TEXT.get_or_init(|| {
        // One part a shipped file (the library's tests read every one), counted without
        // reading them: every command builds this line.
        let parts = format!("{} shipped parts", builtin_sources().count());
        format!(
            "{} (stage model {MODEL_VERSION}, {parts})",
            env!("CARGO_PKG_VERSION")
        )
    })
}
