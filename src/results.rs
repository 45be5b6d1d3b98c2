//! The serde types of `results.json`: the machine-readable contract.
//!
//! Field names and nesting follow `contract.md`; fields beyond the contract are
//! additions. A statistic that cannot be computed is `None` (JSON `null`) with a
//! reason in `warnings`, never NaN. Struct field order fixes the key order, so the
//! same analysis always serializes to the same bytes.

use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

mod decision;
mod evidence;
mod finite;
mod study;
pub use decision::{Decision, DecisionModels, Finding, GateReading, LimitsReading};
pub use evidence::{
    BandCritical, Bands, Equivalence, EquivalencePair, ManyToOne, NextSeason, Robust,
    RobustDifference, RobustMean, RobustWald, SimultaneousFamily,
};
pub use finite::first_non_finite;
pub use study::{Attribute, AttributeReading, Study, StudyAnswer};

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
    /// Covariate value at which adjusted means are given (analysis scale).
    pub adjust_at: f64,
    /// The same point on the measured scale (for a log covariate and the "mean" rule,
    /// the geometric mean of the covariate).
    #[serde(default)]
    pub adjust_at_measured: f64,
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
    /// Differences of adjusted means for every pair of levels (under many-to-one
    /// comparisons, every level against the first).
    pub pairwise_adjusted: Vec<MeanPair>,
    /// The critical values and errors of the many-to-one families, under
    /// `comparisons = "against-reference"`.
    #[serde(default)]
    pub many_to_one: Option<ManyToOne>,
    /// Where two groups differ along the covariate, when slopes differ.
    pub regions: Vec<Region>,
    /// Group differences at chosen covariate values, when slopes differ.
    pub differences_at: Vec<DifferenceAt>,
    /// Partial eta squared of the gate and of the group effect.
    pub effect_sizes: EffectSizes,
    /// Assumption checks.
    pub checks: Checks,
    /// The run repeated without the rows beyond the influence cut-offs, when asked.
    pub sensitivity: Option<Sensitivity>,
    /// Where each line's one-sided confidence bound crosses the plan's limits.
    pub limits: Vec<LimitCrossing>,
    /// The earliest crossing per side when lines are not pooled.
    pub limits_earliest: Vec<EarliestCrossing>,
    /// The raw crossing, the extrapolation cap and the period it supports, rounded
    /// down, when the plan has limits.
    #[serde(default)]
    pub limits_supported: Option<SupportedPeriod>,
    /// The lot-pooling procedure, when the plan chose it.
    pub pooling: Option<Pooling>,
    /// The gate and the comparisons with a heteroscedasticity-consistent covariance,
    /// when the plan's `tests.covariance` names one; the gate then decides on it.
    #[serde(default)]
    pub robust: Option<Robust>,
    /// The critical values of the bands around each line, pointwise and
    /// simultaneous (Working & Hotelling 1929), and which the figures draw.
    #[serde(default)]
    pub bands: Bands,
    /// What next season needs: the rows per group for the equal-slopes test to
    /// detect the slope margin (or the smallest difference this season could detect).
    #[serde(default)]
    pub next_season: Option<NextSeason>,
    /// Two one-sided tests of every pair of slopes against `tests.slope_margin`, when
    /// the plan gives one.
    #[serde(default)]
    pub equivalence: Option<Equivalence>,
    /// What the gate decided and which comparison leads the report.
    pub decision: Decision,
    /// Everything a reader should be warned about, in plain words.
    pub warnings: Vec<String>,
}

/// The data points the figures draw: not part of `results.json`, and thinned so a
/// figure stays small however many rows there are.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct FigurePoints {
    /// Per group, in level order.
    pub groups: Vec<GroupPoints>,
}

/// One group's drawn points.
#[derive(Debug, Clone, PartialEq)]
pub struct GroupPoints {
    /// Group label.
    pub level: String,
    /// Rows the group has (all of them enter lines and bands).
    pub n: u64,
    /// Drawn rows as [x, y, fitted, residual] under the model the decision selected,
    /// every k-th row in data order so the choice never changes between runs.
    pub points: Vec<[f64; 4]>,
}

/// Tool version and the hashes that tie a report to its inputs.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
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
    /// Commit of the source tree that built slopewise ("unknown" outside git).
    #[serde(default)]
    pub build_commit: String,
    /// `rustc -V` of the compiler that built slopewise.
    #[serde(default)]
    pub rustc_version: String,
    /// `typst --version` of the program that compiles the PDF; null when the plan
    /// asks for no PDF or no typst was found (the run then says why).
    #[serde(default)]
    pub typst_version: Option<String>,
    /// SHA-256 of every font handed to typst, by file name; empty without a PDF.
    #[serde(default)]
    pub font_sha256: BTreeMap<String, String>,
    /// SHA-256 of every template that shaped the PDF, by file name; empty without a PDF.
    #[serde(default)]
    pub template_sha256: BTreeMap<String, String>,
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
    /// "quartiles", or "values" when the plan lists tests.compare_at.
    pub compare_at_rule: String,
    /// Unit of the response as measured, when the plan gives one.
    pub response_units: Option<String>,
    /// Unit of the covariate as measured, when the plan gives one.
    pub covariate_units: Option<String>,
    /// How a slope reads on the measured scale: "per-unit" (neither column is
    /// transformed), "ratio-per-unit" (log response: exp(slope) is the factor per
    /// covariate unit), "elasticity" (log response and log covariate: % change of the
    /// response per 1 % of the covariate), "per-log-unit" (log covariate only) or
    /// "transformed" (a square root: no plain reading).
    #[serde(default)]
    pub slope_reading: String,
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
    /// "moments" when the data were per-group moments (`data.moments`) rather than
    /// rows; absent for rows.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub source: Option<String>,
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
    /// How the test came out: "computed", "exact-fit" (zero residual variance with
    /// slopes that differ: F infinite, shown null, p = 0) or "not-computable" (0/0).
    #[serde(default = "computed")]
    pub status: String,
}

fn computed() -> String {
    "computed".into()
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
    /// Interval for the difference at 1 − alpha (pooled, unadjusted).
    #[serde(default)]
    pub ci: Option<[f64; 2]>,
    /// Under many-to-one comparisons: the interval simultaneous over the family,
    /// d ± c·se with c from `many_to_one.slopes`.
    #[serde(default)]
    pub ci_simultaneous: Option<[f64; 2]>,
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
    /// Interval at 1 − alpha with the Welch–Satterthwaite df.
    #[serde(default)]
    pub ci: Option<[f64; 2]>,
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
    /// "computed", "exact-fit" or "not-computable", as for [`EqualSlopes::status`].
    #[serde(default = "computed")]
    pub status: String,
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
    /// For a log response: the geometric mean on the measured scale, exp of the
    /// mean and of its interval.
    #[serde(default)]
    pub back_transformed: Option<BackTransformed>,
}

/// An estimate on a log scale, back on the measured scale.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct BackTransformed {
    /// exp (or 10^) of the estimate: a geometric mean, or for a difference a ratio.
    pub value: f64,
    /// The interval's ends, transformed alike.
    pub ci: Option<[f64; 2]>,
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
    /// Tukey–Kramer p-value: studentized range with k groups at q = |t|·√2.
    pub p_tukey: Option<f64>,
    /// Under many-to-one comparisons: the interval simultaneous over the family,
    /// d ± c·se with c from `many_to_one.adjusted`.
    #[serde(default)]
    pub ci_simultaneous: Option<[f64; 2]>,
    /// For a log response: the ratio of the two geometric means and its interval.
    #[serde(default)]
    pub ratio: Option<BackTransformed>,
}

/// Johnson–Neyman region of significance for one pair of groups.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Region {
    /// First level.
    pub a: String,
    /// Second level.
    pub b: String,
    /// "johnson-neyman" or "johnson-neyman-simultaneous".
    pub method: String,
    /// Critical value the |t| of the difference is compared with.
    pub critical_t: f64,
    /// Every covariate value where significance changes (sorted; may lie outside the data).
    pub bounds: Vec<f64>,
    /// Covariate intervals, within the observed range, where a and b differ.
    pub significant: Vec<[f64; 2]>,
    /// The observed covariate range the intervals are clipped to.
    pub observed_range: [f64; 2],
}

/// The difference of two groups' lines at one covariate value (separate slopes).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct DifferenceAt {
    /// First level.
    pub a: String,
    /// Second level.
    pub b: String,
    /// Covariate value (analysis scale).
    pub at: f64,
    /// The same value on the measured scale.
    #[serde(default)]
    pub at_measured: f64,
    /// Line of a minus line of b at `at`.
    pub difference: f64,
    /// Standard error (pooled residual variance of the separate-slopes model).
    pub se: Option<f64>,
    /// Interval at 1 − alpha.
    pub ci: Option<[f64; 2]>,
    /// t statistic.
    pub t: Option<f64>,
    /// n − 2k.
    pub df: f64,
    /// Two-sided p-value.
    pub p_value: Option<f64>,
    /// For a log response: the ratio of the two lines' values at `at`, with interval.
    #[serde(default)]
    pub ratio: Option<BackTransformed>,
}

/// Partial eta squared, SS_effect / (SS_effect + SS_residual).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct EffectSizes {
    /// Of the slope differences, against the separate-slopes residual.
    pub equal_slopes_partial_eta2: Option<f64>,
    /// Its interval at 1 − alpha, from the noncentrality limits of the equal-slopes F
    /// (Steiger 2004) with λ = f²·(df1 + df2 + 1) and η² = f²/(1 + f²).
    #[serde(default)]
    pub equal_slopes_partial_eta2_ci: Option<[f64; 2]>,
    /// Cohen's f² of the slope differences, F·df1/df2.
    #[serde(default)]
    pub equal_slopes_f2: Option<f64>,
    /// Its interval at 1 − alpha, λ limits over (df1 + df2 + 1).
    #[serde(default)]
    pub equal_slopes_f2_ci: Option<[f64; 2]>,
    /// Of the group effect, against the common-slope residual.
    pub group_effect_partial_eta2: Option<f64>,
}

/// The assumption checks.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Checks {
    /// Normality of the separate-slopes residuals.
    pub normality: Normality,
    /// Equal spread of the separate-slopes residuals across groups.
    pub equal_variance: EqualVariance,
    /// Rows that drive the selected model's fit.
    pub influence: Influence,
    /// The covariate across groups.
    pub covariate_balance: CovariateBalance,
    /// The checks that could not run because the data were per-group moments
    /// without rows ("normality", "equal_variance", "influence"); absent otherwise.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub not_run: Vec<String>,
}

/// Shapiro–Wilk on residuals.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Normality {
    /// "shapiro-wilk".
    pub method: String,
    /// W.
    pub statistic: Option<f64>,
    /// p-value.
    pub p_value: Option<f64>,
    /// Residuals tested (after any subsample).
    pub n: u64,
    /// Residuals available.
    pub residuals: u64,
    /// True when a seeded subsample was tested because n exceeds the method's range.
    pub subsampled: bool,
    /// Per group, in level order.
    pub groups: Vec<GroupNormality>,
    /// Normal quantile pairs [theoretical, standardized residual], at most a few
    /// hundred evenly spaced in rank, for the quantile plot.
    pub qq: Vec<[f64; 2]>,
}

/// Shapiro–Wilk within one group.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct GroupNormality {
    /// Level.
    pub level: String,
    /// W.
    pub statistic: Option<f64>,
    /// p-value.
    pub p_value: Option<f64>,
    /// Residuals tested.
    pub n: u64,
    /// True when subsampled.
    pub subsampled: bool,
    /// Why the group was not tested ("too-few-rows"), or null when it was.
    #[serde(default)]
    pub not_tested: Option<String>,
}

/// Brown–Forsythe test of equal spread.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct EqualVariance {
    /// "brown-forsythe".
    pub method: String,
    /// F statistic.
    pub statistic: Option<f64>,
    /// k − 1.
    pub df1: f64,
    /// n − k.
    pub df2: f64,
    /// p-value.
    pub p_value: Option<f64>,
}

/// Influence measures of the selected model.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Influence {
    /// "common-slope" or "separate-slopes".
    pub model: String,
    /// Largest Cook's distance.
    pub max_cooks_distance: Option<f64>,
    /// Largest leverage.
    pub max_leverage: Option<f64>,
    /// The cut-offs rows are compared with.
    pub cutoffs: InfluenceCutoffs,
    /// Rows beyond any cut-off.
    pub flagged_total: u64,
    /// The flagged rows with the largest Cook's distances (at most 50).
    pub flagged: Vec<FlaggedRow>,
    /// Rows that matter: Cook's distance above the median of F(p, n − p) or
    /// |externally studentized residual| above the Bonferroni t quantile.
    #[serde(default)]
    pub matters_total: u64,
    /// Those rows, in data-row order (at most 50).
    #[serde(default)]
    pub matters: Vec<FlaggedRow>,
}

/// Cut-offs for flagging rows (common practice).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct InfluenceCutoffs {
    /// 2p/n.
    pub leverage: f64,
    /// 4/n.
    pub cooks_distance: f64,
    /// |externally studentized residual| above this.
    pub studentized_residual: f64,
    /// A row matters when its Cook's distance exceeds this: the median of
    /// F(p, n − p) (Cook & Weisberg 1982).
    #[serde(default)]
    pub cooks_distance_matters: Option<f64>,
    /// ... or when |externally studentized residual| exceeds this: the Bonferroni t
    /// quantile t(1 − alpha/(2n); n − p − 1) (Weisberg 1985).
    #[serde(default)]
    pub studentized_bonferroni: Option<f64>,
}

/// A row beyond a cut-off.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct FlaggedRow {
    /// 1-based data row (header excluded).
    pub row: u64,
    /// Its group.
    pub level: String,
    /// Cook's distance.
    pub cooks_distance: Option<f64>,
    /// Leverage.
    pub leverage: f64,
    /// Externally studentized residual.
    pub studentized_residual: Option<f64>,
    /// True when the row matters (beyond either strict cut-off).
    #[serde(default)]
    pub matters: bool,
    /// Every cut-off the row is beyond: "cooks-distance", "studentized-residual" (the
    /// strict ones), "leverage", "cooks-distance-4/n", "studentized-residual-3".
    #[serde(default)]
    pub why: Vec<String>,
}

/// The covariate across groups.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CovariateBalance {
    /// One-way ANOVA F of the covariate across groups.
    pub f: Option<f64>,
    /// k − 1.
    pub df1: f64,
    /// n − k.
    pub df2: f64,
    /// p-value.
    pub p_value: Option<f64>,
    /// The covariate range every group covers, or null if none.
    pub overlap: Option<[f64; 2]>,
}

/// Where one line's one-sided confidence bound meets a limit.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct LimitCrossing {
    /// Group label, or "pooled" for the pooled line.
    pub level: String,
    /// The limit.
    pub limit: f64,
    /// "lower" or "upper".
    pub side: String,
    /// One-sided confidence of the bound: the plan's confidence with one limit,
    /// (1 + confidence)/2 with both; for the simultaneous band, the plan's
    /// confidence (its coverage for both sides and every covariate value together).
    pub confidence: f64,
    /// "mean" (confidence bound of the mean line) or "prediction" (bound for a
    /// single future result).
    #[serde(default)]
    pub bound: String,
    /// "pointwise" (Student's t at the one-sided level) or "simultaneous" (the
    /// Working–Hotelling band at the confidence, for every covariate value at once).
    #[serde(default = "pointwise")]
    pub band: String,
    /// The multiplier of the bound's standard error actually used; null when the
    /// line has no residual df.
    #[serde(default)]
    pub critical_value: Option<f64>,
    /// True when the response has both limits, so each side uses the two-sided level.
    #[serde(default)]
    pub two_sided: bool,
    /// Covariate value where the bound meets the limit, or null.
    pub crossing: Option<f64>,
    /// Why there is no crossing, null otherwise: "never-within" (the bound never
    /// meets the limit after the first observation), "beyond-at-start" (the bound is
    /// already past the limit at the first observation) or "not-decided" (the
    /// pooling steps stopped on a test that cannot be computed).
    pub reason: Option<String>,
    /// Smallest covariate value of the line's rows.
    pub observed_min: f64,
    /// Largest covariate value of the line's rows.
    pub observed_max: f64,
    /// True when the crossing lies beyond the observed maximum.
    pub extrapolated: bool,
    /// How far beyond the observed maximum the crossing lies (0 when within).
    pub beyond: Option<f64>,
    /// "separate", "common-slope", "pooled" or "not-decided".
    pub model: String,
}

/// The period the crossings support once an extrapolation rule caps them.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SupportedPeriod {
    /// The earliest crossing over every line and side, or null when none crosses.
    pub raw_crossing: Option<f64>,
    /// The line and side of that crossing.
    pub limiting_level: Option<String>,
    /// "lower" or "upper".
    pub limiting_side: Option<String>,
    /// The last observed covariate value: the period the data cover.
    pub covered: f64,
    /// The longest period the rule allows, or null when the plan gives no rule.
    pub cap: Option<f64>,
    /// "room", "refrigerated", "frozen", "explicit" or "none".
    pub rule: String,
    /// Why the cap is what it is, in words.
    pub cap_reason: String,
    /// True when the cap, not the crossing, sets the period.
    pub capped: bool,
    /// The step the period is rounded down to.
    pub round_to: f64,
    /// The supported period, rounded down to `round_to`, or null.
    pub supported: Option<f64>,
    /// Why there is no supported period, null otherwise: "beyond-at-start",
    /// "never-within" (no crossing and no cap), "not-decided".
    pub reason: Option<String>,
}

/// The earliest crossing of one side among the groups' lines.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct EarliestCrossing {
    /// "lower" or "upper".
    pub side: String,
    /// The group whose bound crosses first.
    pub level: String,
    /// Its crossing; for a line already past the limit, its first observation.
    pub crossing: f64,
    /// True when that line's bound is already past the limit at its first
    /// observation (then `crossing` is that observation, not a solved crossing).
    #[serde(default)]
    pub already_beyond: bool,
}

/// The lot-pooling steps (ICH Q1E 2003).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Pooling {
    /// Equal-slopes test p-value.
    pub slopes_p: Option<f64>,
    /// Equal-intercepts test p-value (parallel lines against one line).
    pub intercepts_p: Option<f64>,
    /// Level of both tests.
    pub alpha: f64,
    /// "separate", "common-slope" or "pooled"; "not-decided" when a step's test
    /// cannot be computed and the procedure stopped there.
    pub decision: String,
    /// Why the steps stopped ("slopes" or "intercepts": the step whose test cannot be
    /// computed); null when they ran to a decision.
    #[serde(default)]
    pub stopped_at: Option<String>,
    /// "difference" (the two tests decide) or "equivalence" (the two one-sided tests
    /// of every pair against the margins decide; the tests' p-values stay beside).
    #[serde(default = "difference_rule")]
    pub rule: String,
    /// Under the equivalence rule: the slope margin (response units per covariate
    /// unit).
    #[serde(default)]
    pub slope_margin: Option<f64>,
    /// Under the equivalence rule: the margin for the distance between two parallel
    /// lines (response units).
    #[serde(default)]
    pub intercept_margin: Option<f64>,
    /// Under the equivalence rule: level of each one-sided test (the plan's alpha).
    #[serde(default)]
    pub equivalence_alpha: Option<f64>,
    /// Under the equivalence rule: every pair of slopes on the separate lines.
    #[serde(default)]
    pub slope_pairs: Vec<EquivalencePair>,
    /// Under the equivalence rule, when every slope pair is shown equivalent: every
    /// pair of parallel lines (the difference of intercepts on the common slope).
    #[serde(default)]
    pub intercept_pairs: Vec<EquivalencePair>,
}

fn pointwise() -> String {
    "pointwise".into()
}

fn difference_rule() -> String {
    "difference".into()
}

/// The key results again, without the rows that matter.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Sensitivity {
    /// The data rows left out (1-based, header excluded), ascending.
    #[serde(default)]
    pub rows: Vec<u64>,
    /// Which conclusions change without them.
    #[serde(default)]
    pub changes: SensitivityChanges,
    /// Rows left out.
    pub rows_removed: u64,
    /// Rows used.
    pub rows_used: u64,
    /// Rows beyond the leverage cut-off only (not by Cook's distance or the
    /// studentized residual), kept in the rerun: a design point at the end of the
    /// covariate range is not an error in the data.
    #[serde(default)]
    pub rows_kept_leverage_only: u64,
    /// The covariate value of the adjusted means: the full data's `adjust_at`, held
    /// fixed so the comparison point does not move with the rows left out.
    #[serde(default)]
    pub adjust_at: f64,
    /// The gate without them.
    pub equal_slopes: EqualSlopes,
    /// Each group's line without them.
    pub groups: Vec<GroupLineResult>,
    /// The common slope without them.
    pub common_slope: CommonSlope,
    /// The group effect without them.
    pub group_effect: GroupEffect,
    /// Adjusted means without them.
    pub adjusted_means: Vec<AdjustedMean>,
    /// The decision without them.
    pub decision: Decision,
    /// True when the decision differs from the main run's.
    pub decision_changed: bool,
}

/// Which conclusions the refit without the rows that matter changes.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct SensitivityChanges {
    /// The equal-slopes decision.
    pub gate: bool,
    /// The group effect's outcome.
    pub group_effect: bool,
    /// Pairs of the leading comparison whose significance after adjustment flips.
    pub pairs: Vec<PairChange>,
    /// The limits' deciding crossing with all rows, when there are limits.
    pub crossing_before: Option<f64>,
    /// ... and without the rows that matter.
    pub crossing_after: Option<f64>,
}

/// A pair whose significance changes.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PairChange {
    /// First level.
    pub a: String,
    /// Second level.
    pub b: String,
    /// Significant after adjustment with all rows (null: not computable).
    pub before: Option<bool>,
    /// ... and without the rows that matter.
    pub after: Option<bool>,
}
