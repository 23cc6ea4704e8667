//! The MOSFET's own checks (stage-model 8): pinned-low (the gate drive against the RDS(on)
//! points), stays-off (gate leakage through RGS) and gate-voltage, and their words.

use super::corner::NmosWorst;
use super::part::NmosPart;
use super::GATE_VOLTAGE;
use crate::check::{why, Explain, Finding, Status};
use crate::conditions::Conditions;
use crate::drive::{PINNED_LOW, STAYS_OFF};
use crate::quantity::{format_engineering as fe, Base};

/// A gate drive at or above this many times the cold maximum threshold is at least marginal
/// [practice] (stage-model 8).
pub const THRESHOLD_MARGIN: f64 = 1.5;
/// The pin's high level at or below this fraction of VGS max passes [practice].
pub const GATE_DERATING: f64 = 0.8;

/// pinned-low: RDS(on) specified at a gate voltage at or below VGS,min passes; not specified
/// there but VGS,min >= 1.5 x VGS(th),max cold is marginal; below that fails. A test current
/// below ID,max makes it at most marginal, and so does a figure that is not guaranteed at the
/// drive: no point at or below VGS,eff, the gate voltage less the threshold's rise in the cold,
/// which is where stage-model 8 reads the figure. (The spec says "not guaranteed" there without
/// a status; read as a pass, an ngspice channel fitted to the datasheet point saturates at some
/// of these stages: see tests/ngspice_nmos.rs. The same rule as a point's test current.)
pub fn pinned_low(w: &NmosWorst) -> Finding {
    let vgs = w.vgs_min.base();
    let specified = w.lowest_vgs <= w.vgs_min;
    let above_threshold = vgs >= THRESHOLD_MARGIN * w.th_max_cold.base();
    let mut status = if specified {
        Status::Pass
    } else if above_threshold {
        Status::Marginal
    } else {
        Status::Fail
    };
    let beyond_test_current = w.point.id.is_some_and(|i| w.id_max > i);
    if (beyond_test_current || !w.point_qualifies) && status == Status::Pass {
        status = Status::Marginal;
    }
    Finding::new(
        PINNED_LOW,
        status,
        Some(vgs),
        Some(w.lowest_vgs.base()),
        "V",
        why(PinnedLow {
            status,
            vgs_min: vgs,
            vgs_eff: w.vgs_eff.base(),
            point_vgs: w.point.vgs.base(),
            point_ohms: w.point.ohms.base(),
            qualifies: w.point_qualifies,
            lowest: w.lowest_vgs.base(),
            th_cold: w.th_max_cold.base(),
            test_current: w.point.id.map(|i| i.base()).filter(|_| beyond_test_current),
            id_max: w.id_max.base(),
        }),
    )
}

/// stays-off: IGSS x RGS+ at most half VGS(th),min hot passes; no RGS is marginal (a floating
/// gate can charge up and half-open the channel); between half and all of it marginal; above
/// fails.
pub fn stays_off(c: &Conditions, w: &NmosWorst) -> Finding {
    let edge = w.th_min_hot.base();
    let half = edge / 2.0;
    match w.leakage_voltage {
        None => Finding::new(
            STAYS_OFF,
            Status::Marginal,
            None,
            Some(half),
            "V",
            why(StaysOff::Floats),
        ),
        Some(v) => {
            let v = v.base();
            let status = Status::at_most(v, half, edge);
            Finding::new(
                STAYS_OFF,
                status,
                Some(v),
                Some(half),
                "V",
                why(StaysOff::Leaks {
                    status,
                    volts: v,
                    threshold: edge,
                    hot: c.ambient_max.base(),
                }),
            )
        }
    }
}

/// gate-voltage: VOH,max at or below 0.8 x VGS max passes, at or below VGS max is marginal.
pub fn gate_voltage(part: &NmosPart, c: &Conditions) -> Finding {
    let voh = c.logic_high.base();
    let rating = part.vgs_max.base();
    let status = Status::at_most(voh, GATE_DERATING * rating, rating);
    Finding::new(
        GATE_VOLTAGE,
        status,
        Some(voh),
        Some(GATE_DERATING * rating),
        "V",
        why(GateVoltage {
            status,
            voh,
            rating,
        }),
    )
}

// Words.

#[derive(Debug)]
struct PinnedLow {
    status: Status,
    vgs_min: f64,
    vgs_eff: f64,
    point_vgs: f64,
    point_ohms: f64,
    qualifies: bool,
    lowest: f64,
    th_cold: f64,
    test_current: Option<f64>,
    id_max: f64,
}

impl Explain for PinnedLow {
    fn sentence(&self) -> String {
        let figure = if self.qualifies {
            format!(
                "RDS(on) is read at {} ({} max at 25 °C)",
                fe(self.point_vgs, "V"),
                fe(self.point_ohms, "Ω")
            )
        } else {
            format!(
                "RDS(on) is not guaranteed at this drive: the {} point ({} max) stands in",
                fe(self.point_vgs, "V"),
                fe(self.point_ohms, "Ω")
            )
        };
        let tail = match self.test_current {
            Some(i) => format!(
                "; the datasheet states that figure at {} only, below the {} the load draws",
                fe(i, "A"),
                fe(self.id_max, "A")
            ),
            None => String::new(),
        };
        // The drive the points are compared with: VGS,min, less the cold rise when there is one.
        let rise = self.vgs_min - self.vgs_eff;
        let drive = if rise > 0.0 {
            format!(
                "{} ({} once the threshold's {} rise in the cold is taken off)",
                fe(self.vgs_min, "V"),
                fe(self.vgs_eff, "V"),
                fe(rise, "V")
            )
        } else {
            fe(self.vgs_min, "V")
        };
        match self.status {
            Status::Pass => format!(
                "the weakest gate drive {drive} reaches the lowest specified gate voltage {}: {figure}{tail}",
                fe(self.lowest, "V")
            ),
            // Marginal for the test current: the drive itself reaches the figure.
            Status::Marginal if self.qualifies => format!(
                "the weakest gate drive {drive} reaches the lowest specified gate voltage {}, but the figure is not guaranteed at the load's current: {figure}{tail}",
                fe(self.lowest, "V")
            ),
            // Marginal for the cold: the drive reaches the lowest point at 25 °C only.
            Status::Marginal if self.vgs_min >= self.lowest => format!(
                "the weakest gate drive {} reaches the lowest specified gate voltage {}, but not once the threshold's {} rise in the cold is taken off ({}): {figure}{tail}",
                fe(self.vgs_min, "V"),
                fe(self.lowest, "V"),
                fe(rise, "V"),
                fe(self.vgs_eff, "V")
            ),
            Status::Marginal => format!(
                "the weakest gate drive {drive} is below the lowest gate voltage {} the datasheet specifies RDS(on) at, though at least 1.5 x the cold maximum threshold {}: {figure}{tail}",
                fe(self.lowest, "V"),
                fe(self.th_cold, "V")
            ),
            Status::Fail => format!(
                "the weakest gate drive {} is below 1.5 x the cold maximum threshold {}: the channel may not open fully (not logic-level at this drive)",
                fe(self.vgs_min, "V"),
                fe(self.th_cold, "V")
            ),
        }
    }
}

#[derive(Debug)]
enum StaysOff {
    Floats,
    Leaks {
        status: Status,
        volts: f64,
        threshold: f64,
        hot: f64,
    },
}

impl Explain for StaysOff {
    fn sentence(&self) -> String {
        match self {
            StaysOff::Floats => "no gate pull-down: a floating gate can charge up while the pin is high-impedance at reset and half-open the channel".to_string(),
            StaysOff::Leaks {
                status,
                volts,
                threshold,
                hot,
            } => {
                let th = format!(
                    "the {} minimum gate threshold at {} °C",
                    fe(*threshold, "V"),
                    crate::quantity::limits::show_number(*hot)
                );
                match status {
                    Status::Pass => format!(
                        "gate leakage through the pull-down makes {}, under half {th}",
                        fe(*volts, "V")
                    ),
                    Status::Marginal => format!(
                        "gate leakage through the pull-down makes {}, below {th} but above half of it",
                        fe(*volts, "V")
                    ),
                    Status::Fail => format!(
                        "gate leakage through the pull-down makes {}, above {th}: the channel can open by itself",
                        fe(*volts, "V")
                    ),
                }
            }
        }
    }
}

#[derive(Debug)]
struct GateVoltage {
    status: Status,
    voh: f64,
    rating: f64,
}

impl Explain for GateVoltage {
    fn sentence(&self) -> String {
        let word = match self.status {
            Status::Pass => "within 80 % of",
            Status::Marginal => "above 80 % of",
            Status::Fail => "above",
        };
        format!(
            "the pin's high level {} is {word} the gate rating VGS max {}",
            fe(self.voh, "V"),
            fe(self.rating, "V")
        )
    }
}
