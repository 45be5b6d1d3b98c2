//! `results.json` of a plan with several attributes (`[[responses]]`): each
//! attribute's whole results, and the one answer they give together.

use serde::{Deserialize, Serialize};

use super::Results;

/// Several attributes of one study.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Study {
    /// The plan's title.
    pub title: String,
    /// What the attributes give together: the shortest supported period.
    pub answer: StudyAnswer,
    /// Each attribute in the plan's order, with its whole results (the same keys as
    /// a single-response `results.json`).
    pub attributes: Vec<Attribute>,
}

/// One attribute and its results.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Attribute {
    /// The response column.
    pub column: String,
    /// Its results.
    pub results: Results,
}

/// The plan's answer over its attributes.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct StudyAnswer {
    /// The shortest supported period among the attributes with limits, or null (see
    /// `reason`).
    pub supported: Option<f64>,
    /// The attribute that sets it (or that leaves none: already past a limit, or no
    /// line chosen).
    pub limiting: Option<String>,
    /// Null with a period; otherwise "beyond-at-start" (an attribute is past a limit
    /// at its first observation), "not-decided" (an attribute's pooling stopped),
    /// "never-within" (no attribute's bound meets its limit and no cap applies) or
    /// "no-limits" (no attribute has limits).
    pub reason: Option<String>,
    /// One row per attribute, in the plan's order.
    pub rows: Vec<AttributeReading>,
}

/// One attribute's part in the answer.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct AttributeReading {
    /// The response column.
    pub column: String,
    /// The attribute's lower limit (measured scale), if any.
    pub lower: Option<f64>,
    /// Its upper limit, if any.
    pub upper: Option<f64>,
    /// The model its crossings are read from ("separate", "common-slope", "pooled",
    /// "not-decided"); null without limits.
    pub model: Option<String>,
    /// `decision.limits.outcome` of the attribute; null without limits.
    pub outcome: Option<String>,
    /// Its earliest crossing, raw; null when none.
    pub crossing: Option<f64>,
    /// The line and side of that crossing.
    pub line: Option<String>,
    /// "lower" or "upper".
    pub side: Option<String>,
    /// The period it supports after any cap, rounded down; null when none.
    pub supported: Option<f64>,
    /// True for the attribute that sets the plan's answer.
    pub limiting: bool,
}
