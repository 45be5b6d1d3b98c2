//! The decision record: what the report and `diff` are written from.

use serde::{Deserialize, Serialize};

/// The gate's outcome and what the report leads with.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Decision {
    /// Slopes taken as equal.
    pub homogeneous: bool,
    /// "common-slope" (adjusted means lead) or "separate-slopes" (slope differences lead).
    pub lead: String,
    /// Why, in one sentence.
    pub reason: String,
    /// The model each part of the report is read from.
    #[serde(default)]
    pub models: DecisionModels,
    /// How the equal-slopes gate came out, and what the data rule out.
    #[serde(default)]
    pub gate: GateReading,
    /// The equivalence outcome of the slopes when the plan gives a slope margin:
    /// "shown-equivalent", "shown-different" or "not-settled"; null without a margin.
    #[serde(default)]
    pub equivalence: Option<String>,
    /// How the group effect on a common slope came out: "differ",
    /// "not-shown-to-differ", "exact-fit" or "not-computable".
    #[serde(default)]
    pub group_effect: String,
    /// The plan's procedure: "equal-slopes-gate" or "lot-pooling" (the gate's
    /// comparisons, with the limits read from the pooling steps).
    #[serde(default)]
    pub procedure: String,
    /// What the limits come to, read from the model `models.limits` names; null
    /// without limits.
    #[serde(default)]
    pub limits: Option<LimitsReading>,
    /// Where the common-slope tables go when the slopes differ: "main" (the slopes
    /// agree, so they lead), "forced-equal" (a section of their own, titled as a
    /// what-if) or "omitted" (plan key `report.forced_equal = "omit"`).
    #[serde(default)]
    pub common_slope_tables: String,
    /// The report's sections in reading order, by key: the report and `diff` follow
    /// this list and decide nothing of their own.
    #[serde(default)]
    pub sections: Vec<String>,
    /// Every check that failed, per group too, with what it means for the results,
    /// in the order the summary gives them.
    #[serde(default)]
    pub findings: Vec<Finding>,
}

/// The equal-slopes gate, read.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct GateReading {
    /// "differ" (p below slopes_alpha), "not-shown-to-differ" (p at or above it:
    /// not evidence of equal slopes), "exact-fit" (infinite F: the slopes differ
    /// exactly) or "identical" (0/0: the slopes agree to rounding).
    pub outcome: String,
    /// The smallest lower and the largest upper end of the pairwise slope-difference
    /// intervals (unadjusted, 1 − alpha): the slope differences the data leave open.
    /// Null when no interval can be computed.
    pub slope_differences_within: Option<[f64; 2]>,
    /// The pair whose interval reaches furthest from zero.
    pub widest_pair: Option<[String; 2]>,
}

/// The limits, as the decision reads them.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct LimitsReading {
    /// "separate", "common-slope", "pooled" or "not-decided".
    pub model: String,
    /// "crossed-within" (the earliest crossing lies inside the observed data),
    /// "crossed-beyond" (beyond the last observation: an extrapolation),
    /// "already-crossed" (a line's bound is past its limit at its first observation),
    /// "never" (no bound meets a limit) or "not-decided" (no line was chosen).
    pub outcome: String,
    /// The line that sets the outcome ("pooled" for the pooled line).
    pub level: Option<String>,
    /// "lower" or "upper".
    pub side: Option<String>,
    /// The limit.
    pub limit: Option<f64>,
    /// The earliest crossing; for "already-crossed" the line's first observation.
    pub crossing: Option<f64>,
    /// The last observation of that line.
    pub last_observed: Option<f64>,
    /// How far beyond the last observation the crossing lies (0 within the data).
    pub beyond: Option<f64>,
    /// "mean" or "prediction".
    pub bound: String,
    /// "pointwise" or "simultaneous" (Working–Hotelling).
    #[serde(default = "pointwise")]
    pub band: String,
    /// The one-sided confidence of the bound (for the simultaneous band, its
    /// coverage).
    pub confidence: f64,
    /// The supported period after any cap, rounded down; null when none.
    pub supported: Option<f64>,
}

/// One failed check and what it means.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Finding {
    /// "pooling-stopped", "levels-disagree", "low-power", "unequal-slopes-means",
    /// "covariate-balance", "adjust-outside-overlap", "extrapolated-means",
    /// "normality", "normality-group", "equal-variance", "spread-ratio", "influence",
    /// "limit-already-crossed", "limit-crossed-within".
    pub check: String,
    /// The group the finding concerns, or null for the whole data.
    pub level: Option<String>,
    /// The test's p-value when the finding comes from a test.
    pub p_value: Option<f64>,
    /// What was found, as a clause (labels in backticks).
    pub statement: String,
    /// What it means for the results, as a clause.
    pub consequence: String,
}

/// Which fitted model each statement of a report rests on. The equal-slopes gate at
/// `slopes_alpha` chooses the model of the comparisons and of influence; lot pooling
/// at `pooling_alpha` chooses the model of the limits. When the two levels lead to
/// different models, `agree` is false and the first warning says so.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct DecisionModels {
    /// Comparisons between groups: "common-slope" (adjusted means) or
    /// "separate-slopes" (slope differences, regions).
    pub comparisons: String,
    /// Influence measures (as `checks.influence.model`).
    pub influence: String,
    /// The limits' crossings: "separate", "common-slope", "pooled" or
    /// "not-decided"; null without limits.
    pub limits: Option<String>,
    /// True when every part rests on the same lines (separate lines count as the
    /// separate-slopes model, parallel lines as the common-slope model; the pooled line
    /// is a model of its own).
    pub agree: bool,
}

fn pointwise() -> String {
    "pointwise".into()
}
