//! The load kinds a stage can switch, the clamp across an inductive load, and the worst-case
//! collector current each load can draw (stage-model 4).

use crate::quantity::{amps, ohms, Base, Current, Inductance, Resistance, Temperature, Voltage};

/// Temperature coefficient of annealed copper at 20 C, per kelvin [std IEC 60028].
pub const COPPER_ALPHA_PER_K: f64 = 0.00393;
/// Reference temperature of coil resistance figures, C [std IEC 60028].
pub const COPPER_REF_C: f64 = 20.0;

/// What the transistor pins low.
#[derive(Clone, Debug, PartialEq)]
pub enum Load {
    /// A load that draws at most a fixed current.
    Current {
        /// The most the load draws.
        current: Current,
    },
    /// A relay coil (inductive).
    Relay(Relay),
    /// LEDs in series with a resistor.
    Led(Led),
    /// A constant-voltage LED strip segment with on-board resistors.
    Strip(Strip),
}

/// A relay coil.
#[derive(Clone, Debug, PartialEq)]
pub struct Relay {
    /// Coil resistance at 20 C.
    pub coil_20c: Resistance,
    /// +/- fraction of the coil resistance.
    pub tolerance: f64,
    /// Rated coil voltage.
    pub rated: Voltage,
    /// Must-operate voltage as a fraction of the rated voltage.
    pub must_operate_fraction: f64,
    /// Coil inductance, when known.
    pub inductance: Option<Inductance>,
}

/// A string of LEDs with its series resistor.
#[derive(Clone, Debug, PartialEq)]
pub struct Led {
    /// LEDs in series.
    pub count: u32,
    /// Nominal forward voltage of one LED.
    pub forward: Voltage,
    /// Lowest forward voltage of one LED.
    pub forward_min: Voltage,
    /// Highest forward voltage of one LED.
    pub forward_max: Voltage,
    /// Target current.
    pub current: Current,
    /// Absolute maximum current, when given.
    pub max_current: Option<Current>,
    /// Series resistor; `None` means size it.
    pub resistor: Option<Resistance>,
}

/// A constant-voltage LED strip segment.
#[derive(Clone, Debug, PartialEq)]
pub struct Strip {
    /// Rated strip voltage.
    pub rated: Voltage,
    /// Current of one metre at the rated voltage.
    pub current_per_metre: Current,
    /// Segment length in metres.
    pub length_m: f64,
}

/// The turn-off clamp across an inductive load.
#[derive(Clone, Debug, PartialEq)]
pub enum Clamp {
    /// No clamp.
    None,
    /// A diode across the coil.
    Diode {
        /// Forward drop while it carries the coil current.
        forward: Voltage,
        /// Reverse voltage rating, when known.
        reverse: Option<Voltage>,
        /// Current rating, when known.
        current: Option<Current>,
    },
    /// A diode in series with a Zener (faster release, higher collector peak).
    Zener {
        /// Forward drop of the diode.
        forward: Voltage,
        /// Zener voltage.
        zener: Voltage,
        /// Reverse voltage rating, when known.
        reverse: Option<Voltage>,
        /// Current rating, when known.
        current: Option<Current>,
    },
}

impl Clamp {
    /// The voltage above the supply that the clamp holds the collector to at turn-off.
    pub fn voltage(&self) -> Option<Voltage> {
        match self {
            Clamp::None => None,
            Clamp::Diode { forward, .. } => Some(*forward),
            Clamp::Zener { forward, zener, .. } => Some(*forward + *zener),
        }
    }

    /// Reverse and current ratings, when the clamp has any.
    pub fn ratings(&self) -> (Option<Voltage>, Option<Current>) {
        match self {
            Clamp::None => (None, None),
            Clamp::Diode {
                reverse, current, ..
            }
            | Clamp::Zener {
                reverse, current, ..
            } => (*reverse, *current),
        }
    }

    /// `none`, `diode` or `zener`.
    pub fn kind_name(&self) -> &'static str {
        match self {
            Clamp::None => "none",
            Clamp::Diode { .. } => "diode",
            Clamp::Zener { .. } => "zener",
        }
    }
}

impl Relay {
    /// Copper coil resistance at `t`: R20 x (1 + 0.00393 x (T - 20)) [std IEC 60028].
    pub fn coil_at(&self, t: Temperature) -> Resistance {
        copper_at(self.coil_20c, t)
    }

    /// The lowest coil resistance: cold copper at -tol.
    pub fn coil_min(&self, t_min: Temperature) -> Resistance {
        self.coil_at(t_min) * (1.0 - self.tolerance)
    }
}

/// Copper resistance at `t` from its 20 C value [std IEC 60028 annealed copper].
pub fn copper_at(r20: Resistance, t: Temperature) -> Resistance {
    r20 * (1.0 + COPPER_ALPHA_PER_K * (t.base() - COPPER_REF_C))
}

impl Strip {
    /// The strip modelled as a resistor: Rs = Vrated / (I per metre x length).
    pub fn resistance(&self) -> Resistance {
        ohms(self.rated.base() / (self.current_per_metre.base() * self.length_m))
    }
}

impl Led {
    /// The string's drop with every LED at the lowest forward voltage.
    pub fn drop_min(&self) -> Voltage {
        self.forward_min * f64::from(self.count)
    }
    /// The string's drop with every LED at the highest forward voltage.
    pub fn drop_max(&self) -> Voltage {
        self.forward_max * f64::from(self.count)
    }
    /// The string's nominal drop.
    pub fn drop_nominal(&self) -> Voltage {
        self.forward * f64::from(self.count)
    }
}

impl Load {
    /// `current`, `relay`, `led` or `strip`.
    pub fn kind_name(&self) -> &'static str {
        match self {
            Load::Current { .. } => "current",
            Load::Relay(_) => "relay",
            Load::Led(_) => "led",
            Load::Strip(_) => "strip",
        }
    }

    /// True for loads that kick back at turn-off.
    pub fn is_inductive(&self) -> bool {
        matches!(self, Load::Relay(_))
    }

    /// Worst-case (largest) collector current, VCE(sat) taken as 0 (conservative), stage-model 4.
    /// `led_resistor` is the LED resistor in use; `None` for an LED load that could not be sized,
    /// in which case the target current stands in. Never negative.
    pub fn collector_current_max(
        &self,
        vcc_max: Voltage,
        t_min: Temperature,
        resistor_tolerance: f64,
        led_resistor: Option<Resistance>,
    ) -> Current {
        let i = match self {
            Load::Current { current } => *current,
            Load::Relay(r) => vcc_max / r.coil_min(t_min),
            Load::Led(led) => match led_resistor {
                Some(rl) => (vcc_max - led.drop_min()) / (rl * (1.0 - resistor_tolerance)),
                None => led.current,
            },
            Load::Strip(s) => vcc_max / s.resistance(),
        };
        if i.base() > 0.0 {
            i
        } else {
            amps(0.0)
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::quantity::{celsius, volts};
    use approx::assert_relative_eq;

    #[test]
    fn copper_coil_warms_per_iec_60028() {
        // IEC 60028 annealed copper, alpha20 = 0.00393/K: a 320 ohm coil (at 25 C) is about
        // 443 ohm at 125 C. From 25 C: R20 = 320 / (1 + 0.00393 x 5) = 313.83 ohm; at 125 C
        // R = 313.83 x (1 + 0.00393 x 105) = 443.3 ohm.
        let r20 = 320.0 / (1.0 + 0.00393 * 5.0);
        let relay = Relay {
            coil_20c: ohms(r20),
            tolerance: 0.0,
            rated: volts(12.0),
            must_operate_fraction: 0.75,
            inductance: None,
        };
        assert_relative_eq!(
            relay.coil_at(celsius(25.0)).base(),
            320.0,
            max_relative = 1e-9
        );
        assert_relative_eq!(
            relay.coil_at(celsius(125.0)).base(),
            443.0,
            max_relative = 0.002
        );
    }

    #[test]
    fn relay_current_uses_cold_low_tolerance_coil() {
        let relay = Load::Relay(Relay {
            coil_20c: ohms(400.0),
            tolerance: 0.1,
            rated: volts(12.0),
            must_operate_fraction: 0.75,
            inductance: None,
        });
        // Hand-worked: at -20 C the coil is 400 x (1 - 0.00393 x 40) = 337.12 ohm; at -10 %
        // 303.408 ohm; 12.6 V / 303.408 ohm = 41.53 mA.
        let i = relay.collector_current_max(volts(12.6), celsius(-20.0), 0.05, None);
        assert_relative_eq!(i.base(), 12.6 / 303.408, max_relative = 1e-9);
    }

    #[test]
    fn strip_is_a_resistor() {
        let s = Strip {
            rated: volts(12.0),
            current_per_metre: amps(0.5),
            length_m: 2.0,
        };
        assert_relative_eq!(s.resistance().base(), 12.0);
        let load = Load::Strip(s);
        let i = load.collector_current_max(volts(12.6), celsius(0.0), 0.05, None);
        assert_relative_eq!(i.base(), 1.05, max_relative = 1e-12);
    }

    #[test]
    fn led_current_never_negative() {
        let led = Load::Led(Led {
            count: 4,
            forward: volts(3.0),
            forward_min: volts(2.8),
            forward_max: volts(3.2),
            current: amps(0.02),
            max_current: None,
            resistor: Some(ohms(100.0)),
        });
        let i = led.collector_current_max(volts(5.0), celsius(0.0), 0.05, Some(ohms(100.0)));
        assert_eq!(i.base(), 0.0);
    }

    #[test]
    fn clamp_voltage_adds_zener_and_diode() {
        let z = Clamp::Zener {
            forward: volts(1.0),
            zener: volts(24.0),
            reverse: None,
            current: None,
        };
        assert_relative_eq!(z.voltage().map(|v| v.base()).unwrap_or(0.0), 25.0);
        assert!(Clamp::None.voltage().is_none());
    }
}
