//! Resolve a raw stage (own fields over the board defaults over the model's defaults) into a
//! typed [`Stage`], validating every value where it stands and listing each default taken.

use std::sync::Arc;

use super::raw::{Grade, RawStage};
use crate::conditions::{Conditions, InputResistors, PullDown};
use crate::drive::{self, SharedSwitch};
use crate::error::{Error, Place, Result};
use crate::eseries::Series;
use crate::fields::{check_fraction, pct, Origin, Resolution};
use crate::load::{self, Clamp};
use crate::parts::{is_control, Library};
use crate::quantity::limits::{show_number, Span, AMPS, OHMS, VOLTS, WATTS};
use crate::quantity::{amps, celsius, format_engineering as fe, ohms, volts, watts};
use crate::stage::{Stage, StageSource};

/// Supply tolerance when none is given [practice].
pub const DEFAULT_SUPPLY_TOLERANCE: f64 = 0.05;
/// VOH,min = logic high minus this when none is given, V [practice, CMOS outputs].
pub const DEFAULT_LOGIC_HIGH_DROP_V: f64 = 0.4;
/// Pin source limit when none is given, A [practice, conservative].
pub const DEFAULT_PIN_LIMIT_A: f64 = 0.004;
/// Resistor tolerance when none is given [practice].
pub const DEFAULT_RESISTOR_TOLERANCE: f64 = 0.05;
/// Overdrive when none is given [practice: 2 to 5].
pub const DEFAULT_OVERDRIVE: f64 = 2.0;

/// Ambient temperatures the models hold for, C [practice]. The linear copper model
/// (IEC 60028) gives a negative coil resistance below about -234.5 C, which would read as a coil
/// that draws no current; -100 .. 250 C is far wider than any rated part and keeps every
/// temperature model positive.
pub const AMBIENT_RANGE_C: std::ops::RangeInclusive<f64> = -100.0..=250.0;

/// Overdrives accepted: 1 (just pinned) to 1000 [practice: 2 to 5 is usual].
pub const OVERDRIVE: Span = Span {
    min: 1.0,
    max: 1000.0,
    unit: "",
};

/// The command-line flag that sets a stage key.
pub fn flag_for(key: &str) -> &'static str {
    match key {
        "name" => "--name",
        "part" => "--part",
        "supply_v" => "--supply",
        "supply_tolerance" => "--supply-tolerance",
        "logic_high_v" => "--logic-high",
        "logic_high_min_v" => "--logic-high-min",
        "pin_limit_a" => "--pin-limit",
        "ambient_c" => "--ambient",
        "grade" => "--grade",
        "load" => "--load",
        "clamp" => "--clamp",
        "pull_down_ohms" => "--pull-down",
        "resistor_tolerance" => "--resistor-tolerance",
        "resistor_rating_w" => "--resistor-rating",
        "series" => "--series",
        "overdrive" => "--overdrive",
        k => drive::KINDS
            .iter()
            .find(|d| d.series.key == k)
            .map(|d| d.series.flag)
            .unwrap_or("the stage flags"),
    }
}

/// Resolve one stage, looking its part up in `lib`.
pub fn resolve_stage(
    own: &RawStage,
    defaults: &Arc<RawStage>,
    origin: &Origin,
    index: usize,
    lib: &Library,
) -> Result<Stage> {
    resolve_with(own, defaults, origin, index, &|id, place| {
        lib.require(id, place).cloned()
    })
}

/// Resolve one stage with `part(id, place)` to find its part.
pub fn resolve_with(
    own: &RawStage,
    defaults: &Arc<RawStage>,
    origin: &Origin,
    index: usize,
    part: &dyn Fn(&str, Place) -> Result<SharedSwitch>,
) -> Result<Stage> {
    Resolver {
        own,
        defaults,
        origin,
        index,
        assumptions: Vec::new(),
    }
    .run(part)
}

/// Where a key picked stands: the stage or the defaults.
#[derive(Clone, Copy)]
struct At<'k> {
    key: &'k str,
    from_defaults: bool,
}

struct Resolver<'a> {
    own: &'a RawStage,
    defaults: &'a Arc<RawStage>,
    origin: &'a Origin,
    index: usize,
    assumptions: Vec<String>,
}

impl Resolver<'_> {
    /// The JSON path of `key` in the stage (or in the defaults).
    fn path(&self, key: &str, from_defaults: bool) -> String {
        if from_defaults {
            format!("defaults.{key}")
        } else {
            format!("stages[{}].{key}", self.index)
        }
    }

    /// Where `key` stands: the stage itself, or the defaults when only they give it.
    fn place(&self, key: &str, from_defaults: bool) -> Place {
        match self.origin {
            Origin::File(file) => Place::json(file.clone(), self.path(key, from_defaults)),
            Origin::Flags => Place::Flag(flag_for(key).to_string()),
        }
    }

    /// Own value, else the default's, with whether it came from the defaults.
    fn pick<T: Clone>(&self, get: impl Fn(&RawStage) -> Option<T>) -> Option<(T, bool)> {
        if let Some(v) = get(self.own) {
            return Some((v, false));
        }
        get(self.defaults).map(|v| (v, true))
    }

    /// Own value, else the default's, with where it stands (a place is only built for an
    /// error).
    fn pick_at<'k, T: Clone>(
        &self,
        key: &'k str,
        get: impl Fn(&RawStage) -> Option<T>,
    ) -> Option<(T, At<'k>)> {
        self.pick(get)
            .map(|(v, from_defaults)| (v, At { key, from_defaults }))
    }

    /// The place of a key picked.
    fn at(&self, at: At<'_>) -> Place {
        self.place(at.key, at.from_defaults)
    }

    fn missing(&self, key: &str, what: &str) -> Error {
        match self.origin {
            Origin::File(file) => Error::invalid(
                Place::json(file.clone(), format!("stages[{}]", self.index)),
                format!("missing `{key}` ({what}); give it in the stage or in `defaults`"),
            ),
            Origin::Flags => Error::invalid(
                Place::Flag(flag_for(key).into()),
                format!("missing ({what})"),
            ),
        }
    }

    fn within(&self, v: f64, span: Span, at: At<'_>) -> Result<f64> {
        match span.reason(v) {
            None => Ok(v),
            Some(reason) => Err(Error::range(self.at(at), show_number(v), reason)),
        }
    }

    /// A tolerance: a fraction from 0 up to 1.
    fn fraction(&self, v: f64, at: At<'_>) -> Result<f64> {
        if v.is_finite() && (0.0..1.0).contains(&v) {
            Ok(v)
        } else {
            check_fraction(v, self.at(at))
        }
    }

    fn assume(&mut self, text: String) {
        self.assumptions.push(text);
    }

    fn run(mut self, find_part: &dyn Fn(&str, Place) -> Result<SharedSwitch>) -> Result<Stage> {
        if self.defaults.name.is_some() {
            return Err(Error::invalid(
                self.place("name", true),
                "a name belongs to one stage, not to the defaults",
            ));
        }
        let given_name = match &self.own.name {
            Some(n) if n.trim().is_empty() => {
                return Err(Error::invalid(
                    self.place("name", false),
                    "must not be empty",
                ))
            }
            Some(n) => {
                if let Some(c) = n.chars().find(|c| is_control(*c)) {
                    return Err(Error::invalid(
                        self.place("name", false),
                        format!(
                            "holds the control character U+{:04X}; names may hold printable characters only",
                            u32::from(c)
                        ),
                    ));
                }
                Some(n.clone())
            }
            None if matches!(self.origin, Origin::File(_)) => {
                return Err(self.missing("name", "the stage's name"))
            }
            None => None,
        };
        let (part_id, part_place) = self
            .pick_at("part", |r| r.part.clone())
            .ok_or_else(|| self.missing("part", "a part id from the parts library"))?;
        let switch = find_part(&part_id, self.at(part_place))?;
        let kind = switch.kind();
        self.drive_keys(kind)?;

        let (supply, at) = self
            .pick_at("supply_v", |r| r.supply_v)
            .ok_or_else(|| self.missing("supply_v", "the supply voltage"))?;
        let supply = self.within(supply, VOLTS, at)?;
        let supply_tolerance = match self.pick_at("supply_tolerance", |r| r.supply_tolerance) {
            Some((v, at)) => self.fraction(v, at)?,
            None => {
                self.assume(format!(
                    "supply tolerance ±{} assumed [practice]",
                    pct(DEFAULT_SUPPLY_TOLERANCE)
                ));
                DEFAULT_SUPPLY_TOLERANCE
            }
        };
        let (logic_high, at) = self
            .pick_at("logic_high_v", |r| r.logic_high_v)
            .ok_or_else(|| self.missing("logic_high_v", "the pin's logic-high voltage"))?;
        let logic_high = self.within(logic_high, VOLTS, at)?;
        let logic_high_min = match self.pick_at("logic_high_min_v", |r| r.logic_high_min_v) {
            Some((v, at)) => {
                let v = self.within(v, VOLTS, at)?;
                if v > logic_high {
                    return Err(Error::invalid(
                        self.at(at),
                        format!(
                            "the guaranteed logic high {} V is above the nominal {} V; it must not be",
                            show_number(v),
                            show_number(logic_high)
                        ),
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
        let pin_limit = match self.pick_at("pin_limit_a", |r| r.pin_limit_a) {
            Some((v, at)) => self.within(v, AMPS, at)?,
            None => {
                self.assume(format!(
                    "pin limit {} assumed [practice, conservative]",
                    fe(DEFAULT_PIN_LIMIT_A, "A")
                ));
                DEFAULT_PIN_LIMIT_A
            }
        };
        let (t_min, t_max) = self.ambient()?;
        let series_key = kind.series.key;
        let series_resistor = match self.pick(|r| r.series_resistor(series_key)) {
            Some((v, d)) => Some(ohms(self.within(
                v,
                OHMS,
                At {
                    key: series_key,
                    from_defaults: d,
                },
            )?)),
            None => None,
        };
        let pull_down = match self.pick(|r| r.pull_down_ohms) {
            Some((Some(v), d)) => PullDown::Given(ohms(self.within(
                v,
                OHMS,
                At {
                    key: "pull_down_ohms",
                    from_defaults: d,
                },
            )?)),
            Some((None, _)) => PullDown::None,
            // files.md: with a given series resistor a missing pull-down means none; when
            // sizing, it is sized.
            None if series_resistor.is_some() => PullDown::None,
            None => PullDown::Sized,
        };
        let mut conditions = Conditions {
            supply: volts(supply),
            supply_tolerance,
            logic_high: volts(logic_high),
            logic_high_min: volts(logic_high_min),
            pin_limit: amps(pin_limit),
            ambient_min: celsius(t_min),
            ambient_max: celsius(t_max),
            resistor_tolerance: DEFAULT_RESISTOR_TOLERANCE,
            series: Series::E24,
            resistor_rating: None,
            inputs: InputResistors {
                series: series_resistor,
                pull_down,
            },
            overdrive: DEFAULT_OVERDRIVE,
        };

        let (raw_load, from_defaults) = self
            .pick(|r| r.load.clone())
            .ok_or_else(|| self.missing("load", &format!("the load: {}", load::kind_names())))?;
        let load_path = self.path("load", from_defaults);
        let kind_name = match raw_load.get("kind") {
            Some(serde_json::Value::String(k)) => k.clone(),
            _ => {
                return Err(Error::invalid(
                    self.place("load", from_defaults),
                    format!("a load needs `kind`: {}", load::kind_names()),
                ))
            }
        };
        let load_kind = load::kind(&kind_name).ok_or_else(|| {
            let place = match self.origin {
                Origin::File(f) => Place::json(f.clone(), format!("{load_path}.kind")),
                Origin::Flags => Place::Flag("--load".into()),
            };
            Error::invalid(
                place,
                format!(
                    "unknown load kind `{kind_name}`; the kinds are {}",
                    load::kind_names()
                ),
            )
        })?;
        let mut notes = std::mem::take(&mut self.assumptions);
        let load = {
            let mut res = Resolution {
                conditions: &conditions,
                assumptions: &mut notes,
            };
            load_kind.read(&raw_load, self.origin, &load_path, &mut res)?
        };
        let clamp = match self.pick(|r| r.clamp.clone()) {
            Some((raw, from_defaults)) => {
                let mut res = Resolution {
                    conditions: &conditions,
                    assumptions: &mut notes,
                };
                let clamp = Clamp::resolve(
                    &raw,
                    self.origin,
                    &self.path("clamp", from_defaults),
                    &mut res,
                )?;
                if load.kick(&conditions).is_none() && clamp != Clamp::None {
                    notes.push(format!(
                        "the {} clamp is not used: a {} load does not kick back at turn-off",
                        clamp.kind_name(),
                        load_kind.name
                    ));
                    Clamp::None
                } else {
                    clamp
                }
            }
            None => Clamp::None,
        };
        self.assumptions = notes;
        let resistor_tolerance = match self.pick_at("resistor_tolerance", |r| r.resistor_tolerance)
        {
            Some((v, at)) => self.fraction(v, at)?,
            None => {
                self.assume(format!(
                    "resistor tolerance ±{} assumed [practice]",
                    pct(DEFAULT_RESISTOR_TOLERANCE)
                ));
                DEFAULT_RESISTOR_TOLERANCE
            }
        };
        let resistor_rating = match self.pick_at("resistor_rating_w", |r| r.resistor_rating_w) {
            Some((v, at)) => Some(watts(self.within(v, WATTS, at)?)),
            None => None,
        };
        let series_given = self.pick(|r| r.series).map(|(s, _)| s);
        conditions.resistor_tolerance = resistor_tolerance;
        conditions.resistor_rating = resistor_rating;
        let sizes_something = series_resistor.is_none() || load.own_resistor_given() == Some(None);
        if series_given.is_none() && sizes_something {
            self.assume("E24 series assumed for sized values [std IEC 60063]".to_string());
        }
        conditions.series = series_given.unwrap_or(Series::E24);
        let overdrive = if kind.stage_keys.contains(&"overdrive") {
            match self.pick_at("overdrive", |r| r.overdrive) {
                Some((v, at)) => {
                    if !(v.is_finite() && (OVERDRIVE.min..=OVERDRIVE.max).contains(&v)) {
                        return Err(Error::range(
                            self.at(at),
                            show_number(v),
                            "an overdrive from 1 to 1000 is needed (2 to 5 is usual)",
                        ));
                    }
                    v
                }
                None => {
                    self.assume("overdrive 2 assumed [practice: 2 to 5]".to_string());
                    DEFAULT_OVERDRIVE
                }
            }
        } else {
            DEFAULT_OVERDRIVE
        };
        conditions.overdrive = overdrive;
        let mut assumptions = self.assumptions;
        assumptions.extend(switch.assumptions());
        let name = given_name.unwrap_or_else(|| format!("{} stage", load_kind.name));
        Ok(Stage {
            name,
            switch,
            conditions,
            load,
            clamp,
            assumptions,
            source: StageSource {
                own: self.own.clone(),
                defaults: Arc::clone(self.defaults),
                origin: self.origin.clone(),
                index: self.index,
            },
        })
    }

    /// Keys of another drive kind on the stage itself are errors that name the right key.
    fn drive_keys(&self, kind: &'static drive::DriveKind) -> Result<()> {
        for other in drive::KINDS.iter().filter(|k| k.name != kind.name) {
            let key = other.series.key;
            if key != kind.series.key && self.own.series_resistor(key).is_some() {
                return Err(Error::invalid(
                    self.place(key, false),
                    format!(
                        "`{key}` belongs to {} stages; the part `{}` is {}: give `{}` ({} {})",
                        other.name,
                        self.own
                            .part
                            .as_deref()
                            .or(self.defaults.part.as_deref())
                            .unwrap_or("?"),
                        kind.name,
                        kind.series.key,
                        kind.series.symbol,
                        kind.series.role
                    ),
                ));
            }
            for key in other
                .stage_keys
                .iter()
                .filter(|k| !kind.stage_keys.contains(k))
            {
                let given = match *key {
                    "overdrive" => self.own.overdrive.is_some(),
                    _ => false,
                };
                if given {
                    return Err(Error::invalid(
                        self.place(key, false),
                        format!(
                            "`{key}` applies to {} stages only; a {} stage takes none",
                            other.name, kind.name
                        ),
                    ));
                }
            }
        }
        Ok(())
    }

    fn ambient(&mut self) -> Result<(f64, f64)> {
        for (raw, from_defaults) in [(self.own, false), (self.defaults.as_ref(), true)] {
            match (raw.ambient_c, raw.grade) {
                (Some(_), Some(_)) => {
                    return Err(Error::invalid(
                        self.place("ambient_c", from_defaults),
                        "give either an ambient range or a grade, not both",
                    ))
                }
                (Some([lo, hi]), None) => {
                    let ok = |t: f64| t.is_finite() && AMBIENT_RANGE_C.contains(&t);
                    if !ok(lo) || !ok(hi) {
                        return Err(Error::range(
                            self.place("ambient_c", from_defaults),
                            format!("[{}, {}]", show_number(lo), show_number(hi)),
                            format!(
                                "ambient temperatures from {} to {} °C are needed",
                                AMBIENT_RANGE_C.start(),
                                AMBIENT_RANGE_C.end()
                            ),
                        ));
                    }
                    if lo > hi {
                        return Err(Error::invalid(
                            self.place("ambient_c", from_defaults),
                            format!(
                                "the minimum {} °C is above the maximum {} °C",
                                show_number(lo),
                                show_number(hi)
                            ),
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
}
