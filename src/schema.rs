//! The JSON Schema of the plan file, for editors and for scripts that write plans.
//!
//! Editors that understand JSON Schema (for TOML too, through the TOML-to-JSON
//! mapping every TOML tool uses) can then complete keys, offer the allowed values and
//! show each key's `description` as help, before `slopewise` ever reads the plan.
//! The schema is derived from the plan's serde types (`src/plan/schema.rs`, with the
//! `schemars` crate), so a key added there appears here and the two cannot drift;
//! the types' doc comments are the descriptions, and their `schemars` attributes the
//! examples and the ranges that [`crate::plan::load`] also enforces in code.
//! `tests/draft_and_schema.rs` checks the schema against the loader.

use serde_json::{Map, Value};

/// The plan file's JSON Schema (draft 2020-12), describing the plan as a TOML parser
/// turns it into JSON: tables become objects, arrays of tables arrays of objects.
pub fn plan_schema() -> String {
    let mut s = serde_json::to_string_pretty(&plan_schema_value()).unwrap_or_default();
    s.push('\n');
    s
}

/// The schema as a JSON value.
pub fn plan_schema_value() -> Value {
    let mut v = crate::plan::derived_json_schema();
    tidy(&mut v);
    v
}

/// Writes the derived schema the way a plan reads: TOML has no null, so the null
/// alternatives schemars adds to optional keys go; an enum whose variants carry doc
/// comments (a `oneOf` of constants) becomes one `enum`; Rust's number formats go;
/// descriptions are joined into one line.
fn tidy(v: &mut Value) {
    match v {
        Value::Object(map) => {
            for child in map.values_mut() {
                tidy(child);
            }
            if let Some(Value::String(d)) = map.get_mut("description") {
                // Doc comments wrap at the source's width; a description is one line.
                *d = d.split_whitespace().collect::<Vec<_>>().join(" ");
            }
            without_null(map);
            constants_to_enum(map);
            if map.get("format").and_then(Value::as_str).is_some_and(|f| {
                matches!(
                    f,
                    "double" | "float" | "uint" | "uint8" | "uint32" | "uint64"
                )
            }) {
                map.remove("format");
            }
        }
        Value::Array(items) => items.iter_mut().for_each(tidy),
        _ => {}
    }
}

fn without_null(map: &mut Map<String, Value>) {
    if let Some(Value::Array(types)) = map.get_mut("type") {
        types.retain(|t| t != "null");
        if types.len() == 1 {
            let only = types[0].clone();
            map.insert("type".into(), only);
        }
    }
    if let Some(Value::Array(values)) = map.get_mut("enum") {
        values.retain(|x| !x.is_null());
    }
    for key in ["anyOf", "oneOf"] {
        let Some(Value::Array(branches)) = map.get_mut(key) else {
            continue;
        };
        let null = |b: &Value| {
            b.get("type") == Some(&Value::from("null")) || b.get("const") == Some(&Value::Null)
        };
        if !branches.iter().any(null) {
            continue;
        }
        branches.retain(|b| !null(b));
        if branches.len() == 1 {
            let Some(Value::Object(only)) = branches.pop() else {
                continue;
            };
            map.remove(key);
            for (k, x) in only {
                map.entry(k).or_insert(x);
            }
        }
    }
}

fn constants_to_enum(map: &mut Map<String, Value>) {
    let Some(Value::Array(branches)) = map.get("oneOf") else {
        return;
    };
    if branches.is_empty() || !branches.iter().all(|b| b.get("const").is_some()) {
        return;
    }
    let values: Vec<Value> = branches.iter().map(|b| b["const"].clone()).collect();
    let types: Vec<Value> = branches
        .iter()
        .filter_map(|b| b.get("type").cloned())
        .collect();
    map.remove("oneOf");
    if types.len() == values.len() && types.windows(2).all(|w| w[0] == w[1]) {
        map.insert("type".into(), types[0].clone());
    }
    map.insert("enum".into(), Value::Array(values));
}
