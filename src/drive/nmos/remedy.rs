//! Remedies for the MOSFET's own checks: the gate resistor sized again for the pin, a gate
//! pull-down that keeps leakage low without dividing the drive away, and the figures a
//! replacement MOSFET needs (RDS(on) specified at the gate voltage the pin guarantees, the
//! threshold, the gate rating).

use super::checks::{GATE_DERATING, THRESHOLD_MARGIN};
use super::corner::{NmosWorst, GATE_PULL_DOWN_RATIO, T_REF_C};
use super::{detail, NmosPart, GATE_VOLTAGE};
use crate::check::{why, Explain, Finding, Status, PIN_CURRENT};
use crate::conditions::Conditions;
use crate::drive::{Corner, DriveAnalysis, PINNED_LOW, STAYS_OFF};
use crate::quantity::{format_engineering as fe, format_rkm, ohms, Base};
use crate::remedy::{number, Bound, Edit, PartNeed, Proposal};

/// Remedies for pinned-low, pin-current, stays-off and gate-voltage.
pub fn remedies(
    part: &NmosPart,
    c: &Conditions,
    load: &Corner,
    a: &DriveAnalysis,
    findings: &[Finding],
) -> Vec<Proposal> {
    let Some(d) = detail(a) else {
        return Vec::new();
    };
    let w = &d.worst;
    let short = |id| {
        findings
            .iter()
            .find(|f| f.id == id && f.status != Status::Pass)
    };
    let mut out = Vec::new();
    if short(PIN_CURRENT).is_some() && c.inputs.series.is_some() {
        out.push(Proposal::edit(
            PIN_CURRENT,
            vec![Edit::Size("gate_resistor_ohms")],
            why(Words::ResizeGate {
                series: c.series.name(),
            }),
        ));
    }
    let leak_limit = leakage_limit(part, c, w);
    if short(STAYS_OFF).is_some() {
        let usual = c.series.nearest(w.rg * GATE_PULL_DOWN_RATIO);
        let r = c.series.at_or_below(ohms(usual.base().min(leak_limit)));
        if r.base() >= 1.0 && r.base().is_finite() {
            out.push(Proposal::edit(
                STAYS_OFF,
                vec![Edit::Set("pull_down_ohms", number(r.base()))],
                why(Words::PullDown {
                    value: r.base(),
                    had: w.rgs.map(|r| r.base()),
                }),
            ));
        }
    }
    if let Some(f) = short(PINNED_LOW) {
        // The gate voltage that brings VGS,eff (the drive less the cold threshold rise) to the
        // lowest specified point.
        let rise = w.cold_rise().base();
        let target = w.lowest_vgs.base() + rise;
        let weakest = c.logic_high_min.base();
        // A divider that takes the drive below the lowest specified point while the pin alone
        // would reach it: a larger pull-down, within the leakage limit.
        let larger = w
            .rgs
            .filter(|_| weakest > target && w.vgs_min.base() < target)
            .and_then(|_| {
                let needed = target * c.high(w.rg).base()
                    / (weakest - target)
                    / (1.0 - c.resistor_tolerance);
                let r = c.series.at_or_above(ohms(needed));
                (r.base() <= leak_limit).then_some(r)
            });
        match larger {
            Some(r) => out.push(Proposal::edit(
                PINNED_LOW,
                vec![Edit::Set("pull_down_ohms", number(r.base()))],
                why(Words::LargerPullDown {
                    value: r.base(),
                    vgs: target,
                }),
            )),
            None => {
                let mut needs = vec![PartNeed {
                    figure: "rds_on_max.vgs_v",
                    bound: Bound::AtMost,
                    value: w.vgs_eff.base(),
                    unit: "V",
                    at: None,
                }];
                if f.status == Status::Fail {
                    // The cold threshold must stay under VGS,min / 1.5: at 25 C that is this
                    // much lower.
                    let rise = part.th_tempco * (c.ambient_min.base() - T_REF_C);
                    needs.push(PartNeed {
                        figure: "vgs_th.max_v",
                        bound: Bound::AtMost,
                        value: w.vgs_min.base() / THRESHOLD_MARGIN - rise,
                        unit: "V",
                        at: None,
                    });
                }
                if w.point.id.is_some_and(|i| w.id_max > i) {
                    needs.push(PartNeed {
                        figure: "rds_on_max.id_a",
                        bound: Bound::AtLeast,
                        value: w.id_max.base(),
                        unit: "A",
                        at: Some(("vgs_v", w.vgs_eff.base())),
                    });
                }
                out.push(Proposal::part(
                    PINNED_LOW,
                    needs,
                    why(Words::LogicLevel {
                        vgs_eff: w.vgs_eff.base(),
                        rise,
                        current: load.current_max.base(),
                    }),
                ));
            }
        }
    }
    if short(GATE_VOLTAGE).is_some() {
        out.push(Proposal::part(
            GATE_VOLTAGE,
            vec![PartNeed {
                figure: "vgs_max_v",
                bound: Bound::AtLeast,
                value: c.logic_high.base() / GATE_DERATING,
                unit: "V",
                at: None,
            }],
            why(Words::GateRating {
                needed: c.logic_high.base() / GATE_DERATING,
            }),
        ));
    }
    out
}

/// The largest RGS (ohms) whose gate leakage stays under half the hot minimum threshold.
fn leakage_limit(part: &NmosPart, c: &Conditions, w: &NmosWorst) -> f64 {
    let half = w.th_min_hot.base() / 2.0;
    half / (part.igss.base() * (1.0 + c.resistor_tolerance))
}

// Words.

#[derive(Debug)]
enum Words {
    ResizeGate {
        series: &'static str,
    },
    PullDown {
        value: f64,
        had: Option<f64>,
    },
    LargerPullDown {
        value: f64,
        vgs: f64,
    },
    LogicLevel {
        vgs_eff: f64,
        rise: f64,
        current: f64,
    },
    GateRating {
        needed: f64,
    },
}

impl Explain for Words {
    fn sentence(&self) -> String {
        match self {
            Words::ResizeGate { series } => format!(
                "size RG again: the smallest {series} value that keeps the pin within its limit at the switching edge"
            ),
            Words::PullDown { value, had } => format!(
                "fit a gate pull-down RGS = {}{}: the gate is held off at reset and its leakage stays under half the threshold",
                format_rkm(*value),
                match had {
                    Some(h) => format!(" (in place of {})", format_rkm(*h)),
                    None => String::new(),
                }
            ),
            Words::LargerPullDown { value, vgs } => format!(
                "fit RGS = {} so that the divider with RG keeps the gate at {} or more",
                format_rkm(*value),
                fe(*vgs, "V")
            ),
            Words::LogicLevel {
                vgs_eff,
                rise,
                current,
            } => format!(
                "use a MOSFET whose RDS(on) is specified at {} or less (the gate voltage the pin guarantees{}) for {}; a part specified only at 4.5 V or 10 V is not logic-level for this pin",
                fe(*vgs_eff, "V"),
                if *rise > 0.0 {
                    format!(", less the threshold's {} rise in the cold", fe(*rise, "V"))
                } else {
                    String::new()
                },
                fe(*current, "A")
            ),
            Words::GateRating { needed } => format!(
                "use a MOSFET rated VGS max {} or more, or lower the gate drive with a divider",
                fe(*needed, "V")
            ),
        }
    }
}
