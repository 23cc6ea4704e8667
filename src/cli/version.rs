//! The text of `pinlow --version`: the program's version, the stage model it follows and the
//! number of parts it ships.

use std::sync::OnceLock;

use crate::parts::Library;
use crate::report::MODEL_VERSION;

/// `0.1.0 (stage model 2, 10 shipped parts)`; clap puts `pinlow ` before it.
pub fn text() -> &'static str {
    static TEXT: OnceLock<String> = OnceLock::new();
    TEXT.get_or_init(|| {
        let parts = match Library::builtin() {
            Ok(lib) => format!("{} shipped parts", lib.len()),
            Err(e) => format!("shipped parts unreadable: {e}"),
        };
        format!(
            "{} (stage model {MODEL_VERSION}, {parts})",
            env!("CARGO_PKG_VERSION")
        )
    })
}
