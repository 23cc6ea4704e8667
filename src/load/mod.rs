//! Load kinds: what the switch pins to ground. Each kind is one file behind the [`Load`] trait,
//! registered by one line in [`KINDS`]: its raw form and flags ([`LoadKind`]), its resolution
//! into typed values, its worst-case current, whether it kicks back, its own checks and
//! remedies, and its current law for the yield draws.
//!
//! To add a kind: write `src/load/NAME.rs` with a `pub static KIND: LoadKind` and a type that
//! implements [`Load`] (see `motor.rs`, the smallest inductive kind), add `mod NAME;` below and
//! `&NAME::KIND` to [`KINDS`]. Nothing else names load kinds.

mod clamp;
pub mod current;
pub mod led;
pub mod motor;
pub mod relay;
pub mod strip;

pub use clamp::{Clamp, ClampKey, ClampKind, ClampProposal, CLAMP_KINDS, CLAMP_REVERSE_MARGIN};
pub use led::Led;
pub use relay::Relay;

use std::fmt;
use std::sync::Arc;

use crate::check::{Figure, Finding};
use crate::conditions::Conditions;
use crate::fields::{Accepts, Fields, KeySpec, Origin, Resolution};
use crate::quantity::{
    Base, Current, Inductance, Power, Resistance, Temperature, ValueKind, Voltage,
};
use crate::remedy::Proposal;

/// Temperature coefficient of annealed copper at 20 C, per kelvin [std IEC 60028].
pub const COPPER_ALPHA_PER_K: f64 = 0.00393;
/// Reference temperature of coil resistance figures, C [std IEC 60028].
pub const COPPER_REF_C: f64 = 20.0;

/// Copper resistance at `t` from its 20 C value: R20 x (1 + 0.00393 x (T - 20))
/// [std IEC 60028 annealed copper].
pub fn copper_at(r20: Resistance, t: Temperature) -> Resistance {
    r20 * (1.0 + COPPER_ALPHA_PER_K * (t.base() - COPPER_REF_C))
}

/// Every load kind, in the order `--help` and the docs list them.
pub static KINDS: &[&LoadKind] = &[
    &current::KIND,
    &relay::KIND,
    &led::KIND,
    &strip::KIND,
    &motor::KIND,
];

/// The kind named `name`.
pub fn kind(name: &str) -> Option<&'static LoadKind> {
    KINDS.iter().copied().find(|k| k.name == name)
}

/// The names of every kind, for messages (`current, relay, led, strip, motor`).
pub fn kind_names() -> String {
    KINDS.iter().map(|k| k.name).collect::<Vec<_>>().join(", ")
}

/// One field of a load's raw form: its key in a board file and its command-line flag.
#[derive(Clone, Copy, Debug)]
pub struct Field {
    /// Key in the `load` object (`coil_ohms`).
    pub key: &'static str,
    /// The flag that sets it (`--coil`). Several kinds may share a flag when it means the same
    /// key (`--inductance` is `inductance_h` of a relay and of a motor).
    pub flag: &'static str,
    /// What the flag reads.
    pub value: ValueKind,
    /// Placeholder of the flag's value in `--help` (`OHMS`).
    pub value_name: &'static str,
    /// One line for `--help` and error messages: what the figure is.
    pub help: &'static str,
    /// The form the key takes in a file, for type errors (`a number of ohms, e.g. 400`).
    pub form: &'static str,
    /// The numbers it accepts.
    pub accepts: Accepts,
    /// True when the kind cannot do without it.
    pub required: bool,
}

/// The registration of a load kind.
pub struct LoadKind {
    /// The kind as written (`"kind": "relay"`, `--load relay`).
    pub name: &'static str,
    /// One line for `--help`.
    pub about: &'static str,
    /// Its fields (besides `kind`).
    pub fields: &'static [Field],
    /// Read the fields of a `load` object and resolve them into the typed load.
    pub resolve: fn(&Fields<'_>, &mut Resolution<'_>) -> crate::Result<Arc<dyn Load>>,
}

impl fmt::Debug for LoadKind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "LoadKind({})", self.name)
    }
}

impl LoadKind {
    /// The field with this key.
    pub fn field(&self, key: &str) -> Option<&'static Field> {
        self.fields.iter().find(|f| f.key == key)
    }

    /// The fields as the field reader takes them.
    pub fn specs(&self) -> Vec<KeySpec> {
        self.fields
            .iter()
            .map(|f| KeySpec {
                key: f.key,
                flag: f.flag,
                form: f.form,
                what: f.help,
            })
            .collect()
    }

    /// Resolve a `load` object of this kind (at `path`, from `origin`).
    pub fn read(
        &'static self,
        map: &serde_json::Map<String, serde_json::Value>,
        origin: &Origin,
        path: &str,
        res: &mut Resolution<'_>,
    ) -> crate::Result<SharedLoad> {
        let object = format!("a {} load", self.name);
        let fields = Fields::new(map, origin, path, &object, self.specs())?;
        (self.resolve)(&fields, res)
    }
}

/// What an inductive load stores when the switch opens.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Kick {
    /// Inductance, when the stage gives it.
    pub inductance: Option<Inductance>,
    /// The lowest winding resistance (cold, -tol): with L it sets the decay L/R.
    pub resistance_min: Resistance,
}

/// The on-voltage of the switch the load is in series with, as the drive gives it.
pub trait OnVoltage: fmt::Debug {
    /// At `current` and 25 C (the LED sizing's figure, stage-model 6.1).
    fn at_25c(&self, current: Current) -> Voltage;
    /// The worst-case on-voltage when the load corner draws `current_max` (VCE(sat),max at
    /// IC,max for an NPN; Von,max for a MOSFET).
    fn at_corner(&self, current_max: Current) -> Voltage;
}

/// A load's own series resistor (the LED string's RL), after sizing.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct OwnResistor {
    /// The value in use; `None` when sizing found none (no headroom).
    pub value: Option<Resistance>,
    /// Sized by the engine.
    pub sized: bool,
    /// The sizing bound RL,hi (ohms; may be <= 0) when sizing found no value.
    pub bound_ohms: Option<f64>,
}

/// What the load's checks look at.
#[derive(Clone, Copy, Debug)]
pub struct LoadContext<'a> {
    /// The stage's conditions.
    pub conditions: &'a Conditions,
    /// Highest supply.
    pub vcc_max: Voltage,
    /// Lowest supply.
    pub vcc_min: Voltage,
    /// IC,max (ID,max).
    pub current_max: Current,
    /// The switch's worst-case on-voltage at that current.
    pub on_voltage_max: Voltage,
    /// The load's own resistor, when it has one.
    pub own: Option<OwnResistor>,
    /// The switch's on-voltage, for a remedy that sizes the load's own resistor again.
    pub on: &'a dyn OnVoltage,
}

/// How a load's current follows the drawn inputs of one build (the yield's draws): a small
/// vocabulary that the yield model evaluates in blocks. VCE(sat) is taken as 0 in every law, as
/// in the worst-case corner.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum CurrentLaw {
    /// A fixed current, A.
    Fixed(f64),
    /// Supply over a copper winding: VCC / (R20 x (1 + alpha (Ta - 20))), R20 drawn within +/- tol.
    Copper {
        /// Winding at 20 C, ohms.
        r20: f64,
        /// +/- fraction.
        tolerance: f64,
    },
    /// A strip: I_rated x max(1, 1 + (VCC - Vrated) / (0.25 Vrated)).
    Strip {
        /// Current at the rated voltage, A.
        rated_current: f64,
        /// Rated voltage, V.
        rated_v: f64,
    },
    /// LEDs in series with a resistor drawn within the resistor tolerance: (VCC - sum Vf) / RL.
    Led {
        /// LEDs in series.
        count: u32,
        /// Lowest forward voltage of one LED, V.
        forward_min: f64,
        /// Highest less lowest forward voltage of one LED, V.
        forward_span: f64,
        /// The resistor, ohms.
        rl: f64,
    },
}

/// A load the switch pins to ground.
pub trait Load: Send + Sync + fmt::Debug {
    /// The registration of its kind.
    fn kind(&self) -> &'static LoadKind;

    /// True when it works contacts the model does not see (a relay's): the report then cautions
    /// that only the coil side is checked.
    fn works_contacts(&self) -> bool {
        false
    }

    /// What it stores at turn-off, for loads that kick back (relay, motor); `None` otherwise.
    fn kick(&self, _conditions: &Conditions) -> Option<Kick> {
        None
    }

    /// Its own series resistor as given: `Some(None)` to size one, `None` for a load without.
    fn own_resistor_given(&self) -> Option<Option<Resistance>> {
        None
    }

    /// The key of its own resistor inside the `load` object (`resistor_ohms`).
    fn own_resistor_key(&self) -> Option<&'static str> {
        None
    }

    /// Size its own resistor (stage-model 6.1) when it has one to size.
    fn size(&self, _conditions: &Conditions, _on: &dyn OnVoltage) -> Option<OwnResistor> {
        None
    }

    /// The worst-case (largest) current of stage-model 4, never negative; `own` the resistor in
    /// use for a load that has one.
    fn current_max(&self, conditions: &Conditions, own: Option<Resistance>) -> Current;

    /// The most of VCC,max x IC,max a switch in its linear region can dissipate with this load:
    /// 1/4 for a resistive load, 1 for a current load [text] (stage-model 4).
    fn linear_power_fraction(&self) -> f64 {
        0.25
    }

    /// The worst power in its own resistor (stage-model 5).
    fn own_resistor_power(&self, _conditions: &Conditions, _own: Resistance) -> Option<Power> {
        None
    }

    /// Its own checks (coil-voltage, coil-pull-in, led-current, strip-voltage ...).
    fn checks(&self, _ctx: &LoadContext<'_>, _out: &mut Vec<Finding>) {}

    /// Its figures for the report's worst case (`led_current_min_a` ...), after the drive's.
    fn figures(&self, _ctx: &LoadContext<'_>) -> Vec<Figure> {
        Vec::new()
    }

    /// A remedy for one of its own checks that is not a pass.
    fn remedy(&self, _finding: &Finding, _ctx: &LoadContext<'_>) -> Option<Proposal> {
        None
    }

    /// Its current law for the yield draws; `None`: not modelled.
    fn current_law(&self, own: Option<Resistance>) -> Option<CurrentLaw>;
}

/// A shared load.
pub type SharedLoad = Arc<dyn Load>;

#[cfg(test)]
mod tests {
    use super::*;
    use crate::quantity::{celsius, ohms};
    use approx::assert_relative_eq;

    #[test]
    fn copper_coil_warms_per_iec_60028() {
        // IEC 60028 annealed copper, alpha20 = 0.00393/K: a 320 ohm coil (at 25 C) is about
        // 443 ohm at 125 C. From 25 C: R20 = 320 / (1 + 0.00393 x 5) = 313.83 ohm; at 125 C
        // R = 313.83 x (1 + 0.00393 x 105) = 443.3 ohm.
        let r20 = ohms(320.0 / (1.0 + 0.00393 * 5.0));
        assert_relative_eq!(
            copper_at(r20, celsius(25.0)).base(),
            320.0,
            max_relative = 1e-9
        );
        assert_relative_eq!(
            copper_at(r20, celsius(125.0)).base(),
            443.0,
            max_relative = 0.002
        );
    }

    #[test]
    fn flags_shared_between_kinds_mean_one_key() {
        // A flag two kinds share must set the same key and read the same kind of value, so that
        // the command line has one meaning for it.
        for a in KINDS {
            for b in KINDS {
                for fa in a.fields {
                    for fb in b.fields.iter().filter(|fb| fb.flag == fa.flag) {
                        assert_eq!(fa.key, fb.key, "{} in {} and {}", fa.flag, a.name, b.name);
                        assert_eq!(fa.value, fb.value, "{}", fa.flag);
                    }
                }
            }
        }
        assert_eq!(kind_names(), "current, relay, led, strip, motor");
    }
}
