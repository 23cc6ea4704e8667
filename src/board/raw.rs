//! The on-disk form of a board file (files.md): every stage field optional (it may stand in
//! `defaults`), unknown keys refused.

use serde::{Deserialize, Deserializer, Serialize};

use crate::eseries::Series;

/// A board file.
#[derive(Clone, Debug, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct RawBoard {
    /// The board's name.
    #[serde(default)]
    pub board: Option<String>,
    /// Fields every stage takes unless it gives its own.
    #[serde(default)]
    pub defaults: RawStage,
    /// The stages.
    pub stages: Vec<RawStage>,
}

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

/// One stage (or the defaults) as written.
#[derive(Clone, Debug, Default, Deserialize, Serialize)]
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
    /// The load.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub load: Option<RawLoad>,
    /// The clamp across an inductive load.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub clamp: Option<RawClamp>,
    /// Given base resistor, ohms; absent: size it.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub base_resistor_ohms: Option<f64>,
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
    /// Wanted overdrive.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub overdrive: Option<f64>,
}

/// Tell a key given as `null` (`Some(None)`) from a missing key (`None`, via `default`).
fn present<'de, D: Deserializer<'de>>(d: D) -> Result<Option<Option<f64>>, D::Error> {
    Option::<f64>::deserialize(d).map(Some)
}

/// A load as written.
#[derive(Clone, Debug, Deserialize, Serialize, PartialEq)]
#[serde(tag = "kind", rename_all = "lowercase", deny_unknown_fields)]
pub enum RawLoad {
    /// A fixed current.
    Current {
        /// The most the load draws, A.
        current_a: f64,
    },
    /// A relay coil.
    Relay {
        /// Coil resistance at 20 C, ohms.
        coil_ohms: f64,
        /// +/- fraction.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        coil_tolerance: Option<f64>,
        /// Rated coil voltage, V.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        rated_v: Option<f64>,
        /// Must-operate fraction of the rated voltage.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        must_operate_fraction: Option<f64>,
        /// Inductance, H.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        inductance_h: Option<f64>,
    },
    /// LEDs in series.
    Led {
        /// Number of LEDs.
        count: u32,
        /// Nominal forward voltage of one LED, V.
        forward_v: f64,
        /// Lowest forward voltage, V.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        forward_min_v: Option<f64>,
        /// Highest forward voltage, V.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        forward_max_v: Option<f64>,
        /// Target current, A.
        current_a: f64,
        /// Absolute maximum current, A.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        max_current_a: Option<f64>,
        /// Series resistor, ohms (absent: size it).
        #[serde(default, skip_serializing_if = "Option::is_none")]
        resistor_ohms: Option<f64>,
    },
    /// A constant-voltage LED strip segment.
    Strip {
        /// Rated strip voltage, V.
        rated_v: f64,
        /// Current per metre at the rated voltage, A.
        current_per_m_a: f64,
        /// Segment length, m.
        length_m: f64,
    },
}

/// A clamp as written.
#[derive(Clone, Debug, Deserialize, Serialize, PartialEq)]
#[serde(tag = "kind", rename_all = "lowercase", deny_unknown_fields)]
pub enum RawClamp {
    /// No clamp.
    None,
    /// A diode across the coil.
    Diode {
        /// Forward drop, V.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        forward_v: Option<f64>,
        /// Reverse rating, V.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        reverse_v: Option<f64>,
        /// Current rating, A.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        current_a: Option<f64>,
    },
    /// Diode plus Zener.
    Zener {
        /// Zener voltage, V.
        zener_v: f64,
        /// Forward drop of the diode, V.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        forward_v: Option<f64>,
        /// Reverse rating, V.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        reverse_v: Option<f64>,
        /// Current rating, A.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        current_a: Option<f64>,
    },
}
