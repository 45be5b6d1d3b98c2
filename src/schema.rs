//! The JSON Schema of the plan file, for editors and for scripts that write plans.
//!
//! Editors that understand JSON Schema (for TOML too, through the TOML-to-JSON
//! mapping every TOML tool uses) can then complete keys, offer the allowed values and
//! show each key's `description` as help, before `slopewise` ever reads the plan.
//! The schema is hand-written in `templates/plan.schema.json` rather than derived from
//! the serde types, so that it can carry descriptions, examples and the ranges that
//! [`crate::plan::load`] enforces in code; `tests/draft_and_schema.rs` keeps the two in
//! step (every key the schema lists is accepted by the loader, and every key the
//! loader accepts is in the schema).

/// The plan file's JSON Schema (draft 2020-12), describing the plan as a TOML parser
/// turns it into JSON: tables become objects, arrays of tables arrays of objects.
pub const PLAN_SCHEMA: &str = include_str!("../templates/plan.schema.json");
