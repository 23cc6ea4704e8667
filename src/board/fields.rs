//! Field-level helpers of stage resolution: where a field stands (file path or flag), and the
//! checks every number goes through (positive, finite, inside its [`Span`]; fractions).

use super::raw::RawLoad;
use super::resolve::Origin;
use crate::error::{Error, Result};
use crate::quantity::limits::{show_number, Span};

pub(super) fn raw_kind(raw: &RawLoad) -> &'static str {
    match raw {
        RawLoad::Current { .. } => "current",
        RawLoad::Relay { .. } => "relay",
        RawLoad::Led { .. } => "led",
        RawLoad::Strip { .. } => "strip",
    }
}

/// The place of a field inside the load or clamp object.
pub(super) fn sub_place(at: &str, key: &str, origin: &Origin, object: &str, kind: &str) -> String {
    match origin {
        Origin::File { .. } => format!("{at}.{key}"),
        Origin::Flags => flag_for(&format!("{object}.{kind}.{key}")).to_string(),
    }
}

/// The command-line flag that sets a field.
pub fn flag_for(key: &str) -> &'static str {
    match key {
        "part" => "--part",
        "supply_v" => "--supply",
        "supply_tolerance" => "--supply-tolerance",
        "logic_high_v" => "--logic-high",
        "logic_high_min_v" => "--logic-high-min",
        "pin_limit_a" => "--pin-limit",
        "ambient_c" => "--ambient",
        "grade" => "--grade",
        "load" => "--load",
        "clamp" => "--clamp",
        "base_resistor_ohms" => "--base-resistor",
        "pull_down_ohms" => "--pull-down",
        "resistor_tolerance" => "--resistor-tolerance",
        "resistor_rating_w" => "--resistor-rating",
        "series" => "--series",
        "overdrive" => "--overdrive",
        "load.current.current_a" | "load.led.current_a" => "--current",
        "load.relay.coil_ohms" => "--coil",
        "load.relay.coil_tolerance" => "--coil-tolerance",
        "load.relay.rated_v" => "--coil-rated",
        "load.relay.must_operate_fraction" => "--must-operate",
        "load.relay.inductance_h" => "--inductance",
        "load.led.count" => "--led-count",
        "load.led.forward_v" => "--led-vf",
        "load.led.forward_min_v" => "--led-vf-min",
        "load.led.forward_max_v" => "--led-vf-max",
        "load.led.max_current_a" => "--led-max-current",
        "load.led.resistor_ohms" => "--led-resistor",
        "load.strip.rated_v" => "--strip-voltage",
        "load.strip.current_per_m_a" => "--strip-current-per-metre",
        "load.strip.length_m" => "--strip-length",
        k if k.ends_with(".forward_v") => "--clamp-forward",
        k if k.ends_with(".zener_v") => "--zener",
        k if k.ends_with(".reverse_v") => "--clamp-reverse",
        k if k.ends_with(".current_a") => "--clamp-current",
        _ => "the stage flags",
    }
}

/// A number that must be positive, finite and inside `span`; the error names `at`.
pub(super) fn within(v: f64, span: Span, at: &str) -> Result<f64> {
    span.check(v).map_err(|message| Error::invalid(at, message))
}

/// A tolerance: from 0 up to (not including) 1.
pub(super) fn fraction(v: f64, at: &str) -> Result<f64> {
    if v.is_finite() && (0.0..1.0).contains(&v) {
        Ok(v)
    } else {
        Err(Error::invalid(at, format!("{} is not allowed: a fraction from 0 up to (not including) 1 is needed, e.g. 0.05 for ±5 %", show_number(v))))
    }
}

/// A fraction as a percentage, `5 %`.
pub(super) fn pct(f: f64) -> String {
    let s = format!("{:.1}", f * 100.0);
    format!("{} %", s.strip_suffix(".0").unwrap_or(&s))
}
