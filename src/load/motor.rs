//! The motor load (stage-model 2 v2): a brushed DC motor, pump or fan winding. At start and
//! when stalled it draws the supply over its cold winding resistance (no back-EMF at standstill),
//! and a jammed rotor lasts, so the stall current is its worst case for every check. Inductive:
//! it needs a clamp. It has no checks of its own; the drive-neutral ones cover it.
//!
//! This file is the worked example of a load kind: a registration ([`KIND`]: name, fields and
//! flags, resolution) and a type that implements [`Load`].

use std::sync::Arc;

use super::{copper_at, CurrentLaw, Field, Kick, Load, LoadKind, SharedLoad};
use crate::conditions::Conditions;
use crate::fields::{pct, Accepts, Fields, Resolution};
use crate::quantity::limits::{HENRIES, OHMS};
use crate::quantity::{amps, henries, ohms, Base, Current, Inductance, Resistance, ValueKind};

/// Winding resistance tolerance when none is given [practice].
pub const DEFAULT_WINDING_TOLERANCE: f64 = 0.10;

/// The registration of the motor load.
pub static KIND: LoadKind = LoadKind {
    name: "motor",
    about: "a brushed DC motor, pump or fan: stall current at a cold winding (inductive: needs a clamp)",
    fields: &[
        Field {
            key: "winding_ohms",
            flag: "--winding",
            value: ValueKind::Resistance,
            value_name: "OHMS",
            help: "the winding resistance at 20 °C (measured across the terminals, rotor still), e.g. 6R",
            form: "a number of ohms, e.g. 6",
            accepts: Accepts::Span(OHMS),
            required: true,
        },
        Field {
            key: "winding_tolerance",
            flag: "--winding-tolerance",
            value: ValueKind::Fraction,
            value_name: "FRACTION",
            help: "the winding resistance tolerance [default: 10 %]",
            form: "a fraction, e.g. 0.1 for ±10 %",
            accepts: Accepts::Fraction,
            required: false,
        },
        Field {
            key: "inductance_h",
            flag: "--inductance",
            value: ValueKind::Inductance,
            value_name: "HENRIES",
            help: "the winding's inductance, e.g. 200mH (gives the stored energy and decay)",
            form: "a number of henries, e.g. 0.002",
            accepts: Accepts::Span(HENRIES),
            required: false,
        },
    ],
    resolve,
};

/// A motor winding.
#[derive(Clone, Debug, PartialEq)]
pub struct Motor {
    /// Winding resistance at 20 C.
    pub winding_20c: Resistance,
    /// +/- fraction of the winding resistance.
    pub tolerance: f64,
    /// Winding inductance, when known.
    pub inductance: Option<Inductance>,
}

fn resolve(f: &Fields<'_>, res: &mut Resolution<'_>) -> crate::Result<SharedLoad> {
    let tolerance = match f.fraction("winding_tolerance")? {
        Some(t) => t,
        None => {
            res.assume(format!(
                "winding tolerance ±{} assumed [practice]",
                pct(DEFAULT_WINDING_TOLERANCE)
            ));
            DEFAULT_WINDING_TOLERANCE
        }
    };
    Ok(Arc::new(Motor {
        winding_20c: ohms(f.need("winding_ohms", OHMS)?),
        tolerance,
        inductance: f.number("inductance_h", HENRIES)?.map(henries),
    }))
}

impl Motor {
    /// The lowest winding resistance: cold copper at -tol [std IEC 60028].
    fn winding_min(&self, c: &Conditions) -> Resistance {
        copper_at(self.winding_20c, c.ambient_min) * (1.0 - self.tolerance)
    }
}

impl Load for Motor {
    fn kind(&self) -> &'static LoadKind {
        &KIND
    }

    fn kick(&self, c: &Conditions) -> Option<Kick> {
        Some(Kick {
            inductance: self.inductance,
            resistance_min: self.winding_min(c),
        })
    }

    /// The stall current VCC,max / Rw(1 - tol) at Ta,min [text: no back-EMF at standstill].
    fn current_max(&self, c: &Conditions, _own: Option<Resistance>) -> Current {
        let i: Current = c.supply_max() / self.winding_min(c);
        amps(i.base().max(0.0))
    }

    fn current_law(&self, _own: Option<Resistance>) -> Option<CurrentLaw> {
        Some(CurrentLaw::Copper {
            r20: self.winding_20c.base(),
            tolerance: self.tolerance,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::conditions::{InputResistors, PullDown};
    use crate::eseries::Series;
    use crate::quantity::{celsius, volts};
    use approx::assert_relative_eq;

    #[test]
    fn stall_current_is_the_supply_over_the_cold_winding() {
        // Ohm's law at standstill (no back-EMF), copper per IEC 60028: a 6 ohm winding at
        // -20 C is 6 x (1 - 0.00393 x 40) = 5.0568 ohm, at -10 % 4.55112 ohm; 12.6 V / 4.55112
        // ohm = 2.7686 A.
        let c = Conditions {
            supply: volts(12.0),
            supply_tolerance: 0.05,
            logic_high: volts(3.3),
            logic_high_min: volts(2.9),
            pin_limit: amps(0.004),
            ambient_min: celsius(-20.0),
            ambient_max: celsius(60.0),
            resistor_tolerance: 0.05,
            series: Series::E24,
            resistor_rating: None,
            inputs: InputResistors {
                series: None,
                pull_down: PullDown::Sized,
            },
            overdrive: 2.0,
        };
        let m = Motor {
            winding_20c: ohms(6.0),
            tolerance: 0.1,
            inductance: None,
        };
        assert_relative_eq!(
            m.current_max(&c, None).base(),
            12.6 / 4.55112,
            max_relative = 1e-9
        );
        assert!(m.kick(&c).is_some(), "a winding kicks back");
    }
}
