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
        let mut lib = Library::builtin()?;
        for path in paths {
            for part in load_path(path)? {
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

/// Load every part of a folder (sorted by file name) or one file.
fn load_path(path: &Path) -> Result<Vec<Part>> {
    let meta = std::fs::metadata(path).map_err(|source| Error::Io {
        path: path.to_path_buf(),
        source,
    })?;
    if !meta.is_dir() {
        return Ok(vec![check_file(path)?]);
    }
    let entries = std::fs::read_dir(path).map_err(|source| Error::Io {
        path: path.to_path_buf(),
        source,
    })?;
    let mut files: Vec<PathBuf> = Vec::new();
    for entry in entries {
        let entry = entry.map_err(|source| Error::Io {
            path: path.to_path_buf(),
            source,
        })?;
        let p = entry.path();
        if p.extension().is_some_and(|e| e == "json") && p.is_file() {
            files.push(p);
        }
    }
    files.sort();
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

    #[test]
    fn unknown_part_lists_known_ids() {
        let lib = Library::builtin().expect("shipped parts are valid");
        let err = lib.require("nope", "--part").expect_err("unknown");
        let text = err.to_string();
        assert!(text.contains("unknown part `nope`"), "{text}");
        assert!(text.contains("demo-npn-40v"), "{text}");
    }
}
