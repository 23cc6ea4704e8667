//! JSON Schemas (draft 2020-12) of the board file and the part file (files.md), for editors and
//! other tools: made from the types and tables the readers use, never written by hand.
//!
//! [`board::RawStage`](crate::board::RawStage) and the part records of each drive kind derive
//! `JsonSchema`; their numeric ranges come from the same spans the readers check
//! (`quantity::limits`, [`Accepts`]). The `load` and `clamp` objects, whose keys hang on their
//! `kind`, are made from the load registry ([`load::KINDS`]) and the clamp table
//! ([`load::CLAMP_KINDS`]). What a schema cannot say stays with the readers: a minimum above
//! its maximum, points out of order, a part id that no library holds, a key of the other drive
//! kind's stages.

use schemars::generate::SchemaSettings;
use schemars::transform::{RecursiveTransform, Transform};
use schemars::{Schema, SchemaGenerator};
use serde_json::{json, Map, Value};

use crate::board::{RawStage, BOARD_KEYS, NEEDED_KEYS, NULL_KEYS};
use crate::drive;
use crate::fields::Accepts;
use crate::load::{self, CLAMP_KINDS};
use crate::quantity::limits::show_number;

/// The file kinds that have a schema (`pinlow schema board|part`).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum FileKind {
    /// A board file.
    Board,
    /// A part file.
    Part,
}

impl FileKind {
    /// Both kinds.
    pub const ALL: [FileKind; 2] = [FileKind::Board, FileKind::Part];

    /// `board` or `part`.
    pub fn name(self) -> &'static str {
        match self {
            FileKind::Board => "board",
            FileKind::Part => "part",
        }
    }

    /// The schema of this kind of file.
    pub fn schema(self) -> Value {
        match self {
            FileKind::Board => board(),
            FileKind::Part => part(),
        }
    }

    /// The schema as `pinlow schema` prints it and `docs/schema/` holds it: pretty JSON and a
    /// final newline.
    pub fn text(self) -> String {
        let mut text = serde_json::to_string_pretty(&self.schema()).unwrap_or_default();
        text.push('\n');
        text
    }

    /// The name of its copy under `docs/schema/`.
    pub fn file_name(self) -> &'static str {
        match self {
            FileKind::Board => "board.schema.json",
            FileKind::Part => "part.schema.json",
        }
    }
}

/// The meta-schema both schemas follow.
pub const DRAFT_2020_12: &str = "https://json-schema.org/draft/2020-12/schema";

/// A generator for draft 2020-12 that leaves `null` only where the reader takes it.
fn generator(null_keys: &'static [&'static str]) -> SchemaGenerator {
    SchemaSettings::draft2020_12()
        .with_transform(RecursiveTransform(NoNulls(null_keys)))
        .into_generator()
}

/// The schema of a board file.
pub fn board() -> Value {
    let mut g = generator(NULL_KEYS);
    let stage = g.subschema_for::<RawStage>().to_value();
    let defs = g.take_definitions(true);
    let mut properties = Map::new();
    for key in BOARD_KEYS {
        let property = match *key {
            "board" => json!({
                "type": "string",
                "description": "The board's name, for the report's heading."
            }),
            "defaults" => json!({
                "description": "Stage fields that every stage takes unless it gives its own (not `name`).",
                "allOf": [stage.clone()],
                "not": { "required": ["name"] }
            }),
            "stages" => json!({
                "type": "array",
                "description": "The stages, audited in this order.",
                "minItems": 1,
                "items": { "allOf": [stage.clone()], "required": ["name"] }
            }),
            "$schema" => json!({
                "type": "string",
                "description": "Where an editor finds this schema; accepted and ignored by pinlow."
            }),
            _ => json!({}),
        };
        properties.insert((*key).to_string(), property);
    }
    // A key a stage needs may stand in the defaults instead: when the defaults lack it, every
    // stage must give it.
    let needed: Vec<Value> = NEEDED_KEYS
        .iter()
        .map(|key| {
            json!({
                "if": { "required": ["defaults"], "properties": { "defaults": { "required": [key] } } },
                "else": { "properties": { "stages": { "items": { "required": [key] } } } }
            })
        })
        .collect();
    json!({
        "$schema": DRAFT_2020_12,
        "title": "pinlow board file",
        "description": "A board of transistor switch stages for `pinlow audit` (docs/board-file.md). Numbers are in base SI units; the key names the unit.",
        "type": "object",
        "properties": properties,
        "required": ["stages"],
        "additionalProperties": false,
        "allOf": needed,
        "$defs": defs
    })
}

/// The schema of a part file: one of the drive kinds' records, picked by `polarity`.
pub fn part() -> Value {
    let mut g = generator(&[]);
    let records: Vec<Value> = drive::KINDS
        .iter()
        .map(|k| (k.part_schema)(&mut g).to_value())
        .collect();
    let defs = g.take_definitions(true);
    let polarities: Vec<&str> = drive::KINDS.iter().map(|k| k.name).collect();
    json!({
        "$schema": DRAFT_2020_12,
        "title": "pinlow part file",
        "description": "One transistor part (docs/part-file.md): its `polarity` names the drive kind and the keys it takes. Numbers are in base SI units; the key names the unit.",
        "type": "object",
        "properties": {
            "polarity": { "description": "The drive kind.", "enum": polarities }
        },
        "required": ["polarity"],
        "oneOf": records,
        "$defs": defs
    })
}

/// The schema of a `load` object: one branch per load kind of the registry.
pub fn load_object(_: &mut SchemaGenerator) -> Schema {
    let kinds: Vec<Value> = load::KINDS
        .iter()
        .map(|kind| {
            let keys = kind
                .fields
                .iter()
                .map(|f| {
                    let text = format!(
                        "{} (flag {}); in a file, {}.",
                        capital(f.help),
                        f.flag,
                        f.form
                    );
                    (f.key, f.accepts, text, f.required)
                })
                .collect();
            kind_object(kind.name, kind.about, "load", keys)
        })
        .collect();
    object_of_kinds(
        "The load; its `kind` picks the keys it takes.",
        load::KINDS.iter().map(|k| k.name).collect(),
        kinds,
    )
}

/// The schema of a `clamp` object: one branch per clamp kind.
pub fn clamp_object(_: &mut SchemaGenerator) -> Schema {
    let kinds: Vec<Value> = CLAMP_KINDS
        .iter()
        .map(|kind| {
            let keys = kind
                .keys
                .iter()
                .map(|k| {
                    let text = format!(
                        "{} (flag {}); in a file, {}.",
                        capital(k.spec.what),
                        k.spec.flag,
                        k.spec.form
                    );
                    (k.spec.key, k.accepts, text, k.required)
                })
                .collect();
            kind_object(kind.name, kind.about, "clamp", keys)
        })
        .collect();
    object_of_kinds(
        "The turn-off clamp across an inductive load; its `kind` picks the keys it takes.",
        CLAMP_KINDS.iter().map(|k| k.name).collect(),
        kinds,
    )
}

/// An object that is one of `kinds`, told apart by `kind`.
fn object_of_kinds(description: &str, names: Vec<&str>, kinds: Vec<Value>) -> Schema {
    let value = json!({
        "description": description,
        "type": "object",
        "properties": { "kind": { "enum": names } },
        "required": ["kind"],
        "oneOf": kinds
    });
    Schema::try_from(value).unwrap_or_default()
}

/// One kind of a `load` or `clamp` object: `kind` fixed, its keys and nothing else.
fn kind_object(
    name: &str,
    about: &str,
    what: &str,
    keys: Vec<(&str, Accepts, String, bool)>,
) -> Value {
    let mut properties = Map::new();
    properties.insert(
        "kind".into(),
        json!({ "const": name, "description": format!("`{name}`: {about}.") }),
    );
    let mut required = vec![Value::from("kind")];
    for (key, accepts, text, is_required) in keys {
        let mut schema =
            Schema::try_from(json!({ "type": "number", "description": text })).unwrap_or_default();
        constrain(&mut schema, accepts);
        properties.insert(key.into(), schema.to_value());
        if is_required {
            required.push(key.into());
        }
    }
    json!({
        "title": format!("{name} {what}"),
        "type": "object",
        "properties": properties,
        "required": required,
        "additionalProperties": false
    })
}

fn capital(text: &str) -> String {
    let mut chars = text.chars();
    match chars.next() {
        Some(c) => c.to_uppercase().chain(chars).collect(),
        None => String::new(),
    }
}

/// Add `note` as a sentence to the schema's description.
fn describe(schema: &mut Schema, note: &str) {
    let text = match schema.get("description").and_then(Value::as_str) {
        Some(d) if !d.is_empty() => format!("{d} {note}"),
        _ => note.to_string(),
    };
    schema.insert("description".into(), text.into());
}

/// The bounds of `accepts` on a number schema, and the range in its description.
fn constrain(schema: &mut Schema, accepts: Accepts) {
    match accepts {
        Accepts::Span(span) => {
            schema.insert("minimum".into(), span.min.into());
            schema.insert("maximum".into(), span.max.into());
            describe(schema, &format!("pinlow accepts {}.", span.range_text()));
        }
        Accepts::Fraction => {
            schema.insert("minimum".into(), 0.into());
            schema.insert("exclusiveMaximum".into(), 1.into());
            describe(
                schema,
                "A fraction from 0 up to (not including) 1, e.g. 0.05 for ±5 %.",
            );
        }
        Accepts::Whole(min, max) => {
            schema.insert("type".into(), "integer".into());
            schema.insert("minimum".into(), min.into());
            schema.insert("maximum".into(), max.into());
            describe(schema, &format!("A whole number from {min} to {max}."));
        }
    }
}

/// A field transform: the numbers `accepts` allows (`#[schemars(transform = ...)]`).
pub fn accepts(accepts: Accepts) -> impl FnMut(&mut Schema) {
    move |schema: &mut Schema| constrain(schema, accepts)
}

/// A field transform: a number from `min` to `max`, both included.
pub fn between(min: f64, max: f64) -> impl FnMut(&mut Schema) {
    move |schema: &mut Schema| {
        schema.insert("minimum".into(), min.into());
        schema.insert("maximum".into(), max.into());
        describe(
            schema,
            &format!(
                "pinlow accepts {} to {}.",
                show_number(min),
                show_number(max)
            ),
        );
    }
}

/// A field transform: a number above `min` and below `max`, neither included.
pub fn strictly_between(min: f64, max: f64) -> impl FnMut(&mut Schema) {
    move |schema: &mut Schema| {
        schema.insert("exclusiveMinimum".into(), min.into());
        schema.insert("exclusiveMaximum".into(), max.into());
        describe(
            schema,
            &format!(
                "pinlow accepts above {} and below {}.",
                show_number(min),
                show_number(max)
            ),
        );
    }
}

/// A field transform: an array of numbers, each from `min` to `max`.
pub fn items_between(min: f64, max: f64) -> impl FnMut(&mut Schema) {
    move |schema: &mut Schema| {
        if let Some(items) = schema
            .get_mut("items")
            .and_then(|i| <&mut Schema>::try_from(i).ok())
        {
            items.insert("minimum".into(), min.into());
            items.insert("maximum".into(), max.into());
        }
        describe(
            schema,
            &format!(
                "pinlow accepts {} to {} each.",
                show_number(min),
                show_number(max)
            ),
        );
    }
}

/// A struct transform: at most one of `keys` may be given.
pub fn exclusive(keys: &'static [&'static str]) -> impl FnMut(&mut Schema) {
    move |schema: &mut Schema| {
        schema.insert("not".into(), json!({ "required": keys }));
    }
}

/// `null` only as the value of the keys it holds: every other property that schemars made
/// nullable (an `Option` field) loses its `null`, as the readers refuse it
/// (`shape::no_nulls`).
#[derive(Clone, Copy, Debug)]
struct NoNulls(&'static [&'static str]);

impl Transform for NoNulls {
    fn transform(&mut self, schema: &mut Schema) {
        let Some(Value::Object(properties)) = schema.get_mut("properties") else {
            return;
        };
        for (key, property) in properties.iter_mut() {
            if !self.0.contains(&key.as_str()) {
                strip_null(property);
            }
        }
    }
}

fn strip_null(property: &mut Value) {
    let Value::Object(obj) = property else {
        return;
    };
    if let Some(Value::Array(types)) = obj.get_mut("type") {
        types.retain(|t| t != "null");
        if let [only] = types.as_slice() {
            let only = only.clone();
            obj.insert("type".into(), only);
        }
    }
    let is_null = |v: &Value| v.get("type").and_then(Value::as_str) == Some("null");
    if let Some(Value::Array(branches)) = obj.get_mut("anyOf") {
        branches.retain(|b| !is_null(b));
        if let [Value::Object(only)] = branches.as_slice() {
            let only = only.clone();
            obj.remove("anyOf");
            for (k, v) in only {
                obj.entry(k).or_insert(v);
            }
        }
    }
    if obj.get("default") == Some(&Value::Null) {
        obj.remove("default");
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_board_schema_takes_the_top_level_keys_of_the_reader() {
        let schema = board();
        let mut keys: Vec<&str> = schema["properties"]
            .as_object()
            .expect("properties")
            .keys()
            .map(String::as_str)
            .collect();
        keys.sort_unstable();
        let mut want: Vec<&str> = BOARD_KEYS.to_vec();
        want.sort_unstable();
        assert_eq!(keys, want);
        assert_eq!(schema["$schema"], DRAFT_2020_12);
    }

    #[test]
    fn the_stage_schema_takes_the_stage_keys_of_the_reader_and_nothing_else() {
        let schema = board();
        let stage = &schema["$defs"]["RawStage"];
        assert_eq!(stage["additionalProperties"], false);
        let mut keys: Vec<&str> = stage["properties"]
            .as_object()
            .expect("properties")
            .keys()
            .map(String::as_str)
            .collect();
        keys.sort_unstable();
        let mut want: Vec<&str> = crate::board::STAGE_KEYS.to_vec();
        want.sort_unstable();
        assert_eq!(keys, want);
    }

    #[test]
    fn load_and_clamp_kinds_come_from_the_tables() {
        let schema = board();
        let stage = &schema["$defs"]["RawStage"]["properties"];
        let loads = stage["load"]["oneOf"].as_array().expect("oneOf");
        assert_eq!(loads.len(), load::KINDS.len());
        for (branch, kind) in loads.iter().zip(load::KINDS) {
            assert_eq!(branch["properties"]["kind"]["const"], kind.name);
            assert_eq!(branch["additionalProperties"], false);
            assert_eq!(
                branch["properties"].as_object().expect("keys").len(),
                kind.fields.len() + 1
            );
            for f in kind.fields {
                let required = branch["required"]
                    .as_array()
                    .expect("required")
                    .contains(&Value::from(f.key));
                assert_eq!(required, f.required, "{} {}", kind.name, f.key);
            }
        }
        let clamps = stage["clamp"]["oneOf"].as_array().expect("oneOf");
        let names: Vec<&str> = clamps
            .iter()
            .filter_map(|b| b["properties"]["kind"]["const"].as_str())
            .collect();
        assert_eq!(names, ["none", "diode", "zener"]);
    }

    #[test]
    fn only_the_pull_down_may_be_null() {
        let text = serde_json::to_string(&board()).expect("json");
        assert_eq!(text.matches("\"null\"").count(), 1, "{text}");
        let pull_down = &board()["$defs"]["RawStage"]["properties"]["pull_down_ohms"];
        assert_eq!(pull_down["type"], json!(["number", "null"]));
        assert!(!serde_json::to_string(&part())
            .expect("json")
            .contains("null"));
    }
}
