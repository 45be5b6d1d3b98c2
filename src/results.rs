//! The serde types of `results.json`: the machine-readable contract.
//!
//! Field names and nesting follow `contract.md`; fields beyond the contract are
//! additions. A statistic that cannot be computed is `None` (JSON `null`) with a
//! reason in `warnings`, never NaN. Struct field order fixes the key order, so the
//! same analysis always serializes to the same bytes.

use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

/// Everything a run found.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Results {
    /// The plan's title.
    pub title: String,
    /// Where the numbers came from.
    pub provenance: Provenance,
    /// The plan's model and test settings, echoed.
    pub model: ModelEcho,
    /// Rows read, used and dropped.
    pub data: DataAccount,
    /// Mean of the (transformed) covariate over the rows used.
    pub covariate_mean: f64,
    /// Covariate value at which adjusted means are given.
    pub adjust_at: f64,
    /// One entry per level, in level order: each group's own line.
    pub groups: Vec<GroupLineResult>,
    /// The separate-slopes model as a whole.
    pub separate_slopes: ModelFit,
    /// The equal-slopes gate.
    pub equal_slopes: EqualSlopes,
    /// Slope differences for every pair of levels.
    pub pairwise_slopes: Vec<SlopePair>,
    /// The common slope of the parallel-lines model.
    pub common_slope: CommonSlope,
    /// Group effect given a common slope.
    pub group_effect: GroupEffect,
    /// One line for all rows.
    pub one_line: OneLine,
    /// Adjusted means from the common-slope model.
    pub adjusted_means: Vec<AdjustedMean>,
    /// Differences of adjusted means for every pair of levels.
    pub pairwise_adjusted: Vec<MeanPair>,
    /// What the gate decided and which comparison leads the report.
    pub decision: Decision,
    /// Everything a reader should be warned about, in plain words.
    pub warnings: Vec<String>,
}

/// Tool version and the hashes that tie a report to its inputs.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Provenance {
    /// slopewise version.
    pub tool_version: String,
    /// SHA-256 of the plan file's bytes (hex).
    pub plan_sha256: String,
    /// SHA-256 of the data file's bytes (hex).
    pub data_sha256: String,
    /// The plan file as named on the command line.
    pub plan_file: String,
    /// The data file as named in the plan.
    pub data_file: String,
}

/// The plan's model and test settings.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ModelEcho {
    /// Response column.
    pub response: String,
    /// Covariate column.
    pub covariate: String,
    /// Group column.
    pub group: String,
    /// Transform of the response.
    pub response_transform: String,
    /// Transform of the covariate.
    pub covariate_transform: String,
    /// "mean", or "value" when the plan fixed adjust_at.
    pub adjust_at_rule: String,
    /// Level for comparisons and intervals.
    pub alpha: f64,
    /// Level of the equal-slopes gate.
    pub slopes_alpha: f64,
    /// Multiplicity adjustment.
    pub comparisons: String,
}

/// Rows read, used and dropped.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct DataAccount {
    /// Data rows in the file (header excluded).
    pub rows_read: u64,
    /// Rows that entered the fits.
    pub rows_used: u64,
    /// Reason -> rows (only reasons that occurred).
    pub rows_dropped: BTreeMap<String, u64>,
    /// Groups left out of the analysis, with why.
    pub groups_excluded: Vec<ExcludedGroup>,
}

/// A group left out of the analysis.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ExcludedGroup {
    /// Its label.
    pub level: String,
    /// Its usable rows.
    pub n: u64,
    /// Why it was left out.
    pub reason: String,
}

/// One group's own simple regression.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct GroupLineResult {
    /// Group label.
    pub level: String,
    /// Rows used.
    pub n: u64,
    /// Slope.
    pub slope: f64,
    /// Standard error of the slope (own residual variance).
    pub slope_se: Option<f64>,
    /// Interval for the slope at 1 − alpha, t with n − 2 df.
    pub slope_ci: Option<[f64; 2]>,
    /// Intercept.
    pub intercept: f64,
    /// Standard error of the intercept.
    pub intercept_se: Option<f64>,
    /// Interval for the intercept at 1 − alpha.
    pub intercept_ci: Option<[f64; 2]>,
    /// Coefficient of determination.
    pub r_squared: Option<f64>,
    /// Residual standard deviation √(RSS/(n − 2)).
    pub residual_sd: Option<f64>,
    /// Mean covariate of the group.
    pub covariate_mean: f64,
    /// Mean response of the group.
    pub response_mean: f64,
    /// Smallest covariate value.
    pub covariate_min: f64,
    /// Largest covariate value.
    pub covariate_max: f64,
}

/// A fitted model's residual summary.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ModelFit {
    /// Residual sum of squares.
    pub rss: f64,
    /// Residual degrees of freedom.
    pub df: f64,
    /// √(RSS/df).
    pub residual_sd: Option<f64>,
}

/// The extra-sum-of-squares test of equal slopes.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct EqualSlopes {
    /// F statistic.
    pub f: Option<f64>,
    /// k − 1.
    pub df1: f64,
    /// n − 2k.
    pub df2: f64,
    /// Upper-tail p-value.
    pub p_value: Option<f64>,
    /// The gate's level (slopes_alpha).
    pub alpha: f64,
    /// Slopes taken as equal: p ≥ alpha.
    pub homogeneous: bool,
    /// RSS of the separate-slopes model.
    pub rss_separate: f64,
    /// RSS of the common-slope model.
    pub rss_common: f64,
}

/// A difference of two groups' slopes, a − b.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SlopePair {
    /// First level.
    pub a: String,
    /// Second level.
    pub b: String,
    /// Slope of a minus slope of b.
    pub difference: f64,
    /// Standard error from the pooled residual variance of the separate-slopes model.
    pub se: Option<f64>,
    /// t statistic.
    pub t: Option<f64>,
    /// n − 2k.
    pub df: f64,
    /// Two-sided p-value.
    pub p_value: Option<f64>,
    /// p-value adjusted for the number of pairs.
    pub p_adjusted: Option<f64>,
    /// The unpooled form, for groups whose residual spreads differ.
    pub welch: WelchTest,
}

/// Unpooled comparison with Welch–Satterthwaite degrees of freedom.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct WelchTest {
    /// √(se_a² + se_b²) from each group's own fit.
    pub se: Option<f64>,
    /// t statistic.
    pub t: Option<f64>,
    /// Welch–Satterthwaite degrees of freedom.
    pub df: Option<f64>,
    /// Two-sided p-value.
    pub p_value: Option<f64>,
}

/// The common slope of the parallel-lines model.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CommonSlope {
    /// Common slope.
    pub slope: f64,
    /// Its standard error.
    pub se: Option<f64>,
    /// Interval at 1 − alpha, t with n − k − 1 df.
    pub ci: Option<[f64; 2]>,
    /// n − k − 1.
    pub df: f64,
    /// Residual standard deviation of the model.
    pub residual_sd: Option<f64>,
}

/// The group effect given a common slope.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct GroupEffect {
    /// F statistic.
    pub f: Option<f64>,
    /// k − 1.
    pub df1: f64,
    /// n − k − 1.
    pub df2: f64,
    /// Upper-tail p-value.
    pub p_value: Option<f64>,
    /// RSS of one line through all rows.
    pub rss_one_line: f64,
}

/// One line through all rows.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct OneLine {
    /// Rows.
    pub n: u64,
    /// Slope.
    pub slope: f64,
    /// Intercept.
    pub intercept: f64,
    /// Standard error of the slope.
    pub slope_se: Option<f64>,
    /// Standard error of the intercept.
    pub intercept_se: Option<f64>,
    /// Residual standard deviation.
    pub residual_sd: Option<f64>,
    /// Coefficient of determination.
    pub r_squared: Option<f64>,
}

/// A group's mean response at the adjustment point, given a common slope.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct AdjustedMean {
    /// Group label.
    pub level: String,
    /// Adjusted mean.
    pub mean: f64,
    /// Its standard error.
    pub se: Option<f64>,
    /// Interval at 1 − alpha.
    pub ci: Option<[f64; 2]>,
    /// False when adjust_at lies outside this group's covariate range.
    pub within_range: bool,
}

/// A difference of two adjusted means, a − b.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct MeanPair {
    /// First level.
    pub a: String,
    /// Second level.
    pub b: String,
    /// Adjusted mean of a minus that of b.
    pub difference: f64,
    /// Standard error.
    pub se: Option<f64>,
    /// Interval for the difference at 1 − alpha (unadjusted).
    pub ci: Option<[f64; 2]>,
    /// t statistic.
    pub t: Option<f64>,
    /// n − k − 1.
    pub df: f64,
    /// Two-sided p-value.
    pub p_value: Option<f64>,
    /// p-value adjusted for the number of pairs.
    pub p_adjusted: Option<f64>,
}

/// The gate's outcome and what the report leads with.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Decision {
    /// Slopes taken as equal.
    pub homogeneous: bool,
    /// "common-slope" (adjusted means lead) or "separate-slopes" (slope differences lead).
    pub lead: String,
    /// Why, in one sentence.
    pub reason: String,
}
