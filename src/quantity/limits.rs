//! The ranges of numbers pinlow accepts from part files, board files and flags.
//!
//! Every figure a user gives must be positive and finite, and also inside a span wide enough for
//! any logic-driven transistor stage yet narrow enough that no product or quotient of the model
//! overflows to infinity or underflows to zero (1e300 ohms or 1e-300 amps would otherwise turn
//! into a silent "pass"). The spans are [practice]: generous bounds, not datasheet limits.

use super::format_engineering;

/// A closed range of accepted values with the unit used to print its ends.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Span {
    /// Smallest accepted value (positive).
    pub min: f64,
    /// Largest accepted value.
    pub max: f64,
    /// Unit symbol for messages (empty for plain numbers).
    pub unit: &'static str,
}

/// Voltages: 1 mV to 10 kV.
pub const VOLTS: Span = Span {
    min: 1e-3,
    max: 1e4,
    unit: "V",
};
/// Currents: 1 pA to 10 kA.
pub const AMPS: Span = Span {
    min: 1e-12,
    max: 1e4,
    unit: "A",
};
/// Leakage currents (ICBO): 1 aA to 1 A.
pub const LEAKAGE_AMPS: Span = Span {
    min: 1e-18,
    max: 1.0,
    unit: "A",
};
/// Resistances: 1 mΩ to 1 TΩ.
pub const OHMS: Span = Span {
    min: 1e-3,
    max: 1e12,
    unit: "Ω",
};
/// Inductances: 1 pH to 1 kH.
pub const HENRIES: Span = Span {
    min: 1e-12,
    max: 1e3,
    unit: "H",
};
/// Power ratings: 1 µW to 10 kW.
pub const WATTS: Span = Span {
    min: 1e-6,
    max: 1e4,
    unit: "W",
};
/// Lengths: 0.1 mm to 10 km.
pub const METRES: Span = Span {
    min: 1e-4,
    max: 1e4,
    unit: "m",
};
/// Times: 1 fs to 1000 s.
pub const SECONDS: Span = Span {
    min: 1e-15,
    max: 1e3,
    unit: "s",
};
/// DC gains: 0.001 to 10 million.
pub const GAIN: Span = Span {
    min: 1e-3,
    max: 1e7,
    unit: "",
};
/// Thermal resistances: 0.001 to 1 million K/W.
pub const KELVIN_PER_WATT: Span = Span {
    min: 1e-3,
    max: 1e6,
    unit: "K/W",
};

/// A number as a user would write it: plain (`0.05`, `4700`) in everyday magnitudes, with an
/// exponent (`1e300`, `1e-300`) outside them, so a message never runs to hundreds of digits.
pub fn show_number(v: f64) -> String {
    let a = v.abs();
    if a == 0.0 || !a.is_finite() || (1e-4..1e15).contains(&a) {
        format!("{v}")
    } else {
        format!("{v:e}")
    }
}

/// The span of the figures a kind of value gives (`None` for kinds without one).
pub fn span_of(kind: super::ValueKind) -> Option<Span> {
    use super::ValueKind as K;
    match kind {
        K::Voltage => Some(VOLTS),
        K::Current => Some(AMPS),
        K::Resistance => Some(OHMS),
        K::Power => Some(WATTS),
        K::Inductance => Some(HENRIES),
        K::Length => Some(METRES),
        K::Time => Some(SECONDS),
        K::Temperature | K::Fraction | K::Plain => None,
    }
}

impl Span {
    /// Why `v` is not accepted (without the number itself), or `None` when it is: it must be
    /// finite, positive and inside the span.
    pub fn reason(&self, v: f64) -> Option<String> {
        if !(v.is_finite() && v > 0.0) {
            return Some("a positive finite number is needed".to_string());
        }
        if v < self.min || v > self.max {
            return Some(format!("pinlow accepts {}", self.range_text()));
        }
        None
    }

    /// The accepted range in words (`1 mΩ to 1000 GΩ`).
    pub fn range_text(&self) -> String {
        format!("{} to {}", self.show(self.min), self.show(self.max))
    }

    /// `v` when it is finite, positive and inside the span; otherwise why not, in words.
    pub fn check(&self, v: f64) -> Result<f64, String> {
        if !(v.is_finite() && v > 0.0) {
            return Err(format!(
                "{} is not allowed: a positive finite number is needed",
                show_number(v)
            ));
        }
        if v < self.min || v > self.max {
            return Err(format!(
                "{} is not allowed: pinlow accepts {}",
                show_number(v),
                self.range_text()
            ));
        }
        Ok(v)
    }

    fn show(&self, v: f64) -> String {
        if self.unit.is_empty() {
            format!("{v}")
        } else {
            format_engineering(v, self.unit)
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn refuses_zero_negative_non_finite_and_huge() {
        for bad in [0.0, -1.0, f64::NAN, f64::INFINITY, f64::NEG_INFINITY] {
            let e = OHMS.check(bad).expect_err("refused");
            assert!(e.contains("positive finite"), "{bad}: {e}");
        }
        let e = OHMS.check(1e300).expect_err("1e300 ohms refused");
        assert!(
            e.starts_with("1e300 is not allowed") && e.contains("1 mΩ to 1000 GΩ"),
            "{e}"
        );
        let e = AMPS.check(1e-300).expect_err("1e-300 amps refused");
        assert!(e.contains("1 pA"), "{e}");
        let e = GAIN.check(1e9).expect_err("gain 1e9 refused");
        assert!(e.contains("0.001 to 10000000"), "{e}");
    }

    #[test]
    fn numbers_in_messages_stay_short() {
        assert_eq!(show_number(1e300), "1e300");
        assert_eq!(show_number(-1e-300), "-1e-300");
        assert_eq!(show_number(0.05), "0.05");
        assert_eq!(show_number(4700.0), "4700");
        assert_eq!(show_number(0.0), "0");
        assert_eq!(show_number(f64::NAN), "NaN");
    }

    #[test]
    fn accepts_the_ends_and_everyday_values() {
        assert_eq!(VOLTS.check(1e-3), Ok(1e-3));
        assert_eq!(VOLTS.check(1e4), Ok(1e4));
        assert_eq!(OHMS.check(4700.0), Ok(4700.0));
        assert_eq!(AMPS.check(0.02), Ok(0.02));
    }
}
