//! Resolve a raw stage (own fields over the board defaults over the model's defaults) into a
//! typed [`Stage`], validating every value where it stands and listing each default taken.

use super::fields::{flag_for, fraction, pct, raw_kind, sub_place, within};
use super::raw::{Grade, RawClamp, RawLoad, RawStage};
use crate::error::{Error, Result};
use crate::eseries::Series;
use crate::load::{Clamp, Led, Load, Relay, Strip};
use crate::parts::Library;
use crate::quantity::limits::{show_number, AMPS, HENRIES, METRES, OHMS, VOLTS, WATTS};
use crate::quantity::{amps, celsius, format_engineering as fe, henries, ohms, volts, watts};
use crate::stage::{PullDown, Stage};

/// Supply tolerance when none is given [practice].
pub const DEFAULT_SUPPLY_TOLERANCE: f64 = 0.05;
/// VOH,min = logic high minus this when none is given, V [practice, CMOS outputs].
pub const DEFAULT_LOGIC_HIGH_DROP_V: f64 = 0.4;
/// Pin source limit when none is given, A [practice, conservative].
pub const DEFAULT_PIN_LIMIT_A: f64 = 0.004;
/// Coil resistance tolerance when none is given [practice].
pub const DEFAULT_COIL_TOLERANCE: f64 = 0.10;
/// Must-operate fraction of the rated coil voltage when none is given [practice].
pub const DEFAULT_MUST_OPERATE_FRACTION: f64 = 0.75;
/// LED forward voltage spread when no limits are given, V per LED [memory].
pub const DEFAULT_LED_VF_SPREAD_V: f64 = 0.2;
/// Clamp diode forward drop when none is given, V [memory].
pub const DEFAULT_CLAMP_FORWARD_V: f64 = 1.0;
/// Resistor tolerance when none is given [practice].
pub const DEFAULT_RESISTOR_TOLERANCE: f64 = 0.05;
/// Overdrive when none is given [practice: 2 to 5].
pub const DEFAULT_OVERDRIVE: f64 = 2.0;

/// Ambient temperatures the models hold for, C [practice]. The linear copper model
/// (IEC 60028) gives a negative coil resistance below about -234.5 C, which would read as a coil
/// that draws no current; -100 .. 250 C is far wider than any rated part and keeps every
/// temperature model positive.
pub const AMBIENT_RANGE_C: std::ops::RangeInclusive<f64> = -100.0..=250.0;

/// Where a stage was written: a board file or the command line.
#[derive(Clone, Debug)]
pub enum Origin {
    /// A board file (its name as given) and the stage's index.
    File {
        /// The file name.
        file: String,
        /// Index in `stages`.
        index: usize,
    },
    /// Stage flags on the command line.
    Flags,
}

/// Resolve one stage.
pub fn resolve_stage(
    own: &RawStage,
    defaults: &RawStage,
    origin: &Origin,
    lib: &Library,
) -> Result<Stage> {
    Resolver {
        own,
        defaults,
        origin,
        assumptions: Vec::new(),
    }
    .run(lib)
}

struct Resolver<'a> {
    own: &'a RawStage,
    defaults: &'a RawStage,
    origin: &'a Origin,
    assumptions: Vec<String>,
}

impl Resolver<'_> {
    /// Where `key` stands: the stage itself, or the defaults when only they give it.
    fn place(&self, key: &str, from_defaults: bool) -> String {
        match self.origin {
            Origin::File { file, index } => {
                if from_defaults {
                    format!("{file}: defaults.{key}")
                } else {
                    format!("{file}: stages[{index}].{key}")
                }
            }
            Origin::Flags => flag_for(key).to_string(),
        }
    }

    /// Own value, else the default's, with its place.
    fn pick<T: Clone>(
        &self,
        key: &str,
        get: impl Fn(&RawStage) -> Option<T>,
    ) -> Option<(T, String)> {
        if let Some(v) = get(self.own) {
            return Some((v, self.place(key, false)));
        }
        get(self.defaults).map(|v| (v, self.place(key, true)))
    }

    fn missing(&self, key: &str, what: &str) -> Error {
        let place = match self.origin {
            Origin::File { file, index } => format!("{file}: stages[{index}]"),
            Origin::Flags => flag_for(key).to_string(),
        };
        let hint = match self.origin {
            Origin::File { .. } => {
                format!("missing `{key}` ({what}); give it in the stage or in `defaults`")
            }
            Origin::Flags => format!("missing ({what})"),
        };
        Error::invalid(place, hint)
    }

    fn run(mut self, lib: &Library) -> Result<Stage> {
        if self.defaults.name.is_some() {
            return Err(Error::invalid(
                self.place("name", true),
                "a name belongs to one stage, not to the defaults",
            ));
        }
        let name = match (&self.own.name, self.origin) {
            (Some(n), _) if !n.trim().is_empty() => n.clone(),
            (Some(_), _) => {
                return Err(Error::invalid(
                    self.place("name", false),
                    "must not be empty",
                ))
            }
            (None, Origin::File { .. }) => return Err(self.missing("name", "the stage's name")),
            (None, Origin::Flags) => "stage".to_string(),
        };
        let (part_id, part_place) = self
            .pick("part", |r| r.part.clone())
            .ok_or_else(|| self.missing("part", "a part id from the parts library"))?;
        let part = lib.require(&part_id, &part_place)?.clone();

        let (supply, at) = self
            .pick("supply_v", |r| r.supply_v)
            .ok_or_else(|| self.missing("supply_v", "the supply voltage"))?;
        let supply = within(supply, VOLTS, &at)?;
        let supply_tolerance = match self.pick("supply_tolerance", |r| r.supply_tolerance) {
            Some((v, at)) => fraction(v, &at)?,
            None => {
                self.assume(format!(
                    "supply tolerance ±{} assumed [practice]",
                    pct(DEFAULT_SUPPLY_TOLERANCE)
                ));
                DEFAULT_SUPPLY_TOLERANCE
            }
        };
        let (logic_high, at_high) = self
            .pick("logic_high_v", |r| r.logic_high_v)
            .ok_or_else(|| self.missing("logic_high_v", "the pin's logic-high voltage"))?;
        let logic_high = within(logic_high, VOLTS, &at_high)?;
        let logic_high_min = match self.pick("logic_high_min_v", |r| r.logic_high_min_v) {
            Some((v, at)) => {
                let v = within(v, VOLTS, &at)?;
                if v > logic_high {
                    return Err(Error::invalid(
                        at,
                        format!("the guaranteed logic high {v} V is above the nominal {logic_high} V; it must not be"),
                    ));
                }
                v
            }
            None => {
                let v = (logic_high - DEFAULT_LOGIC_HIGH_DROP_V).max(0.0);
                self.assume(format!(
                    "guaranteed logic high {} assumed (nominal less 0.4 V) [practice, CMOS outputs]",
                    fe(v, "V")
                ));
                v
            }
        };
        let pin_limit = match self.pick("pin_limit_a", |r| r.pin_limit_a) {
            Some((v, at)) => within(v, AMPS, &at)?,
            None => {
                self.assume(format!(
                    "pin limit {} assumed [practice, conservative]",
                    fe(DEFAULT_PIN_LIMIT_A, "A")
                ));
                DEFAULT_PIN_LIMIT_A
            }
        };
        let (t_min, t_max) = self.ambient()?;
        let (load, load_at) = self
            .pick("load", |r| r.load.clone())
            .ok_or_else(|| self.missing("load", "the load: current, relay, led or strip"))?;
        let load = self.load(&load, &load_at, supply)?;
        let clamp = self.clamp(&load)?;
        let base_resistor = match self.pick("base_resistor_ohms", |r| r.base_resistor_ohms) {
            Some((v, at)) => Some(ohms(within(v, OHMS, &at)?)),
            None => None,
        };
        let pull_down = match self.pick("pull_down_ohms", |r| r.pull_down_ohms) {
            Some((Some(v), at)) => PullDown::Given(ohms(within(v, OHMS, &at)?)),
            Some((None, _)) => PullDown::None,
            None if base_resistor.is_some() => PullDown::None,
            None => PullDown::Sized,
        };
        let resistor_tolerance = match self.pick("resistor_tolerance", |r| r.resistor_tolerance) {
            Some((v, at)) => fraction(v, &at)?,
            None => {
                self.assume(format!(
                    "resistor tolerance ±{} assumed [practice]",
                    pct(DEFAULT_RESISTOR_TOLERANCE)
                ));
                DEFAULT_RESISTOR_TOLERANCE
            }
        };
        let sizes_something =
            base_resistor.is_none() || matches!(&load, Load::Led(Led { resistor: None, .. }));
        let series = match self.pick("series", |r| r.series) {
            Some((s, _)) => s,
            None => {
                if sizes_something {
                    self.assume("E24 series assumed for sized values [std IEC 60063]".to_string());
                }
                Series::E24
            }
        };
        let resistor_rating = match self.pick("resistor_rating_w", |r| r.resistor_rating_w) {
            Some((v, at)) => Some(watts(within(v, WATTS, &at)?)),
            None => None,
        };
        let overdrive = match self.pick("overdrive", |r| r.overdrive) {
            Some((v, at)) => {
                if !(v.is_finite() && (1.0..=1000.0).contains(&v)) {
                    return Err(Error::invalid(
                        at,
                        format!("{} is not allowed: an overdrive from 1 to 1000 is needed (2 to 5 is usual)", show_number(v)),
                    ));
                }
                v
            }
            None => {
                self.assume("overdrive 2 assumed [practice: 2 to 5]".to_string());
                DEFAULT_OVERDRIVE
            }
        };
        if part.gain_temp_exponent_assumed {
            self.assume(format!(
                "part {}: gain temperature exponent XTB 1.5 assumed [text, memory]",
                part.id
            ));
        }
        if part.icbo_assumed {
            self.assume(format!(
                "part {}: ICBO 50 nA at 25 °C assumed [memory]",
                part.id
            ));
        }
        Ok(Stage {
            name,
            part,
            supply: volts(supply),
            supply_tolerance,
            logic_high: volts(logic_high),
            logic_high_min: volts(logic_high_min),
            pin_limit: amps(pin_limit),
            ambient_min: celsius(t_min),
            ambient_max: celsius(t_max),
            load,
            clamp,
            base_resistor,
            pull_down,
            resistor_tolerance,
            series,
            resistor_rating,
            overdrive,
            assumptions: self.assumptions,
        })
    }

    fn assume(&mut self, text: String) {
        self.assumptions.push(text);
    }

    fn ambient(&mut self) -> Result<(f64, f64)> {
        for (raw, from_defaults) in [(self.own, false), (self.defaults, true)] {
            match (raw.ambient_c, raw.grade) {
                (Some(_), Some(_)) => {
                    return Err(Error::invalid(
                        self.place("ambient_c", from_defaults),
                        "give either an ambient range or a grade, not both",
                    ))
                }
                (Some([lo, hi]), None) => {
                    let at = self.place("ambient_c", from_defaults);
                    let ok = |t: f64| t.is_finite() && AMBIENT_RANGE_C.contains(&t);
                    if !ok(lo) || !ok(hi) {
                        return Err(Error::invalid(
                            at,
                            format!(
                                "[{}, {}] is not allowed: ambient temperatures from {} to {} °C are needed",
                                show_number(lo),
                                show_number(hi),
                                AMBIENT_RANGE_C.start(),
                                AMBIENT_RANGE_C.end()
                            ),
                        ));
                    }
                    if lo > hi {
                        return Err(Error::invalid(
                            at,
                            format!("the minimum {lo} °C is above the maximum {hi} °C"),
                        ));
                    }
                    return Ok((lo, hi));
                }
                (None, Some(g)) => return Ok(g.range_c()),
                (None, None) => {}
            }
        }
        let (lo, hi) = Grade::Commercial.range_c();
        self.assume(format!(
            "ambient {lo} .. {hi} °C assumed (commercial grade) [practice]"
        ));
        Ok((lo, hi))
    }

    fn load(&mut self, raw: &RawLoad, at: &str, supply: f64) -> Result<Load> {
        let key = |k: &str| -> String { sub_place(at, k, self.origin, "load", raw_kind(raw)) };
        Ok(match raw {
            RawLoad::Current { current_a } => Load::Current {
                current: amps(within(*current_a, AMPS, &key("current_a"))?),
            },
            RawLoad::Relay {
                coil_ohms,
                coil_tolerance,
                rated_v,
                must_operate_fraction,
                inductance_h,
            } => {
                let coil = within(*coil_ohms, OHMS, &key("coil_ohms"))?;
                let tolerance = match coil_tolerance {
                    Some(v) => fraction(*v, &key("coil_tolerance"))?,
                    None => {
                        self.assume(format!(
                            "coil tolerance ±{} assumed [practice]",
                            pct(DEFAULT_COIL_TOLERANCE)
                        ));
                        DEFAULT_COIL_TOLERANCE
                    }
                };
                let rated = match rated_v {
                    Some(v) => within(*v, VOLTS, &key("rated_v"))?,
                    None => {
                        self.assume(format!(
                            "coil rated voltage {} assumed (the nominal supply)",
                            fe(supply, "V")
                        ));
                        supply
                    }
                };
                let must = match must_operate_fraction {
                    Some(v) if v.is_finite() && *v > 0.0 && *v <= 1.0 => *v,
                    Some(v) => return Err(Error::invalid(key("must_operate_fraction"), format!("{} is not allowed: a fraction above 0 and at most 1 is needed (0.75 is usual)", show_number(*v)))),
                    None => {
                        self.assume(format!("must-operate voltage {} of rated assumed [practice]", pct(DEFAULT_MUST_OPERATE_FRACTION)));
                        DEFAULT_MUST_OPERATE_FRACTION
                    }
                };
                let inductance = match inductance_h {
                    Some(v) => Some(henries(within(*v, HENRIES, &key("inductance_h"))?)),
                    None => None,
                };
                Load::Relay(Relay {
                    coil_20c: ohms(coil),
                    tolerance,
                    rated: volts(rated),
                    must_operate_fraction: must,
                    inductance,
                })
            }
            RawLoad::Led {
                count,
                forward_v,
                forward_min_v,
                forward_max_v,
                current_a,
                max_current_a,
                resistor_ohms,
            } => {
                if *count == 0 || *count > 1000 {
                    return Err(Error::invalid(
                        key("count"),
                        format!("{count} is not allowed: 1 to 1000 LEDs in series are needed"),
                    ));
                }
                let vf = within(*forward_v, VOLTS, &key("forward_v"))?;
                let lo = match forward_min_v {
                    Some(v) => Some(within(*v, VOLTS, &key("forward_min_v"))?),
                    None => None,
                };
                let hi = match forward_max_v {
                    Some(v) => Some(within(*v, VOLTS, &key("forward_max_v"))?),
                    None => None,
                };
                if lo.is_none() || hi.is_none() {
                    self.assume(format!(
                        "LED forward voltage spread ±{} per LED assumed [memory]",
                        fe(DEFAULT_LED_VF_SPREAD_V, "V")
                    ));
                }
                let lo = lo.unwrap_or((vf - DEFAULT_LED_VF_SPREAD_V).max(0.0));
                let hi = hi.unwrap_or(vf + DEFAULT_LED_VF_SPREAD_V);
                if lo > vf || vf > hi {
                    return Err(Error::invalid(key("forward_v"), format!("the forward voltages must run min <= nominal <= max; got {lo} <= {vf} <= {hi} V")));
                }
                let current = within(*current_a, AMPS, &key("current_a"))?;
                let max_current = match max_current_a {
                    Some(v) => Some(amps(within(*v, AMPS, &key("max_current_a"))?)),
                    None => None,
                };
                let resistor = match resistor_ohms {
                    Some(v) => Some(ohms(within(*v, OHMS, &key("resistor_ohms"))?)),
                    None => None,
                };
                Load::Led(Led {
                    count: *count,
                    forward: volts(vf),
                    forward_min: volts(lo),
                    forward_max: volts(hi),
                    current: amps(current),
                    max_current,
                    resistor,
                })
            }
            RawLoad::Strip {
                rated_v,
                current_per_m_a,
                length_m,
            } => Load::Strip(Strip {
                rated: volts(within(*rated_v, VOLTS, &key("rated_v"))?),
                current_per_metre: amps(within(*current_per_m_a, AMPS, &key("current_per_m_a"))?),
                length_m: within(*length_m, METRES, &key("length_m"))?,
            }),
        })
    }

    fn clamp(&mut self, load: &Load) -> Result<Clamp> {
        let Some((raw, at)) = self.pick("clamp", |r| r.clamp.clone()) else {
            return Ok(Clamp::None);
        };
        let kind = match &raw {
            RawClamp::None => "none",
            RawClamp::Diode { .. } => "diode",
            RawClamp::Zener { .. } => "zener",
        };
        let key = |k: &str| -> String { sub_place(&at, k, self.origin, "clamp", kind) };
        let opt_v = |v: &Option<f64>, k: &str| -> Result<Option<f64>> {
            let span = if k.ends_with("_a") { AMPS } else { VOLTS };
            match v {
                Some(x) => Ok(Some(within(*x, span, &key(k))?)),
                None => Ok(None),
            }
        };
        let clamp = match &raw {
            RawClamp::None => Clamp::None,
            RawClamp::Diode {
                forward_v,
                reverse_v,
                current_a,
            } => Clamp::Diode {
                forward: volts(self.clamp_forward(opt_v(forward_v, "forward_v")?)),
                reverse: opt_v(reverse_v, "reverse_v")?.map(volts),
                current: opt_v(current_a, "current_a")?.map(amps),
            },
            RawClamp::Zener {
                zener_v,
                forward_v,
                reverse_v,
                current_a,
            } => Clamp::Zener {
                zener: volts(within(*zener_v, VOLTS, &key("zener_v"))?),
                forward: volts(self.clamp_forward(opt_v(forward_v, "forward_v")?)),
                reverse: opt_v(reverse_v, "reverse_v")?.map(volts),
                current: opt_v(current_a, "current_a")?.map(amps),
            },
        };
        if !load.is_inductive() && !matches!(clamp, Clamp::None) {
            self.assume(format!(
                "the {} clamp is not used: a {} load does not kick back at turn-off",
                clamp.kind_name(),
                load.kind_name()
            ));
            return Ok(Clamp::None);
        }
        Ok(clamp)
    }

    fn clamp_forward(&mut self, given: Option<f64>) -> f64 {
        given.unwrap_or_else(|| {
            self.assume(format!(
                "clamp diode forward drop {} assumed [memory]",
                fe(DEFAULT_CLAMP_FORWARD_V, "V")
            ));
            DEFAULT_CLAMP_FORWARD_V
        })
    }
}
