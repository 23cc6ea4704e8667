//! What a check reports: its id, status, figure, limit and one sentence why.

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
}

impl std::fmt::Display for Status {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.as_str())
    }
}

/// The checks of stage-model 5.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum CheckId {
    /// The transistor saturates at the worst corner with the wanted overdrive.
    PinnedLow,
    /// The pin can source the base current.
    PinCurrent,
    /// The stage stays off while the pin floats or leaks.
    StaysOff,
    /// The collector current is within the part's rating.
    CollectorCurrent,
    /// The collector voltage is within VCEO.
    CollectorVoltage,
    /// The junction stays below its limit.
    JunctionTemp,
    /// A hot coil still pulls in at the lowest supply.
    CoilPullIn,
    /// The clamp diode's ratings.
    ClampRating,
    /// The LED current stays in its window.
    LedCurrent,
    /// Resistors within their power ratings.
    ResistorPower,
}

impl CheckId {
    /// The id as written in reports (`pinned-low`).
    pub fn as_str(self) -> &'static str {
        match self {
            CheckId::PinnedLow => "pinned-low",
            CheckId::PinCurrent => "pin-current",
            CheckId::StaysOff => "stays-off",
            CheckId::CollectorCurrent => "collector-current",
            CheckId::CollectorVoltage => "collector-voltage",
            CheckId::JunctionTemp => "junction-temp",
            CheckId::CoilPullIn => "coil-pull-in",
            CheckId::ClampRating => "clamp-rating",
            CheckId::LedCurrent => "led-current",
            CheckId::ResistorPower => "resistor-power",
        }
    }
}

impl std::fmt::Display for CheckId {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.as_str())
    }
}

/// One check's outcome. Figures are plain numbers in the base SI unit named by `unit`
/// (`A`, `V`, `W`, `°C`, or empty for a ratio).
#[derive(Clone, Debug, PartialEq, Serialize)]
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
    /// One sentence: why this status.
    pub detail: String,
}
