//! Every file a command writes goes through here, so that an output never destroys an input:
//!
//! - each output is resolved to a canonical path (symbolic links followed; a file that does not
//!   exist yet by its folder's canonical path) and, where it exists, its device and inode, and
//!   compared with every input of the run ([`Inputs`]: the board, part files, part folders and
//!   each file in them, standard input when it is a file) and with every other output of the
//!   run ([`Plan`]); a clash is an error naming both, found before anything is written;
//! - an existing file is replaced only when pinlow wrote it (it starts with pinlow's marker,
//!   see [`Kind::marker`]), or when `--force` is given; an empty file holds nothing to lose and
//!   is replaced too; inputs are never replaced, `--force` or not;
//! - a file is written whole or not at all: into a temporary file beside the target, synced,
//!   then renamed over it ([`OutputFile::commit`]); on any error the temporary file is removed.
//!   Devices and pipes (`/dev/null`, `/dev/stdout`) are written in place.

use std::collections::HashMap;
use std::fs::{File, Metadata, Permissions};
use std::io::{BufWriter, Read, Write};
use std::path::{Component, Path, PathBuf};

use crate::error::{Error, Result};

/// The version written into every marker.
const VERSION: &str = env!("CARGO_PKG_VERSION");

/// The UTF-8 byte-order mark.
const BOM: &[u8] = b"\xEF\xBB\xBF";

/// How many bytes at the start of an existing file are read to look for the marker.
const HEAD_BYTES: u64 = 512;

/// What kind of text a file holds, which decides how it carries pinlow's marker.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Kind {
    /// JSON: a top-level `"generator": "pinlow VERSION"` key, first in the object.
    Json,
    /// Markdown: a first-line HTML comment.
    Markdown,
    /// SVG: an XML comment before the root element.
    Svg,
    /// Plain text (tables): a first line `# written by pinlow VERSION`.
    Text,
    /// A board file (`pinlow fix`): it carries no marker (a board takes no key of pinlow's own),
    /// so an existing file is replaced only with `--force`.
    Board,
}

impl Kind {
    /// The marker of this kind as written (for JSON it stands for the opening `{`).
    pub fn marker(self) -> String {
        match self {
            Kind::Json => format!("{{\n  \"generator\": \"pinlow {VERSION}\","),
            Kind::Markdown | Kind::Svg => format!("<!-- written by pinlow {VERSION} -->\n"),
            Kind::Text => format!("# written by pinlow {VERSION}\n"),
            Kind::Board => String::new(),
        }
    }
}

/// True when the start of a file carries pinlow's marker (of any kind and any version).
pub fn has_marker(head: &[u8]) -> bool {
    let head = head.strip_prefix(BOM).unwrap_or(head);
    let head = after_xml_declaration(head);
    let markers: [&[u8]; 3] = [
        b"<!-- written by pinlow ",
        b"# written by pinlow ",
        b"{\n  \"generator\": \"pinlow ",
    ];
    markers.iter().any(|m| head.starts_with(m))
}

/// The bytes after a leading `<?xml ...?>` declaration and the white space after it.
fn after_xml_declaration(head: &[u8]) -> &[u8] {
    if !head.starts_with(b"<?xml") {
        return head;
    }
    match head.windows(2).position(|w| w == b"?>") {
        Some(end) => {
            let rest = head.get(end + 2..).unwrap_or_default();
            let skip = rest.iter().take_while(|b| b.is_ascii_whitespace()).count();
            rest.get(skip..).unwrap_or_default()
        }
        None => head,
    }
}

/// Device and inode of a file, which name it whatever path leads there (hard links, bind
/// mounts).
#[cfg(unix)]
fn file_id(meta: &Metadata) -> Option<(u64, u64)> {
    use std::os::unix::fs::MetadataExt;
    Some((meta.dev(), meta.ino()))
}

#[cfg(not(unix))]
fn file_id(_meta: &Metadata) -> Option<(u64, u64)> {
    None
}

/// The inputs of a run, to be kept from every output.
#[derive(Debug, Default)]
pub struct Inputs {
    /// Canonical path -> the path as given.
    files: HashMap<PathBuf, String>,
    /// Device and inode -> the path as given.
    ids: HashMap<(u64, u64), String>,
    /// Canonical paths of part folders -> the folder as given.
    folders: HashMap<PathBuf, String>,
}

impl Inputs {
    /// No inputs yet.
    pub fn new() -> Inputs {
        Inputs::default()
    }

    /// A file the run reads (a board or a part file), named `shown` in messages. A path that
    /// does not resolve is left out: reading it reports the problem.
    pub fn add_file(&mut self, path: &Path, shown: &str) {
        if let Ok(canonical) = std::fs::canonicalize(path) {
            self.files.insert(canonical, shown.to_string());
        }
        if let Some(id) = std::fs::metadata(path).ok().as_ref().and_then(file_id) {
            self.ids.insert(id, shown.to_string());
        }
    }

    /// A `--parts` or `PINLOW_PARTS` path: a part file, or a folder and every entry in it.
    pub fn add_parts(&mut self, path: &Path) {
        let shown = path.display().to_string();
        let is_dir = std::fs::metadata(path).is_ok_and(|m| m.is_dir());
        if !is_dir {
            self.add_file(path, &shown);
            return;
        }
        if let Ok(canonical) = std::fs::canonicalize(path) {
            self.folders.insert(canonical, shown.clone());
        }
        self.add_file(path, &shown);
        if let Ok(entries) = std::fs::read_dir(path) {
            for entry in entries.flatten() {
                let p = entry.path();
                self.add_file(&p, &p.display().to_string());
            }
        }
    }

    /// Standard input, when it is a file (`pinlow audit - < b.json`).
    pub fn add_stdin(&mut self) {
        #[cfg(unix)]
        {
            use std::os::fd::AsFd;
            let stdin = std::io::stdin();
            if let Ok(fd) = stdin.as_fd().try_clone_to_owned() {
                let file = File::from(fd);
                if let Some(id) = file.metadata().ok().as_ref().and_then(file_id) {
                    self.ids
                        .insert(id, "<stdin> (the file it reads)".to_string());
                }
            }
        }
    }

    fn find(&self, canonical: &Path, id: Option<(u64, u64)>) -> Option<&str> {
        self.files
            .get(canonical)
            .or_else(|| id.and_then(|id| self.ids.get(&id)))
            .map(String::as_str)
    }
}

/// The outputs of one run, each checked against the inputs and the others before anything is
/// written.
#[derive(Debug)]
pub struct Plan<'a> {
    inputs: &'a Inputs,
    force: bool,
    outputs: HashMap<PathBuf, PathBuf>,
    output_ids: HashMap<(u64, u64), PathBuf>,
}

impl<'a> Plan<'a> {
    /// A plan for a run with these inputs; `force` lets it replace files pinlow did not write.
    pub fn new(inputs: &'a Inputs, force: bool) -> Plan<'a> {
        Plan {
            inputs,
            force,
            outputs: HashMap::new(),
            output_ids: HashMap::new(),
        }
    }

    /// Check the output file `path` (its folder must exist).
    pub fn file(&mut self, path: &Path, kind: Kind) -> Result<Target> {
        let resolved = resolve_file(path)?;
        self.check(path.to_path_buf(), resolved, kind)
    }

    /// Check the output folder `dir`, which may not exist yet (it is made by
    /// [`Folder::create`]).
    pub fn folder(&mut self, dir: &Path) -> Result<Folder> {
        let resolved = resolve_folder(dir)?;
        if let Some(input) = self.inputs.find(&resolved, None) {
            return Err(clash(dir, &resolved, input));
        }
        Ok(Folder {
            shown: dir.to_path_buf(),
            resolved,
        })
    }

    /// Check the output file `name` inside an output folder.
    pub fn file_in(&mut self, folder: &Folder, name: &str, kind: Kind) -> Result<Target> {
        self.check(folder.shown.join(name), folder.resolved.join(name), kind)
    }

    fn check(&mut self, shown: PathBuf, resolved: PathBuf, kind: Kind) -> Result<Target> {
        let meta = match std::fs::metadata(&resolved) {
            Ok(meta) => Some(meta),
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => None,
            Err(source) => {
                return Err(Error::Write {
                    path: shown,
                    source,
                })
            }
        };
        if meta.as_ref().is_some_and(Metadata::is_dir) {
            return Err(Error::Usage(format!(
                "cannot write {}: it is a folder; give a file name",
                shown.display()
            )));
        }
        let id = meta.as_ref().and_then(file_id);
        if let Some(input) = self.inputs.find(&resolved, id) {
            return Err(clash(&shown, &resolved, input));
        }
        if resolved.extension().is_some_and(|e| e == "json") {
            let folder = resolved
                .parent()
                .and_then(|dir| self.inputs.folders.get(dir));
            if let Some(folder) = folder {
                return Err(Error::Usage(format!(
                    "cannot write {}: it would add a file to the parts folder {folder}, where every *.json is read as a part file; choose another folder",
                    shown.display()
                )));
            }
        }
        let twice = self
            .outputs
            .get(&resolved)
            .or_else(|| id.and_then(|id| self.output_ids.get(&id)));
        if let Some(other) = twice {
            return Err(Error::Usage(format!(
                "cannot write {}: it is the same file as {}, which this command writes too",
                shown.display(),
                other.display()
            )));
        }
        let special = meta.as_ref().is_some_and(|m| !m.is_file());
        if let Some(meta) = &meta {
            if !special && !self.force && meta.len() > 0 && !written_by_pinlow(&resolved)? {
                return Err(Error::Usage(format!(
                    "cannot write {}: the file exists and pinlow did not write it; give --force to replace it",
                    shown.display()
                )));
            }
        }
        self.outputs.insert(resolved.clone(), shown.clone());
        if let Some(id) = id {
            self.output_ids.insert(id, shown.clone());
        }
        Ok(Target {
            shown,
            path: resolved,
            kind,
            special,
            permissions: meta.filter(Metadata::is_file).map(|m| m.permissions()),
        })
    }
}

fn clash(shown: &Path, resolved: &Path, input: &str) -> Error {
    let both = if shown == resolved && Path::new(input) == resolved {
        String::new()
    } else {
        format!(" (both are {})", resolved.display())
    };
    Error::Usage(format!(
        "cannot write {}: it is the input {input}{both}; pinlow never writes over its input, choose another output",
        shown.display()
    ))
}

/// True when the file at `path` starts with pinlow's marker.
fn written_by_pinlow(path: &Path) -> Result<bool> {
    let io = |source| Error::Io {
        path: path.to_path_buf(),
        source,
    };
    let mut head = Vec::new();
    File::open(path)
        .map_err(io)?
        .take(HEAD_BYTES)
        .read_to_end(&mut head)
        .map_err(io)?;
    Ok(has_marker(&head))
}

/// The canonical path an output file stands for: an existing one (or a symbolic link's
/// target) resolved, a new one as its folder's canonical path and its name.
fn resolve_file(path: &Path) -> Result<PathBuf> {
    let write_error = |source| Error::Write {
        path: path.to_path_buf(),
        source,
    };
    match std::fs::symlink_metadata(path) {
        Ok(meta) => std::fs::canonicalize(path).or_else(|e| {
            // A link to a pipe or socket (`/dev/stdout` on a pipe leads to `pipe:[N]`): no
            // path to resolve, but something to write to in place.
            if std::fs::metadata(path).is_ok_and(|m| !m.is_file() && !m.is_dir()) {
                return Ok(path.to_path_buf());
            }
            Err(if meta.file_type().is_symlink() {
                Error::Usage(format!(
                    "cannot write {}: it is a symbolic link that leads nowhere ({e}); remove it or give another name",
                    path.display()
                ))
            } else {
                write_error(e)
            })
        }),
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => {
            let Some(name) = path.file_name() else {
                return Err(Error::Usage(format!(
                    "cannot write {}: it does not name a file",
                    path.display()
                )));
            };
            let parent = match path.parent() {
                Some(p) if !p.as_os_str().is_empty() => p,
                _ => Path::new("."),
            };
            let dir = std::fs::canonicalize(parent).map_err(|source| Error::Write {
                path: path.to_path_buf(),
                source: std::io::Error::new(
                    source.kind(),
                    format!("its folder {} cannot be used: {source}", parent.display()),
                ),
            })?;
            Ok(dir.join(name))
        }
        Err(e) => Err(write_error(e)),
    }
}

/// The canonical path of a folder that may not exist yet: its deepest existing ancestor
/// resolved, and the rest appended.
fn resolve_folder(dir: &Path) -> Result<PathBuf> {
    let not_folder = |p: &Path| {
        Error::Usage(format!(
            "cannot write into {}: {} is not a folder",
            dir.display(),
            p.display()
        ))
    };
    for ancestor in dir.ancestors() {
        let existing = if ancestor.as_os_str().is_empty() {
            Path::new(".")
        } else {
            ancestor
        };
        let Ok(meta) = std::fs::metadata(existing) else {
            continue;
        };
        if !meta.is_dir() {
            return Err(not_folder(existing));
        }
        let mut resolved = std::fs::canonicalize(existing).map_err(|source| Error::Write {
            path: dir.to_path_buf(),
            source,
        })?;
        let rest = dir.strip_prefix(ancestor).unwrap_or(Path::new(""));
        for part in rest.components() {
            match part {
                Component::Normal(name) => resolved.push(name),
                Component::CurDir => {}
                _ => {
                    return Err(Error::Usage(format!(
                        "cannot write into {}: give the new folder without `..`",
                        dir.display()
                    )))
                }
            }
        }
        return Ok(resolved);
    }
    Err(Error::Usage(format!(
        "cannot write into {}: no part of the path exists",
        dir.display()
    )))
}

/// An output folder, checked; made by [`Folder::create`].
#[derive(Clone, Debug)]
pub struct Folder {
    shown: PathBuf,
    resolved: PathBuf,
}

impl Folder {
    /// The folder as given.
    pub fn shown(&self) -> &Path {
        &self.shown
    }

    /// Its canonical path.
    pub fn path(&self) -> &Path {
        &self.resolved
    }

    /// Make the folder (and its parents) when it does not exist.
    pub fn create(&self) -> Result<()> {
        std::fs::create_dir_all(&self.resolved).map_err(|source| Error::Write {
            path: self.shown.clone(),
            source,
        })
    }
}

/// One output file, checked.
#[derive(Debug)]
pub struct Target {
    shown: PathBuf,
    path: PathBuf,
    kind: Kind,
    special: bool,
    permissions: Option<Permissions>,
}

impl Target {
    /// The path as given.
    pub fn shown(&self) -> &Path {
        &self.shown
    }

    /// The canonical path written.
    pub fn path(&self) -> &Path {
        &self.path
    }

    /// Start writing: into a temporary file beside the target (or in place for a device or
    /// a pipe). Nothing reaches the target before [`OutputFile::commit`].
    pub fn create(&self) -> Result<OutputFile> {
        let write_error = |source| Error::Write {
            path: self.shown.clone(),
            source,
        };
        if self.special {
            let file = std::fs::OpenOptions::new()
                .write(true)
                .open(&self.path)
                .map_err(write_error)?;
            return Ok(OutputFile {
                writer: Some(BufWriter::new(file)),
                temp: None,
                target: self.path.clone(),
                shown: self.shown.clone(),
                kind: self.kind,
                special: true,
                marked: true,
            });
        }
        let (file, temp) = temp_beside(&self.path).map_err(write_error)?;
        let out = OutputFile {
            writer: Some(BufWriter::new(file)),
            temp: Some(temp),
            target: self.path.clone(),
            shown: self.shown.clone(),
            kind: self.kind,
            special: false,
            marked: false,
        };
        if let (Some(permissions), Some(temp)) = (&self.permissions, &out.temp) {
            std::fs::set_permissions(temp, permissions.clone()).map_err(|e| out.error(e))?;
        }
        Ok(out)
    }

    /// Write `bytes` as the whole file.
    pub fn write(&self, bytes: &[u8]) -> Result<()> {
        let mut out = self.create()?;
        out.write_all(bytes).map_err(|e| out.error(e))?;
        out.commit()
    }
}

/// A new file `.pinlow-PID-N.tmp` in the target's folder.
fn temp_beside(target: &Path) -> std::io::Result<(File, PathBuf)> {
    use std::sync::atomic::{AtomicU64, Ordering};
    static COUNTER: AtomicU64 = AtomicU64::new(0);
    let dir = target.parent().unwrap_or(Path::new("."));
    loop {
        let n = COUNTER.fetch_add(1, Ordering::Relaxed);
        let temp = dir.join(format!(".pinlow-{}-{n}.tmp", std::process::id()));
        match std::fs::OpenOptions::new()
            .write(true)
            .create_new(true)
            .open(&temp)
        {
            Ok(file) => return Ok((file, temp)),
            Err(e) if e.kind() == std::io::ErrorKind::AlreadyExists => continue,
            Err(e) => return Err(e),
        }
    }
}

/// An output file being written; dropped without [`OutputFile::commit`], it leaves the target
/// as it was and removes its temporary file.
#[derive(Debug)]
pub struct OutputFile {
    writer: Option<BufWriter<File>>,
    temp: Option<PathBuf>,
    target: PathBuf,
    shown: PathBuf,
    kind: Kind,
    /// A device or a pipe, written in place.
    special: bool,
    /// The marker is written (or not wanted).
    marked: bool,
}

impl OutputFile {
    /// A write error of this file, naming it as given ([`Error::OutputClosed`] when it is a
    /// pipe whose reader went away).
    pub fn error(&self, source: std::io::Error) -> Error {
        if self.special && source.kind() == std::io::ErrorKind::BrokenPipe {
            return Error::OutputClosed;
        }
        Error::Write {
            path: self.shown.clone(),
            source,
        }
    }

    /// Finish: flush, sync and rename the temporary file over the target.
    pub fn commit(mut self) -> Result<()> {
        let Some(writer) = self.writer.take() else {
            return Ok(());
        };
        if !self.marked {
            // Nothing was written: the file still carries the marker.
            let mut w = writer;
            let marker = match self.kind {
                Kind::Json => format!("{{\n  \"generator\": \"pinlow {VERSION}\"\n}}\n"),
                kind => kind.marker(),
            };
            w.write_all(marker.as_bytes()).map_err(|e| self.error(e))?;
            return self.finish(w);
        }
        self.finish(writer)
    }

    fn finish(&mut self, writer: BufWriter<File>) -> Result<()> {
        let file = writer
            .into_inner()
            .map_err(|e| self.error(e.into_error()))?;
        if let Some(temp) = self.temp.take() {
            let done = file
                .sync_all()
                .and_then(|()| std::fs::rename(&temp, &self.target));
            if let Err(e) = done {
                let _ = std::fs::remove_file(&temp);
                return Err(self.error(e));
            }
        }
        Ok(())
    }

    fn write_marked(&mut self, buf: &[u8]) -> std::io::Result<()> {
        let Some(w) = self.writer.as_mut() else {
            return Err(std::io::Error::other("the file is closed"));
        };
        if self.marked {
            return w.write_all(buf);
        }
        self.marked = true;
        let marker = self.kind.marker();
        match self.kind {
            Kind::Json => match buf.strip_prefix(b"{") {
                Some(rest) => {
                    w.write_all(marker.as_bytes())?;
                    w.write_all(rest)
                }
                None => w.write_all(buf),
            },
            Kind::Svg if buf.starts_with(b"<?xml") => {
                let split = buf.len() - after_xml_declaration(buf).len();
                let (declaration, rest) = buf.split_at(split);
                w.write_all(declaration)?;
                if !declaration.ends_with(b"\n") {
                    w.write_all(b"\n")?;
                }
                w.write_all(marker.as_bytes())?;
                w.write_all(rest)
            }
            Kind::Markdown | Kind::Svg | Kind::Text | Kind::Board => {
                w.write_all(marker.as_bytes())?;
                w.write_all(buf)
            }
        }
    }
}

impl Write for OutputFile {
    fn write(&mut self, buf: &[u8]) -> std::io::Result<usize> {
        if buf.is_empty() {
            return Ok(0);
        }
        self.write_marked(buf)?;
        Ok(buf.len())
    }

    fn flush(&mut self) -> std::io::Result<()> {
        match self.writer.as_mut() {
            Some(w) => w.flush(),
            None => Ok(()),
        }
    }
}

impl Drop for OutputFile {
    fn drop(&mut self) {
        if let Some(temp) = self.temp.take() {
            self.writer = None;
            let _ = std::fs::remove_file(temp);
        }
    }
}

/// The link from a file in folder `from` to the file `to`, both canonical: `../plots/x.svg`.
pub fn relative_link(from: &Path, to: &Path) -> String {
    let from: Vec<Component> = from.components().collect();
    let to_parts: Vec<Component> = to.components().collect();
    let common = from
        .iter()
        .zip(&to_parts)
        .take_while(|(a, b)| a == b)
        .count();
    let mut parts: Vec<String> = Vec::new();
    for _ in common..from.len() {
        parts.push("..".to_string());
    }
    for c in to_parts.iter().skip(common) {
        parts.push(c.as_os_str().to_string_lossy().into_owned());
    }
    parts.join("/")
}

#[cfg(test)]
mod tests {
    use super::*;

    fn scratch(name: &str) -> PathBuf {
        let dir =
            std::env::temp_dir().join(format!("pinlow-outputs-{}-{name}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        std::fs::create_dir_all(&dir).expect("temp dir");
        dir
    }

    fn leftovers(dir: &Path) -> Vec<String> {
        std::fs::read_dir(dir)
            .expect("list")
            .flatten()
            .map(|e| e.file_name().to_string_lossy().into_owned())
            .filter(|n| n.ends_with(".tmp"))
            .collect()
    }

    #[test]
    fn every_kind_carries_a_marker_it_recognises() {
        for kind in [Kind::Json, Kind::Markdown, Kind::Svg, Kind::Text] {
            assert!(has_marker(kind.marker().as_bytes()), "{kind:?}");
        }
        assert!(has_marker(
            b"<?xml version=\"1.0\"?>\n<!-- written by pinlow 9.9.9 -->\n<svg/>"
        ));
        assert!(!has_marker(b"{\"stages\": []}"));
        assert!(!has_marker(b"# Board: my notes"));
        assert!(!has_marker(b""));
    }

    #[test]
    fn markers_are_placed_in_each_format() {
        let dir = scratch("markers");
        let inputs = Inputs::new();
        let mut plan = Plan::new(&inputs, false);
        let cases = [
            (Kind::Json, "r.json", &b"{\n  \"board\": null\n}\n"[..]),
            (Kind::Markdown, "r.md", b"# Board: x\n"),
            (
                Kind::Svg,
                "a.svg",
                b"<svg xmlns=\"http://www.w3.org/2000/svg\"/>\n",
            ),
            (Kind::Svg, "b.svg", b"<?xml version=\"1.0\"?>\n<svg/>\n"),
            (Kind::Text, "r.txt", b"table\n"),
        ];
        for (kind, name, body) in cases {
            let target = plan.file(&dir.join(name), kind).expect("checked");
            target.write(body).expect("written");
            let text = std::fs::read_to_string(dir.join(name)).expect("read back");
            assert!(has_marker(text.as_bytes()), "{name}: {text}");
        }
        let json: serde_json::Value =
            serde_json::from_str(&std::fs::read_to_string(dir.join("r.json")).expect("read"))
                .expect("still JSON");
        assert_eq!(json["generator"], format!("pinlow {VERSION}"));
        assert_eq!(
            std::fs::read_to_string(dir.join("b.svg")).expect("read"),
            format!("<?xml version=\"1.0\"?>\n<!-- written by pinlow {VERSION} -->\n<svg/>\n")
        );
        assert!(leftovers(&dir).is_empty());
        std::fs::remove_dir_all(&dir).ok();
    }

    #[test]
    fn refuses_inputs_twins_and_foreign_files() {
        let dir = scratch("refuse");
        let board = dir.join("b.json");
        std::fs::write(&board, "{}").expect("write");
        let mut inputs = Inputs::new();
        inputs.add_file(&board, "b.json");
        let mut plan = Plan::new(&inputs, true);
        let err = plan
            .file(&dir.join("sub/../b.json"), Kind::Json)
            .expect_err("no folder sub")
            .to_string();
        assert!(err.contains("cannot write"), "{err}");
        let err = plan
            .file(&dir.join("./b.json"), Kind::Json)
            .expect_err("the input")
            .to_string();
        assert!(err.contains("it is the input b.json"), "{err}");
        // A new file: fine once; a second output of the same run is refused.
        let out = dir.join("r.md");
        plan.file(&out, Kind::Markdown).expect("new file");
        let err = plan
            .file(&dir.join(".").join("r.md"), Kind::Markdown)
            .expect_err("twice")
            .to_string();
        assert!(err.contains("same file as"), "{err}");
        // A file pinlow did not write: refused without force.
        let notes = dir.join("notes.md");
        std::fs::write(&notes, "mine").expect("write");
        let mut strict = Plan::new(&inputs, false);
        let err = strict
            .file(&notes, Kind::Markdown)
            .expect_err("foreign")
            .to_string();
        assert!(
            err.contains("pinlow did not write it; give --force"),
            "{err}"
        );
        assert_eq!(std::fs::read_to_string(&notes).expect("read"), "mine");
        std::fs::remove_dir_all(&dir).ok();
    }

    #[test]
    fn a_dropped_file_leaves_the_target_and_no_temporary() {
        let dir = scratch("dropped");
        let out = dir.join("r.md");
        std::fs::write(&out, format!("{}old\n", Kind::Markdown.marker())).expect("write");
        let inputs = Inputs::new();
        let mut plan = Plan::new(&inputs, false);
        let target = plan.file(&out, Kind::Markdown).expect("pinlow's own file");
        {
            let mut w = target.create().expect("create");
            w.write_all(b"new, half written").expect("write");
            assert_eq!(
                leftovers(&dir).len(),
                1,
                "the temporary file exists while writing"
            );
        }
        assert!(std::fs::read_to_string(&out)
            .expect("read")
            .ends_with("old\n"));
        assert!(leftovers(&dir).is_empty());
        let mut w = target.create().expect("create");
        w.write_all(b"new\n").expect("write");
        w.commit().expect("commit");
        assert!(std::fs::read_to_string(&out)
            .expect("read")
            .ends_with("\nnew\n"));
        std::fs::remove_dir_all(&dir).ok();
    }

    #[cfg(unix)]
    #[test]
    fn links_lead_to_their_targets() {
        let dir = scratch("links");
        let board = dir.join("b.json");
        std::fs::write(&board, "{}").expect("write");
        let mut inputs = Inputs::new();
        inputs.add_file(&board, "b.json");
        let mut plan = Plan::new(&inputs, true);
        std::os::unix::fs::symlink(&board, dir.join("soft.json")).expect("symlink");
        std::fs::hard_link(&board, dir.join("hard.json")).expect("hard link");
        for alias in ["soft.json", "hard.json"] {
            let err = plan
                .file(&dir.join(alias), Kind::Json)
                .expect_err("an alias of the input")
                .to_string();
            assert!(err.contains("it is the input b.json"), "{alias}: {err}");
        }
        std::os::unix::fs::symlink(dir.join("nowhere"), dir.join("dangling.md")).expect("link");
        let err = plan
            .file(&dir.join("dangling.md"), Kind::Markdown)
            .expect_err("dangling")
            .to_string();
        assert!(err.contains("leads nowhere"), "{err}");
        std::fs::remove_dir_all(&dir).ok();
    }

    #[test]
    fn parts_folders_take_no_new_part_files() {
        let dir = scratch("parts");
        let parts = dir.join("parts");
        std::fs::create_dir_all(&parts).expect("dir");
        std::fs::write(parts.join("a.json"), "{}").expect("write");
        let mut inputs = Inputs::new();
        inputs.add_parts(&parts);
        let mut plan = Plan::new(&inputs, true);
        let err = plan
            .file(&parts.join("a.json"), Kind::Json)
            .expect_err("a part file")
            .to_string();
        assert!(err.contains("it is the input"), "{err}");
        let err = plan
            .file(&parts.join("list.json"), Kind::Json)
            .expect_err("a new part file")
            .to_string();
        assert!(err.contains("parts folder"), "{err}");
        assert!(plan.file(&parts.join("list.md"), Kind::Markdown).is_ok());
        std::fs::remove_dir_all(&dir).ok();
    }

    #[test]
    fn new_folders_resolve_and_links_are_relative() {
        let dir = scratch("folders");
        let inputs = Inputs::new();
        let mut plan = Plan::new(&inputs, false);
        let folder = plan.folder(&dir.join("a/b")).expect("a new folder");
        let canonical = std::fs::canonicalize(&dir).expect("canonical");
        assert_eq!(folder.path(), canonical.join("a/b"));
        assert!(plan.folder(&dir.join("a/../c")).is_err());
        assert_eq!(
            relative_link(
                &canonical.join("review"),
                &canonical.join("a/b/stage-1.svg")
            ),
            "../a/b/stage-1.svg"
        );
        assert_eq!(
            relative_link(&canonical, &canonical.join("stage-1.svg")),
            "stage-1.svg"
        );
        std::fs::remove_dir_all(&dir).ok();
    }
}
