//! Remedies for the NPN's own checks: the base resistor sized again (pin limit first), a
//! pull-down that keeps hot leakage under half the threshold, and what a replacement part needs
//! when no resistor helps. The composer in `analysis` merges these with the other checks'
//! remedies and re-runs the whole stage.

use super::corner::{icbo_at, size_base, NpnCorner, PULL_DOWN_RATIO};
use super::{detail, NpnPart};
use crate::check::{why, Explain, Finding, Status, PIN_CURRENT};
use crate::conditions::{Conditions, PullDown};
use crate::drive::{Corner, DriveAnalysis, PINNED_LOW, STAYS_OFF};
use crate::quantity::{format_engineering as fe, format_rkm, ohms, Base, Resistance};
use crate::remedy::{number, Bound, Edit, PartNeed, Proposal};

/// Remedies for pinned-low, pin-current and stays-off, given every finding of the stage.
pub fn remedies(
    part: &NpnPart,
    c: &Conditions,
    _load: &Corner,
    a: &DriveAnalysis,
    findings: &[Finding],
) -> Vec<Proposal> {
    let Some(d) = detail(a) else {
        return Vec::new();
    };
    let short = |id| {
        findings
            .iter()
            .find(|f| f.id == id && f.status != Status::Pass)
    };
    let corner: NpnCorner = d.worst.corner;
    let mut out = Vec::new();

    // The pull-down first: it changes what the base resistor must be.
    let mut pull_down = c.inputs.pull_down;
    if short(STAYS_OFF).is_some() {
        if let Some(r) = pull_down_for_leakage(part, c, a.series) {
            pull_down = PullDown::Given(r);
            out.push(Proposal::edit(
                STAYS_OFF,
                vec![Edit::Set("pull_down_ohms", number(r.base()))],
                why(Words::PullDown {
                    value: r.base(),
                    had: a.pull_down.map(|r| r.base()),
                }),
            ));
        }
    }

    // What sizing RB would give with that pull-down.
    let mut sized_conditions = c.clone();
    sized_conditions.inputs.series = None;
    sized_conditions.inputs.pull_down = pull_down;
    let resized = size_base(&sized_conditions, &corner);
    let pinned_short = short(PINNED_LOW);
    let ib_resized = corner.base_current_min(
        &sized_conditions,
        resized.rb,
        super::corner::pull_down_for(&sized_conditions, resized.rb),
    );
    let given = c.inputs.series.is_some();
    // RB needs a new value when the drive falls short, the pin is overloaded, or a new pull-down
    // would take the overdrive below its target with the RB fitted now.
    let new_pull_down_starves = pull_down != c.inputs.pull_down && {
        let ib = corner.base_current_min(
            &sized_conditions,
            a.series,
            super::corner::pull_down_for(&sized_conditions, a.series),
        );
        !corner.meets(ib, c.overdrive)
    };
    let resize = (pinned_short.is_some() || short(PIN_CURRENT).is_some() || new_pull_down_starves)
        && (given || pull_down != c.inputs.pull_down)
        && resized.rb != a.series;
    if resize {
        let check = if short(PIN_CURRENT).is_some() {
            PIN_CURRENT
        } else {
            PINNED_LOW
        };
        out.push(Proposal::edit(
            check,
            vec![Edit::Size("base_resistor_ohms")],
            why(Words::ResizeBase {
                series: c.series.name(),
                k: c.overdrive,
            }),
        ));
    }

    // When even the most drive the pin can give falls short, only another part helps.
    if pinned_short.is_some() && !resized.reached {
        if ib_resized.base() <= 0.0 {
            // The 25 C VBE(sat),max whose cold value just reaches the weakest logic high.
            let shift = part.vbe_tempco() * (c.ambient_min.base() - super::corner::T_REF_C);
            out.push(Proposal::part(
                PINNED_LOW,
                vec![PartNeed {
                    figure: "vbe_sat.max_v",
                    bound: Bound::AtMost,
                    value: c.logic_high_min.base() - shift,
                    unit: "V",
                    at: Some(("ic_a", corner.ic_max.base())),
                }],
                why(Words::CannotTurnOn {
                    voh_min: c.logic_high_min.base(),
                    vbe: corner.vbe_max_cold.base(),
                }),
            ));
        } else {
            let gain = part.gain_need(&sized_conditions, &corner, resized.rb_pin);
            out.push(Proposal::part(
                PINNED_LOW,
                gain.class
                    .map(|(_, g)| g)
                    .or(gain.own)
                    .map(|g| PartNeed {
                        figure: "gain_min.hfe",
                        bound: Bound::AtLeast,
                        value: g,
                        unit: "",
                        at: Some(("ic_a", corner.ic_max.base())),
                    })
                    .into_iter()
                    .collect(),
                why(Words::MoreGain {
                    gain,
                    ic: corner.ic_max.base(),
                    k: c.overdrive,
                    darlington: part.is_darlington(),
                    rb_pin: resized.rb_pin.base(),
                }),
            ));
        }
    }
    out
}

/// The largest series pull-down (at most the usual 10 x RB) that keeps the hot leakage voltage
/// under half the threshold; `None` when no resistor can.
fn pull_down_for_leakage(part: &NpnPart, c: &Conditions, rb: Resistance) -> Option<Resistance> {
    let half = super::corner::turn_on_edge(c.ambient_max).base() / 2.0;
    let leak = icbo_at(part.icbo_max, c.ambient_max).base();
    // ICBO x (RBE+ || Rint) <= half: 1/RBE+ >= ICBO/half - 1/Rint.
    let needed_conductance = leak / half
        - part
            .internal_base_emitter
            .map(|r| 1.0 / r.base())
            .unwrap_or(0.0);
    let usual = c.series.nearest(rb * PULL_DOWN_RATIO).base();
    let limit = if needed_conductance > 0.0 {
        (1.0 / needed_conductance) / (1.0 + c.resistor_tolerance)
    } else {
        f64::INFINITY
    };
    let r = c.series.at_or_below(ohms(usual.min(limit)));
    (r.base().is_finite() && r.base() >= 1.0).then_some(r)
}

// Words.

#[derive(Debug)]
enum Words {
    PullDown {
        value: f64,
        had: Option<f64>,
    },
    ResizeBase {
        series: &'static str,
        k: f64,
    },
    MoreGain {
        gain: super::corner::GainNeed,
        ic: f64,
        k: f64,
        darlington: bool,
        rb_pin: f64,
    },
    CannotTurnOn {
        voh_min: f64,
        vbe: f64,
    },
}

impl Explain for Words {
    fn sentence(&self) -> String {
        match self {
            Words::PullDown { value, had } => format!(
                "fit a pull-down RBE = {} from base to emitter{}: hot leakage then stays under half the base-emitter threshold",
                format_rkm(*value),
                match had {
                    Some(h) => format!(" (in place of {})", format_rkm(*h)),
                    None => String::new(),
                }
            ),
            Words::ResizeBase { series, k } => format!(
                "size RB again: the largest {series} value that reaches overdrive {k} without the pin sourcing more than its limit"
            ),
            Words::MoreGain {
                gain,
                ic,
                k,
                darlington,
                rb_pin,
            } => {
                let need = super::checks::gain_words(gain, *ic);
                let pair = if *darlington { "" } else { ", a Darlington pair" };
                format!(
                    "no base resistor reaches overdrive {k} within the pin's limit (RB no lower than {}): use {need}{pair}, a logic-level MOSFET, or a buffer",
                    format_rkm(*rb_pin)
                )
            }
            Words::CannotTurnOn { voh_min, vbe } => format!(
                "the pin's weakest high level {} does not clear VBE(sat) {} at the coldest ambient: use a logic-level MOSFET, a part with a lower VBE(sat), or a higher logic level",
                fe(*voh_min, "V"),
                fe(*vbe, "V")
            ),
        }
    }
}
