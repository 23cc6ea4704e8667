//! What a remedy proposes, as data: board-field edits and the figures a replacement part would
//! need. The drive kinds, load kinds and drive-neutral checks each propose remedies for their own
//! checks; `analysis::compose` merges them into one change of the stage and re-runs the engine
//! on it.

use serde::Serialize;
use serde_json::Value;

use crate::check::{CheckId, Why};

/// A board field: a stage key (`base_resistor_ohms`) or a key inside the load (`load.resistor_ohms`).
pub type FieldPath = &'static str;

/// A change of one board field.
#[derive(Clone, Debug, PartialEq)]
pub enum Edit {
    /// Leave the field out so that the engine sizes it; the composed remedy then writes the
    /// value the engine sized.
    Size(FieldPath),
    /// Set the field to this JSON value (`null` only where the file format gives it a meaning).
    Set(FieldPath, Value),
}

impl Edit {
    /// The field the edit changes.
    pub fn field(&self) -> FieldPath {
        match self {
            Edit::Size(f) | Edit::Set(f, _) => f,
        }
    }
}

/// Which way a figure of a replacement part must go.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Bound {
    /// The part's figure must be at least the value.
    AtLeast,
    /// The part's figure must be at most the value.
    AtMost,
}

/// One figure a replacement part needs (`minimum gain >= 247 at 41.5 mA, 25 °C`).
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct PartNeed {
    /// The figure as keyed in part files (`gain_min.hfe`, `vceo_max_v`), or in the load object
    /// for a figure of the load (`relay.rated_v`).
    pub figure: &'static str,
    /// Which way.
    pub bound: Bound,
    /// The value, in the base SI unit of `unit`.
    pub value: f64,
    /// Unit of the value (`V`, `A`, `Ω`, `K/W`, or empty for a ratio).
    pub unit: &'static str,
    /// The condition it is read at: a current in amperes (`ic_a`, `id_a`) or a voltage in volts
    /// (`vgs_v`), when it has one.
    pub at: Option<(&'static str, f64)>,
}

/// A figure of a replacement part in words.
pub fn figure_label(key: &str) -> &'static str {
    match key {
        "gain_min.hfe" => "minimum gain (25 °C)",
        "vbe_sat.max_v" => "VBE(sat) maximum (25 °C)",
        "ic_max_a" => "rated collector current",
        "vceo_max_v" => "VCEO",
        "id_max_a" => "rated drain current",
        "vds_max_v" => "VDS max",
        "vgs_max_v" => "VGS max",
        "vgs_th.max_v" => "VGS(th) maximum (25 °C)",
        "rds_on_max.vgs_v" => "RDS(on) specified at a gate voltage of",
        "rds_on_max.id_a" => "RDS(on) test current",
        "r_th_ja_k_per_w" => "RthJA",
        "tj_max_c" => "Tj max",
        "relay.rated_v" => "a relay coil rated",
        "relay.must_operate_v" => "a relay whose must-operate voltage at 20 °C is",
        "strip.rated_v" => "a strip rated",
        _ => "figure",
    }
}

/// A remedy one check proposes.
#[derive(Clone, Debug)]
pub struct Proposal {
    /// The check it answers.
    pub check: CheckId,
    /// Board-field edits (empty when only another part or circuit helps).
    pub edits: Vec<Edit>,
    /// Figures a replacement part needs, when the remedy is another part.
    pub needs: Vec<PartNeed>,
    /// What to do, in words when rendered.
    pub why: Why,
}

impl Proposal {
    /// A remedy that changes board fields.
    pub fn edit(check: CheckId, edits: Vec<Edit>, why: Why) -> Proposal {
        Proposal {
            check,
            edits,
            needs: Vec::new(),
            why,
        }
    }

    /// A remedy that needs another part (or circuit): nothing a board field can take.
    pub fn part(check: CheckId, needs: Vec<PartNeed>, why: Why) -> Proposal {
        Proposal {
            check,
            edits: Vec::new(),
            needs,
            why,
        }
    }
}

/// A JSON number for a board field: whole numbers without a fraction (`1000`, not `1000.0`).
pub fn number(v: f64) -> Value {
    if v.fract() == 0.0 && v.abs() < 1e15 {
        Value::from(v as i64)
    } else {
        serde_json::Number::from_f64(v)
            .map(Value::Number)
            .unwrap_or(Value::Null)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn whole_numbers_are_written_without_a_fraction() {
        assert_eq!(number(1000.0).to_string(), "1000");
        assert_eq!(number(0.25).to_string(), "0.25");
        assert_eq!(
            Edit::Size("base_resistor_ohms").field(),
            "base_resistor_ohms"
        );
    }
}
