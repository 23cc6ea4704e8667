//! The shape rules of the input files beyond what their types say (files.md): objects only where
//! the format has objects (serde would read a positional array into a struct), and `null` only
//! where the format gives it a meaning.

use serde_json::Value;

use crate::error::{join_path, Error, Place, Result};
use crate::fields::json_type;

/// Refuse `null` anywhere under `value` (at `path` in `file`) except as the value of a key in
/// `allowed`.
pub fn no_nulls(value: &Value, file: &str, path: &str, allowed: &[&str]) -> Result<()> {
    match first_null(value, allowed) {
        None => Ok(()),
        Some(inner) => Err(Error::Json {
            place: Place::json(file, join_path(path, &inner)),
            message: "null is not allowed here; leave the key out to take its default".into(),
        }),
    }
}

/// The path (below `value`) of the first `null` that is not the value of an allowed key; the
/// path is only built for a `null` found.
fn first_null(value: &Value, allowed: &[&str]) -> Option<String> {
    match value {
        Value::Null => Some(String::new()),
        Value::Array(items) => items.iter().enumerate().find_map(|(i, v)| {
            first_null(v, allowed).map(|inner| join_path(&format!("[{i}]"), &inner))
        }),
        Value::Object(map) => map.iter().find_map(|(k, v)| {
            if v.is_null() && allowed.contains(&k.as_str()) {
                return None;
            }
            first_null(v, allowed).map(|inner| join_path(k, &inner))
        }),
        _ => None,
    }
}

/// The value at `path` must be an object (`what` says what it holds, for the message).
pub fn object(value: &Value, file: &str, path: &str, what: &str) -> Result<()> {
    if value.is_object() {
        Ok(())
    } else {
        Err(Error::Json {
            place: Place::json(file, path),
            message: format!(
                "{what} is written as an object with named keys, not {}",
                json_type(value)
            ),
        })
    }
}

/// Each element of the array under `key` of `value` (an object at `path`) must be an object.
pub fn objects_in(value: &Value, key: &str, file: &str, path: &str, what: &str) -> Result<()> {
    if let Some(Value::Array(items)) = value.get(key) {
        for (i, item) in items.iter().enumerate() {
            object(
                item,
                file,
                &join_path(&join_path(path, key), &format!("[{i}]")),
                what,
            )?;
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn positional_arrays_and_nulls_are_refused_with_their_path() {
        let v: Value = serde_json::from_str(r#"{"gain_min": [[0.01, 100]]}"#).expect("json");
        let err = objects_in(&v, "gain_min", "p.json", "", "a gain point")
            .expect_err("an array is no object")
            .to_string();
        assert_eq!(
            err,
            "p.json: gain_min[0]: a gain point is written as an object with named keys, not an array"
        );
        let v: Value = serde_json::from_str(r#"{"a": {"pull_down_ohms": null, "b": [1, null]}}"#)
            .expect("json");
        let err = no_nulls(&v, "b.json", "", &["pull_down_ohms"])
            .expect_err("null in a list")
            .to_string();
        assert_eq!(
            err,
            "b.json: a.b[1]: null is not allowed here; leave the key out to take its default"
        );
    }
}
