//! The on-disk form of a part file (files.md): plain numbers in base SI units, unknown keys refused.

use serde::{Deserialize, Serialize};

/// One part file as written on disk.
#[derive(Clone, Debug, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct PartRecord {
    /// Unique id used by boards and flags (`demo-npn-40v`).
    pub id: String,
    /// One line for people.
    #[serde(default)]
    pub description: String,
    /// Only `npn` is modelled in version 1.
    pub polarity: String,
    /// Package name (`TO-92`).
    pub package: String,
    /// Where the numbers come from. Required.
    pub provenance: String,
    /// Collector-emitter breakdown with the base open.
    pub vceo_max_v: f64,
    /// Rated continuous collector current.
    pub ic_max_a: f64,
    /// Minimum DC gain at several collector currents, sorted by current.
    pub gain_min: Vec<GainRecord>,
    /// Maximum DC gain at several collector currents (optional; used by the yield draw).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub gain_max: Option<Vec<GainRecord>>,
    /// Gummel-Poon XTB: gain grows as (T/298.15 K)^XTB. Optional, default 1.5.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub gain_temp_exponent: Option<f64>,
    /// Maximum VCE(sat) at (IC, IB) points, sorted by current.
    pub vce_sat_max: Vec<VceSatRecord>,
    /// VBE(sat) minimum and maximum at (IC, IB) points, sorted by current.
    pub vbe_sat: Vec<VbeSatRecord>,
    /// Collector cut-off current at 25 C. Optional, default 50 nA.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub icbo_max_a: Option<f64>,
    /// Storage time (optional; not used by the version 1 model).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub storage_time_s: Option<f64>,
    /// Maximum junction temperature.
    pub tj_max_c: f64,
    /// Junction-to-ambient thermal resistance (JEDEC JESD51).
    pub r_th_ja_k_per_w: f64,
}

/// A gain point.
#[derive(Clone, Debug, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct GainRecord {
    /// Collector current of the point.
    pub ic_a: f64,
    /// Gain at that current.
    pub hfe: f64,
}

/// A VCE(sat) point.
#[derive(Clone, Debug, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct VceSatRecord {
    /// Collector current.
    pub ic_a: f64,
    /// Base current of the test condition.
    pub ib_a: f64,
    /// Maximum VCE(sat).
    pub v: f64,
}

/// A VBE(sat) point.
#[derive(Clone, Debug, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct VbeSatRecord {
    /// Collector current.
    pub ic_a: f64,
    /// Base current of the test condition.
    pub ib_a: f64,
    /// Minimum VBE(sat).
    pub min_v: f64,
    /// Maximum VBE(sat).
    pub max_v: f64,
}
