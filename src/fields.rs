//! Reading the fields of a raw input object (a `load` object of a board file, or what the stage
//! flags make of one) into typed numbers: every error names the place (the flag, or the file and
//! JSON path), echoes the value and says the accepted form. The load kinds read their objects
//! through [`Fields`]; the stage resolver collects the defaults taken in a [`Resolution`].

use serde_json::{Map, Value};

use crate::conditions::Conditions;
use crate::error::{Error, Place, Result};
use crate::quantity::limits::{show_number, Span};

/// Where a stage was written: a board file or the command line.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Origin {
    /// A board file (its name as given, or `<stdin>`).
    File(String),
    /// Stage flags on the command line.
    Flags,
}

/// The form a board key takes, by its name or unit suffix, for type errors.
pub fn form_of_key(key: &str) -> Option<&'static str> {
    Some(match key {
        "name" | "board" | "part" => "a string",
        "kind" => "a string naming the kind",
        "count" => "a whole number, e.g. 3",
        "ambient_c" => "[minimum, maximum] in °C, e.g. [-20, 60]",
        "grade" => "a string: commercial, industrial or automotive",
        "series" => "a string: E6, E12, E24, E48 or E96",
        "overdrive" => "a number, e.g. 2",
        "load" => "an object, e.g. {\"kind\": \"relay\", \"coil_ohms\": 400}",
        "clamp" => "an object, e.g. {\"kind\": \"diode\"}",
        "defaults" => "an object of stage fields",
        "stages" => "an array of stage objects",
        "must_operate_fraction" => "a fraction of the rated voltage, e.g. 0.75",
        k if k.ends_with("tolerance") => "a fraction, e.g. 0.05 for ±5 %",
        k if k.ends_with("_ohms") => "a number of ohms, e.g. 4700",
        k if k.ends_with("_v") => "a number of volts, e.g. 12",
        k if k.ends_with("_a") => "a number of amperes, e.g. 0.02",
        k if k.ends_with("_w") => "a number of watts, e.g. 0.25",
        k if k.ends_with("_h") => "a number of henries, e.g. 0.2",
        k if k.ends_with("_m") => "a number of metres, e.g. 1.5",
        k if k.ends_with("_c") => "a number of °C, e.g. 150",
        k if k.ends_with("_k_per_w") => "a number of kelvins per watt, e.g. 200",
        k if k.ends_with("_s") => "a number of seconds, e.g. 1e-6",
        k if k.ends_with("_per_k") => "a number per kelvin, e.g. 0.006",
        _ => return None,
    })
}

/// The type of a JSON value in words.
pub fn json_type(v: &Value) -> &'static str {
    match v {
        Value::Null => "null",
        Value::Bool(_) => "a boolean",
        Value::Number(_) => "a number",
        Value::String(_) => "a string",
        Value::Array(_) => "an array",
        Value::Object(_) => "an object",
    }
}

/// One field of an object a reader knows: its key, the flag that sets it, and its form.
#[derive(Clone, Copy, Debug)]
pub struct KeySpec {
    /// The key.
    pub key: &'static str,
    /// The flag that sets it on the command line.
    pub flag: &'static str,
    /// The form it takes in a file (`a number of ohms, e.g. 400`).
    pub form: &'static str,
    /// What the figure is (`the coil resistance at 20 °C`).
    pub what: &'static str,
}

/// The fields of one raw object, with the place of the object for errors.
#[derive(Debug)]
pub struct Fields<'a> {
    map: &'a Map<String, Value>,
    origin: &'a Origin,
    /// JSON path of the object (`stages[2].load`).
    path: String,
    /// What the object is, for messages (`a relay load`).
    object: String,
    specs: Vec<KeySpec>,
}

impl<'a> Fields<'a> {
    /// Read `map` (at `path`, from `origin`) as an object whose keys are `specs` plus `kind`;
    /// unknown keys and `null` values are refused naming the key.
    pub fn new(
        map: &'a Map<String, Value>,
        origin: &'a Origin,
        path: &str,
        object: &str,
        specs: Vec<KeySpec>,
    ) -> Result<Fields<'a>> {
        let fields = Fields {
            map,
            origin,
            path: path.to_string(),
            object: object.to_string(),
            specs,
        };
        for (key, value) in map {
            if key == "kind" {
                continue;
            }
            if fields.spec(key).is_none() {
                let known = fields
                    .specs
                    .iter()
                    .map(|s| s.key)
                    .collect::<Vec<_>>()
                    .join(", ");
                return Err(Error::Json {
                    place: fields.place(key),
                    message: format!(
                        "unknown key `{key}` for {}; it takes {}",
                        fields.object,
                        if known.is_empty() {
                            "no other key".to_string()
                        } else {
                            known
                        }
                    ),
                });
            }
            if value.is_null() {
                return Err(Error::Json {
                    place: fields.place(key),
                    message: format!(
                        "null is not allowed for `{key}`; leave the key out to take its default"
                    ),
                });
            }
        }
        Ok(fields)
    }

    fn spec(&self, key: &str) -> Option<&KeySpec> {
        self.specs.iter().find(|s| s.key == key)
    }

    /// Where `key` stands: its flag, or its JSON path.
    pub fn place(&self, key: &str) -> Place {
        match self.origin {
            Origin::Flags => Place::Flag(
                self.spec(key)
                    .map(|s| s.flag)
                    .unwrap_or("the stage flags")
                    .to_string(),
            ),
            Origin::File(file) => Place::json(file.clone(), format!("{}.{key}", self.path)),
        }
    }

    /// The object's own place (its flag is `--load`).
    pub fn object_place(&self) -> Place {
        match self.origin {
            Origin::Flags => Place::Flag("--load".into()),
            Origin::File(file) => Place::json(file.clone(), self.path.clone()),
        }
    }

    /// True when the object came from flags.
    pub fn from_flags(&self) -> bool {
        matches!(self.origin, Origin::Flags)
    }

    /// A number, when given; must lie in `span`.
    pub fn number(&self, key: &str, span: Span) -> Result<Option<f64>> {
        let Some(v) = self.raw_number(key)? else {
            return Ok(None);
        };
        match span.reason(v) {
            None => Ok(Some(v)),
            Some(reason) => Err(Error::range(self.place(key), show_number(v), reason)),
        }
    }

    /// A number the object must give.
    pub fn need(&self, key: &str, span: Span) -> Result<f64> {
        self.number(key, span)?.ok_or_else(|| self.missing(key))
    }

    /// A tolerance from 0 up to (not including) 1, when given.
    pub fn fraction(&self, key: &str) -> Result<Option<f64>> {
        let Some(v) = self.raw_number(key)? else {
            return Ok(None);
        };
        check_fraction(v, self.place(key)).map(Some)
    }

    /// A whole number from `min` to `max`, when given.
    pub fn whole(&self, key: &str, min: u32, max: u32) -> Result<Option<u32>> {
        let Some(v) = self.raw_number(key)? else {
            return Ok(None);
        };
        if v.fract() != 0.0 || v < f64::from(min) || v > f64::from(max) {
            return Err(Error::range(
                self.place(key),
                show_number(v),
                format!("a whole number from {min} to {max} is needed"),
            ));
        }
        Ok(Some(v as u32))
    }

    /// The error for a missing key.
    pub fn missing(&self, key: &str) -> Error {
        let what = self.spec(key).map(|s| s.what).unwrap_or("a value");
        match self.origin {
            Origin::Flags => Error::invalid(
                self.place(key),
                format!("missing ({what}) for {}", self.object),
            ),
            Origin::File(_) => Error::invalid(
                self.object_place(),
                format!("missing `{key}` ({what}) in {}", self.object),
            ),
        }
    }

    fn raw_number(&self, key: &str) -> Result<Option<f64>> {
        match self.map.get(key) {
            None => Ok(None),
            Some(Value::Number(n)) => Ok(n.as_f64()),
            Some(other) => {
                let form = self
                    .spec(key)
                    .map(|s| s.form)
                    .or_else(|| form_of_key(key))
                    .unwrap_or("a number");
                Err(Error::Json {
                    place: self.place(key),
                    message: format!("{key} takes {form}; got {}", json_type(other)),
                })
            }
        }
    }
}

/// The numbers a field of a raw object accepts, as the field tables of the load kinds and clamps
/// state it: the JSON Schemas are made from it, and tests hold the readers to it.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Accepts {
    /// Positive, finite and inside the span.
    Span(Span),
    /// A tolerance: from 0 up to (not including) 1.
    Fraction,
    /// A whole number from the first to the second, both included.
    Whole(u32, u32),
}

/// A tolerance: from 0 up to (not including) 1.
pub fn check_fraction(v: f64, place: Place) -> Result<f64> {
    if v.is_finite() && (0.0..1.0).contains(&v) {
        Ok(v)
    } else {
        Err(Error::range(
            place,
            show_number(v),
            "a fraction from 0 up to (not including) 1 is needed, e.g. 0.05 for ±5 %",
        ))
    }
}

/// A fraction as a percentage, `5 %`.
pub fn pct(f: f64) -> String {
    use std::fmt::Write as _;
    let mut s = String::with_capacity(10);
    // Whole tenths of a percent (every usual tolerance) by integers, the same digits as the
    // float formatter gives; anything else by the float formatter. Writing to a String cannot
    // fail.
    let tenths = (f * 1000.0).round();
    if (f * 1000.0 - tenths).abs() < 1e-6 && tenths.abs() < 1e12 {
        // A whole number below 2^40: the cast is exact.
        let t = tenths as i64;
        let sign = if t < 0 { "-" } else { "" };
        let _ = write!(s, "{sign}{}.{}", t.abs() / 10, t.abs() % 10);
    } else {
        let _ = write!(s, "{:.1}", f * 100.0);
    }
    if s.ends_with(".0") {
        s.truncate(s.len() - 2);
    }
    s.push_str(" %");
    s
}

/// What resolving a stage's load (or other part) collects beside the typed value: the stage's
/// conditions to resolve against, and the defaults taken, in words.
#[derive(Debug)]
pub struct Resolution<'a> {
    /// The stage's conditions (resolved before the load).
    pub conditions: &'a Conditions,
    /// Every default taken so far.
    pub assumptions: &'a mut Vec<String>,
}

impl Resolution<'_> {
    /// Note a default taken.
    pub fn assume(&mut self, text: impl Into<String>) {
        self.assumptions.push(text.into());
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::quantity::limits::OHMS;

    #[test]
    fn percentages_read_as_the_float_formatter_writes_them() {
        // The integer path must give the float formatter's own digits.
        let float = |f: f64| {
            let s = format!("{:.1}", f * 100.0);
            format!("{} %", s.strip_suffix(".0").unwrap_or(&s))
        };
        for k in -2000..=2000 {
            let f = f64::from(k) * 0.0005;
            assert_eq!(pct(f), float(f), "{f}");
        }
        for f in [
            0.05, 0.1, 0.02, 0.001, 0.123, 0.0125, 0.9999, 1e-9, 0.333_333,
        ] {
            assert_eq!(pct(f), float(f), "{f}");
        }
        assert_eq!(pct(0.05), "5 %");
        assert_eq!(pct(0.125), "12.5 %");
    }

    fn specs() -> Vec<KeySpec> {
        vec![KeySpec {
            key: "coil_ohms",
            flag: "--coil",
            form: "a number of ohms, e.g. 400",
            what: "the coil resistance at 20 °C",
        }]
    }

    #[test]
    fn unknown_keys_and_nulls_are_refused_with_their_path() {
        let origin = Origin::File("b.json".into());
        let map: Map<String, Value> =
            serde_json::from_str(r#"{"kind": "relay", "typo": 1}"#).expect("json");
        let err = Fields::new(&map, &origin, "stages[0].load", "a relay load", specs())
            .expect_err("unknown key")
            .to_string();
        assert_eq!(
            err,
            "b.json: stages[0].load.typo: unknown key `typo` for a relay load; it takes coil_ohms"
        );
        let map: Map<String, Value> =
            serde_json::from_str(r#"{"kind": "relay", "coil_ohms": null}"#).expect("json");
        let err = Fields::new(&map, &origin, "stages[0].load", "a relay load", specs())
            .expect_err("null")
            .to_string();
        assert!(err.contains("null is not allowed for `coil_ohms`"), "{err}");
    }

    #[test]
    fn type_and_range_errors_name_the_form() {
        let origin = Origin::Flags;
        let map: Map<String, Value> =
            serde_json::from_str(r#"{"coil_ohms": "400"}"#).expect("json");
        let f = Fields::new(&map, &origin, "load", "a relay load", specs()).expect("known keys");
        let err = f.need("coil_ohms", OHMS).expect_err("a string").to_string();
        assert_eq!(
            err,
            "--coil: coil_ohms takes a number of ohms, e.g. 400; got a string"
        );
        let map: Map<String, Value> = serde_json::from_str(r#"{"coil_ohms": 0}"#).expect("json");
        let f = Fields::new(&map, &origin, "load", "a relay load", specs()).expect("known keys");
        let err = f.need("coil_ohms", OHMS).expect_err("zero").to_string();
        assert!(err.starts_with("--coil: 0 is not allowed"), "{err}");
        let empty = Map::new();
        let f = Fields::new(&empty, &origin, "load", "a relay load", specs()).expect("empty");
        let err = f.need("coil_ohms", OHMS).expect_err("missing").to_string();
        assert_eq!(
            err,
            "--coil: missing (the coil resistance at 20 °C) for a relay load"
        );
    }

    #[test]
    fn forms_follow_the_unit_suffix() {
        assert_eq!(
            form_of_key("coil_ohms"),
            Some("a number of ohms, e.g. 4700")
        );
        assert_eq!(
            form_of_key("supply_tolerance"),
            Some("a fraction, e.g. 0.05 for ±5 %")
        );
        assert_eq!(form_of_key("zzz"), None);
        assert_eq!(pct(0.05), "5 %");
    }
}
