//! The checks of stage-model 5, each with its three verdicts. Margins are [practice] unless marked.

use super::corners::WorstCase;
use super::finding::{CheckId, Finding, Status};
use super::resistors::ResistorUse;
use crate::load::{Clamp, Led, Load, Relay};
use crate::quantity::{format_engineering as fe, Base};
use crate::stage::Stage;

/// IC,max at or below this fraction of the rating passes [practice].
pub const COLLECTOR_CURRENT_DERATING: f64 = 0.8;
/// Collector peak at or below this fraction of VCEO passes [practice].
pub const COLLECTOR_VOLTAGE_DERATING: f64 = 0.8;
/// Junction margin below Tj,max for a pass, K [practice].
pub const JUNCTION_MARGIN_K: f64 = 25.0;
/// LED current at least this fraction of the target passes [practice].
pub const LED_PASS_FRACTION: f64 = 0.8;
/// LED current at least this fraction of the target is marginal [practice].
pub const LED_MARGINAL_FRACTION: f64 = 0.5;
/// A resistor at or below this fraction of its rating passes [practice].
pub const RESISTOR_DERATING: f64 = 0.5;

/// What the checks look at besides the worst case.
pub struct CheckInput<'a> {
    /// The stage.
    pub stage: &'a Stage,
    /// Its worst-case figures.
    pub wc: &'a WorstCase,
    /// The resistors with their powers and ratings.
    pub resistors: &'a [ResistorUse],
    /// False when the base resistor was sized and no series value reached the overdrive.
    pub overdrive_reached: bool,
    /// For an LED load whose resistor could not be sized: the ideal value (<= 0 ohm).
    pub led_no_headroom: Option<f64>,
    /// The minimum gain at 25 C a part would need to reach the overdrive within the pin limit.
    pub gain_needed_within_pin_limit: Option<f64>,
}

/// Run every check that applies to the stage, in report order.
pub fn run_checks(input: &CheckInput) -> Vec<Finding> {
    let mut out = vec![
        pinned_low(input),
        pin_current(input),
        stays_off(input),
        collector_current(input),
        collector_voltage(input),
        junction_temp(input),
    ];
    if let Load::Relay(relay) = &input.stage.load {
        out.push(coil_pull_in(input, relay));
        if let Some(f) = clamp_rating(input) {
            out.push(f);
        }
    }
    if let Load::Led(led) = &input.stage.load {
        out.push(led_current(input, led));
    }
    out.push(resistor_power(input));
    out
}

fn finding(
    id: CheckId,
    status: Status,
    value: Option<f64>,
    limit: Option<f64>,
    unit: &'static str,
    detail: String,
) -> Finding {
    Finding {
        id,
        status,
        value: value.filter(|v| v.is_finite()),
        limit: limit.filter(|v| v.is_finite()),
        unit,
        detail,
    }
}

fn pinned_low(input: &CheckInput) -> Finding {
    let wc = input.wc;
    let k = input.stage.overdrive;
    let od = wc.overdrive_min;
    let ib = wc.base_current_min.base();
    let (status, detail) = if ib <= 0.0 {
        (
            Status::Fail,
            format!(
                "the stage cannot turn on: the weakest logic high {} minus VBE(sat) {} at the cold corner leaves no base current{}",
                fe(input.stage.logic_high_min.base(), "V"),
                fe(wc.load.vbe_sat_max_cold.base(), "V"),
                if wc.resistors.rbe.is_some() { " after the pull-down takes its share" } else { "" },
            ),
        )
    } else if !input.overdrive_reached {
        (
            Status::Fail,
            format!(
                "no {} value from 10 Ω to 10 MΩ gives the overdrive {k}; at the pin-limited value the worst case is {od:.3}",
                input.stage.series
            ),
        )
    } else if od >= k {
        (
            Status::Pass,
            format!(
                "worst-case gain {:.1} times the minimum base current {} carries {} with overdrive {od:.2}, at least the {k} asked",
                wc.load.gain_min,
                fe(ib, "A"),
                fe(wc.load.ic_max.base(), "A")
            ),
        )
    } else if od >= 1.0 {
        (
            Status::Marginal,
            format!(
                "saturates at the worst corner but with overdrive {od:.2}, below the {k} asked: little room for ageing and parts outside their datasheet"
            ),
        )
    } else {
        (
            Status::Fail,
            format!(
                "at the worst corner the base current {} times gain {:.1} carries only {} of the {} the load draws: the transistor leaves saturation",
                fe(ib, "A"),
                wc.load.gain_min,
                fe(wc.load.gain_min * ib, "A"),
                fe(wc.load.ic_max.base(), "A")
            ),
        )
    };
    finding(
        CheckId::PinnedLow,
        status,
        Some(od.max(0.0)),
        Some(k),
        "",
        detail,
    )
}

fn pin_current(input: &CheckInput) -> Finding {
    let i = input.wc.pin_current_max.base();
    let limit = input.stage.pin_limit.base();
    let (status, detail) = if i <= limit {
        (
            Status::Pass,
            format!(
                "the pin sources at most {} of its {} limit",
                fe(i, "A"),
                fe(limit, "A")
            ),
        )
    } else {
        let gain = match input.gain_needed_within_pin_limit {
            Some(g) => format!("a part with minimum gain {g:.0} at the load current (25 °C)"),
            None => "a higher-gain part".to_string(),
        };
        (
            Status::Fail,
            format!(
                "the pin would source {}, above its {} limit; ways out: {gain}, a Darlington pair, a logic-level MOSFET, or a buffer",
                fe(i, "A"),
                fe(limit, "A"),
            ),
        )
    };
    finding(
        CheckId::PinCurrent,
        status,
        Some(i),
        Some(limit),
        "A",
        detail,
    )
}

fn stays_off(input: &CheckInput) -> Finding {
    let wc = input.wc;
    let edge = wc.turn_on_edge_hot.base();
    let half = edge / 2.0;
    match wc.leakage_voltage {
        None => finding(
            CheckId::StaysOff,
            Status::Marginal,
            None,
            Some(half),
            "V",
            "no pull-down: the base floats while the pin is high-impedance at reset or set as an input, and leakage or pickup can turn the load on".to_string(),
        ),
        Some(v) => {
            let v = v.base();
            let status = if v <= half {
                Status::Pass
            } else if v <= edge {
                Status::Marginal
            } else {
                Status::Fail
            };
            let detail = match status {
                Status::Pass => format!(
                    "hot leakage through the pull-down makes {}, under half the {} turn-on edge",
                    fe(v, "V"),
                    fe(edge, "V")
                ),
                Status::Marginal => format!(
                    "hot leakage through the pull-down makes {}, below the {} turn-on edge but above half of it",
                    fe(v, "V"),
                    fe(edge, "V")
                ),
                Status::Fail => format!(
                    "hot leakage through the pull-down makes {}, above the {} turn-on edge: the stage can turn itself on",
                    fe(v, "V"),
                    fe(edge, "V")
                ),
            };
            finding(CheckId::StaysOff, status, Some(v), Some(half), "V", detail)
        }
    }
}

fn collector_current(input: &CheckInput) -> Finding {
    let i = input.wc.load.ic_max.base();
    let rated = input.stage.part.ic_max.base();
    let pass = COLLECTOR_CURRENT_DERATING * rated;
    let (status, word) = if i <= pass {
        (Status::Pass, "within 80 % of")
    } else if i <= rated {
        (Status::Marginal, "above 80 % of")
    } else {
        (Status::Fail, "above")
    };
    let detail = format!(
        "the load draws at most {}, {word} the part's {} rating",
        fe(i, "A"),
        fe(rated, "A")
    );
    finding(
        CheckId::CollectorCurrent,
        status,
        Some(i),
        Some(pass),
        "A",
        detail,
    )
}

fn collector_voltage(input: &CheckInput) -> Finding {
    let vceo = input.stage.part.vceo.base();
    let pass = COLLECTOR_VOLTAGE_DERATING * vceo;
    let Some(peak) = input.wc.collector_peak.map(|v| v.base()) else {
        return finding(
            CheckId::CollectorVoltage,
            Status::Fail,
            None,
            Some(pass),
            "V",
            "an inductive load with no clamp: the coil's turn-off kick drives the collector far above VCEO".to_string(),
        );
    };
    let (status, word) = if peak <= pass {
        (Status::Pass, "within 80 % of")
    } else if peak <= vceo {
        (Status::Marginal, "above 80 % of")
    } else {
        (Status::Fail, "above")
    };
    let detail = format!(
        "the collector peaks at {}, {word} VCEO {}",
        fe(peak, "V"),
        fe(vceo, "V")
    );
    finding(
        CheckId::CollectorVoltage,
        status,
        Some(peak),
        Some(pass),
        "V",
        detail,
    )
}

fn junction_temp(input: &CheckInput) -> Finding {
    let tj = input.wc.junction_max.base();
    let tj_max = input.stage.part.tj_max.base();
    let pass = tj_max - JUNCTION_MARGIN_K;
    let status = if tj <= pass {
        Status::Pass
    } else if tj <= tj_max {
        Status::Marginal
    } else {
        Status::Fail
    };
    let detail = format!(
        "{} dissipated at {} ambient heats the junction to {:.1} °C against a {:.0} °C limit",
        fe(input.wc.power_max.base(), "W"),
        fmt_c(input.stage.ambient_max.base()),
        tj,
        tj_max
    );
    finding(
        CheckId::JunctionTemp,
        status,
        Some(tj),
        Some(pass),
        "°C",
        detail,
    )
}

fn coil_pull_in(input: &CheckInput, relay: &Relay) -> Finding {
    let stage = input.stage;
    let available = (input.wc.load.vcc_min - input.wc.load.vce_sat_max).base();
    let warm = relay.coil_at(stage.ambient_max).base() / relay.coil_20c.base();
    let needed = relay.must_operate_fraction * relay.rated.base() * warm;
    let status = if available >= needed {
        Status::Pass
    } else {
        Status::Fail
    };
    let detail = format!(
        "at the lowest supply the coil gets {}; hot at {} it needs {} to pull in",
        fe(available, "V"),
        fmt_c(stage.ambient_max.base()),
        fe(needed, "V")
    );
    finding(
        CheckId::CoilPullIn,
        status,
        Some(available),
        Some(needed),
        "V",
        detail,
    )
}

fn clamp_rating(input: &CheckInput) -> Option<Finding> {
    let (reverse, current) = input.stage.clamp.ratings();
    if matches!(input.stage.clamp, Clamp::None) || (reverse.is_none() && current.is_none()) {
        return None;
    }
    let vcc_max = input.wc.load.vcc_max.base();
    let ic_max = input.wc.load.ic_max.base();
    let current_ok = current.is_none_or(|c| c.base() >= ic_max);
    let (status, value, limit, unit, detail) = match reverse {
        Some(r) => {
            let r = r.base();
            let status = if !current_ok || r < vcc_max {
                Status::Fail
            } else if r >= 1.5 * vcc_max {
                Status::Pass
            } else {
                Status::Marginal
            };
            let detail = format!(
                "reverse rating {} against 1.5 x the highest supply {}{}",
                fe(r, "V"),
                fe(1.5 * vcc_max, "V"),
                current_phrase(current.map(|c| c.base()), ic_max)
            );
            (status, r, 1.5 * vcc_max, "V", detail)
        }
        None => {
            let c = current.map(|c| c.base()).unwrap_or(0.0);
            let status = if current_ok {
                Status::Pass
            } else {
                Status::Fail
            };
            let detail = format!("no reverse rating given{}", current_phrase(Some(c), ic_max));
            (status, c, ic_max, "A", detail)
        }
    };
    Some(finding(
        CheckId::ClampRating,
        status,
        Some(value),
        Some(limit),
        unit,
        detail,
    ))
}

fn current_phrase(current: Option<f64>, ic_max: f64) -> String {
    match current {
        Some(c) if c >= ic_max => format!(
            "; current rating {} covers the coil's {}",
            fe(c, "A"),
            fe(ic_max, "A")
        ),
        Some(c) => format!(
            "; current rating {} is below the coil's {}",
            fe(c, "A"),
            fe(ic_max, "A")
        ),
        None => String::new(),
    }
}

fn led_current(input: &CheckInput, led: &Led) -> Finding {
    let target = led.current.base();
    let pass_min = LED_PASS_FRACTION * target;
    let Some(currents) = input.wc.led else {
        let ideal = input.led_no_headroom.unwrap_or(0.0);
        return finding(
            CheckId::LedCurrent,
            Status::Fail,
            None,
            Some(pass_min),
            "A",
            format!(
                "no headroom: the supply {} less {} LEDs at {} and VCE(sat) leaves nothing for a resistor (ideal {})",
                fe(input.stage.supply.base(), "V"),
                led.count,
                fe(led.forward.base(), "V"),
                fe(ideal, "Ω")
            ),
        );
    };
    let (min, max) = (currents.min.base(), currents.max.base());
    if let Some(abs) = led.max_current.map(|c| c.base()) {
        if max > abs {
            return finding(
                CheckId::LedCurrent,
                Status::Fail,
                Some(max),
                Some(abs),
                "A",
                format!(
                    "at the highest supply and lowest forward voltage the LEDs carry {}, above their {} absolute maximum",
                    fe(max, "A"),
                    fe(abs, "A")
                ),
            );
        }
    }
    let status = if min >= pass_min {
        Status::Pass
    } else if min >= LED_MARGINAL_FRACTION * target {
        Status::Marginal
    } else {
        Status::Fail
    };
    let detail = match status {
        Status::Pass => format!(
            "the LEDs carry {} to {} for a {} target",
            fe(min, "A"),
            fe(max, "A"),
            fe(target, "A")
        ),
        _ if min <= 0.0 => format!(
            "no headroom at the low corner: the lowest supply cannot forward-bias {} LEDs at their highest forward voltage",
            led.count
        ),
        _ => format!(
            "little headroom: at the lowest supply and highest forward voltage the LEDs get only {} of the {} target",
            fe(min, "A"),
            fe(target, "A")
        ),
    };
    finding(
        CheckId::LedCurrent,
        status,
        Some(min),
        Some(pass_min),
        "A",
        detail,
    )
}

fn resistor_power(input: &CheckInput) -> Finding {
    // The resistor closest to its rating decides.
    let worst = input
        .resistors
        .iter()
        .max_by(|a, b| a.load_ratio().total_cmp(&b.load_ratio()));
    let Some(r) = worst else {
        return finding(
            CheckId::ResistorPower,
            Status::Pass,
            None,
            None,
            "W",
            "no resistor to check".to_string(),
        );
    };
    let p = r.worst_power.base();
    let rating = r.rating.base();
    let status = if p <= RESISTOR_DERATING * rating {
        Status::Pass
    } else if p <= rating {
        Status::Marginal
    } else {
        Status::Fail
    };
    let detail = format!(
        "{} {} dissipates at most {} against its {} {} rating",
        r.role.label(),
        crate::quantity::format_rkm(r.value.base()),
        fe(p, "W"),
        fe(rating, "W"),
        r.rating_source.as_str()
    );
    finding(
        CheckId::ResistorPower,
        status,
        Some(p),
        Some(RESISTOR_DERATING * rating),
        "W",
        detail,
    )
}

fn fmt_c(t: f64) -> String {
    format!("{} °C", trim(t))
}

fn trim(v: f64) -> String {
    let s = format!("{v:.1}");
    s.strip_suffix(".0").map(String::from).unwrap_or(s)
}
