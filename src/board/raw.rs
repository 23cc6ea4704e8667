//! The on-disk form of a board's stage (files.md): every field optional (it may stand in
//! `defaults`), unknown keys refused. The `load` and `clamp` objects stay raw JSON objects here:
//! their kind decides which keys they take (`load::KINDS`, `load::Clamp`).

use schemars::JsonSchema;
use serde::{Deserialize, Deserializer, Serialize};
use serde_json::{Map, Value};

use super::resolve::{AMBIENT_RANGE_C, OVERDRIVE};
use crate::eseries::Series;
use crate::fields::Accepts;
use crate::quantity::limits::{AMPS, OHMS, VOLTS, WATTS};

/// Temperature grades and their ambient ranges [practice].
#[derive(Clone, Copy, Debug, PartialEq, Eq, Deserialize, Serialize, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum Grade {
    /// Ambient 0 to 70 °C.
    Commercial,
    /// Ambient -40 to 85 °C.
    Industrial,
    /// Ambient -40 to 125 °C.
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

/// The keys a stage cannot do without, from itself or from `defaults` (`name` besides, from the
/// stage itself only).
pub const NEEDED_KEYS: &[&str] = &["part", "supply_v", "logic_high_v", "load"];

/// One stage (or the defaults) as written. Its JSON Schema (`pinlow schema board`) is derived
/// from it: the doc comments below are the descriptions an editor shows.
#[derive(Clone, Debug, Default, Deserialize, Serialize, PartialEq, JsonSchema)]
#[serde(deny_unknown_fields)]
#[schemars(
    description = "One stage: a logic pin driving a switch that pins a load to ground. Every field but `name` may stand in `defaults` instead; the stage's own value wins.",
    transform = crate::schema::exclusive(&["ambient_c", "grade"])
)]
pub struct RawStage {
    /// The stage's name in the report (a stage's own; not allowed in `defaults`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(length(min = 1))]
    pub name: Option<String>,
    /// Part id from the parts library (`pinlow parts list`), matched without regard to case.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(length(min = 1))]
    pub part: Option<String>,
    /// Nominal supply of the load, V.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(transform = crate::schema::accepts(Accepts::Span(VOLTS)))]
    pub supply_v: Option<f64>,
    /// Supply tolerance, ± fraction [default: 0.05].
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(transform = crate::schema::accepts(Accepts::Fraction))]
    pub supply_tolerance: Option<f64>,
    /// The pin's nominal logic high (its supply), V.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(transform = crate::schema::accepts(Accepts::Span(VOLTS)))]
    pub logic_high_v: Option<f64>,
    /// Guaranteed logic high at the pin's rated current, V, at most `logic_high_v` [default: logic high - 0.4 V].
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(transform = crate::schema::accepts(Accepts::Span(VOLTS)))]
    pub logic_high_min_v: Option<f64>,
    /// Most current the pin may source, A [default: 0.004].
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(transform = crate::schema::accepts(Accepts::Span(AMPS)))]
    pub pin_limit_a: Option<f64>,
    /// Ambient range [minimum, maximum], °C (instead of `grade`) [default: 0 to 70].
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(transform = crate::schema::items_between(*AMBIENT_RANGE_C.start(), *AMBIENT_RANGE_C.end()))]
    pub ambient_c: Option<[f64; 2]>,
    /// Temperature grade (instead of `ambient_c`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub grade: Option<Grade>,
    /// The load object; its `kind` picks the load kind and the keys it takes.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(schema_with = "crate::schema::load_object")]
    pub load: Option<Map<String, Value>>,
    /// The turn-off clamp across an inductive load; its `kind` picks the keys it takes.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(schema_with = "crate::schema::clamp_object")]
    pub clamp: Option<Map<String, Value>>,
    /// Given base resistor of an npn stage, ohms; absent: size it.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(transform = crate::schema::accepts(Accepts::Span(OHMS)))]
    pub base_resistor_ohms: Option<f64>,
    /// Given gate resistor of an nmos stage, ohms; absent: size it.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(transform = crate::schema::accepts(Accepts::Span(OHMS)))]
    pub gate_resistor_ohms: Option<f64>,
    /// Pull-down: absent (`None`), `null` (`Some(None)`) or a value.
    #[serde(
        default,
        deserialize_with = "present",
        skip_serializing_if = "Option::is_none"
    )]
    #[schemars(
        description = "Pull-down from the base (or gate) to ground, ohms; null: none. Absent: none with a given base or gate resistor, sized when sizing.",
        transform = crate::schema::accepts(Accepts::Span(OHMS))
    )]
    pub pull_down_ohms: Option<Option<f64>>,
    /// Resistor tolerance, ± fraction [default: 0.05].
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(transform = crate::schema::accepts(Accepts::Fraction))]
    pub resistor_tolerance: Option<f64>,
    /// Power rating of the fitted resistors, W.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(transform = crate::schema::accepts(Accepts::Span(WATTS)))]
    pub resistor_rating_w: Option<f64>,
    /// Preferred-value series for sized values [default: E24].
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub series: Option<Series>,
    /// Wanted worst-case overdrive over the minimum gain, npn stages only [default: 2].
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(transform = crate::schema::accepts(Accepts::Span(OVERDRIVE)))]
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
