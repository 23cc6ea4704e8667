//! The library of parts: the shipped files (embedded at build time) overlaid by the user's files
//! and folders (`--parts`, `PINLOW_PARTS`), later sources overriding earlier ones by id. Ids match
//! without regard to case.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use serde_json::Value;

use crate::drive::{self, SharedSwitch};
use crate::error::{parse_value_text, Error, Place, Result};
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
    ("2n7000.json", include_str!("../../parts/2n7000.json")),
    ("2n7002.json", include_str!("../../parts/2n7002.json")),
    ("bss138.json", include_str!("../../parts/bss138.json")),
    ("bss123.json", include_str!("../../parts/bss123.json")),
    (
        "demo-nmos-20v.json",
        include_str!("../../parts/demo-nmos-20v.json"),
    ),
    (
        "demo-nmos-40v.json",
        include_str!("../../parts/demo-nmos-40v.json"),
    ),
];

/// The names of the shipped part files (for a test that none is forgotten).
pub fn builtin_sources() -> impl Iterator<Item = &'static str> {
    BUILTIN.iter().map(|(name, _)| *name)
}

/// Read one part file's text (`file` names it in errors): its `polarity` picks the drive kind
/// that reads the rest.
pub fn read_part(file: &str, text: &str, source: PartSource) -> Result<SharedSwitch> {
    let value = parse_value_text(file, text)?;
    let text = crate::error::strip_bom(text);
    parse_part_value(file, &value, source).map_err(|e| e.with_position(file, text))
}

fn parse_part_value(file: &str, value: &Value, source: PartSource) -> Result<SharedSwitch> {
    let Value::Object(map) = value else {
        return Err(Error::Json {
            place: Place::json(file, ""),
            message: format!(
                "a part file holds one object of part figures, not {}",
                crate::fields::json_type(value)
            ),
        });
    };
    let polarity = match map.get("polarity") {
        Some(Value::String(p)) => p.as_str(),
        Some(other) => {
            return Err(Error::Json {
                place: Place::json(file, "polarity"),
                message: format!(
                    "polarity takes a string naming the drive kind ({}); got {}",
                    drive::kind_names(),
                    crate::fields::json_type(other)
                ),
            })
        }
        None => {
            return Err(Error::invalid(
                Place::json(file, ""),
                format!(
                    "missing `polarity` (the drive kind: {})",
                    drive::kind_names()
                ),
            ))
        }
    };
    let Some(kind) = drive::kind(polarity) else {
        return Err(Error::invalid(
            Place::json(file, "polarity"),
            format!(
                "`{polarity}` is not modelled: the drive kinds are {}",
                drive::kind_names()
            ),
        ));
    };
    for key in map.keys() {
        if let Some(other) = drive::KINDS.iter().find(|k| {
            k.name != kind.name
                && k.part_keys.contains(&key.as_str())
                && !kind.part_keys.contains(&key.as_str())
        }) {
            return Err(Error::Json {
                place: Place::json(file, key.clone()),
                message: format!(
                    "`{key}` belongs to {} parts; a {} part gives {}",
                    other.name,
                    kind.name,
                    kind.part_keys.join(", ")
                ),
            });
        }
    }
    crate::shape::no_nulls(value, file, "", &[])?;
    (kind.parse_part)(value, file, source)
}

/// Parts by id (matched without regard to case).
#[derive(Clone, Debug, Default)]
pub struct Library {
    parts: BTreeMap<String, SharedSwitch>,
}

impl Library {
    /// The shipped parts only. They are read once a process (the version line and the command
    /// both want them); later calls share the parts read.
    pub fn builtin() -> Result<Library> {
        static SHIPPED: std::sync::OnceLock<Option<Library>> = std::sync::OnceLock::new();
        match SHIPPED.get_or_init(|| Self::read_builtin().ok()) {
            Some(lib) => Ok(lib.clone()),
            // Read again for the error itself (the shipped files are tested to read).
            None => Self::read_builtin(),
        }
    }

    fn read_builtin() -> Result<Library> {
        let mut lib = Library::default();
        let mut seen: BTreeMap<String, String> = BTreeMap::new();
        for (name, text) in BUILTIN {
            let label = format!("parts/{name}");
            let part = read_part(&label, text, PartSource::Builtin(name))?;
            let id = part.info().id.clone();
            if let Some(first) = seen.insert(id.to_lowercase(), label.clone()) {
                return Err(Error::DuplicatePart {
                    id,
                    first,
                    second: label,
                });
            }
            lib.insert(part);
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
                lib.insert(part);
            }
        }
        Ok(lib)
    }

    /// Add or replace a part (by id, any case).
    pub fn insert(&mut self, part: SharedSwitch) {
        self.parts.insert(part.info().id.to_lowercase(), part);
    }

    /// The part with this id (any case).
    pub fn get(&self, id: &str) -> Option<&SharedSwitch> {
        self.parts.get(&id.to_lowercase())
    }

    /// The part with this id, or an error at `place` that names the nearest ids.
    pub fn require(&self, id: &str, place: impl Into<Place>) -> Result<&SharedSwitch> {
        self.get(id).ok_or_else(|| Error::UnknownPart {
            place: place.into(),
            id: id.to_string(),
            hint: self.hint(id),
        })
    }

    /// "did you mean ...", or every known id.
    fn hint(&self, id: &str) -> String {
        let wanted = id.to_lowercase();
        let mut near: Vec<(usize, &str)> = self
            .parts
            .iter()
            .map(|(key, p)| (edit_distance(&wanted, key), p.info().id.as_str()))
            .filter(|(d, _)| *d <= 3.max(wanted.chars().count() / 3))
            .collect();
        near.sort();
        if near.is_empty() {
            let all: Vec<&str> = self.iter().map(|p| p.info().id.as_str()).collect();
            format!("known parts: {}", all.join(", "))
        } else {
            let names: Vec<&str> = near.iter().take(5).map(|(_, n)| *n).collect();
            format!(
                "did you mean {}? (`pinlow parts list` shows every part)",
                names.join(", ")
            )
        }
    }

    /// Every part, by id.
    pub fn iter(&self) -> impl Iterator<Item = &SharedSwitch> {
        self.parts.values()
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

/// Levenshtein distance of two short strings, by characters.
pub fn edit_distance(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut row: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.chars().enumerate() {
        let mut prev = row.first().copied().unwrap_or(0);
        if let Some(first) = row.first_mut() {
            *first = i + 1;
        }
        for (j, cb) in b.iter().enumerate() {
            let above = row.get(j + 1).copied().unwrap_or(usize::MAX);
            let left = row.get(j).copied().unwrap_or(usize::MAX);
            let diagonal = prev + usize::from(ca != *cb);
            prev = above;
            if let Some(cell) = row.get_mut(j + 1) {
                *cell = diagonal.min(above + 1).min(left + 1);
            }
        }
    }
    row.last().copied().unwrap_or(0)
}

/// Load every part of a folder (sorted by file name) or one file.
fn load_path(path: &Path) -> Result<Vec<SharedSwitch>> {
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
        let id = part.info().id.clone();
        if let Some(first) = seen.insert(id.to_lowercase(), file.clone()) {
            return Err(Error::DuplicatePart {
                id,
                first: first.display().to_string(),
                second: file.display().to_string(),
            });
        }
        parts.push(part);
    }
    Ok(parts)
}

/// Read and validate one part file.
pub fn check_file(path: &Path) -> Result<SharedSwitch> {
    let text = read_text(path, PART_FILE_LIMIT)?;
    let label = path.display().to_string();
    read_part(&label, &text, PartSource::File(path.to_path_buf()))
}

/// Check part files and folders as `pinlow parts check` does: every file on its own, then ids
/// across all of them (any case). Returns each good file with its part, and every problem (a bad
/// file, a bad folder entry, an id defined by two files).
pub fn check_paths(paths: &[PathBuf]) -> (Vec<(PathBuf, SharedSwitch)>, Vec<Error>) {
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
                    let id = part.info().id.clone();
                    match seen.get(&id.to_lowercase()) {
                        Some(first) => errors.push(Error::DuplicatePart {
                            id,
                            first: first.display().to_string(),
                            second: file.display().to_string(),
                        }),
                        None => {
                            seen.insert(id.to_lowercase(), file.clone());
                        }
                    }
                    good.push((file, part));
                }
                Err(e) => errors.push(e),
            }
        }
    }
    (good, errors)
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
            assert!(!part.info().provenance.is_empty());
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
    fn ids_match_in_any_case_and_unknown_ones_get_the_nearest() {
        let lib = Library::builtin().expect("shipped parts are valid");
        assert!(lib.get("2n3904").is_some() && lib.get("tip120").is_some());
        let err = lib
            .require("2N3094", "--part")
            .expect_err("unknown")
            .to_string();
        assert!(
            err.contains("unknown part `2N3094`; did you mean 2N3904"),
            "{err}"
        );
        let err = lib
            .require("zzzzzzzzzzzz", "--part")
            .expect_err("unknown")
            .to_string();
        assert!(
            err.contains("known parts:") && err.contains("demo-npn-40v"),
            "{err}"
        );
        assert_eq!(edit_distance("kitten", "sitting"), 3);
    }
}
