//! Reading part files with a size cap: a part file is small text, and reading a huge file or an
//! endless one (`/dev/zero`, a pipe) must fail cleanly instead of exhausting memory or hanging.
//! Board files have no cap: they are read as a stream (`board::stream`).

use std::io::Read;
use std::path::Path;

use crate::error::{Error, Result};

/// Largest part file read, bytes (a part file is about 1 kB).
pub const PART_FILE_LIMIT: u64 = 1024 * 1024;

/// The text of `path`, refused when it holds more than `limit` bytes. A UTF-8 byte-order mark
/// at the start, as some editors write, is dropped.
pub fn read_text(path: &Path, limit: u64) -> Result<String> {
    let io = |source| Error::Io {
        path: path.to_path_buf(),
        source,
    };
    let file = std::fs::File::open(path).map_err(io)?;
    let too_large = || {
        Error::invalid(
            path.display().to_string(),
            format!(
                "the file is larger than {}; pinlow reads files up to that size (split a larger board into several files)",
                size_words(limit)
            ),
        )
    };
    // The size on disk says it at once for regular files; devices and pipes report none, so the
    // read itself stops one byte past the limit.
    if file.metadata().map_err(io)?.len() > limit {
        return Err(too_large());
    }
    let mut bytes = Vec::new();
    file.take(limit.saturating_add(1))
        .read_to_end(&mut bytes)
        .map_err(io)?;
    if bytes.len() as u64 > limit {
        return Err(too_large());
    }
    let bom = if bytes.starts_with(BOM) { BOM.len() } else { 0 };
    bytes.drain(..bom);
    String::from_utf8(bytes).map_err(|e| {
        Error::invalid(
            path.display().to_string(),
            format!(
                "the file is not UTF-8 text (invalid byte at offset {}); save it as UTF-8 JSON",
                e.utf8_error().valid_up_to() + bom
            ),
        )
    })
}

/// The UTF-8 byte-order mark.
const BOM: &[u8] = b"\xEF\xBB\xBF";

/// `16 MiB`, or a byte count below 1 MiB.
fn size_words(bytes: u64) -> String {
    const MIB: u64 = 1024 * 1024;
    if bytes >= MIB && bytes % MIB == 0 {
        format!("{} MiB", bytes / MIB)
    } else {
        format!("{bytes} bytes")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn temp(name: &str, bytes: &[u8]) -> std::path::PathBuf {
        let dir = std::env::temp_dir().join(format!("pinlow-read-{}", std::process::id()));
        std::fs::create_dir_all(&dir).expect("temp dir");
        let path = dir.join(name);
        std::fs::write(&path, bytes).expect("write temp file");
        path
    }

    #[test]
    fn reads_small_files_and_refuses_large_ones() {
        let path = temp("small.json", b"{\"a\": 1}");
        assert_eq!(read_text(&path, 100).expect("read"), "{\"a\": 1}");
        let err = read_text(&path, 4).expect_err("over the limit").to_string();
        assert!(err.contains("larger than 4 bytes"), "{err}");
        assert_eq!(size_words(PART_FILE_LIMIT), "1 MiB");
    }

    #[test]
    fn an_endless_device_stops_at_the_limit() {
        // /dev/zero reports no size and never ends: the read must stop (Linux, POSIX device).
        let zero = Path::new("/dev/zero");
        if zero.exists() {
            let err = read_text(zero, 1024).expect_err("refused").to_string();
            assert!(err.contains("larger than 1024 bytes"), "{err}");
        }
    }

    #[test]
    fn a_byte_order_mark_is_dropped() {
        let path = temp("bom.json", b"\xEF\xBB\xBF{\"a\": 1}");
        assert_eq!(read_text(&path, 100).expect("read"), "{\"a\": 1}");
        // Offsets of bad bytes still count from the start of the file.
        let path = temp("bom-latin1.json", b"\xEF\xBB\xBF{\"a\": \"\xe9\"}");
        let err = read_text(&path, 100).expect_err("refused").to_string();
        assert!(err.contains("offset 10"), "{err}");
    }

    #[test]
    fn refuses_non_utf8() {
        // `{"name": "caf` is 13 bytes; the Latin-1 é (0xE9) that follows is not UTF-8.
        let path = temp("latin1.json", b"{\"name\": \"caf\xe9\"}");
        let err = read_text(&path, 100).expect_err("refused").to_string();
        assert!(
            err.contains("not UTF-8") && err.contains("offset 13"),
            "{err}"
        );
    }
}
