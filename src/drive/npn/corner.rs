//! The NPN's worst-case figures (stage-model 4) and its input sizing (6.2): everything here is
//! arithmetic on typed quantities, no words.

use super::part::NpnPart;
use crate::conditions::{Conditions, PullDown};
use crate::drive::Corner;
use crate::quantity::{
    amps, ohms, volts, watts, Base, Current, Power, Resistance, Temperature, Voltage,
};

/// Reference temperature of datasheet figures, C.
pub const T_REF_C: f64 = 25.0;
/// 0 C in kelvins.
pub const ZERO_C_IN_K: f64 = 273.15;
/// VBE temperature coefficient of one junction, V/K [text: about -2 mV/K for silicon].
pub const VBE_TEMPCO_V_PER_K: f64 = -0.002;
/// A Darlington pair's two junctions in series move twice as fast, V/K [text] (stage-model 6b).
pub const DARLINGTON_VBE_TEMPCO_V_PER_K: f64 = -0.004;
/// Turn-on edge at 25 C: below it the base draws negligible current, V [practice]; it moves at
/// -2 mV/K, also for a Darlington pair (conservative, 6b).
pub const TURN_ON_EDGE_25C_V: f64 = 0.5;
/// ICBO doubles every this many kelvins [practice].
pub const ICBO_DOUBLING_K: f64 = 10.0;
/// Ratio of the sized pull-down to the base resistor [practice].
pub const PULL_DOWN_RATIO: f64 = 10.0;
/// Smallest and largest base resistor the sizing walks, ohms (stage-model 6.2).
pub const RB_RANGE_OHMS: (f64, f64) = (10.0, 10e6);

/// Gain multiplier at `t` against 25 C: ((T + 273.15) / 298.15)^XTB
/// [text: Gummel-Poon beta temperature exponent].
pub fn gain_factor(t: Temperature, xtb: f64) -> f64 {
    ((t.base() + ZERO_C_IN_K) / (T_REF_C + ZERO_C_IN_K)).powf(xtb)
}

/// The turn-on edge at `t`: 0.5 V at 25 C [practice], moving at -2 mV/K [text].
pub fn turn_on_edge(t: Temperature) -> Voltage {
    volts(TURN_ON_EDGE_25C_V + VBE_TEMPCO_V_PER_K * (t.base() - T_REF_C))
}

/// ICBO at `t`, doubling every 10 K from its 25 C maximum [practice].
pub fn icbo_at(icbo25: Current, t: Temperature) -> Current {
    amps(icbo25.base() * 2f64.powf((t.base() - T_REF_C) / ICBO_DOUBLING_K))
}

impl NpnPart {
    /// The VBE temperature coefficient: -2 mV/K, or -4 mV/K for a Darlington pair.
    pub fn vbe_tempco(&self) -> f64 {
        if self.is_darlington() {
            DARLINGTON_VBE_TEMPCO_V_PER_K
        } else {
            VBE_TEMPCO_V_PER_K
        }
    }

    /// A 25 C base-emitter voltage moved to `t`.
    pub fn vbe_at(&self, v25: Voltage, t: Temperature) -> Voltage {
        v25 + volts(self.vbe_tempco() * (t.base() - T_REF_C))
    }
}

/// The figures of an NPN stage that depend on the load corner but not on RB.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct NpnCorner {
    /// IC,max.
    pub ic_max: Current,
    /// hFE,wc: hFE,min at IC,max and Ta,min.
    pub gain_wc: f64,
    /// VBE(sat),max at IC,max and Ta,min.
    pub vbe_max_cold: Voltage,
    /// VBE(sat),min at IC,max and Ta,max.
    pub vbe_min_hot: Voltage,
    /// VCE(sat),max at IC,max.
    pub vce_sat_max: Voltage,
}

impl NpnCorner {
    /// The corner of `part` carrying `ic_max` under `c`.
    pub fn of(part: &NpnPart, c: &Conditions, ic_max: Current) -> NpnCorner {
        let (vbe_min, vbe_max) = part.vbe_sat_at(ic_max);
        NpnCorner {
            ic_max,
            gain_wc: part.gain_min_at(ic_max) * gain_factor(c.ambient_min, part.gain_temp_exponent),
            vbe_max_cold: part.vbe_at(vbe_max, c.ambient_min),
            vbe_min_hot: part.vbe_at(vbe_min, c.ambient_max),
            vce_sat_max: part.vce_sat_max_at(ic_max),
        }
    }

    /// IB,min at Ta,min: (VOH,min - VBE(sat),max) / RB+ minus VBE(sat),max / RBE-. May be zero or
    /// negative: the stage cannot turn on.
    pub fn base_current_min(
        &self,
        c: &Conditions,
        rb: Resistance,
        rbe: Option<Resistance>,
    ) -> Current {
        let through_rb = (c.logic_high_min - self.vbe_max_cold) / c.high(rb);
        let stolen = match rbe {
            Some(r) => self.vbe_max_cold / c.low(r),
            None => amps(0.0),
        };
        through_rb - stolen
    }

    /// hFE,wc x IB,min / IC,max: `None` when the stage cannot turn on (IB,min <= 0) or carries
    /// nothing (IC,max = 0) (stage-model 4, v2).
    pub fn overdrive(&self, ib_min: Current) -> Option<f64> {
        let (ib, ic) = (ib_min.base(), self.ic_max.base());
        (ib > 0.0 && ic > 0.0).then(|| self.gain_wc * ib / ic)
    }

    /// True when the base current meets overdrive `k` (always, for a load that draws nothing:
    /// pinned-low then passes, stage-model 4).
    pub fn meets(&self, ib_min: Current, k: f64) -> bool {
        if self.ic_max.base() <= 0.0 {
            return true;
        }
        self.overdrive(ib_min).is_some_and(|od| od >= k)
    }

    /// VOH,max - VBE(sat),min(Ta,max): what drives the pin current, never below 0.
    pub fn pin_drive(&self, c: &Conditions) -> Voltage {
        volts((c.logic_high - self.vbe_min_hot).base().max(0.0))
    }

    /// Pin current max = (VOH,max - VBE(sat),min(Ta,max)) / RB-.
    pub fn pin_current_max(&self, c: &Conditions, rb: Resistance) -> Current {
        self.pin_drive(c) / c.low(rb)
    }
}

/// The VBE(sat),max at 25 C a single transistor of the small-signal and medium-power class may
/// have, for advice that fits any candidate part, V [practice: their datasheets give at most
/// about 1.2 V; from memory].
pub const CLASS_VBE_SAT_MAX_V: f64 = 1.2;
/// The same for a Darlington pair, V [practice, memory].
pub const DARLINGTON_CLASS_VBE_SAT_MAX_V: f64 = 2.5;

/// The minimum gain at IC,max (25 C) a part needs for the overdrive at `rb` (with the stage's
/// pull-down rule), its VBE(sat),max at the cold corner being `vbe_cold` and its gain
/// temperature exponent `xtb`; `None` when no base current flows.
pub fn gain_needed(
    c: &Conditions,
    corner: &NpnCorner,
    vbe_cold: Voltage,
    xtb: f64,
    rb: Resistance,
) -> Option<f64> {
    let k = NpnCorner {
        vbe_max_cold: vbe_cold,
        ..*corner
    };
    let ib = k.base_current_min(c, rb, pull_down_for(c, rb)).base();
    let ic = corner.ic_max.base();
    (ib > 0.0 && ic > 0.0).then(|| c.overdrive * ic / ib / gain_factor(c.ambient_min, xtb))
}

/// The gain a replacement part needs, for a part like this one and for any part of its class.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct GainNeed {
    /// For a part with this one's VBE(sat).
    pub own: Option<f64>,
    /// For any part of the class: (its VBE(sat),max at 25 C, the gain), when that VBE(sat) is
    /// higher than this part's.
    pub class: Option<(f64, f64)>,
}

impl NpnPart {
    /// The gain a replacement needs for the overdrive at `rb`.
    pub fn gain_need(&self, c: &Conditions, corner: &NpnCorner, rb: Resistance) -> GainNeed {
        let own = gain_needed(c, corner, corner.vbe_max_cold, self.gain_temp_exponent, rb);
        let class_v = if self.is_darlington() {
            DARLINGTON_CLASS_VBE_SAT_MAX_V
        } else {
            CLASS_VBE_SAT_MAX_V
        };
        let own_v25 = self.vbe_sat_at(corner.ic_max).1.base();
        let class = (class_v > own_v25)
            .then(|| {
                let cold = self.vbe_at(volts(class_v), c.ambient_min);
                gain_needed(c, corner, cold, self.gain_temp_exponent, rb).map(|g| (class_v, g))
            })
            .flatten();
        GainNeed { own, class }
    }
}

/// The pull-down that goes with a base resistor under the stage's rule.
pub fn pull_down_for(c: &Conditions, rb: Resistance) -> Option<Resistance> {
    match c.inputs.pull_down {
        PullDown::None => None,
        PullDown::Given(r) => Some(r),
        PullDown::Sized => Some(c.series.nearest(rb * PULL_DOWN_RATIO)),
    }
}

/// The outcome of sizing RB (stage-model 6.2, v2).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct BaseSizing {
    /// The chosen base resistor.
    pub rb: Resistance,
    /// RB,pin: the smallest series value whose pin current stays within the pin limit.
    pub rb_pin: Resistance,
    /// True when the chosen RB meets the overdrive (false: the pin limit or the part stops it).
    pub reached: bool,
}

/// RB,pin: the smallest series value from 10 ohm to 10 Mohm whose worst pin current is within
/// the pin limit (10 Mohm when none is).
pub fn pin_limited(c: &Conditions, corner: &NpnCorner) -> Resistance {
    let drive = corner.pin_drive(c).base();
    let (lowest, highest) = RB_RANGE_OHMS;
    let ideal = drive / (c.pin_limit.base() * (1.0 - c.resistor_tolerance));
    if !ideal.is_finite() || ideal <= lowest {
        return ohms(lowest);
    }
    let r = c.series.at_or_above(ohms(ideal));
    // A value a rounding step below the ideal would overload the pin by that step: step up.
    let r = if corner.pin_current_max(c, r) > c.pin_limit {
        c.series.at_or_above(r * (1.0 + 1e-6))
    } else {
        r
    };
    ohms(r.base().min(highest))
}

/// Stage-model 6.2 (v2): the largest series value whose worst-case overdrive reaches k, unless
/// that is below RB,pin (or there is none): then RB,pin, the most drive the pin can give without
/// damage. With nothing to carry, RB,pin.
pub fn size_base(c: &Conditions, corner: &NpnCorner) -> BaseSizing {
    let rb_pin = pin_limited(c, corner);
    let fallback = BaseSizing {
        rb: rb_pin,
        rb_pin,
        reached: corner.ic_max.base() <= 0.0,
    };
    if corner.ic_max.base() <= 0.0 {
        return fallback;
    }
    // A pull-down only takes base current away, so no RB above the value that reaches k
    // without one can reach it with one: start the walk there (same result, fewer steps).
    let drive = (c.logic_high_min - corner.vbe_max_cold).base();
    let ib_needed = c.overdrive * corner.ic_max.base() / corner.gain_wc;
    let bound = drive / (ib_needed * (1.0 + c.resistor_tolerance));
    if !(bound.is_finite() && bound > 0.0) {
        return fallback;
    }
    let top = ohms((bound * (1.0 + 1e-9)).min(RB_RANGE_OHMS.1));
    for rb in c.series.values_down_from(top) {
        if rb < rb_pin {
            break;
        }
        let rbe = match c.inputs.pull_down {
            // Ten times a series value of 100 ohm or more is the series value a decade up,
            // exactly (whole ohms): the nearest value to 10 x RB without searching for it.
            PullDown::Sized if rb.base() >= 100.0 => Some(rb * PULL_DOWN_RATIO),
            _ => pull_down_for(c, rb),
        };
        if corner.meets(corner.base_current_min(c, rb, rbe), c.overdrive) {
            return BaseSizing {
                rb,
                rb_pin,
                reached: true,
            };
        }
    }
    fallback
}

/// Every worst-case figure of an NPN stage with its resistors fixed.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct NpnWorst {
    /// The corner.
    pub corner: NpnCorner,
    /// RB.
    pub rb: Resistance,
    /// RBE, if fitted.
    pub rbe: Option<Resistance>,
    /// IB,min at Ta,min.
    pub base_current_min: Current,
    /// Worst-case overdrive (`None`: cannot turn on, or nothing to carry).
    pub overdrive: Option<f64>,
    /// IC,max / IB,min (`None`: cannot turn on, or nothing to carry).
    pub forced_beta: Option<f64>,
    /// True when the switch is pinned low at the worst corner (overdrive >= 1, or nothing to
    /// carry while base current flows).
    pub pinned: bool,
    /// Largest pin current.
    pub pin_current_max: Current,
    /// Largest dissipation (the linear-region figure when not pinned, stage-model 4 v2).
    pub power_max: Power,
    /// Highest junction temperature.
    pub junction_max: Temperature,
    /// Leakage voltage on the base at Ta,max: ICBO x (RBE+ and/or the internal resistor), when
    /// anything holds the base down.
    pub leakage_voltage: Option<Voltage>,
    /// The turn-on edge at Ta,max.
    pub edge_hot: Voltage,
    /// Worst power in RB.
    pub rb_power: Power,
    /// Worst power in RBE.
    pub rbe_power: Option<Power>,
}

impl NpnWorst {
    /// Evaluate `part` with these resistors at the load corner.
    pub fn of(
        part: &NpnPart,
        c: &Conditions,
        load: &Corner,
        corner: NpnCorner,
        rb: Resistance,
        rbe: Option<Resistance>,
    ) -> NpnWorst {
        let ib = corner.base_current_min(c, rb, rbe);
        let overdrive = corner.overdrive(ib);
        let ic = corner.ic_max.base();
        let forced_beta = (ib.base() > 0.0 && ic > 0.0).then(|| ic / ib.base());
        let pinned = match overdrive {
            Some(od) => od >= 1.0,
            None => ic <= 0.0 && ib.base() > 0.0,
        };
        let pin = corner.pin_current_max(c, rb);
        let collector: Power = if pinned {
            corner.vce_sat_max * corner.ic_max
        } else {
            watts(load.linear_fraction * load.vcc_max.base() * ic)
        };
        let power_max = collector + corner.vbe_max_cold * pin;
        let junction_max = c.ambient_max + power_max * part.info.r_th_ja;
        let leak = icbo_at(part.icbo_max, c.ambient_max);
        let holder = match (rbe.map(|r| c.high(r)), part.internal_base_emitter) {
            (Some(a), Some(b)) => Some(ohms(a.base() * b.base() / (a.base() + b.base()))),
            (a, b) => a.or(b),
        };
        let drive = corner.pin_drive(c).base();
        NpnWorst {
            corner,
            rb,
            rbe,
            base_current_min: ib,
            overdrive,
            forced_beta,
            pinned,
            pin_current_max: pin,
            power_max,
            junction_max,
            leakage_voltage: holder.map(|r| leak * r),
            edge_hot: turn_on_edge(c.ambient_max),
            rb_power: watts(drive * drive / c.low(rb).base()),
            rbe_power: rbe.map(|r| watts(corner.vbe_max_cold.base().powi(2) / c.low(r).base())),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::conditions::InputResistors;
    use crate::eseries::Series;
    use crate::quantity::celsius;
    use approx::assert_relative_eq;

    fn conditions(pin_limit: f64, k: f64) -> Conditions {
        Conditions {
            supply: volts(5.0),
            supply_tolerance: 0.0,
            logic_high: volts(5.0),
            logic_high_min: volts(5.0),
            pin_limit: amps(pin_limit),
            ambient_min: celsius(25.0),
            ambient_max: celsius(25.0),
            resistor_tolerance: 0.0,
            series: Series::E24,
            resistor_rating: None,
            inputs: InputResistors {
                series: None,
                pull_down: PullDown::None,
            },
            overdrive: k,
        }
    }

    fn corner(ic: f64, gain: f64, vbe: f64) -> NpnCorner {
        NpnCorner {
            ic_max: amps(ic),
            gain_wc: gain,
            vbe_max_cold: volts(vbe),
            vbe_min_hot: volts(vbe),
            vce_sat_max: volts(0.2),
        }
    }

    #[test]
    fn sizing_matches_a_hand_worked_base_resistor() {
        // Hand-worked with Ohm's law (the textbook base-resistor sizing): 5 V drive, 50 mA load,
        // minimum gain 20, overdrive 2 -> IB 5 mA; VBE(sat) 0.95 V -> RB <= 4.05 V / 5 mA =
        // 810 ohm; E24 750 ohm (820 ohm would give overdrive 1.976).
        let c = conditions(0.1, 2.0);
        let s = size_base(&c, &corner(0.05, 20.0, 0.95));
        assert_eq!(s.rb.base(), 750.0);
        assert!(s.reached);
    }

    #[test]
    fn the_pin_limit_comes_first() {
        // Stage-model 6.2 (v2): with a 4 mA pin the base resistor may not go below
        // 4.05 V / 4 mA = 1012.5 ohm -> E24 1.1 kohm, whatever overdrive is asked.
        let c = conditions(0.004, 2.0);
        let s = size_base(&c, &corner(0.05, 20.0, 0.95));
        assert_eq!(s.rb.base(), 1100.0);
        assert_eq!(s.rb_pin.base(), 1100.0);
        assert!(!s.reached);
        let pin = corner(0.05, 20.0, 0.95).pin_current_max(&c, s.rb);
        assert!(pin <= c.pin_limit);
        // A higher target never gives a larger RB.
        let higher = size_base(&conditions(0.004, 5.0), &corner(0.05, 20.0, 0.95));
        assert!(higher.rb <= s.rb);
    }

    #[test]
    fn overdrive_is_none_when_the_stage_cannot_turn_on_or_carries_nothing() {
        let k = corner(0.05, 20.0, 0.95);
        assert_eq!(k.overdrive(amps(-1e-3)), None);
        assert_eq!(corner(0.0, 20.0, 0.95).overdrive(amps(1e-3)), None);
        assert_relative_eq!(
            k.overdrive(amps(5e-3)).unwrap_or(0.0),
            2.0,
            max_relative = 1e-12
        );
    }

    #[test]
    fn temperature_models() {
        // Gummel-Poon XTB = 1.5 (typical silicon, from memory): at -40 C the factor is
        // (233.15 / 298.15)^1.5 = 0.6915.
        assert_relative_eq!(
            gain_factor(celsius(-40.0), 1.5),
            0.6915,
            max_relative = 1e-3
        );
        // Cutoff edge about 0.5 V at 25 C (common practice), 0.38 V at 85 C at -2 mV/K.
        assert_relative_eq!(
            turn_on_edge(celsius(85.0)).base(),
            0.38,
            max_relative = 1e-12
        );
        // Common practice: ICBO doubles every 10 K; 50 nA at 25 C is 3.2 uA at 85 C (2^6).
        assert_relative_eq!(
            icbo_at(amps(50e-9), celsius(85.0)).base(),
            3.2e-6,
            max_relative = 1e-12
        );
    }
}
