//! The parts library: part files (one JSON file a part, files.md), read by the drive kind their
//! `polarity` names, and the library that merges the shipped parts with the user's folders.

mod library;
pub mod points;

pub use library::{
    builtin_sources, check_file, check_paths, edit_distance, folder_files, read_part, Library,
    PartSource, PartsPath,
};

use crate::error::{Error, Place, Result};
use crate::quantity::limits::{show_number, Span};
use crate::quantity::{Temperature, ThermalResistance};

/// What every part has, whatever its drive kind.
#[derive(Clone, Debug, PartialEq)]
pub struct PartInfo {
    /// Unique id used by boards and flags (`demo-npn-40v`).
    pub id: String,
    /// One line for people.
    pub description: String,
    /// The drive kind (`npn`, `nmos`).
    pub polarity: &'static str,
    /// Package (`TO-92`).
    pub package: String,
    /// Where the figures come from.
    pub provenance: String,
    /// Maximum junction temperature.
    pub tj_max: Temperature,
    /// Junction-to-ambient thermal resistance (JEDEC JESD51).
    pub r_th_ja: ThermalResistance,
    /// Where the part was loaded from.
    pub source: PartSource,
}

/// A part's junction limit must lie above the first and below the second, °C [practice: no
/// silicon part is rated at or below room temperature, nor anywhere near 400 °C].
pub const TJ_MAX_RANGE_C: (f64, f64) = (25.0, 400.0);

/// Checks shared by the part readers of every drive kind: each error names the file and the
/// JSON path of the figure.
#[derive(Clone, Copy, Debug)]
pub struct PartCheck<'a> {
    /// The file, as named in messages.
    pub file: &'a str,
}

impl PartCheck<'_> {
    /// The place of `path` in the file.
    pub fn at(&self, path: &str) -> Place {
        Place::json(self.file, path)
    }

    /// A figure that must be positive, finite and inside `span`.
    pub fn within(&self, path: &str, v: f64, span: Span) -> Result<f64> {
        match span.reason(v) {
            None => Ok(v),
            Some(reason) => Err(Error::range(self.at(path), show_number(v), reason)),
        }
    }

    /// Text that must not be empty and must hold no control characters (they would reach a
    /// terminal or a report raw).
    pub fn text(&self, path: &str, v: &str) -> Result<()> {
        if v.trim().is_empty() {
            return Err(Error::invalid(self.at(path), "must not be empty"));
        }
        self.no_controls(path, v)
    }

    /// Text that holds no control characters.
    pub fn no_controls(&self, path: &str, v: &str) -> Result<()> {
        match v.chars().find(|c| is_control(*c)) {
            Some(c) => Err(Error::invalid(
                self.at(path),
                format!(
                    "holds the control character U+{:04X}; names and texts may hold printable characters only",
                    u32::from(c)
                ),
            )),
            None => Ok(()),
        }
    }

    /// A junction limit above 25 C and below 400 C ([`TJ_MAX_RANGE_C`]).
    pub fn tj_max(&self, v: f64) -> Result<f64> {
        let (lo, hi) = TJ_MAX_RANGE_C;
        if v.is_finite() && v > lo && v < hi {
            Ok(v)
        } else {
            Err(Error::range(
                self.at("tj_max_c"),
                show_number(v),
                "a junction limit above 25 °C and below 400 °C is needed",
            ))
        }
    }

    /// Values that must rise strictly along a list (`name[i].key`).
    pub fn sorted(&self, name: &str, key: &str, values: impl Iterator<Item = f64>) -> Result<()> {
        let mut prev: Option<f64> = None;
        for (i, v) in values.enumerate() {
            if let Some(p) = prev {
                if v <= p {
                    return Err(Error::invalid(
                        self.at(&format!("{name}[{i}].{key}")),
                        format!(
                            "points must be sorted by increasing {}: {} {unit} follows {} {unit}",
                            if key.ends_with("_v") {
                                "voltage"
                            } else {
                                "current"
                            },
                            show_number(v),
                            show_number(p),
                            unit = if key.ends_with("_v") { "V" } else { "A" }
                        ),
                    ));
                }
            }
            prev = Some(v);
        }
        Ok(())
    }
}

/// A control character: C0, DEL, C1, and the Unicode bidirectional controls that reorder text on
/// screen.
pub fn is_control(c: char) -> bool {
    c.is_control() || matches!(c, '\u{202a}'..='\u{202e}' | '\u{2066}'..='\u{2069}')
}
