//! The shape rules of the input files beyond what their types say (files.md): objects only where
//! the format has objects (serde would read a positional array into a struct), and `null` only
//! where the format gives it a meaning.

use serde_json::Value;

use crate::error::{join_path, Error, Place, Result};
use crate::fields::json_type;

/// Refuse `null` anywhere under `value` (at `path` in `file`) except as the value of a key in
/// `allowed`.
pub fn no_nulls(value: &Value, file: &str, path: &str, allowed: &[&str]) -> Result<()> {
    match value {
        Value::Null => Err(Error::Json {
            place: Place::json(file, path),
            message: "null is not allowed here; leave the key out to take its default".into(),
        }),
        Value::Array(items) => {
            for (i, v) in items.iter().enumerate() {
                no_nulls(v, file, &join_path(path, &format!("[{i}]")), allowed)?;
            }
            Ok(())
        }
        Value::Object(map) => {
            for (k, v) in map {
                if v.is_null() && allowed.contains(&k.as_str()) {
                    continue;
                }
                no_nulls(v, file, &join_path(path, k), allowed)?;
            }
            Ok(())
        }
        _ => Ok(()),
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
