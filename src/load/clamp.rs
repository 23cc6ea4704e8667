//! The turn-off clamp across an inductive load (relay, motor), read from its raw object, and the
//! ratings the engine proposes for it (stage-model 6.3).

use serde_json::{Map, Value};

use crate::error::{Error, Result};
use crate::fields::{Accepts, Fields, KeySpec, Origin, Resolution};
use crate::quantity::limits::{AMPS, VOLTS};
use crate::quantity::{amps, format_engineering as fe, volts, Current, Energy, Time, Voltage};

/// Clamp diode forward drop when none is given, V [memory].
pub const DEFAULT_CLAMP_FORWARD_V: f64 = 1.0;
/// A clamp's reverse rating should reach this many times the highest supply [practice].
pub const CLAMP_REVERSE_MARGIN: f64 = 1.5;

/// The turn-off clamp across an inductive load.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Clamp {
    /// No clamp.
    None,
    /// A diode across the coil.
    Diode {
        /// Forward drop while it carries the coil current.
        forward: Voltage,
        /// Reverse voltage rating, when stated.
        reverse: Option<Voltage>,
        /// Current rating, when stated.
        current: Option<Current>,
    },
    /// A diode in series with a Zener (faster release, higher collector peak).
    Zener {
        /// Forward drop of the diode.
        forward: Voltage,
        /// Zener voltage.
        zener: Voltage,
        /// Reverse voltage rating, when stated.
        reverse: Option<Voltage>,
        /// Current rating, when stated.
        current: Option<Current>,
    },
}

impl Clamp {
    /// The voltage above the supply that the clamp holds the switch to at turn-off.
    pub fn voltage(&self) -> Option<Voltage> {
        match self {
            Clamp::None => None,
            Clamp::Diode { forward, .. } => Some(*forward),
            Clamp::Zener { forward, zener, .. } => Some(*forward + *zener),
        }
    }

    /// Reverse and current ratings, when the clamp states any.
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

    /// Read a `clamp` object (at `path`, from `origin`).
    pub fn resolve(
        map: &Map<String, Value>,
        origin: &Origin,
        path: &str,
        res: &mut Resolution<'_>,
    ) -> Result<Clamp> {
        let kind = match map.get("kind") {
            Some(Value::String(k)) => k.as_str(),
            Some(_) | None => {
                let place = match origin {
                    Origin::Flags => crate::error::Place::Flag("--clamp".into()),
                    Origin::File(f) => crate::error::Place::json(f.clone(), format!("{path}.kind")),
                };
                return Err(Error::invalid(
                    place,
                    "a clamp needs `kind`: none, diode or zener",
                ));
            }
        };
        let specs = match CLAMP_KINDS.iter().find(|k| k.name == kind) {
            Some(k) => k.keys.iter().map(|key| key.spec).collect(),
            None => {
                let place = match origin {
                    Origin::Flags => crate::error::Place::Flag("--clamp".into()),
                    Origin::File(f) => crate::error::Place::json(f.clone(), format!("{path}.kind")),
                };
                return Err(Error::invalid(
                    place,
                    format!("unknown clamp kind `{kind}`; the kinds are none, diode and zener"),
                ));
            }
        };
        let f = Fields::new(map, origin, path, &format!("a {kind} clamp"), specs)?;
        let forward = |res: &mut Resolution<'_>| -> Result<Voltage> {
            Ok(volts(match f.number("forward_v", VOLTS)? {
                Some(v) => v,
                None => {
                    res.assume(format!(
                        "clamp diode forward drop {} assumed [memory]",
                        fe(DEFAULT_CLAMP_FORWARD_V, "V")
                    ));
                    DEFAULT_CLAMP_FORWARD_V
                }
            }))
        };
        Ok(match kind {
            "none" => Clamp::None,
            "diode" => Clamp::Diode {
                forward: forward(res)?,
                reverse: f.number("reverse_v", VOLTS)?.map(volts),
                current: f.number("current_a", AMPS)?.map(amps),
            },
            _ => Clamp::Zener {
                zener: volts(f.need("zener_v", VOLTS)?),
                forward: forward(res)?,
                reverse: f.number("reverse_v", VOLTS)?.map(volts),
                current: f.number("current_a", AMPS)?.map(amps),
            },
        })
    }
}

/// A clamp kind as a board file writes it: `"kind": name` and the keys it takes.
#[derive(Clone, Copy, Debug)]
pub struct ClampKind {
    /// `none`, `diode` or `zener`.
    pub name: &'static str,
    /// One line for people.
    pub about: &'static str,
    /// Its keys besides `kind`.
    pub keys: &'static [ClampKey],
}

/// One key of a clamp object.
#[derive(Clone, Copy, Debug)]
pub struct ClampKey {
    /// The key, its flag, form and meaning.
    pub spec: KeySpec,
    /// The numbers it accepts.
    pub accepts: Accepts,
    /// True when the kind cannot do without it.
    pub required: bool,
}

/// Every clamp kind, with the keys [`Clamp::resolve`] reads.
pub static CLAMP_KINDS: &[ClampKind] = &[
    ClampKind {
        name: "none",
        about: "no clamp",
        keys: &[],
    },
    ClampKind {
        name: "diode",
        about: "a diode across the coil",
        keys: &[
            ClampKey {
                spec: FORWARD,
                accepts: Accepts::Span(VOLTS),
                required: false,
            },
            ClampKey {
                spec: REVERSE,
                accepts: Accepts::Span(VOLTS),
                required: false,
            },
            ClampKey {
                spec: CURRENT,
                accepts: Accepts::Span(AMPS),
                required: false,
            },
        ],
    },
    ClampKind {
        name: "zener",
        about: "a diode in series with a Zener across the coil (faster release, higher peak)",
        keys: &[
            ClampKey {
                spec: ZENER,
                accepts: Accepts::Span(VOLTS),
                required: true,
            },
            ClampKey {
                spec: FORWARD,
                accepts: Accepts::Span(VOLTS),
                required: false,
            },
            ClampKey {
                spec: REVERSE,
                accepts: Accepts::Span(VOLTS),
                required: false,
            },
            ClampKey {
                spec: CURRENT,
                accepts: Accepts::Span(AMPS),
                required: false,
            },
        ],
    },
];

const FORWARD: KeySpec = KeySpec {
    key: "forward_v",
    flag: "--clamp-forward",
    form: "a number of volts, e.g. 1",
    what: "the diode's forward drop",
};
const REVERSE: KeySpec = KeySpec {
    key: "reverse_v",
    flag: "--clamp-reverse",
    form: "a number of volts, e.g. 100",
    what: "the diode's reverse rating",
};
const CURRENT: KeySpec = KeySpec {
    key: "current_a",
    flag: "--clamp-current",
    form: "a number of amperes, e.g. 1",
    what: "the diode's current rating",
};
const ZENER: KeySpec = KeySpec {
    key: "zener_v",
    flag: "--zener",
    form: "a number of volts, e.g. 24",
    what: "the Zener voltage",
};

/// What the clamp of an inductive load needs (stage-model 6.3): minimum ratings.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ClampProposal {
    /// Reverse rating at least 1.5 x VCC,max.
    pub reverse_min: Voltage,
    /// Current rating at least IC,max.
    pub current_min: Current,
    /// L I^2 / 2 at IC,max, when L is known.
    pub stored_energy: Option<Energy>,
    /// L / R with the lowest winding resistance, when L is known.
    pub decay_time_constant: Option<Time>,
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::conditions::{Conditions, InputResistors, PullDown};
    use crate::eseries::Series;
    use crate::quantity::{celsius, Base};

    fn conditions() -> Conditions {
        Conditions {
            supply: volts(12.0),
            supply_tolerance: 0.05,
            logic_high: volts(3.3),
            logic_high_min: volts(2.9),
            pin_limit: amps(0.004),
            ambient_min: celsius(0.0),
            ambient_max: celsius(70.0),
            resistor_tolerance: 0.05,
            series: Series::E24,
            resistor_rating: None,
            inputs: InputResistors {
                series: None,
                pull_down: PullDown::Sized,
            },
            overdrive: 2.0,
        }
    }

    fn read(text: &str) -> Result<Clamp> {
        let map: Map<String, Value> = serde_json::from_str(text).expect("json");
        let c = conditions();
        let mut notes = Vec::new();
        let mut res = Resolution {
            conditions: &c,
            assumptions: &mut notes,
        };
        Clamp::resolve(
            &map,
            &Origin::File("b.json".into()),
            "stages[0].clamp",
            &mut res,
        )
    }

    #[test]
    fn clamp_voltage_adds_zener_and_diode() {
        let z = read(r#"{"kind": "zener", "zener_v": 24}"#).expect("zener");
        assert_eq!(z.voltage().map(|v| v.base()), Some(25.0));
        assert!(Clamp::None.voltage().is_none());
    }

    #[test]
    fn every_clamp_kind_refuses_keys_it_does_not_take() {
        let err = read(r#"{"kind": "none", "typo_key": 1, "zener_v": 24}"#)
            .expect_err("none takes no keys")
            .to_string();
        assert!(
            err.contains("unknown key `typo_key` for a none clamp"),
            "{err}"
        );
        let err = read(r#"{"kind": "diode", "zener_v": 24}"#)
            .expect_err("a diode has no Zener voltage")
            .to_string();
        assert!(err.contains("stages[0].clamp.zener_v"), "{err}");
        let err = read(r#"{"kind": "snubber"}"#)
            .expect_err("unknown kind")
            .to_string();
        assert!(err.contains("unknown clamp kind `snubber`"), "{err}");
    }
}
