//! What a check reports: its id, status, figure, limit and why. Shared by the drive kinds, the
//! load kinds and the engine; it depends on nothing else in the crate.
//!
//! The engine never writes prose: a finding carries its reason as a typed value ([`Why`]) whose
//! words are produced only when a report is rendered ([`Explain::sentence`]).

use std::fmt;
use std::sync::Arc;

use serde::Serialize;

/// The verdict of a check, a stage or a board. Ordered: pass < marginal < fail.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Status {
    /// Meets the margin.
    Pass,
    /// Works, but without the margin.
    Marginal,
    /// Does not work, or breaks a rating.
    Fail,
}

impl Status {
    /// `pass`, `marginal` or `fail`.
    pub fn as_str(self) -> &'static str {
        match self {
            Status::Pass => "pass",
            Status::Marginal => "marginal",
            Status::Fail => "fail",
        }
    }

    /// The status of a figure that passes at or below `pass`, is marginal at or below `limit`
    /// and fails above it.
    pub fn at_most(value: f64, pass: f64, limit: f64) -> Status {
        if value <= pass {
            Status::Pass
        } else if value <= limit {
            Status::Marginal
        } else {
            Status::Fail
        }
    }

    /// The status of a figure that passes at or above `pass`, is marginal at or above `floor`
    /// and fails below it.
    pub fn at_least(value: f64, pass: f64, floor: f64) -> Status {
        if value >= pass {
            Status::Pass
        } else if value >= floor {
            Status::Marginal
        } else {
            Status::Fail
        }
    }
}

impl fmt::Display for Status {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

/// A check's id as written in reports (`pinned-low`), with its place in the report order. Each
/// drive kind, load kind and the engine define the ids of their own checks as constants.
#[derive(Clone, Copy, Debug, Eq)]
pub struct CheckId {
    /// The id (`pinned-low`).
    pub name: &'static str,
    /// Where the check stands in a stage's list (lower first).
    pub rank: u16,
}

impl CheckId {
    /// A check id.
    pub const fn new(name: &'static str, rank: u16) -> CheckId {
        CheckId { name, rank }
    }

    /// The id as written in reports.
    pub fn as_str(self) -> &'static str {
        self.name
    }
}

impl PartialEq for CheckId {
    fn eq(&self, other: &Self) -> bool {
        self.name == other.name
    }
}

impl std::hash::Hash for CheckId {
    fn hash<H: std::hash::Hasher>(&self, state: &mut H) {
        self.name.hash(state);
    }
}

impl fmt::Display for CheckId {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name)
    }
}

impl Serialize for CheckId {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.serialize_str(self.name)
    }
}

/// The pin can source the input current (drive-neutral, stage-model 5).
pub const PIN_CURRENT: CheckId = CheckId::new("pin-current", 20);
/// The junction stays below its limit (drive-neutral).
pub const JUNCTION_TEMP: CheckId = CheckId::new("junction-temp", 60);
/// The clamp's stated ratings (drive-neutral, inductive loads).
pub const CLAMP_RATING: CheckId = CheckId::new("clamp-rating", 80);
/// Resistors within their power ratings (drive-neutral).
pub const RESISTOR_POWER: CheckId = CheckId::new("resistor-power", 90);

/// A reason that can say itself in one sentence. Implemented by the small reason types of each
/// check, beside the check but apart from its computation.
pub trait Explain: Send + Sync + fmt::Debug {
    /// One sentence: why the check has its status.
    fn sentence(&self) -> String;
}

/// The reason of a finding or a remedy, shared cheaply.
pub type Why = Arc<dyn Explain>;

/// Wrap a reason.
pub fn why(reason: impl Explain + 'static) -> Why {
    Arc::new(reason)
}

/// One check's outcome. Figures are plain numbers in the base SI unit named by `unit` (`A`, `V`,
/// `W`, `°C`, `Ω`, or empty for a ratio).
#[derive(Clone, Debug)]
pub struct Finding {
    /// Which check.
    pub id: CheckId,
    /// Its status.
    pub status: Status,
    /// The figure checked; `None` when there is none (no pull-down, unbounded kick).
    pub value: Option<f64>,
    /// The limit it is held to (the pass threshold).
    pub limit: Option<f64>,
    /// Unit of value and limit.
    pub unit: &'static str,
    /// Why this status.
    pub why: Why,
}

impl Finding {
    /// A finding; non-finite figures become `None`.
    pub fn new(
        id: CheckId,
        status: Status,
        value: Option<f64>,
        limit: Option<f64>,
        unit: &'static str,
        why: Why,
    ) -> Finding {
        Finding {
            id,
            status,
            value: value.filter(|v| v.is_finite()),
            limit: limit.filter(|v| v.is_finite()),
            unit,
            why,
        }
    }

    /// The sentence of the reason.
    pub fn detail(&self) -> String {
        self.why.sentence()
    }
}

/// One worst-case figure of a stage's report (`collector_current_max_a`), with how tables show it.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Figure {
    /// JSON key (base SI unit in the suffix).
    pub key: &'static str,
    /// The value; `None` where the model gives none (JSON `null`).
    pub value: Option<f64>,
    /// Table header with its display unit (`IC max [mA]`); `None`: not in the tables.
    pub header: Option<&'static str>,
    /// Display value = value x scale.
    pub scale: f64,
}

impl Figure {
    /// A figure; non-finite values become `None`.
    pub fn new(
        key: &'static str,
        value: Option<f64>,
        header: Option<&'static str>,
        scale: f64,
    ) -> Figure {
        Figure {
            key,
            value: value.filter(|v| v.is_finite()),
            header,
            scale,
        }
    }
}

/// A reason written out already (for tests and simple notes).
#[derive(Clone, Debug)]
pub struct Said(pub String);

impl Explain for Said {
    fn sentence(&self) -> String {
        self.0.clone()
    }
}

/// The worst status of some findings (pass when there are none).
pub fn worst<'a>(findings: impl IntoIterator<Item = &'a Finding>) -> Status {
    findings
        .into_iter()
        .map(|f| f.status)
        .max()
        .unwrap_or(Status::Pass)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn statuses_order_and_thresholds() {
        assert!(Status::Pass < Status::Marginal && Status::Marginal < Status::Fail);
        assert_eq!(Status::at_most(0.8, 0.8, 1.0), Status::Pass);
        assert_eq!(Status::at_most(0.9, 0.8, 1.0), Status::Marginal);
        assert_eq!(Status::at_most(1.1, 0.8, 1.0), Status::Fail);
        assert_eq!(Status::at_least(2.0, 2.0, 1.0), Status::Pass);
        assert_eq!(Status::at_least(1.0, 2.0, 1.0), Status::Marginal);
        assert_eq!(Status::at_least(0.9, 2.0, 1.0), Status::Fail);
    }

    #[test]
    fn ids_compare_by_name() {
        let a = CheckId::new("pin-current", 20);
        assert_eq!(a, CheckId::new("pin-current", 99));
        assert_eq!(a.to_string(), "pin-current");
        assert_eq!(
            serde_json::to_string(&a).ok().as_deref(),
            Some("\"pin-current\"")
        );
    }

    #[test]
    fn findings_drop_non_finite_figures() {
        let f = Finding::new(
            CheckId::new("x", 1),
            Status::Pass,
            Some(f64::INFINITY),
            Some(2.0),
            "",
            why(Said("ok".into())),
        );
        assert_eq!((f.value, f.limit), (None, Some(2.0)));
        assert_eq!(f.detail(), "ok");
    }
}
