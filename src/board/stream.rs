//! A board file read as a stream: the top level (`board`, `defaults`, `stages`) is scanned byte
//! by byte, and each element of `stages` is handed out on its own as raw JSON text with the
//! line and column where it starts, so that a board of any size is read with memory bounded by
//! its largest element rather than by the file.
//!
//! Opening a board makes one pass over the whole input: it checks the top level (an object with
//! `stages`, a non-empty list; `board` and `defaults`, in any order; `"$schema"` accepted and
//! ignored; any other key an error naming it) and keeps the raw text of `board` and `defaults`.
//! [`BoardStream::stages`] then goes over the stage list again, as many times as asked.
//! Standard input and other inputs that cannot seek (pipes) are copied to an unnamed temporary
//! file during the first pass. The scanner tracks strings, escapes and nesting only; the text of
//! each element goes to serde, whose errors [`RawText::parse`] places in the whole file.
//!
//! Binary or endless input stops at once: the first byte that cannot stand where it is ends the
//! read with its line and column, and no single value may exceed [`PIECE_LIMIT`].

use std::fs::File;
use std::io::{Read, Seek, SeekFrom, Write};
use std::path::{Path, PathBuf};

use serde::de::{DeserializeOwned, IgnoredAny};

use crate::error::{parse_json_at, Error, Result};

/// Largest single value read (a stage, the defaults, the board name), bytes. A stage is a few
/// hundred bytes; a larger value is almost always a missing quote or bracket.
pub const PIECE_LIMIT: usize = 1024 * 1024;

/// How the reader names standard input in messages.
pub const STDIN_LABEL: &str = "<stdin>";

/// Bytes read from the input at a time.
const CHUNK: usize = 64 * 1024;

/// Longest top-level key read, bytes.
const KEY_LIMIT: usize = 4096;

/// Where a byte of the input stands.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Pos {
    /// Bytes before it in the file.
    pub offset: u64,
    /// Line, from 1.
    pub line: usize,
    /// Column in characters, from 1 (as `crate::jsonpos` counts).
    pub column: usize,
    /// Column in bytes, from 1 (as serde_json counts).
    pub byte_column: usize,
}

impl Pos {
    const START: Pos = Pos {
        offset: 0,
        line: 1,
        column: 1,
        byte_column: 1,
    };
}

/// One value of the file as written, with where it starts.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct RawText {
    /// The value's JSON text.
    pub text: String,
    /// Where its first byte stands.
    pub start: Pos,
}

impl RawText {
    /// The (line, column) in the whole file of a (line, column) inside `text`; `bytes` says
    /// whether columns count bytes (serde_json) or characters (`crate::jsonpos`).
    pub fn absolute(&self, line: usize, column: usize, bytes: bool) -> (usize, usize) {
        let first = if bytes {
            self.start.byte_column
        } else {
            self.start.column
        };
        if line <= 1 {
            (self.start.line, first.saturating_sub(1) + column)
        } else {
            (self.start.line + line - 1, column)
        }
    }

    /// The (line, column) in the whole file where the value at `path` inside this one starts
    /// (`load.coil_ohms`; empty for the value itself).
    pub fn locate(&self, path: &str) -> Option<(usize, usize)> {
        let (line, column) = crate::jsonpos::locate(&self.text, path)?;
        Some(self.absolute(line, column, false))
    }

    /// As [`RawText::locate`], with the value as typed when it is a scalar.
    pub fn locate_token(&self, path: &str) -> Option<crate::error::Located> {
        let found = crate::jsonpos::locate_token(&self.text, path)?;
        let (line, column) = self.absolute(found.line, found.column, false);
        Some(crate::error::Located {
            line,
            column,
            token: found.token,
        })
    }

    /// Deserialize the value; errors name `file`, the JSON path `prefix` + the path inside,
    /// and the line and column in the whole file.
    pub fn parse<T: DeserializeOwned>(&self, file: &str, prefix: &str) -> Result<T> {
        parse_json_at(file, &self.text, prefix, &|line, column| {
            self.absolute(line, column, true)
        })
    }
}

/// One element of `stages`.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct RawElement {
    /// Its index in `stages`, from 0.
    pub index: usize,
    /// Its text and where it starts.
    pub raw: RawText,
}

impl RawElement {
    /// `stages[N]`, the JSON path of the element.
    pub fn path(&self) -> String {
        format!("stages[{}]", self.index)
    }

    /// Where a JSON path of the whole file (`stages[N].load.coil_ohms`) stands, when it lies
    /// inside this element.
    pub fn locate(&self, path: &str) -> Option<(usize, usize)> {
        let rest = path.strip_prefix(&self.path())?;
        let rest = match rest.strip_prefix('.') {
            Some(r) => r,
            None if rest.is_empty() || rest.starts_with('[') => rest,
            None => return None,
        };
        self.raw.locate(rest)
    }
}

/// Something a pass can read from the start again.
trait Source: Read + Seek {}
impl<T: Read + Seek> Source for T {}

/// A board file opened for streaming.
pub struct BoardStream {
    label: String,
    source: Box<dyn Source>,
    /// Keeps the spool of a non-seekable input alive.
    _spool: Option<Spool>,
    board: Option<RawText>,
    defaults: Option<RawText>,
    /// Just after the `[` of `stages`.
    stages_at: Pos,
    len: usize,
}

impl std::fmt::Debug for BoardStream {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("BoardStream")
            .field("label", &self.label)
            .field("len", &self.len)
            .finish_non_exhaustive()
    }
}

impl BoardStream {
    /// Open a board file; `-` reads standard input (named `<stdin>` in messages).
    pub fn open(path: &Path) -> Result<BoardStream> {
        if path.as_os_str() == "-" {
            let stdin = std::io::stdin();
            let mut lock = stdin.lock();
            return BoardStream::from_reader(STDIN_LABEL, &mut lock);
        }
        let label = path.display().to_string();
        let io = |source| Error::Io {
            path: path.to_path_buf(),
            source,
        };
        let mut file = File::open(path).map_err(io)?;
        if file.metadata().map_err(io)?.is_file() {
            let layout = scan_top(&label, &mut file, None)?;
            Ok(BoardStream::new(label, Box::new(file), None, layout))
        } else {
            // A pipe or a device: read once, keeping a copy to read the stages from.
            BoardStream::from_reader(&label, &mut file)
        }
    }

    /// A board held in memory (tests, fuzzing).
    pub fn from_bytes(label: &str, bytes: Vec<u8>) -> Result<BoardStream> {
        let mut cursor = std::io::Cursor::new(bytes);
        let layout = scan_top(label, &mut cursor, None)?;
        Ok(BoardStream::new(
            label.to_string(),
            Box::new(cursor),
            None,
            layout,
        ))
    }

    /// A board read once from `reader`, copied to a temporary file while it is checked.
    pub fn from_reader(label: &str, reader: &mut dyn Read) -> Result<BoardStream> {
        let mut spool = Spool::create(label)?;
        let layout = {
            let mut tee = std::io::BufWriter::new(&mut spool.file);
            let layout = scan_top(label, reader, Some(&mut tee))?;
            tee.flush().map_err(|e| spool_error(label, e))?;
            layout
        };
        let file = spool.file.try_clone().map_err(|e| spool_error(label, e))?;
        Ok(BoardStream::new(
            label.to_string(),
            Box::new(file),
            Some(spool),
            layout,
        ))
    }

    fn new(
        label: String,
        source: Box<dyn Source>,
        spool: Option<Spool>,
        layout: Layout,
    ) -> BoardStream {
        BoardStream {
            label,
            source,
            _spool: spool,
            board: layout.board,
            defaults: layout.defaults,
            stages_at: layout.stages_at,
            len: layout.len,
        }
    }

    /// The file's name as messages give it (`<stdin>` for standard input).
    pub fn label(&self) -> &str {
        &self.label
    }

    /// The raw value of `board`, when the file has one.
    pub fn board(&self) -> Option<&RawText> {
        self.board.as_ref()
    }

    /// The raw value of `defaults`, when the file has one.
    pub fn defaults(&self) -> Option<&RawText> {
        self.defaults.as_ref()
    }

    /// Number of stages (at least one).
    pub fn len(&self) -> usize {
        self.len
    }

    /// Never true: a board without stages is refused when it is opened.
    pub fn is_empty(&self) -> bool {
        self.len == 0
    }

    /// Go over the stages from the first, one element at a time.
    pub fn stages(&mut self) -> Result<Stages<'_>> {
        self.source
            .seek(SeekFrom::Start(self.stages_at.offset))
            .map_err(|source| Error::Io {
                path: PathBuf::from(&self.label),
                source,
            })?;
        let scanner = Scanner::new(&self.label, &mut self.source, None, self.stages_at);
        Ok(Stages {
            scanner,
            index: 0,
            done: false,
            buf: Vec::new(),
        })
    }

    /// Finds where JSON paths of this file stand, for errors found after parsing.
    pub fn locator(&self) -> Locator {
        Locator {
            board: self.board.clone(),
            defaults: self.defaults.clone(),
        }
    }
}

/// Finds where a JSON path of a board file stands: `stages[N]...` inside the element read,
/// `defaults...` or `board`.
#[derive(Clone, Debug)]
pub struct Locator {
    board: Option<RawText>,
    defaults: Option<RawText>,
}

impl Locator {
    /// Where `path` stands and the value there as typed, when it lies in `element`, `defaults`
    /// or `board`.
    pub fn locate_token(
        &self,
        element: Option<&RawElement>,
        path: &str,
    ) -> Option<crate::error::Located> {
        let pieces = [
            element.map(|e| (e.path(), &e.raw)),
            self.defaults.as_ref().map(|r| ("defaults".to_string(), r)),
            self.board.as_ref().map(|r| ("board".to_string(), r)),
        ];
        for (key, raw) in pieces.into_iter().flatten() {
            let Some(rest) = path.strip_prefix(key.as_str()) else {
                continue;
            };
            let rest = match rest.strip_prefix('.') {
                Some(r) => r,
                None if rest.is_empty() || rest.starts_with('[') => rest,
                None => continue,
            };
            return raw.locate_token(rest);
        }
        None
    }

    /// The (line, column) of `path` in the whole file, when it lies in `element`, `defaults`
    /// or `board`.
    pub fn locate(&self, element: Option<&RawElement>, path: &str) -> Option<(usize, usize)> {
        if let Some(found) = element.and_then(|e| e.locate(path)) {
            return Some(found);
        }
        for (key, raw) in [("defaults", &self.defaults), ("board", &self.board)] {
            let (Some(raw), Some(rest)) = (raw, path.strip_prefix(key)) else {
                continue;
            };
            match rest.strip_prefix('.') {
                Some(rest) => return raw.locate(rest),
                None if rest.is_empty() || rest.starts_with('[') => return raw.locate(rest),
                None => {}
            }
        }
        None
    }
}

/// The stages of a board, one element at a time.
pub struct Stages<'a> {
    scanner: Scanner<'a>,
    index: usize,
    done: bool,
    buf: Vec<u8>,
}

impl Iterator for Stages<'_> {
    type Item = Result<RawElement>;

    fn next(&mut self) -> Option<Result<RawElement>> {
        if self.done {
            return None;
        }
        let step = next_element(&mut self.scanner, self.index, &mut self.buf);
        match step {
            Ok(Some(start)) => {
                let index = self.index;
                self.index += 1;
                let text = std::mem::take(&mut self.buf);
                Some(raw_text(self.scanner.label, text, start).map(|raw| RawElement { index, raw }))
            }
            Ok(None) => {
                self.done = true;
                None
            }
            Err(e) => {
                self.done = true;
                Some(Err(e))
            }
        }
    }
}

/// What the first pass learns.
struct Layout {
    board: Option<RawText>,
    defaults: Option<RawText>,
    stages_at: Pos,
    len: usize,
}

/// The unnamed temporary copy of a non-seekable input.
struct Spool {
    file: File,
    path: PathBuf,
    removed: bool,
}

impl Spool {
    fn create(label: &str) -> Result<Spool> {
        use std::sync::atomic::{AtomicU32, Ordering};
        static COUNTER: AtomicU32 = AtomicU32::new(0);
        let dir = std::env::temp_dir();
        let mut last = None;
        for _ in 0..100 {
            let n = COUNTER.fetch_add(1, Ordering::Relaxed);
            let path = dir.join(format!(".pinlow-board-{}-{n}.json", std::process::id()));
            match std::fs::OpenOptions::new()
                .read(true)
                .write(true)
                .create_new(true)
                .open(&path)
            {
                Ok(file) => {
                    // On Unix the open handle keeps the data; the name goes at once.
                    let removed = cfg!(unix) && std::fs::remove_file(&path).is_ok();
                    return Ok(Spool {
                        file,
                        path,
                        removed,
                    });
                }
                Err(e) if e.kind() == std::io::ErrorKind::AlreadyExists => last = Some(e),
                Err(e) => return Err(spool_error(label, e)),
            }
        }
        Err(spool_error(
            label,
            last.unwrap_or_else(|| std::io::Error::other("no free temporary name")),
        ))
    }
}

impl Drop for Spool {
    fn drop(&mut self) {
        if !self.removed {
            let _ = std::fs::remove_file(&self.path);
        }
    }
}

fn spool_error(label: &str, e: std::io::Error) -> Error {
    Error::Write {
        path: std::env::temp_dir(),
        source: std::io::Error::new(
            e.kind(),
            format!("cannot keep a temporary copy of {label}: {e}"),
        ),
    }
}

/// A byte reader that knows the line and column of the next byte.
struct Scanner<'a> {
    label: &'a str,
    reader: &'a mut dyn Read,
    tee: Option<&'a mut dyn Write>,
    buf: Vec<u8>,
    at: usize,
    len: usize,
    pos: Pos,
}

impl<'a> Scanner<'a> {
    fn new(
        label: &'a str,
        reader: &'a mut dyn Read,
        tee: Option<&'a mut dyn Write>,
        pos: Pos,
    ) -> Scanner<'a> {
        Scanner {
            label,
            reader,
            tee,
            buf: vec![0; CHUNK],
            at: 0,
            len: 0,
            pos,
        }
    }

    /// The next byte, without taking it; `None` at the end of the input.
    fn peek(&mut self) -> Result<Option<u8>> {
        if self.at >= self.len {
            self.fill()?;
        }
        if self.at < self.len {
            Ok(self.buf.get(self.at).copied())
        } else {
            Ok(None)
        }
    }

    fn fill(&mut self) -> Result<()> {
        loop {
            match self.reader.read(&mut self.buf) {
                Ok(n) => {
                    if let (Some(tee), Some(read)) = (self.tee.as_mut(), self.buf.get(..n)) {
                        tee.write_all(read)
                            .map_err(|e| spool_error(self.label, e))?;
                    }
                    self.at = 0;
                    self.len = n;
                    return Ok(());
                }
                Err(e) if e.kind() == std::io::ErrorKind::Interrupted => continue,
                Err(source) => {
                    return Err(Error::Io {
                        path: PathBuf::from(self.label),
                        source,
                    })
                }
            }
        }
    }

    /// Take the byte `peek` returned.
    fn bump(&mut self) {
        let Some(&b) = self.buf.get(self.at) else {
            return;
        };
        self.at += 1;
        self.pos.offset += 1;
        if b == b'\n' {
            self.pos.line += 1;
            self.pos.column = 1;
            self.pos.byte_column = 1;
        } else {
            self.pos.byte_column += 1;
            // UTF-8 continuation bytes belong to the character already counted.
            if b & 0xC0 != 0x80 {
                self.pos.column += 1;
            }
        }
    }

    /// The next byte, taken.
    fn next(&mut self) -> Result<Option<u8>> {
        let b = self.peek()?;
        if b.is_some() {
            self.bump();
        }
        Ok(b)
    }

    fn skip_ws(&mut self) -> Result<()> {
        while let Some(b' ' | b'\t' | b'\n' | b'\r') = self.peek()? {
            self.bump();
        }
        Ok(())
    }

    /// A syntax error at the next byte.
    fn error(&self, path: &str, message: impl Into<String>) -> Error {
        syntax_error(self.label, self.pos, path, message)
    }

    /// Copy one JSON value (string, object, list, or scalar) into `out`, up to `limit` bytes.
    fn value(&mut self, out: &mut Vec<u8>, limit: usize) -> Result<Captured> {
        out.clear();
        let Some(first) = self.peek()? else {
            return Ok(Captured::Eof);
        };
        match first {
            b'"' => {
                self.bump();
                out.push(first);
                self.rest_of_string(out, limit)
            }
            b'{' | b'[' => {
                let mut depth = 0usize;
                loop {
                    let Some(b) = self.next()? else {
                        return Ok(Captured::Eof);
                    };
                    out.push(b);
                    match b {
                        b'"' => match self.rest_of_string(out, limit)? {
                            Captured::Complete => {}
                            other => return Ok(other),
                        },
                        b'{' | b'[' => depth += 1,
                        b'}' | b']' => {
                            depth = depth.saturating_sub(1);
                            if depth == 0 {
                                return Ok(Captured::Complete);
                            }
                        }
                        b if outside_strings(b) => {}
                        _ => return Ok(Captured::Broken),
                    }
                    if out.len() > limit {
                        return Ok(Captured::TooLarge);
                    }
                }
            }
            _ => {
                // A number, true, false or null: stops at the first byte none of them holds.
                while let Some(b) = self.peek()? {
                    if !in_scalar(b) {
                        break;
                    }
                    self.bump();
                    out.push(b);
                    if out.len() > limit {
                        return Ok(Captured::TooLarge);
                    }
                }
                Ok(Captured::Complete)
            }
        }
    }

    /// After an opening quote: copy up to and including the closing one.
    fn rest_of_string(&mut self, out: &mut Vec<u8>, limit: usize) -> Result<Captured> {
        loop {
            let Some(b) = self.next()? else {
                return Ok(Captured::Eof);
            };
            out.push(b);
            match b {
                b'"' => return Ok(Captured::Complete),
                b'\\' => match self.next()? {
                    Some(e) => out.push(e),
                    None => return Ok(Captured::Eof),
                },
                // JSON strings hold no raw control characters (RFC 8259, section 7).
                0x00..=0x1F => return Ok(Captured::Broken),
                _ => {}
            }
            if out.len() > limit {
                return Ok(Captured::TooLarge);
            }
        }
    }
}

/// How copying a value ended.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Captured {
    /// The whole value (its JSON may still be wrong inside: serde reads it).
    Complete,
    /// The input ended inside it.
    Eof,
    /// It grew past the limit.
    TooLarge,
    /// A byte that JSON never holds where it stands (binary data): stopped there.
    Broken,
}

/// Bytes of a number, `true`, `false` or `null`.
fn in_scalar(b: u8) -> bool {
    b.is_ascii_alphanumeric() || matches!(b, b'+' | b'-' | b'.')
}

/// Bytes JSON may hold outside strings (RFC 8259): white space, structure, scalars.
fn outside_strings(b: u8) -> bool {
    in_scalar(b) || matches!(b, b' ' | b'\t' | b'\n' | b'\r' | b',' | b':')
}

fn syntax_error(label: &str, pos: Pos, path: &str, message: impl Into<String>) -> Error {
    Error::Json {
        place: crate::error::Place::Json {
            file: label.to_string(),
            path: path.to_string(),
            line_col: Some((pos.line, pos.column)),
        },
        message: message.into(),
    }
}

/// What a byte found where another was expected looks like in a message.
fn found(b: Option<u8>) -> String {
    match b {
        None => "the end of the input".to_string(),
        Some(b'{') => "an object `{`".to_string(),
        Some(b'[') => "a list `[`".to_string(),
        Some(b'"') => "a string".to_string(),
        Some(b'-' | b'0'..=b'9') => "a number".to_string(),
        Some(b't' | b'f') => "true or false".to_string(),
        Some(b'n') => "null".to_string(),
        Some(b) if b.is_ascii_graphic() => format!("`{}`", char::from(b)),
        Some(b) => format!("byte 0x{b:02X} (is this a binary file?)"),
    }
}

/// The text of a value copied from the input, checked to be UTF-8.
fn raw_text(label: &str, bytes: Vec<u8>, start: Pos) -> Result<RawText> {
    String::from_utf8(bytes)
        .map(|text| RawText { text, start })
        .map_err(|e| {
            let offset = start.offset + e.utf8_error().valid_up_to() as u64;
            Error::invalid(
                label,
                format!(
                    "the file is not UTF-8 text (invalid byte at offset {offset}); save it as UTF-8 JSON"
                ),
            )
        })
}

/// The error of a value that could not be copied whole (the input ended, or it grew past the
/// limit): serde's own reading of what was copied when it finds a fault before the cut (an
/// unclosed string, a stray byte), else the cut itself.
fn cut_error(label: &str, path: &str, start: Pos, bytes: &[u8], how: Captured, end: Pos) -> Error {
    if let Err(e) = serde_json::from_slice::<IgnoredAny>(bytes) {
        if !e.is_eof() {
            let raw = RawText {
                text: String::new(),
                start,
            };
            return Error::from_json_at(label, path, raw.absolute(e.line(), e.column(), true), &e);
        }
    }
    match how {
        Captured::Broken => syntax_error(label, end, path, "a byte JSON does not allow here"),
        Captured::TooLarge => syntax_error(
            label,
            start,
            path,
            format!(
                "this value is larger than {} MiB; a stage is a few hundred bytes (is a quote or a bracket missing?)",
                PIECE_LIMIT / (1024 * 1024)
            ),
        ),
        _ => syntax_error(label, end, path, "EOF while parsing a value"),
    }
}

/// Copy the value at the scanner into a [`RawText`] named `path` in errors.
fn piece(sc: &mut Scanner<'_>, path: &str, buf: &mut Vec<u8>) -> Result<RawText> {
    let start = sc.pos;
    match sc.value(buf, PIECE_LIMIT)? {
        Captured::Complete if buf.is_empty() => {
            let next = found(sc.peek()?);
            Err(sc.error(path, format!("expected a value, found {next}")))
        }
        Captured::Complete => raw_text(sc.label, std::mem::take(buf), start),
        how => Err(cut_error(sc.label, path, start, buf, how, sc.pos)),
    }
}

/// Step to the next element of `stages` (the scanner stands after `[` or after an element):
/// copies it into `buf` and returns where it starts, or `None` after the closing `]`.
fn next_element(sc: &mut Scanner<'_>, index: usize, buf: &mut Vec<u8>) -> Result<Option<Pos>> {
    sc.skip_ws()?;
    if index > 0 {
        match sc.peek()? {
            Some(b',') => {
                sc.bump();
                sc.skip_ws()?;
                if sc.peek()? == Some(b']') {
                    return Err(sc.error("", "trailing comma"));
                }
            }
            Some(b']') => {
                sc.bump();
                return Ok(None);
            }
            None => return Err(sc.error("stages", "EOF while parsing a list")),
            Some(_) => return Err(sc.error("", "expected `,` or `]`")),
        }
    } else if sc.peek()? == Some(b']') {
        sc.bump();
        return Ok(None);
    }
    let path = format!("stages[{index}]");
    let start = sc.pos;
    match sc.value(buf, PIECE_LIMIT)? {
        Captured::Complete if buf.is_empty() => {
            let next = found(sc.peek()?);
            Err(sc.error(&path, format!("expected a stage, found {next}")))
        }
        Captured::Complete => Ok(Some(start)),
        how => Err(cut_error(sc.label, &path, start, buf, how, sc.pos)),
    }
}

/// The first pass: check the top level of the whole input and keep `board` and `defaults`.
fn scan_top<'a>(
    label: &'a str,
    reader: &'a mut dyn Read,
    tee: Option<&'a mut dyn Write>,
) -> Result<Layout> {
    let mut sc = Scanner::new(label, reader, tee, Pos::START);
    let mut buf = Vec::new();
    // A UTF-8 byte-order mark, as some editors write, is skipped.
    if sc.peek()? == Some(0xEF) {
        for expected in [0xEF, 0xBB, 0xBF] {
            if sc.peek()? != Some(expected) {
                return Err(sc.error("", "the file starts with a broken byte-order mark"));
            }
            sc.bump();
        }
        sc.pos.column = 1;
        sc.pos.byte_column = 1;
    }
    sc.skip_ws()?;
    match sc.peek()? {
        Some(b'{') => sc.bump(),
        None => {
            return Err(sc.error(
                "",
                "the input is empty; a board file is a JSON object such as {\"stages\": [...]}",
            ))
        }
        other => {
            return Err(sc.error(
                "",
                format!(
                    "expected a board object `{{\"stages\": [...]}}`, found {}",
                    found(other)
                ),
            ))
        }
    }
    let mut board = None;
    let mut defaults = None;
    let mut stages: Option<(Pos, usize)> = None;
    let mut members = 0usize;
    let close = loop {
        sc.skip_ws()?;
        if members == 0 && sc.peek()? == Some(b'}') {
            let at = sc.pos;
            sc.bump();
            break at;
        }
        let key_at = sc.pos;
        let key = match sc.peek()? {
            Some(b'"') => read_key(&mut sc, &mut buf)?,
            Some(b'}') => return Err(sc.error("", "trailing comma")),
            None => return Err(sc.error("", "EOF while parsing an object")),
            Some(_) => return Err(sc.error("", "key must be a string")),
        };
        members += 1;
        sc.skip_ws()?;
        if sc.peek()? != Some(b':') {
            return Err(sc.error(&key, "expected `:`"));
        }
        sc.bump();
        sc.skip_ws()?;
        let duplicate = |seen: bool| {
            if seen {
                Err(syntax_error(
                    label,
                    key_at,
                    &key,
                    format!("duplicate field `{key}`"),
                ))
            } else {
                Ok(())
            }
        };
        match key.as_str() {
            "board" => {
                duplicate(board.is_some())?;
                board = Some(piece(&mut sc, "board", &mut buf)?);
            }
            "defaults" => {
                duplicate(defaults.is_some())?;
                defaults = Some(piece(&mut sc, "defaults", &mut buf)?);
            }
            "$schema" => {
                piece(&mut sc, "$schema", &mut buf)?;
            }
            "stages" => {
                duplicate(stages.is_some())?;
                stages = Some(scan_stages(&mut sc, &mut buf)?);
            }
            other => {
                return Err(syntax_error(
                    label,
                    key_at,
                    &escape_key(other),
                    format!(
                        "unknown field `{}`, expected one of `board`, `defaults`, `stages` (and `$schema`, which is ignored)",
                        escape_key(other)
                    ),
                ))
            }
        }
        sc.skip_ws()?;
        match sc.peek()? {
            Some(b',') => sc.bump(),
            Some(b'}') => {
                let at = sc.pos;
                sc.bump();
                break at;
            }
            None => return Err(sc.error("", "EOF while parsing an object")),
            Some(_) => return Err(sc.error("", "expected `,` or `}`")),
        }
    };
    sc.skip_ws()?;
    if sc.peek()?.is_some() {
        return Err(sc.error("", "trailing characters"));
    }
    let Some((stages_at, len)) = stages else {
        return Err(syntax_error(label, close, "", "missing field `stages`"));
    };
    Ok(Layout {
        board,
        defaults,
        stages_at,
        len,
    })
}

/// The value of `stages`: a non-empty list, every element copied once (and dropped) so that
/// its end is found. Returns the position after `[` and the number of elements.
fn scan_stages(sc: &mut Scanner<'_>, buf: &mut Vec<u8>) -> Result<(Pos, usize)> {
    let open = sc.pos;
    match sc.peek()? {
        Some(b'[') => sc.bump(),
        other => {
            return Err(sc.error(
                "stages",
                format!(
                    "expected a list of stages `[{{...}}, ...]`, found {}",
                    found(other)
                ),
            ))
        }
    }
    let after = sc.pos;
    let mut len = 0;
    while next_element(sc, len, buf)?.is_some() {
        len += 1;
    }
    if len == 0 {
        return Err(Error::invalid(
            format!(
                "{}: line {}, column {}, at stages",
                sc.label, open.line, open.column
            ),
            "the board has no stage to audit",
        ));
    }
    Ok((after, len))
}

/// A top-level key (the scanner stands on its opening quote), decoded.
fn read_key(sc: &mut Scanner<'_>, buf: &mut Vec<u8>) -> Result<String> {
    let start = sc.pos;
    match sc.value(buf, KEY_LIMIT)? {
        Captured::Complete => {}
        Captured::TooLarge => {
            return Err(syntax_error(
                sc.label,
                start,
                "",
                format!("a key longer than {KEY_LIMIT} bytes"),
            ))
        }
        Captured::Eof => return Err(sc.error("", "EOF while parsing a string")),
        Captured::Broken => {
            return Err(sc.error(
                "",
                "control character (\\u0000-\\u001F) found while parsing a string",
            ))
        }
    }
    serde_json::from_slice::<String>(buf).map_err(|e| {
        let raw = RawText {
            text: String::new(),
            start,
        };
        Error::from_json_at(sc.label, "", raw.absolute(e.line(), e.column(), true), &e)
    })
}

/// A key as a message shows it: control characters escaped.
fn escape_key(key: &str) -> String {
    key.chars()
        .map(|c| {
            if c.is_control() {
                c.escape_default().to_string()
            } else {
                c.to_string()
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn open(text: &str) -> Result<BoardStream> {
        BoardStream::from_bytes("b.json", text.as_bytes().to_vec())
    }

    fn err(text: &str) -> String {
        open(text).expect_err("refused").to_string()
    }

    fn elements(text: &str) -> Vec<RawElement> {
        let mut s = open(text).expect("opens");
        let all: Result<Vec<_>> = s.stages().expect("rewinds").collect();
        all.expect("every element")
    }

    #[test]
    fn gives_board_defaults_and_each_stage_with_its_position() {
        let text = "{\n  \"stages\": [\n    {\"name\": \"a\"},\n    {\"name\": \"b\", \"x\": [1, \"],}\"]}\n  ],\n  \"defaults\": {\"supply_v\": 12},\n  \"board\": \"demo\"\n}\n";
        let mut s = open(text).expect("opens");
        assert_eq!(s.len(), 2);
        assert_eq!(s.board().map(|b| b.text.as_str()), Some("\"demo\""));
        let d = s.defaults().expect("defaults kept");
        assert_eq!(d.text, "{\"supply_v\": 12}");
        assert_eq!((d.start.line, d.start.column), (6, 15));
        let els: Vec<RawElement> = s
            .stages()
            .expect("stages")
            .map(|e| e.expect("ok"))
            .collect();
        assert_eq!(els.len(), 2);
        let e1 = els.get(1).expect("second");
        assert_eq!(e1.index, 1);
        assert_eq!(e1.raw.text, "{\"name\": \"b\", \"x\": [1, \"],}\"]}");
        assert_eq!((e1.raw.start.line, e1.raw.start.column), (4, 5));
        // The same places as a look-up in the whole text.
        assert_eq!(
            e1.locate("stages[1].x"),
            crate::jsonpos::locate(text, "stages[1].x")
        );
        assert_eq!(
            s.locator().locate(None, "defaults.supply_v"),
            crate::jsonpos::locate(text, "defaults.supply_v")
        );
        // A second pass gives the same elements.
        assert_eq!(elements(text), els);
    }

    #[test]
    fn positions_count_characters_and_bytes() {
        // "é" is two bytes: jsonpos counts characters, serde counts bytes.
        let text = "{\"board\": \"é\", \"stages\": [{\"name\": 1}]}";
        let els = elements(text);
        let e = els.first().expect("one");
        assert_eq!((e.raw.start.column, e.raw.start.byte_column), (27, 28));
        assert_eq!(
            e.locate("stages[0].name"),
            crate::jsonpos::locate(text, "stages[0].name")
        );
        #[derive(serde::Deserialize, Debug)]
        #[allow(dead_code)]
        struct Named {
            name: String,
        }
        #[derive(serde::Deserialize, Debug)]
        #[allow(dead_code)]
        struct Whole {
            board: String,
            stages: Vec<Named>,
        }
        // The error of the element alone, placed in the file, is the one of the whole file.
        let whole = crate::error::parse_json::<Whole>("b.json", text)
            .expect_err("a number")
            .to_string();
        let err = e
            .raw
            .parse::<Named>("b.json", "stages[0]")
            .expect_err("a number")
            .to_string();
        assert_eq!(err, whole);
        assert!(
            err.starts_with("b.json: line 1, column 37, at stages[0].name"),
            "{err}"
        );
    }

    #[test]
    fn a_byte_order_mark_is_skipped() {
        let text = "\u{feff}{\"stages\": [{}]}";
        let s = open(text).expect("a BOM is accepted");
        assert_eq!(s.len(), 1);
        let e = elements(text);
        assert_eq!(e.first().map(|e| e.raw.start.column), Some(13));
    }

    #[test]
    fn the_top_level_is_checked_with_positions() {
        for (text, want) in [
            ("", "b.json: line 1, column 1: the input is empty"),
            ("[{}]", "line 1, column 1: expected a board object `{\"stages\": [...]}`, found a list `[`"),
            ("\0\0\0", "found byte 0x00 (is this a binary file?)"),
            ("{\"board\": \"x\"}", "b.json: line 1, column 14: missing field `stages`"),
            ("{\"stages\": {}}", "line 1, column 12, at stages: expected a list of stages `[{...}, ...]`, found an object `{`"),
            ("{\"stages\": []}", "b.json: line 1, column 12, at stages: the board has no stage to audit"),
            ("{\n \"stages\": [{}],\n \"stage\": 1}", "b.json: line 3, column 2, at stage: unknown field `stage`, expected one of `board`, `defaults`, `stages`"),
            ("{\"stages\": [{}], \"stages\": [{}]}", "line 1, column 18, at stages: duplicate field `stages`"),
            ("{\"stages\": [{}] \"board\": 1}", "line 1, column 17: expected `,` or `}`"),
            ("{\"stages\": [{} {}]}", "line 1, column 16: expected `,` or `]`"),
            ("{\"stages\": [{},]}", "line 1, column 16: trailing comma"),
            ("{\"stages\": [{}]} x", "line 1, column 18: trailing characters"),
            ("{\"stages\": [{\"name\": \"a", "b.json: line 1, column 24, at stages[0]: EOF while parsing a value"),
            ("{\"stages\": [{}", "EOF while parsing a list"),
            ("{\"stages\" [{}]}", "at stages: expected `:`"),
            ("{stages: []}", "line 1, column 2: key must be a string"),
        ] {
            let got = err(text);
            assert!(got.contains(want), "{text:?}: {got}");
        }
        // "$schema" is accepted and ignored.
        assert!(
            open("{\"$schema\": \"https://example.invalid/board.json\", \"stages\": [{}]}").is_ok()
        );
    }

    #[test]
    fn a_broken_element_is_named_by_serde_where_it_breaks() {
        // An unclosed string runs into the next line: serde names the control character there.
        let text = "{\"stages\": [{\"name\": \"a},\n{\"name\": \"b\"}]}";
        let got = err(text);
        assert!(
            got.contains("b.json: line 1, column 25, at stages[0]: control character"),
            "{got}"
        );
    }

    #[test]
    fn endless_and_oversized_values_stop() {
        // An endless list of brackets or string: cut at the limit.
        let text = format!("{{\"stages\": [{}", "[".repeat(PIECE_LIMIT + 10));
        let got = err(&text);
        assert!(
            got.contains("line 1, column 13, at stages[0]") && got.contains("larger than 1 MiB"),
            "{got}"
        );
        let text = format!("{{\"stages\": [\"{}\"]}}", "x".repeat(PIECE_LIMIT + 10));
        let got = err(&text);
        assert!(got.contains("larger than 1 MiB"), "{got}");
    }

    #[test]
    fn invalid_utf8_names_its_offset() {
        let mut bytes = b"{\"board\": \"caf".to_vec();
        bytes.extend_from_slice(b"\xe9\", \"stages\": [{}]}");
        let got = BoardStream::from_bytes("b.json", bytes)
            .expect_err("refused")
            .to_string();
        assert!(
            got.contains("not UTF-8") && got.contains("offset 14"),
            "{got}"
        );
    }

    #[test]
    fn a_reader_is_spooled_and_read_again() {
        let text = b"{\"stages\": [{\"name\": \"a\"}, {\"name\": \"b\"}]}".to_vec();
        let mut reader = std::io::Cursor::new(text);
        let mut s = BoardStream::from_reader(STDIN_LABEL, &mut reader).expect("spooled");
        assert_eq!(s.label(), "<stdin>");
        for _ in 0..2 {
            let names: Vec<String> = s
                .stages()
                .expect("stages")
                .map(|e| e.expect("ok").raw.text)
                .collect();
            assert_eq!(names, ["{\"name\": \"a\"}", "{\"name\": \"b\"}"]);
        }
    }

    #[test]
    fn an_endless_device_stops_at_once() {
        // /dev/zero never ends (POSIX): its first byte is refused.
        let zero = Path::new("/dev/zero");
        if zero.exists() {
            let got = BoardStream::open(zero).expect_err("refused").to_string();
            assert!(
                got.contains("/dev/zero: line 1, column 1") && got.contains("0x00"),
                "{got}"
            );
        }
    }
}
