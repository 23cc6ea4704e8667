//! Concrete remedies for every marginal or failing check, each re-checked by running the engine
//! again on the changed stage. A remedy that a board file can take carries `apply`: the stage
//! fields to set (dotted paths for fields inside `load`).

use std::collections::BTreeMap;

use serde::Serialize;
use serde_json::{json, Value};

use super::finding::{CheckId, Finding, Status};
use super::{analyse, StageAnalysis};
use crate::load::{Clamp, Load};
use crate::quantity::{format_engineering as fe, format_rkm, ohms, Base};
use crate::stage::{PullDown, Stage};

/// Standard diode reverse ratings, V [practice: the usual rectifier steps].
pub const DIODE_REVERSE_STEPS_V: [f64; 7] = [50.0, 100.0, 200.0, 400.0, 600.0, 800.0, 1000.0];
/// Standard diode current ratings, A [practice].
pub const DIODE_CURRENT_STEPS_A: [f64; 5] = [0.2, 0.5, 1.0, 3.0, 5.0];

/// One remedy.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Fix {
    /// The check it answers.
    pub check: CheckId,
    /// What to do, in one sentence.
    pub action: String,
    /// Stage fields to set in a board file; empty when the remedy needs another part or circuit.
    pub apply: BTreeMap<String, Value>,
    /// Status of the check after applying (`None` when it cannot be re-checked here).
    pub recheck: Option<Status>,
    /// Other checks that get worse after applying, in words.
    pub conflicts: Vec<String>,
}

/// Remedies for every check of `a` that is not a pass.
pub fn propose_fixes(stage: &Stage, a: &StageAnalysis) -> Vec<Fix> {
    let mut out = Vec::new();
    for f in a.findings.iter().filter(|f| f.status != Status::Pass) {
        let fix = match f.id {
            CheckId::PinnedLow => pinned_low(stage, a),
            CheckId::PinCurrent => Some(pin_current(a)),
            CheckId::StaysOff => stays_off(stage, a),
            CheckId::CollectorCurrent => Some(part_only(
                f,
                format!(
                    "choose a part rated for at least {} collector current (the load draws {})",
                    fe(a.worst.load.ic_max.base() / 0.8, "A"),
                    fe(a.worst.load.ic_max.base(), "A")
                ),
            )),
            CheckId::CollectorVoltage => collector_voltage(stage, a, f),
            CheckId::JunctionTemp => Some(junction(stage, a, f)),
            CheckId::CoilPullIn => Some(coil(stage, f)),
            CheckId::ClampRating => clamp_fix(stage, a, CheckId::ClampRating),
            CheckId::LedCurrent => led(stage, a, f),
            CheckId::ResistorPower => resistor_power(stage, a),
        };
        out.extend(fix);
    }
    out
}

fn part_only(f: &Finding, action: String) -> Fix {
    advice(f.id, action)
}

/// A remedy a board file cannot take (another part or circuit): nothing to apply or re-check.
fn advice(check: CheckId, action: String) -> Fix {
    Fix {
        check,
        action,
        apply: BTreeMap::new(),
        recheck: None,
        conflicts: Vec::new(),
    }
}

/// Apply `change` to a copy of the stage, re-run the engine, and fill in the recheck.
fn rechecked(
    stage: &Stage,
    before: &StageAnalysis,
    check: CheckId,
    action: String,
    apply: BTreeMap<String, Value>,
    change: impl FnOnce(&mut Stage),
) -> Fix {
    let mut changed = stage.clone();
    change(&mut changed);
    let after = analyse(&changed);
    let recheck = after
        .findings
        .iter()
        .find(|f| f.id == check)
        .map(|f| f.status);
    let conflicts = after
        .findings
        .iter()
        .filter(|f| f.id != check)
        .filter_map(|f| {
            let old = before
                .findings
                .iter()
                .find(|b| b.id == f.id)
                .map(|b| b.status);
            match old {
                Some(o) if f.status > o => {
                    Some(format!("{} becomes {}: {}", f.id, f.status, f.detail))
                }
                None if f.status != Status::Pass => {
                    Some(format!("{} is {}: {}", f.id, f.status, f.detail))
                }
                _ => None,
            }
        })
        .collect();
    Fix {
        check,
        action,
        apply,
        recheck,
        conflicts,
    }
}

fn one(key: &str, v: Value) -> BTreeMap<String, Value> {
    let mut m = BTreeMap::new();
    m.insert(key.to_string(), v);
    m
}

fn pinned_low(stage: &Stage, a: &StageAnalysis) -> Option<Fix> {
    let mut sizing = stage.clone();
    sizing.base_resistor = None;
    if !matches!(sizing.pull_down, PullDown::Given(_)) {
        sizing.pull_down = PullDown::None;
    }
    let sized = analyse(&sizing);
    let reached = sized
        .findings
        .iter()
        .any(|f| f.id == CheckId::PinnedLow && f.status == Status::Pass);
    if stage.base_resistor.is_some() && reached {
        let rb = sized.worst.resistors.rb;
        let action = format!(
            "fit RB = {} ({}), the largest {} value that reaches overdrive {}",
            format_rkm(rb.base()),
            fe(rb.base(), "Ω"),
            stage.series,
            stage.overdrive
        );
        return Some(rechecked(
            stage,
            a,
            CheckId::PinnedLow,
            action,
            one("base_resistor_ohms", json!(rb.base())),
            |s| s.base_resistor = Some(rb),
        ));
    }
    let gain = a
        .gain_needed_within_pin_limit
        .map(|g| {
            format!(
                "a part with minimum gain {g:.0} at {} (25 °C)",
                fe(a.worst.load.ic_max.base(), "A")
            )
        })
        .unwrap_or_else(|| "a part with a lower VBE(sat), or a higher logic level".to_string());
    Some(advice(
        CheckId::PinnedLow,
        format!("no base resistor reaches the overdrive within the pin's limit: use {gain}, a Darlington pair, a logic-level MOSFET, or a buffer"),
    ))
}

fn pin_current(a: &StageAnalysis) -> Fix {
    let gain = a
        .gain_needed_within_pin_limit
        .map(|g| format!("a higher-gain part (minimum gain {g:.0} at the load current, 25 °C)"))
        .unwrap_or_else(|| "a higher-gain part".to_string());
    advice(
        CheckId::PinCurrent,
        format!("the pin cannot supply the base current: use {gain}, a Darlington pair, a logic-level MOSFET, or a buffer"),
    )
}

fn stays_off(stage: &Stage, a: &StageAnalysis) -> Option<Fix> {
    let wc = &a.worst;
    let half = wc.turn_on_edge_hot.base() / 2.0;
    let icbo = super::temperature::icbo_at(stage.part.icbo_max, stage.ambient_max).base();
    let leak_limit = half / (icbo * (1.0 + stage.resistor_tolerance));
    let wanted = match wc.resistors.rbe {
        None => stage
            .series
            .nearest(wc.resistors.rb * 10.0)
            .base()
            .min(leak_limit),
        Some(_) => leak_limit,
    };
    let r = stage.series.at_or_below(ohms(wanted));
    if !(r.base().is_finite() && r.base() > 0.0) {
        return None;
    }
    let action = format!(
        "fit a pull-down RBE = {} from base to emitter: hot leakage then stays under half the turn-on edge",
        format_rkm(r.base())
    );
    Some(rechecked(
        stage,
        a,
        CheckId::StaysOff,
        action,
        one("pull_down_ohms", json!(r.base())),
        |s| {
            s.pull_down = PullDown::Given(r);
            if s.base_resistor.is_none() {
                s.base_resistor = Some(wc.resistors.rb);
            }
        },
    ))
}

fn collector_voltage(stage: &Stage, a: &StageAnalysis, f: &Finding) -> Option<Fix> {
    if stage.load.is_inductive() && matches!(stage.clamp, Clamp::None) {
        return clamp_fix(stage, a, CheckId::CollectorVoltage);
    }
    let peak = a.worst.collector_peak.map(|v| v.base()).unwrap_or(0.0);
    let mut action = format!(
        "choose a part with VCEO of at least {} (the collector peaks at {})",
        fe(peak / 0.8, "V"),
        fe(peak, "V")
    );
    if let Clamp::Zener { .. } = stage.clamp {
        action.push_str(", or a lower Zener voltage");
    }
    Some(part_only(f, action))
}

fn junction(stage: &Stage, a: &StageAnalysis, f: &Finding) -> Fix {
    let p = a.worst.power_max.base();
    let budget = stage.part.tj_max.base() - 25.0 - stage.ambient_max.base();
    let action = if budget > 0.0 && p > 0.0 {
        format!(
            "keep RthJA at or below {:.0} K/W (more copper, a heat sink or a larger package) for {} at {} °C ambient",
            budget / p,
            fe(p, "W"),
            stage.ambient_max.base()
        )
    } else {
        "the ambient leaves no junction margin: choose a part with a higher Tj,max".to_string()
    };
    part_only(f, action)
}

fn coil(stage: &Stage, f: &Finding) -> Fix {
    let available = f.value.unwrap_or(0.0);
    let needed = f.limit.unwrap_or(0.0);
    let action = match &stage.load {
        Load::Relay(r) => {
            let warm = r.coil_at(stage.ambient_max).base() / r.coil_20c.base();
            format!(
                "choose a relay whose must-operate voltage at 20 °C is at most {} (now {}), or raise the lowest supply by {}",
                fe(available / warm, "V"),
                fe(needed / warm, "V"),
                fe(needed - available, "V")
            )
        }
        _ => String::new(),
    };
    part_only(f, action)
}

fn step_up(steps: &[f64], v: f64) -> f64 {
    steps.iter().copied().find(|s| *s >= v).unwrap_or(v.ceil())
}

fn clamp_fix(stage: &Stage, a: &StageAnalysis, check: CheckId) -> Option<Fix> {
    let c = a.clamp?;
    let reverse = step_up(&DIODE_REVERSE_STEPS_V, c.reverse_min.base());
    let current = step_up(&DIODE_CURRENT_STEPS_A, c.current_min.base());
    let (clamp, value) = match &stage.clamp {
        Clamp::Zener { forward, zener, .. } => (
            Clamp::Zener {
                forward: *forward,
                zener: *zener,
                reverse: Some(crate::quantity::volts(reverse)),
                current: Some(crate::quantity::amps(current)),
            },
            json!({"kind": "zener", "zener_v": zener.base(), "forward_v": forward.base(), "reverse_v": reverse, "current_a": current}),
        ),
        Clamp::Diode { forward, .. } => (
            Clamp::Diode {
                forward: *forward,
                reverse: Some(crate::quantity::volts(reverse)),
                current: Some(crate::quantity::amps(current)),
            },
            json!({"kind": "diode", "forward_v": forward.base(), "reverse_v": reverse, "current_a": current}),
        ),
        Clamp::None => (
            Clamp::Diode {
                forward: crate::quantity::volts(1.0),
                reverse: Some(crate::quantity::volts(reverse)),
                current: Some(crate::quantity::amps(current)),
            },
            json!({"kind": "diode", "forward_v": 1.0, "reverse_v": reverse, "current_a": current}),
        ),
    };
    let action = format!(
        "fit a flyback diode across the coil rated at least {} reverse and {} forward current",
        fe(reverse, "V"),
        fe(current, "A")
    );
    let mut base = stage.clone();
    if base.base_resistor.is_none() {
        base.base_resistor = Some(a.worst.resistors.rb);
        base.pull_down = a
            .worst
            .resistors
            .rbe
            .map(PullDown::Given)
            .unwrap_or(PullDown::None);
    }
    Some(rechecked(
        &base,
        a,
        check,
        action,
        one("clamp", value),
        |s| s.clamp = clamp,
    ))
}

fn led(stage: &Stage, a: &StageAnalysis, f: &Finding) -> Option<Fix> {
    let Load::Led(l) = &stage.load else {
        return None;
    };
    // The largest series value that still gives 80 % of the target at the low corner.
    let tol = stage.resistor_tolerance;
    let vce = a.worst.load.vce_sat_max;
    let spare = (stage.supply_min() - l.drop_max() - vce).base();
    let ideal = spare / (super::checks::LED_PASS_FRACTION * l.current.base() * (1.0 + tol));
    if ideal > 0.0 {
        let r = stage.series.at_or_below(ohms(ideal));
        if Some(r) != a.worst.resistors.rl && r.base() > 0.0 {
            let action = format!(
                "fit RL = {} ({}), the largest {} value that keeps the LEDs at 80 % of their target at the low corner",
                format_rkm(r.base()),
                fe(r.base(), "Ω"),
                stage.series
            );
            let fix = rechecked(
                stage,
                a,
                CheckId::LedCurrent,
                action,
                one("load.resistor_ohms", json!(r.base())),
                |s| {
                    if let Load::Led(l) = &mut s.load {
                        l.resistor = Some(r);
                    }
                },
            );
            if fix.recheck == Some(Status::Pass) {
                return Some(fix);
            }
        }
    }
    Some(part_only(
        f,
        format!(
            "too little headroom: the lowest supply {} leaves {} over {} LEDs at their highest forward voltage; put fewer in series or raise the supply",
            fe(stage.supply_min().base(), "V"),
            fe(spare.max(0.0), "V"),
            l.count
        ),
    ))
}

fn resistor_power(stage: &Stage, a: &StageAnalysis) -> Option<Fix> {
    let needed = a
        .resistors
        .iter()
        .filter(|r| !r.sized)
        .filter_map(|r| r.recommended_rating.map(|p| p.base()))
        .fold(0.0_f64, f64::max);
    if needed <= 0.0 {
        return None;
    }
    let action = format!(
        "fit resistors rated at least {} (twice their worst power)",
        fe(needed, "W")
    );
    Some(rechecked(
        stage,
        a,
        CheckId::ResistorPower,
        action,
        one("resistor_rating_w", json!(needed)),
        |s| s.resistor_rating = Some(crate::quantity::watts(needed)),
    ))
}
