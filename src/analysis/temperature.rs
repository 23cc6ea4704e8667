//! Temperature models of the transistor (stage-model 3). Copper lives in `load`.

use crate::quantity::{amps, volts, Base, Current, Temperature, Voltage};

/// Reference temperature of datasheet figures, C.
pub const T_REF_C: f64 = 25.0;
/// VBE temperature coefficient, V/K [text: about -2 mV/K for a silicon junction].
pub const VBE_TEMPCO_V_PER_K: f64 = -0.002;
/// Turn-on edge at 25 C: below it the base draws negligible current, V [practice].
pub const TURN_ON_EDGE_25C_V: f64 = 0.5;
/// ICBO doubles every this many kelvins [practice].
pub const ICBO_DOUBLING_K: f64 = 10.0;
/// 0 C in kelvins.
pub const ZERO_C_IN_K: f64 = 273.15;

/// Gain multiplier at `t` against 25 C: ((T + 273.15) / 298.15)^XTB
/// [text: Gummel-Poon beta temperature exponent].
pub fn gain_factor(t: Temperature, xtb: f64) -> f64 {
    ((t.base() + ZERO_C_IN_K) / (T_REF_C + ZERO_C_IN_K)).powf(xtb)
}

/// A 25 C junction voltage moved to `t` at -2 mV/K [text].
pub fn vbe_at(v25: Voltage, t: Temperature) -> Voltage {
    v25 + volts(VBE_TEMPCO_V_PER_K * (t.base() - T_REF_C))
}

/// The turn-on edge at `t`: 0.5 V at 25 C [practice], moving at -2 mV/K [text].
pub fn turn_on_edge(t: Temperature) -> Voltage {
    vbe_at(volts(TURN_ON_EDGE_25C_V), t)
}

/// ICBO at `t`, doubling every 10 K from its 25 C maximum [practice].
pub fn icbo_at(icbo25: Current, t: Temperature) -> Current {
    amps(icbo25.base() * 2f64.powf((t.base() - T_REF_C) / ICBO_DOUBLING_K))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::quantity::celsius;
    use approx::assert_relative_eq;

    #[test]
    fn gain_falls_when_cold() {
        // Gummel-Poon XTB = 1.5 (typical silicon, from memory): at -40 C the factor is
        // (233.15 / 298.15)^1.5 = 0.6915.
        assert_relative_eq!(
            gain_factor(celsius(-40.0), 1.5),
            0.6915,
            max_relative = 1e-3
        );
        assert_relative_eq!(gain_factor(celsius(25.0), 1.5), 1.0);
    }

    #[test]
    fn vbe_rises_two_millivolts_per_kelvin_colder() {
        // Common practice / textbook: VBE falls about 2 mV per kelvin; 0.7 V at 25 C is 0.83 V
        // at -40 C.
        assert_relative_eq!(
            vbe_at(volts(0.7), celsius(-40.0)).base(),
            0.83,
            max_relative = 1e-12
        );
        // Cutoff edge about 0.5 V at 25 C (common practice), 0.38 V at 85 C.
        assert_relative_eq!(
            turn_on_edge(celsius(85.0)).base(),
            0.38,
            max_relative = 1e-12
        );
    }

    #[test]
    fn leakage_doubles_every_ten_kelvin() {
        // Common practice: ICBO doubles every 10 K; 50 nA at 25 C is 3.2 uA at 85 C (2^6).
        assert_relative_eq!(
            icbo_at(amps(50e-9), celsius(85.0)).base(),
            3.2e-6,
            max_relative = 1e-12
        );
    }
}
