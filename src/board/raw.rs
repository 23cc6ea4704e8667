//! The on-disk form of a board's stage (files.md): every field optional (it may stand in
//! `defaults`), unknown keys refused. The `load` and `clamp` objects stay raw JSON objects here:
//! their kind decides which keys they take (`load::KINDS`, `load::Clamp`).

use serde::{Deserialize, Deserializer, Serialize};
use serde_json::{Map, Value};

use crate::eseries::Series;

/// Temperature grades and their ambient ranges [practice].
#[derive(Clone, Copy, Debug, PartialEq, Eq, Deserialize, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Grade {
    /// 0 .. 70 C.
    Commercial,
    /// -40 .. 85 C.
    Industrial,
    /// -40 .. 125 C.
    Automotive,
}

impl Grade {
    /// The ambient range of the grade, C [practice].
    pub fn range_c(self) -> (f64, f64) {
        match self {
            Grade::Commercial => (0.0, 70.0),
            Grade::Industrial => (-40.0, 85.0),
            Grade::Automotive => (-40.0, 125.0),
        }
    }

    /// `commercial`, `industrial` or `automotive`.
    pub fn name(self) -> &'static str {
        match self {
            Grade::Commercial => "commercial",
            Grade::Industrial => "industrial",
            Grade::Automotive => "automotive",
        }
    }
}

/// The stage keys of files.md, in the order a stage is written.
pub const STAGE_KEYS: &[&str] = &[
    "name",
    "part",
    "supply_v",
    "supply_tolerance",
    "logic_high_v",
    "logic_high_min_v",
    "pin_limit_a",
    "ambient_c",
    "grade",
    "load",
    "clamp",
    "base_resistor_ohms",
    "gate_resistor_ohms",
    "pull_down_ohms",
    "resistor_tolerance",
    "resistor_rating_w",
    "series",
    "overdrive",
];

/// One stage (or the defaults) as written.
#[derive(Clone, Debug, Default, Deserialize, Serialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct RawStage {
    /// The stage's name (not allowed in defaults).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub name: Option<String>,
    /// Part id.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub part: Option<String>,
    /// Nominal supply, V.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub supply_v: Option<f64>,
    /// Supply +/- fraction.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub supply_tolerance: Option<f64>,
    /// Nominal logic high, V.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub logic_high_v: Option<f64>,
    /// Guaranteed logic high, V.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub logic_high_min_v: Option<f64>,
    /// Pin source limit, A.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub pin_limit_a: Option<f64>,
    /// Ambient range [min, max], C.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub ambient_c: Option<[f64; 2]>,
    /// Temperature grade (instead of `ambient_c`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub grade: Option<Grade>,
    /// The load object (its `kind` picks the load kind).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub load: Option<Map<String, Value>>,
    /// The clamp object.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub clamp: Option<Map<String, Value>>,
    /// Given base resistor of an npn stage, ohms; absent: size it.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub base_resistor_ohms: Option<f64>,
    /// Given gate resistor of an nmos stage, ohms; absent: size it.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub gate_resistor_ohms: Option<f64>,
    /// Pull-down: absent (`None`), `null` (`Some(None)`) or a value.
    #[serde(
        default,
        deserialize_with = "present",
        skip_serializing_if = "Option::is_none"
    )]
    pub pull_down_ohms: Option<Option<f64>>,
    /// Resistor +/- fraction.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub resistor_tolerance: Option<f64>,
    /// Power rating of fitted resistors, W.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub resistor_rating_w: Option<f64>,
    /// Preferred-value series for sizing.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub series: Option<Series>,
    /// Wanted overdrive (npn stages).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub overdrive: Option<f64>,
}

impl RawStage {
    /// The series resistor under `key` (`base_resistor_ohms` or `gate_resistor_ohms`).
    pub fn series_resistor(&self, key: &str) -> Option<f64> {
        match key {
            "base_resistor_ohms" => self.base_resistor_ohms,
            "gate_resistor_ohms" => self.gate_resistor_ohms,
            _ => None,
        }
    }
}

/// Tell a key given as `null` (`Some(None)`) from a missing key (`None`, via `default`).
fn present<'de, D: Deserializer<'de>>(d: D) -> Result<Option<Option<f64>>, D::Error> {
    Option::<f64>::deserialize(d).map(Some)
}
