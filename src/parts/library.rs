//! The library of parts: the shipped files (embedded at build time) overlaid by the user's files
//! and folders (`--parts`, `PINLOW_PARTS`), later sources overriding earlier ones by id.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};
use std::sync::Arc;

use super::part::Part;
use super::record::PartRecord;
use super::validate::part_from_record;
use crate::error::{parse_json, Error, Result};
use crate::read::{read_text, PART_FILE_LIMIT};

/// Where a part came from.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum PartSource {
    /// Shipped inside the binary (file name under `parts/`).
    Builtin(&'static str),
    /// A user's file.
    File(PathBuf),
}

impl std::fmt::Display for PartSource {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            PartSource::Builtin(name) => write!(f, "built-in {name}"),
            PartSource::File(p) => write!(f, "{}", p.display()),
        }
    }
}

/// The shipped part files, embedded at build time: (file name, contents).
const BUILTIN: &[(&str, &str)] = &[
    (
        "demo-npn-40v.json",
        include_str!("../../parts/demo-npn-40v.json"),
    ),
    (
        "demo-npn-1a.json",
        include_str!("../../parts/demo-npn-1a.json"),
    ),
    ("2n3904.json", include_str!("../../parts/2n3904.json")),
    ("2n2222a.json", include_str!("../../parts/2n2222a.json")),
    ("2n4401.json", include_str!("../../parts/2n4401.json")),
    ("bc547b.json", include_str!("../../parts/bc547b.json")),
    ("bc337-40.json", include_str!("../../parts/bc337-40.json")),
    ("bc817-40.json", include_str!("../../parts/bc817-40.json")),
    ("bd139.json", include_str!("../../parts/bd139.json")),
    ("tip120.json", include_str!("../../parts/tip120.json")),
];

/// The names of the shipped part files (for a test that none is forgotten).
pub fn builtin_sources() -> impl Iterator<Item = &'static str> {
    BUILTIN.iter().map(|(name, _)| *name)
}

/// Parts by id.
#[derive(Clone, Debug, Default)]
pub struct Library {
    parts: BTreeMap<String, Arc<Part>>,
}

impl Library {
    /// The shipped parts only.
    pub fn builtin() -> Result<Library> {
        let mut lib = Library::default();
        let mut seen: BTreeMap<String, String> = BTreeMap::new();
        for (name, text) in BUILTIN {
            let label = format!("parts/{name}");
            let rec: PartRecord = parse_json(&label, text)?;
            let part = part_from_record(&rec, &label, PartSource::Builtin(name))?;
            if let Some(first) = seen.insert(part.id.clone(), label.clone()) {
                return Err(Error::DuplicatePart {
                    id: part.id,
                    first,
                    second: label,
                });
            }
            lib.parts.insert(part.id.clone(), Arc::new(part));
        }
        Ok(lib)
    }

    /// The shipped parts overlaid by each path in order (a folder: every `*.json` in it; a file:
    /// that file). Two files of one folder with the same id are an error; a later path overrides.
    pub fn load(paths: &[PathBuf]) -> Result<Library> {
        let sources: Vec<PartsPath> = paths.iter().cloned().map(PartsPath::given).collect();
        Library::load_from(&sources)
    }

    /// As [`Library::load`], each error of a path led by the path's context when it has one
    /// (`PINLOW_PARTS entry 2 (/x/y): ...`).
    pub fn load_from(sources: &[PartsPath]) -> Result<Library> {
        let mut lib = Library::builtin()?;
        for source in sources {
            let parts = load_path(&source.path).map_err(|e| source.name_in(e))?;
            for part in parts {
                lib.parts.insert(part.id.clone(), Arc::new(part));
            }
        }
        Ok(lib)
    }

    /// Add or replace a part (by id).
    pub fn insert(&mut self, part: Part) {
        self.parts.insert(part.id.clone(), Arc::new(part));
    }

    /// The part with this id.
    pub fn get(&self, id: &str) -> Option<&Part> {
        self.parts.get(id).map(|p| p.as_ref())
    }

    /// Look a part up as a shared handle (stages share their part), or say which ids exist.
    pub fn require(&self, id: &str, place: &str) -> Result<&Arc<Part>> {
        self.parts.get(id).ok_or_else(|| Error::UnknownPart {
            place: place.to_string(),
            id: id.to_string(),
            known: self.parts.keys().cloned().collect::<Vec<_>>().join(", "),
        })
    }

    /// Every part, by id.
    pub fn iter(&self) -> impl Iterator<Item = &Part> {
        self.parts.values().map(|p| p.as_ref())
    }

    /// Number of parts.
    pub fn len(&self) -> usize {
        self.parts.len()
    }

    /// True when the library holds no part.
    pub fn is_empty(&self) -> bool {
        self.parts.is_empty()
    }
}

/// A file or folder of parts given by the user, and how messages name where it came from.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct PartsPath {
    /// The file or folder.
    pub path: PathBuf,
    /// Leads every error of this path, e.g. `PINLOW_PARTS entry 2 (/x/y)`; `None` for a
    /// `--parts` flag (its errors name the path already).
    pub context: Option<String>,
}

impl PartsPath {
    /// A path given on the command line.
    pub fn given(path: PathBuf) -> PartsPath {
        PartsPath {
            path,
            context: None,
        }
    }

    /// The paths of a `PINLOW_PARTS` value (a path list; empty entries skipped), each named by
    /// its place in the list, from 1.
    pub fn from_env(value: &std::ffi::OsStr) -> Vec<PartsPath> {
        std::env::split_paths(value)
            .enumerate()
            .filter(|(_, p)| !p.as_os_str().is_empty())
            .map(|(i, path)| PartsPath {
                context: Some(format!("PINLOW_PARTS entry {} ({})", i + 1, path.display())),
                path,
            })
            .collect()
    }

    fn name_in(&self, err: Error) -> Error {
        match &self.context {
            Some(context) => Error::Context {
                context: context.clone(),
                source: Box::new(err),
            },
            None => err,
        }
    }
}

/// The part files of a folder, sorted by name: every `*.json` entry. A `*.json` entry that is
/// not a readable file, a symbolic link that leads nowhere (dangling or looping) and an entry
/// that cannot be listed are errors naming it, never skipped.
pub fn folder_files(dir: &Path) -> Result<Vec<PathBuf>> {
    let io = |path: &Path| {
        let path = path.to_path_buf();
        move |source| Error::Io { path, source }
    };
    let mut files: Vec<PathBuf> = Vec::new();
    for entry in std::fs::read_dir(dir).map_err(io(dir))? {
        let entry = entry.map_err(io(dir))?;
        let p = entry.path();
        let link = std::fs::symlink_metadata(&p).map_err(io(&p))?;
        let target = match std::fs::metadata(&p) {
            Ok(meta) => meta,
            Err(e) if link.file_type().is_symlink() => {
                return Err(Error::invalid(
                    p.display().to_string(),
                    format!("a symbolic link that leads nowhere (dangling or looping: {e}); remove it or fix its target"),
                ))
            }
            Err(e) => return Err(io(&p)(e)),
        };
        if p.extension().is_some_and(|e| e == "json") {
            if !target.is_file() {
                return Err(Error::invalid(
                    p.display().to_string(),
                    "named like a part file but not a file; every *.json in a parts folder is read as a part",
                ));
            }
            files.push(p);
        }
    }
    files.sort();
    Ok(files)
}

/// Load every part of a folder (sorted by file name) or one file.
fn load_path(path: &Path) -> Result<Vec<Part>> {
    let meta = std::fs::metadata(path).map_err(|source| Error::Io {
        path: path.to_path_buf(),
        source,
    })?;
    if !meta.is_dir() {
        return Ok(vec![check_file(path)?]);
    }
    let files = folder_files(path)?;
    let mut seen: BTreeMap<String, PathBuf> = BTreeMap::new();
    let mut parts = Vec::new();
    for file in files {
        let part = check_file(&file)?;
        if let Some(first) = seen.insert(part.id.clone(), file.clone()) {
            return Err(Error::DuplicatePart {
                id: part.id,
                first: first.display().to_string(),
                second: file.display().to_string(),
            });
        }
        parts.push(part);
    }
    Ok(parts)
}

/// Check part files and folders as `pinlow parts check` does: every file on its own, then ids
/// across all of them. Returns each good file with its part id, and every problem (a bad file,
/// a bad folder entry, an id defined by two files).
pub fn check_paths(paths: &[PathBuf]) -> (Vec<(PathBuf, String)>, Vec<Error>) {
    let mut good = Vec::new();
    let mut errors = Vec::new();
    let mut seen: BTreeMap<String, PathBuf> = BTreeMap::new();
    for path in paths {
        let files = match std::fs::metadata(path) {
            Ok(meta) if meta.is_dir() => match folder_files(path) {
                Ok(files) => files,
                Err(e) => {
                    errors.push(e);
                    continue;
                }
            },
            _ => vec![path.clone()],
        };
        for file in files {
            match check_file(&file) {
                Ok(part) => {
                    if let Some(first) = seen.get(&part.id) {
                        errors.push(Error::DuplicatePart {
                            id: part.id.clone(),
                            first: first.display().to_string(),
                            second: file.display().to_string(),
                        });
                    } else {
                        seen.insert(part.id.clone(), file.clone());
                    }
                    good.push((file, part.id));
                }
                Err(e) => errors.push(e),
            }
        }
    }
    (good, errors)
}

/// Read and validate one part file.
pub fn check_file(path: &Path) -> Result<Part> {
    let text = read_text(path, PART_FILE_LIMIT)?;
    let label = path.display().to_string();
    let rec: PartRecord = parse_json(&label, &text)?;
    part_from_record(&rec, &label, PartSource::File(path.to_path_buf()))
        .map_err(|e| e.with_position(&label, &text))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_shipped_file_is_embedded() {
        let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("parts");
        let mut on_disk: Vec<String> = std::fs::read_dir(&dir)
            .expect("parts folder")
            .filter_map(|e| e.ok())
            .map(|e| e.file_name().to_string_lossy().into_owned())
            .filter(|n| n.ends_with(".json"))
            .collect();
        on_disk.sort();
        let mut embedded: Vec<String> = builtin_sources().map(String::from).collect();
        embedded.sort();
        assert_eq!(on_disk, embedded);
    }

    #[test]
    fn shipped_library_has_demo_and_generic_parts() {
        let lib = Library::builtin().expect("shipped parts are valid");
        assert!(lib.len() >= 8);
        for id in ["demo-npn-40v", "demo-npn-1a", "2N3904", "TIP120"] {
            assert!(lib.get(id).is_some(), "{id} missing");
        }
        for part in lib.iter() {
            assert!(!part.provenance.is_empty());
        }
    }

    fn scratch(name: &str) -> PathBuf {
        let dir = std::env::temp_dir().join(format!("pinlow-lib-{}-{name}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        std::fs::create_dir_all(&dir).expect("temp dir");
        dir
    }

    #[cfg(unix)]
    #[test]
    fn dangling_and_looping_links_in_a_folder_are_errors() {
        let dir = scratch("links");
        let good = Path::new(env!("CARGO_MANIFEST_DIR")).join("parts/2n3904.json");
        std::fs::copy(&good, dir.join("a.json")).expect("copy");
        std::os::unix::fs::symlink(dir.join("missing.json"), dir.join("b.json")).expect("link");
        let err = Library::load(std::slice::from_ref(&dir))
            .expect_err("dangling")
            .to_string();
        assert!(
            err.contains("b.json") && err.contains("leads nowhere"),
            "{err}"
        );
        std::fs::remove_file(dir.join("b.json")).expect("unlink");
        std::os::unix::fs::symlink(dir.join("c.json"), dir.join("c.json")).expect("loop");
        let err = Library::load(std::slice::from_ref(&dir))
            .expect_err("looping")
            .to_string();
        assert!(
            err.contains("c.json") && err.contains("leads nowhere"),
            "{err}"
        );
        std::fs::remove_file(dir.join("c.json")).expect("unlink");
        assert!(Library::load(std::slice::from_ref(&dir)).is_ok());
        std::fs::remove_dir_all(&dir).ok();
    }

    #[test]
    fn errors_of_the_variable_name_its_entry() {
        let sources = PartsPath::from_env(std::ffi::OsStr::new("::/no/such/parts"));
        assert_eq!(sources.len(), 1);
        let err = Library::load_from(&sources)
            .expect_err("missing")
            .to_string();
        assert!(
            err.starts_with("PINLOW_PARTS entry 3 (/no/such/parts): /no/such/parts: cannot read"),
            "{err}"
        );
    }

    #[test]
    fn check_names_an_id_defined_by_two_files() {
        let dir = scratch("dup");
        let good = Path::new(env!("CARGO_MANIFEST_DIR")).join("parts/2n3904.json");
        std::fs::copy(&good, dir.join("one.json")).expect("copy");
        std::fs::copy(&good, dir.join("two.json")).expect("copy");
        let (ok, errors) = check_paths(&[dir.join("one.json"), dir.join("two.json")]);
        assert_eq!(ok.len(), 2);
        let text: Vec<String> = errors.iter().map(ToString::to_string).collect();
        assert_eq!(text.len(), 1, "{text:?}");
        assert!(
            text.first()
                .is_some_and(|t| t.contains("`2N3904` is defined twice")
                    && t.contains("one.json")
                    && t.contains("two.json")),
            "{text:?}"
        );
        std::fs::remove_dir_all(&dir).ok();
    }

    #[test]
    fn unknown_part_lists_known_ids() {
        let lib = Library::builtin().expect("shipped parts are valid");
        let err = lib.require("nope", "--part").expect_err("unknown");
        let text = err.to_string();
        assert!(text.contains("unknown part `nope`"), "{text}");
        assert!(text.contains("demo-npn-40v"), "{text}");
    }
}
