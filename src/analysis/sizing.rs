//! Sizing (stage-model 6): the LED resistor, the base resistor and its pull-down, resistor power
//! ratings and the clamp diode's ratings.

use super::corners::LoadCorner;
use super::temperature::gain_factor;
use crate::load::{Led, Load};
use crate::quantity::{ohms, watts, Base, Current, Energy, Power, Resistance, Time, Voltage};
use crate::stage::{PullDown, Stage};

/// Standard resistor power ratings, W [practice: the usual catalogue steps].
pub const POWER_RATINGS_W: [f64; 9] = [0.063, 0.1, 0.125, 0.25, 0.5, 1.0, 2.0, 3.0, 5.0];
/// A resistor is rated at least this many times its worst power [practice].
pub const POWER_DERATING: f64 = 2.0;
/// Ratio of the sized pull-down to the base resistor [practice].
pub const PULL_DOWN_RATIO: f64 = 10.0;
/// Clamp diode reverse rating over the highest supply [practice].
pub const CLAMP_REVERSE_MARGIN: f64 = 1.5;

/// The outcome of sizing the LED resistor.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum LedSizing {
    /// The smallest series value at or above the ideal.
    Sized(Resistance),
    /// VCC - n Vf - VCE(sat) leaves nothing for a resistor: the ideal value in ohms (<= 0).
    NoHeadroom(f64),
}

/// RL,ideal = (VCC - n Vf - VCE(sat),max at the target) / target, all nominal; then the
/// smallest series value at or above it.
pub fn size_led_resistor(stage: &Stage, led: &Led) -> LedSizing {
    let vce = stage.part.vce_sat_max_at(led.current);
    let headroom: Voltage = stage.supply - led.drop_nominal() - vce;
    let ideal: Resistance = headroom / led.current;
    if ideal.base() <= 0.0 {
        LedSizing::NoHeadroom(ideal.base())
    } else {
        LedSizing::Sized(stage.series.at_or_above(ideal))
    }
}

/// The outcome of sizing the base resistor.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct BaseSizing {
    /// The chosen base resistor.
    pub rb: Resistance,
    /// The pull-down that goes with it (sized, given or none).
    pub rbe: Option<Resistance>,
    /// False when no series value from 10 ohm to 10 Mohm reaches the overdrive; `rb` is then the
    /// fallback: the smallest series value the pin can drive within its limit.
    pub reached: bool,
}

/// The pull-down for a base resistor under the stage's pull-down rule.
pub fn pull_down_for(stage: &Stage, rb: Resistance) -> Option<Resistance> {
    match stage.pull_down {
        PullDown::None => None,
        PullDown::Given(r) => Some(r),
        PullDown::Sized => Some(stage.series.nearest(rb * PULL_DOWN_RATIO)),
    }
}

/// Walk the series from 10 Mohm down to 10 ohm and take the largest RB whose worst-case overdrive
/// reaches the target.
pub fn size_base_resistor(stage: &Stage, corner: &LoadCorner) -> BaseSizing {
    // A pull-down only takes base current away, so no RB above the value that reaches the
    // overdrive without one can reach it with one: start the walk there (same result, fewer steps).
    let drive = (stage.logic_high_min - corner.vbe_sat_max_cold).base();
    let ib_needed = stage.overdrive * corner.ic_max.base() / corner.gain_min;
    let bound = drive / (ib_needed * (1.0 + stage.resistor_tolerance));
    let start = if bound.is_finite() && bound > 0.0 {
        bound * (1.0 + 1e-9)
    } else {
        f64::INFINITY
    };
    for rb in stage.series.values_down_from(ohms(start)) {
        let rbe = match stage.pull_down {
            // Ten times a series value of 100 ohm or more is the series value a decade up,
            // exactly (whole ohms): the nearest value to 10 x RB without searching for it.
            PullDown::Sized if rb.base() >= 100.0 => Some(rb * PULL_DOWN_RATIO),
            _ => pull_down_for(stage, rb),
        };
        let ib = corner.base_current_min(stage, rb, rbe);
        if ib.base() > 0.0 && corner.overdrive(ib) >= stage.overdrive {
            return BaseSizing {
                rb,
                rbe,
                reached: true,
            };
        }
    }
    let rb = pin_limited_base_resistor(stage, corner);
    BaseSizing {
        rb,
        rbe: pull_down_for(stage, rb),
        reached: false,
    }
}

/// The minimum gain at 25 C a part would need for the overdrive when RB is as small as the pin
/// limit allows; `None` when no base current flows at all.
pub fn gain_needed_within_pin_limit(stage: &Stage, corner: &LoadCorner) -> Option<f64> {
    let rb = pin_limited_base_resistor(stage, corner);
    let ib = corner
        .base_current_min(stage, rb, pull_down_for(stage, rb))
        .base();
    if ib <= 0.0 {
        return None;
    }
    let cold = gain_factor(stage.ambient_min, stage.part.gain_temp_exponent);
    Some(stage.overdrive * corner.ic_max.base() / ib / cold)
}

/// The smallest series value that keeps the pin within its limit, within 10 ohm .. 10 Mohm.
fn pin_limited_base_resistor(stage: &Stage, corner: &LoadCorner) -> Resistance {
    let drive = (stage.logic_high - corner.vbe_sat_min_hot).base().max(0.0);
    let ideal = drive / (stage.pin_limit.base() * (1.0 - stage.resistor_tolerance));
    let lowest = ohms(10.0);
    let highest = ohms(10e6);
    if !(ideal.is_finite()) || ideal <= lowest.base() {
        return lowest;
    }
    let r = stage.series.at_or_above(ohms(ideal));
    if r > highest {
        highest
    } else {
        r
    }
}

/// The smallest standard rating at least twice the worst power; `None` above 5 W / 2.
pub fn power_rating_for(worst: Power) -> Option<Power> {
    POWER_RATINGS_W
        .iter()
        .copied()
        .find(|r| *r >= POWER_DERATING * worst.base())
        .map(watts)
}

/// What the clamp diode of an inductive load needs.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ClampProposal {
    /// Reverse rating at least 1.5 x VCC,max.
    pub reverse_min: Voltage,
    /// Current rating at least IC,max.
    pub current_min: Current,
    /// L I^2 / 2 at IC,max, when L is known.
    pub stored_energy: Option<Energy>,
    /// L / R with the lowest coil resistance, when L is known.
    pub decay_time_constant: Option<Time>,
}

/// The clamp a relay load needs; `None` for other loads.
pub fn propose_clamp(stage: &Stage, corner: &LoadCorner) -> Option<ClampProposal> {
    let Load::Relay(relay) = &stage.load else {
        return None;
    };
    let i = corner.ic_max;
    let (stored_energy, decay_time_constant) = match relay.inductance {
        Some(l) => {
            let r = relay.coil_min(stage.ambient_min);
            let e: Energy = l * i * i / 2.0;
            let tau: Time = l / r;
            (Some(e), Some(tau))
        }
        None => (None, None),
    };
    Some(ClampProposal {
        reverse_min: corner.vcc_max * CLAMP_REVERSE_MARGIN,
        current_min: i,
        stored_energy,
        decay_time_constant,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::eseries::Series;

    #[test]
    fn ten_times_a_series_value_is_its_nearest_decade_up() {
        // The walk's shortcut for the sized pull-down must agree with the search it replaces.
        for series in Series::ALL {
            for rb in series.values().filter(|r| r.base() >= 100.0) {
                assert_eq!(
                    rb * PULL_DOWN_RATIO,
                    series.nearest(rb * PULL_DOWN_RATIO),
                    "{series}"
                );
            }
        }
    }
}
