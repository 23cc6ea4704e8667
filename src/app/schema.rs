//! `pinlow schema board|part`: print the JSON Schema of a board file or a part file.

use std::io::Write;

use super::stdout_error;
use crate::cli::SchemaArg;
use crate::error::Result;
use crate::schema::FileKind;

/// Print the schema of `file` to `out`.
pub(super) fn print(file: SchemaArg, out: &mut dyn Write) -> Result<u8> {
    let kind = match file {
        SchemaArg::Board => FileKind::Board,
        SchemaArg::Part => FileKind::Part,
    };
    out.write_all(kind.text().as_bytes())
        .map_err(stdout_error)?;
    Ok(0)
}
