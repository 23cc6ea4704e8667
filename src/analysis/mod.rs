//! The worst-case engine: a [`Stage`] in, an [`Analysis`] out (stage-model version 2), for any
//! drive kind and load kind.
//!
//! Order of work: size the load's own resistor (the LED string's RL) with the switch's
//! on-voltage, fix the load corner (IC,max, the switch's peak voltage), let the drive size its
//! input resistors and evaluate its on and off states, then run the drive-neutral checks and the
//! load's own checks, list assumptions and cautions. No words are written here: findings carry
//! typed reasons.

pub mod common;
pub mod compose;
pub mod resistors;
pub mod yield_mc;

pub use compose::{apply_changes, compose, Change, Remedy};
pub use resistors::{RatingSource, ResistorUse};

use crate::check::{why, worst, Explain, Figure, Finding, Status, Why};
use crate::drive::{Corner, DriveAnalysis};
use crate::load::{ClampProposal, LoadContext, OwnResistor, CLAMP_REVERSE_MARGIN};
use crate::parts::PartSource;
use crate::quantity::{amps, format_engineering as fe, Base, Energy, Time};
use crate::stage::Stage;

/// Supply above which the touch-safe extra-low-voltage class ends, V DC
/// [memory: IEC 62368-1 ES1; IEC 61140 sets the ELV band].
pub const ELV_LIMIT_V: f64 = 60.0;
/// A pin limit above this is far beyond what a logic pin sources, A [practice].
pub const PLAUSIBLE_PIN_LIMIT_A: f64 = 0.1;
/// A logic high above this is beyond logic levels, V [practice].
pub const PLAUSIBLE_LOGIC_HIGH_V: f64 = 24.0;
/// A supply above this is beyond a small-signal switch stage, V [practice].
pub const PLAUSIBLE_SUPPLY_V: f64 = 1000.0;

/// Everything the engine found about one stage.
#[derive(Clone, Debug)]
pub struct Analysis {
    /// The load corner the switch was evaluated against.
    pub corner: Corner,
    /// What the drive found.
    pub drive: DriveAnalysis,
    /// The load's own resistor (the LED string's RL), when it has one.
    pub own: Option<OwnResistor>,
    /// The resistors, their powers and ratings.
    pub resistors: Vec<ResistorUse>,
    /// What the clamp of an inductive load needs.
    pub clamp: Option<ClampProposal>,
    /// One finding per check, in report order.
    pub findings: Vec<Finding>,
    /// The worst finding.
    pub verdict: Status,
    /// The worst-case figures of the report: the drive's, then the load's.
    pub figures: Vec<Figure>,
    /// Defaults the engine took beyond those the stage lists.
    pub extra_assumptions: Vec<String>,
    /// Cautions that apply (stage-model 7, and implausible inputs).
    pub cautions: Vec<Why>,
}

impl Analysis {
    /// Every default taken: the stage's own list, then the engine's.
    pub fn assumptions<'a>(&'a self, stage: &'a Stage) -> impl Iterator<Item = &'a String> {
        stage.assumptions.iter().chain(&self.extra_assumptions)
    }

    /// The finding of a check.
    pub fn finding(&self, id: crate::check::CheckId) -> Option<&Finding> {
        self.findings.iter().find(|f| f.id == id)
    }

    /// The load's own resistor value in use.
    pub fn own_value(&self) -> Option<crate::quantity::Resistance> {
        self.own.and_then(|o| o.value)
    }
}

/// Size what the stage leaves open and audit the result.
pub fn analyse(stage: &Stage) -> Analysis {
    let c = &stage.conditions;
    let switch = &stage.switch;
    let load = &stage.load;
    let on = switch.on_voltage(c);
    let own = load.size(c, on.as_ref());
    let own_value = own.and_then(|o| o.value);
    let current_max = load.current_max(c, own_value);
    let current_max = amps(current_max.base().max(0.0));
    let vcc_max = c.supply_max();
    let kick = load.kick(c);
    let peak = match (kick, stage.clamp.voltage()) {
        (Some(_), Some(v)) => Some(vcc_max + v),
        (Some(_), None) => None,
        (None, _) => Some(vcc_max),
    };
    let corner = Corner {
        vcc_max,
        vcc_min: c.supply_min(),
        current_max,
        linear_fraction: load.linear_power_fraction(),
        peak,
        inductive: kick.is_some(),
    };
    let drive = switch.analyse(c, &corner);
    let ratings = switch.ratings();
    let kind = switch.kind();

    let mut resistors = vec![ResistorUse::new(
        c,
        kind.series.symbol,
        kind.series.role,
        drive.series,
        drive.series_sized,
        drive.series_power,
    )];
    if let (Some(r), Some(p)) = (drive.pull_down, drive.pull_down_power) {
        resistors.push(ResistorUse::new(
            c,
            kind.pull_down.symbol,
            kind.pull_down.role,
            r,
            drive.pull_down_sized,
            p,
        ));
    }
    if let (Some(o), Some(r)) = (own, own_value) {
        if let Some(p) = load.own_resistor_power(c, r) {
            resistors.push(ResistorUse::new(c, "RL", "led", r, o.sized, p));
        }
    }

    let clamp = kick.map(|k| {
        let (stored_energy, decay) = match k.inductance {
            Some(l) => {
                let e: Energy = l * current_max * current_max / 2.0;
                let tau: Time = l / k.resistance_min;
                (Some(e), Some(tau))
            }
            None => (None, None),
        };
        ClampProposal {
            reverse_min: vcc_max * CLAMP_REVERSE_MARGIN,
            current_min: current_max,
            stored_energy,
            decay_time_constant: decay,
        }
    });

    let ctx = LoadContext {
        conditions: c,
        vcc_max,
        vcc_min: corner.vcc_min,
        current_max,
        on_voltage_max: drive.on_voltage_max,
        own,
        on: on.as_ref(),
    };
    let mut findings = drive.findings.clone();
    findings.push(common::pin_current(c, &drive));
    findings.push(common::current_rating(&ratings, &corner));
    findings.push(common::voltage_rating(&ratings, &corner));
    findings.push(common::junction(&ratings, c, &drive));
    load.checks(&ctx, &mut findings);
    if let Some(p) = &clamp {
        findings.extend(common::clamp_rating(&stage.clamp, &corner, p));
    }
    findings.push(common::resistor_power(&resistors));
    findings.sort_by_key(|f| f.id.rank);

    let mut figures = drive.figures.clone();
    figures.extend(load.figures(&ctx));

    let mut extra_assumptions = Vec::new();
    if resistors
        .iter()
        .any(|r| r.rating_source == RatingSource::Assumed)
    {
        extra_assumptions.push(format!(
            "fitted resistors rated {} assumed [practice]",
            fe(crate::conditions::DEFAULT_RESISTOR_RATING_W, "W")
        ));
    }
    Analysis {
        verdict: worst(&findings),
        cautions: cautions(stage, &corner),
        corner,
        drive,
        own,
        resistors,
        clamp,
        findings,
        figures,
        extra_assumptions,
    }
}

/// The cautions that apply to a stage (stage-model 7), and those for inputs far outside what a
/// logic pin or a small-signal stage does.
fn cautions(stage: &Stage, corner: &Corner) -> Vec<Why> {
    let c = &stage.conditions;
    let mut out: Vec<Why> = Vec::new();
    let vcc_max = corner.vcc_max.base();
    if vcc_max > ELV_LIMIT_V {
        out.push(why(Caution::AboveElv { vcc_max }));
    }
    if stage.load.works_contacts() {
        out.push(why(Caution::CoilSideOnly));
    }
    if let PartSource::Builtin(_) = stage.switch.info().source {
        out.push(why(Caution::ShippedPart {
            id: stage.switch.info().id.clone(),
            provenance: stage.switch.info().provenance.clone(),
        }));
    }
    for (what, value, unit, limit, reason) in [
        ("pin limit", c.pin_limit.base(), "A", PLAUSIBLE_PIN_LIMIT_A, "logic pins source a few milliamperes to a few tens; check the figure (or its unit) against the pin's datasheet"),
        ("logic high", c.logic_high.base(), "V", PLAUSIBLE_LOGIC_HIGH_V, "logic levels are 1.8 V to 15 V; check the figure (or its unit)"),
        ("supply", c.supply.base(), "V", PLAUSIBLE_SUPPLY_V, "this is far beyond a logic-driven switch stage; the model and its defaults do not hold there"),
    ] {
        if value > limit {
            out.push(why(Caution::Implausible {
                what,
                value,
                unit,
                limit,
                reason,
            }));
        }
    }
    out
}

// Words.

#[derive(Debug)]
enum Caution {
    AboveElv {
        vcc_max: f64,
    },
    CoilSideOnly,
    ShippedPart {
        id: String,
        provenance: String,
    },
    Implausible {
        what: &'static str,
        value: f64,
        unit: &'static str,
        limit: f64,
        reason: &'static str,
    },
}

impl Explain for Caution {
    fn sentence(&self) -> String {
        match self {
            Caution::AboveElv { vcc_max } => format!(
                "the highest supply {} is above 60 V DC, beyond the touch-safe extra-low-voltage class (60 V DC is the common limit, e.g. IEC 62368-1 ES1; IEC 61140 sets the ELV band): defer to local codes and licensed practice",
                fe(*vcc_max, "V")
            ),
            Caution::CoilSideOnly => "only the coil side is checked: contacts that switch mains need rated parts, creepage and clearance, and licensed practice under local codes".to_string(),
            Caution::ShippedPart { id, provenance } => {
                if provenance.to_lowercase().contains("verify") {
                    format!("part {id} ships with pinlow: {provenance}")
                } else {
                    format!(
                        "part {id} ships with pinlow ({provenance}): verify every figure against the supplier's datasheet before building"
                    )
                }
            }
            Caution::Implausible {
                what,
                value,
                unit,
                limit,
                reason,
            } => format!(
                "the {what} {} is above {}, unusual: {reason}",
                fe(*value, unit),
                fe(*limit, unit)
            ),
        }
    }
}

#[cfg(test)]
mod tests;
