//! The NPN's own checks (stage-model 5): pinned-low and stays-off, and their words.

use super::corner::{BaseSizing, NpnWorst};
use super::part::NpnPart;
use crate::check::{why, Explain, Finding, Status};
use crate::conditions::Conditions;
use crate::drive::{PINNED_LOW, STAYS_OFF};
use crate::quantity::{format_engineering as fe, format_rkm, Base};

/// What the pin limit did to a sized base resistor.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PinBound {
    /// RB,pin, ohms.
    pub rb_pin: f64,
    /// The minimum gain at the load current (25 C) a replacement would need for the overdrive
    /// at RB,pin.
    pub gain_needed: super::corner::GainNeed,
}

/// pinned-low: overdrive >= k passes, 1 <= overdrive < k is marginal, below 1 or no base current
/// fails; nothing to carry passes.
pub fn pinned_low(
    part: &NpnPart,
    c: &Conditions,
    w: &NpnWorst,
    sizing: Option<&BaseSizing>,
    gain_needed: super::corner::GainNeed,
) -> Finding {
    let k = c.overdrive;
    let pin_bound = sizing.filter(|s| !s.reached).map(|s| PinBound {
        rb_pin: s.rb_pin.base(),
        gain_needed,
    });
    let ib = w.base_current_min.base();
    let ic = w.corner.ic_max.base();
    // A stage that cannot turn on fails even while its load draws nothing.
    let case = if ib <= 0.0 {
        Pinned::CannotTurnOn
    } else if ic <= 0.0 {
        Pinned::Nothing
    } else {
        Pinned::Drive
    };
    let status = match (case, w.overdrive) {
        (Pinned::Nothing, _) => Status::Pass,
        (Pinned::CannotTurnOn, _) | (_, None) => Status::Fail,
        (Pinned::Drive, Some(od)) => Status::at_least(od, k, 1.0),
    };
    Finding::new(
        PINNED_LOW,
        status,
        w.overdrive,
        Some(k),
        "",
        why(PinnedLow {
            case,
            status,
            overdrive: w.overdrive.unwrap_or(0.0),
            k,
            gain: w.corner.gain_wc,
            ib,
            ic,
            voh_min: c.logic_high_min.base(),
            vbe_max_cold: w.corner.vbe_max_cold.base(),
            with_pull_down: w.rbe.is_some(),
            pin_bound,
            darlington: part.is_darlington(),
        }),
    )
}

/// stays-off: the hot leakage through whatever holds the base down, against the base-emitter
/// threshold at Ta,max (stage-model 5; 6b for a Darlington pair's internal resistor).
pub fn stays_off(part: &NpnPart, c: &Conditions, w: &NpnWorst) -> Finding {
    let edge = w.edge_hot.base();
    let half = edge / 2.0;
    let hot = c.ambient_max.base();
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
                    edge,
                    hot,
                    internal: part.internal_base_emitter.is_some() && w.rbe.is_none(),
                }),
            )
        }
    }
}

// Words.

/// "a part with minimum gain 247 at 41.5 mA (25 °C) if its VBE(sat) is no higher than this
/// one's; 290 for any part of its class (VBE(sat) up to 1.2 V)".
pub fn gain_words(g: &super::corner::GainNeed, ic: f64) -> String {
    match (g.own, g.class) {
        (Some(own), Some((v, class))) => format!(
            "a part with minimum gain {own:.0} at {} (25 °C) if its VBE(sat) is no higher than this one's, {class:.0} for any part of its class (VBE(sat) up to {})",
            fe(ic, "A"),
            fe(v, "V")
        ),
        (Some(own), None) => format!(
            "a part with minimum gain {own:.0} at {} (25 °C) if its VBE(sat) is no higher than this one's",
            fe(ic, "A")
        ),
        _ => "a part with more gain".to_string(),
    }
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Pinned {
    Nothing,
    CannotTurnOn,
    Drive,
}

#[derive(Debug)]
struct PinnedLow {
    case: Pinned,
    status: Status,
    overdrive: f64,
    k: f64,
    gain: f64,
    ib: f64,
    ic: f64,
    voh_min: f64,
    vbe_max_cold: f64,
    with_pull_down: bool,
    pin_bound: Option<PinBound>,
    darlington: bool,
}

impl PinnedLow {
    fn way_out(&self) -> String {
        let Some(b) = self.pin_bound else {
            return String::new();
        };
        let gain = gain_words(&b.gain_needed, self.ic);
        let pair = if self.darlington {
            ""
        } else {
            ", a Darlington pair"
        };
        format!(
            "; the pin's limit allows RB down to {} only; what would carry it: {gain}{pair}, a logic-level MOSFET, or a buffer",
            format_rkm(b.rb_pin)
        )
    }
}

impl Explain for PinnedLow {
    fn sentence(&self) -> String {
        match (self.case, self.status) {
            (Pinned::Nothing, _) => {
                "the load draws nothing at the worst corner: there is nothing to carry".to_string()
            }
            (Pinned::CannotTurnOn, _) => format!(
                "the stage cannot turn on: the weakest logic high {} minus VBE(sat) {} at the coldest ambient leaves no base current{}",
                fe(self.voh_min, "V"),
                fe(self.vbe_max_cold, "V"),
                if self.with_pull_down { " after the pull-down takes its share" } else { "" },
            ),
            (_, Status::Pass) => format!(
                "the least base current {} times the minimum gain {:.1} at the coldest ambient carries {} with overdrive {:.2}, at least the {} asked",
                fe(self.ib, "A"),
                self.gain,
                fe(self.ic, "A"),
                self.overdrive,
                self.k
            ),
            (_, Status::Marginal) => format!(
                "saturates at the worst corner but with overdrive {:.2}, below the {} asked: little room for ageing and parts outside their datasheet{}",
                self.overdrive,
                self.k,
                self.way_out()
            ),
            (_, Status::Fail) => format!(
                "at the worst corner the base current {} times the minimum gain {:.1} carries only {} of the {} the load draws: the transistor leaves saturation{}",
                fe(self.ib, "A"),
                self.gain,
                fe(self.gain * self.ib, "A"),
                fe(self.ic, "A"),
                self.way_out()
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
        edge: f64,
        hot: f64,
        internal: bool,
    },
}

impl Explain for StaysOff {
    fn sentence(&self) -> String {
        match self {
            StaysOff::Floats => "no pull-down: the base floats while the pin is high-impedance at reset or set as an input, and leakage or pickup can turn the load on".to_string(),
            StaysOff::Leaks {
                status,
                volts,
                edge,
                hot,
                internal,
            } => {
                let through = if *internal {
                    "the pair's internal base-emitter resistor"
                } else {
                    "the pull-down"
                };
                let threshold = format!(
                    "the {} base-emitter threshold at {} °C (where the base starts to conduct)",
                    fe(*edge, "V"),
                    crate::quantity::limits::show_number(*hot)
                );
                match status {
                    Status::Pass => format!(
                        "hot leakage through {through} puts {} on the base, under half {threshold}",
                        fe(*volts, "V")
                    ),
                    Status::Marginal => format!(
                        "hot leakage through {through} puts {} on the base, below {threshold} but above half of it",
                        fe(*volts, "V")
                    ),
                    Status::Fail => format!(
                        "hot leakage through {through} would raise the base to {} (leakage x resistance), above {threshold}: the base conducts well before that, so the stage can turn itself on",
                        fe(*volts, "V")
                    ),
                }
            }
        }
    }
}
