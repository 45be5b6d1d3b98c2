//! Serde types that mirror the plan file one to one. Unknown keys are refused and
//! every value keeps its byte span, so validation can point at it.

use schemars::JsonSchema;
use serde::Deserialize;
use toml::Spanned;

/// `model.adjust_at` as the schema describes it: the word "mean" or a number. The
/// loader reads it as a TOML value and checks it itself.
pub(super) struct AdjustAt;

impl JsonSchema for AdjustAt {
    fn schema_name() -> std::borrow::Cow<'static, str> {
        "AdjustAt".into()
    }
    fn inline_schema() -> bool {
        true
    }
    fn json_schema(_: &mut schemars::SchemaGenerator) -> schemars::Schema {
        schemars::json_schema!({"anyOf": [{"const": "mean"}, {"type": "number"}]})
    }
}

/// A slopewise plan: which CSV to read, which columns are the response, the covariate
/// and the group, how to test and what to write. Paths are relative to the folder
/// holding the plan file. Unknown keys are errors.
#[derive(Debug, Clone, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
#[schemars(title = "slopewise plan")]
#[schemars(extend("anyOf" = [
    {
        "properties": {
            "model": {"required": ["response"]},
            "responses": {"maxItems": 0},
            "limits": {"anyOf": [{"required": ["lower"]}, {"required": ["upper"]}]}
        }
    },
    {
        "required": ["responses"],
        "properties": {
            "model": {"not": {"anyOf": [
                {"required": ["response"]},
                {"properties": {"transform": {"required": ["response"]}}, "required": ["transform"]},
                {"properties": {"units": {"required": ["response"]}}, "required": ["units"]}
            ]}},
            "responses": {"minItems": 1},
            "limits": {"not": {"anyOf": [{"required": ["lower"]}, {"required": ["upper"]}]}}
        }
    }
]))]
pub(super) struct RawPlan {
    /// Title of the report. Required; must not be blank.
    #[schemars(with = "String", extend("pattern" = "\\S", "examples" = ["Seedling dry mass by nursery bed, 2026"]))]
    pub title: Spanned<String>,
    /// Where the data are and how to read them.
    #[schemars(with = "RawData")]
    pub data: Spanned<RawData>,
    /// Which columns play which part. Response, covariate and group must be three
    /// different columns.
    #[schemars(with = "RawModel")]
    pub model: Spanned<RawModel>,
    /// Levels and procedures of the tests.
    #[schemars(with = "Option<RawTests>")]
    pub tests: Option<Spanned<RawTests>>,
    /// Assumption checks and their options.
    pub checks: Option<RawChecks>,
    /// Limits the mean response must respect: the report gives where each line's one-sided
    /// confidence bound crosses them. At least one of `lower` and `upper`; lower
    /// must be below upper.
    #[schemars(with = "Option<RawLimits>", extend("examples" = [{"lower": 95.0, "confidence": 0.95}]))]
    pub limits: Option<Spanned<RawLimits>>,
    /// What to write and where.
    #[schemars(with = "Option<RawReport>")]
    pub report: Option<Spanned<RawReport>>,
    /// Several attributes of one study (e.g. assay, a degradant, dissolution), each
    /// analysed on its own with the plan's covariate, groups and tests, in one
    /// report: with them, `model.response` and the response's transform and unit
    /// move into each entry, and `[limits]` keeps the shared settings while each
    /// entry gives its own lower and upper limit. The earliest supported period
    /// among them is the plan's answer.
    #[serde(default)]
    #[schemars(with = "Vec<RawResponse>", extend("examples" = [[{"column": "assay_pct", "units": "% of label claim", "limits": {"lower": 95.0, "upper": 105.0}}, {"column": "impurity_pct", "limits": {"upper": 0.5}}]]))]
    pub responses: Vec<Spanned<RawResponse>>,
}

/// One attribute under `[[responses]]`.
#[derive(Debug, Clone, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub(super) struct RawResponse {
    /// The response column of this attribute.
    #[schemars(with = "String", extend("pattern" = "\\S", "examples" = ["assay_pct"]))]
    pub column: Spanned<String>,
    /// Its transform: "none", "log", "log10" or "sqrt".
    #[schemars(with = "Option<Transform>", extend("default" = "none", "examples" = ["log"]))]
    pub transform: Option<Spanned<Transform>>,
    /// Its unit as measured, for axis titles and tables.
    #[schemars(extend("examples" = ["% of label claim"]))]
    pub units: Option<String>,
    /// Its limits, on the measured scale; the other limit settings come from
    /// `[limits]`.
    #[schemars(with = "Option<RawResponseLimits>")]
    pub limits: Option<Spanned<RawResponseLimits>>,
}

/// An attribute's own limits.
#[derive(Debug, Clone, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
#[schemars(extend("examples" = [{"lower": 95.0, "upper": 105.0}], "anyOf" = [{"required": ["lower"]}, {"required": ["upper"]}]))]
pub(super) struct RawResponseLimits {
    /// The attribute's mean must stay at or above this value.
    #[schemars(with = "Option<f64>", extend("examples" = [95.0]))]
    pub lower: Option<Spanned<f64>>,
    /// The attribute's mean must stay at or below this value.
    #[schemars(with = "Option<f64>", extend("examples" = [105.0]))]
    pub upper: Option<Spanned<f64>>,
}

#[derive(Debug, Clone, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
#[schemars(extend("oneOf" = [{"required": ["path"]}, {"required": ["moments"]}], "allOf" = [
    {
        "if": {"properties": {"path": {"pattern": "\\.([xX][lL][sS][xX]|[oO][dD][sS]|[pP][aA][rR][qQ][uU][eE][tT])$"}}},
        "then": {"not": {"required": ["delimiter"]}}
    },
    {
        "if": {"not": {"properties": {"path": {"pattern": "\\.([xX][lL][sS][xX]|[oO][dD][sS])$"}}}},
        "then": {"allOf": [{"not": {"required": ["sheet"]}}, {"not": {"required": ["header_row"]}}]}
    }
]))]
pub(super) struct RawData {
    /// The data file, relative to the plan's folder ("-": standard input). Required
    /// unless `moments` is given instead. A CSV file with a header row; a path ending
    /// in .xlsx or .ods is read as a spreadsheet (see `sheet`, `header_row`), one
    /// ending in .parquet as a Parquet table.
    #[schemars(with = "Option<String>", extend("pattern" = "\\S", "examples" = ["../demo-data/nursery-2026.csv"]))]
    pub path: Option<Spanned<String>>,
    /// Instead of `path`: a file of per-group moments an engine computed (the query
    /// `slopewise sql` prints), relative to the plan's folder; CSV, or Parquet when
    /// it ends in .parquet. Columns group, n, mean_x, mean_y, sxx, syy, sxy, min_x,
    /// max_x, of the transformed values. The fits, the gate and the comparisons
    /// come from them; the checks that need the rows are said not to have run.
    #[schemars(with = "Option<String>", extend("pattern" = "\\S", "examples" = ["nursery-moments.csv"]))]
    pub moments: Option<Spanned<String>>,
    /// Cell texts read as missing, compared after trimming spaces. Rows with a missing
    /// response, covariate or group are dropped and counted by reason.
    #[schemars(with = "Option<Vec<String>>", extend("default" = ["", "NA"], "examples" = [["", "NA", "-"]]))]
    pub missing: Option<Spanned<Vec<String>>>,
    /// Optional pin of the data file: 64 hexadecimal digits of its SHA-256 (the first
    /// field of `sha256sum FILE`). The run refuses a file that differs.
    #[schemars(with = "Option<String>", extend("pattern" = "^\\s*[0-9A-Fa-f]{64}\\s*$", "examples" = ["e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855"]))]
    pub sha256: Option<Spanned<String>>,
    /// Field delimiter of the CSV: "," (the default), ";", "tab" (or "\t") or "|".
    #[schemars(with = "Option<String>", extend("enum" = [",", ";", "tab", "\t", "|"], "default" = ",", "examples" = [";"]))]
    pub delimiter: Option<Spanned<String>>,
    #[serde(default)]
    /// Row filters, written as [[data.keep]] tables; a row must pass all of them. Each
    /// names a column and exactly one of `equals` or `one_of`.
    #[schemars(with = "Vec<RawKeep>", extend("examples" = [[{"column": "status", "equals": "measured"}]]))]
    pub keep: Vec<Spanned<RawKeep>>,
    /// For a spreadsheet (`path` ending in .xlsx or .ods): the sheet to read, by
    /// name. Default: the first sheet.
    #[schemars(with = "Option<String>", extend("examples" = ["assays"]))]
    pub sheet: Option<Spanned<String>>,
    /// For a spreadsheet: the row (1-based, as the spreadsheet numbers it) that holds
    /// the column names; the data rows follow it. Default 1.
    #[schemars(with = "Option<u32>", extend("minimum" = 1, "default" = 1, "examples" = [3]))]
    pub header_row: Option<Spanned<i64>>,
}

/// One row filter: keep the rows whose `column` holds an accepted text.
#[derive(Debug, Clone, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
#[schemars(extend("oneOf" = [{"required": ["equals"]}, {"required": ["one_of"]}]))]
pub(super) struct RawKeep {
    /// Column whose text (trimmed) is compared.
    #[schemars(with = "String", extend("pattern" = "\\S", "examples" = ["status"]))]
    pub column: Spanned<String>,
    /// Keep the rows whose column holds exactly this text. Use either this or `one_of`.
    #[schemars(with = "Option<String>", extend("examples" = ["measured"]))]
    pub equals: Option<Spanned<String>>,
    /// Keep the rows whose column holds any of these texts. Use either this or
    /// `equals`; must not be empty.
    #[schemars(with = "Option<Vec<String>>", extend("minItems" = 1, "examples" = [["measured", "remeasured"]]))]
    pub one_of: Option<Spanned<Vec<String>>>,
}

#[derive(Debug, Clone, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub(super) struct RawModel {
    /// Numeric column: the y of each group's line. Required, unless the plan lists
    /// its attributes under [[responses]] instead.
    #[schemars(with = "Option<String>", extend("pattern" = "\\S", "examples" = ["dry_mass_g"]))]
    pub response: Option<Spanned<String>>,
    /// Numeric column: the x of each group's line. Required; not the response.
    #[schemars(with = "String", extend("pattern" = "\\S", "examples" = ["height_cm"]))]
    pub covariate: Spanned<String>,
    /// Column of group labels, read as text (for example a bed, site or lot). Required;
    /// neither the response nor the covariate.
    #[schemars(with = "String", extend("pattern" = "\\S", "examples" = ["bed"]))]
    pub group: Spanned<String>,
    /// Optional order of the groups; the first is the reference. At least two, each
    /// once; every listed level must occur in the data and no other may. Default: all
    /// labels, sorted.
    #[schemars(with = "Option<Vec<String>>", extend("minItems" = 2, "uniqueItems" = true, "examples" = [["north-1", "north-2", "south-1"]]))]
    pub levels: Option<Spanned<Vec<Spanned<String>>>>,
    /// Covariate value at which adjusted means are given: "mean" (the mean of the
    /// covariate over the rows used) or a number on the transformed covariate scale.
    #[schemars(with = "Option<AdjustAt>", extend("default" = "mean", "examples" = ["mean", 25.0]))]
    pub adjust_at: Option<Spanned<toml::Value>>,
    /// Transforms applied before fitting. "log" and "log10" need positive values,
    /// "sqrt" values of zero or more.
    #[schemars(extend("examples" = [{"response": "none", "covariate": "log"}]))]
    pub transform: Option<RawTransform>,
    /// Optional units of the columns as measured, shown in axis titles.
    #[schemars(extend("examples" = [{"response": "g", "covariate": "cm"}]))]
    pub units: Option<RawUnits>,
}

#[derive(Debug, Clone, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
#[schemars(extend("examples" = [{"response": "g", "covariate": "cm"}]))]
pub(super) struct RawUnits {
    /// Unit of the response, for example "g".
    #[schemars(extend("examples" = ["g"]))]
    pub response: Option<String>,
    /// Unit of the covariate, for example "cm".
    #[schemars(extend("examples" = ["cm"]))]
    pub covariate: Option<String>,
}

#[derive(Debug, Clone, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
#[schemars(extend("examples" = [{"response": "none", "covariate": "log"}]))]
pub(super) struct RawTransform {
    /// Transform of the response: "none", "log" (natural), "log10" or "sqrt".
    #[schemars(with = "Option<Transform>", extend("default" = "none", "examples" = ["log"]))]
    pub response: Option<Spanned<Transform>>,
    /// Transform of the covariate: "none", "log" (natural), "log10" or "sqrt".
    #[schemars(with = "Option<Transform>", extend("default" = "none", "examples" = ["log"]))]
    pub covariate: Option<Spanned<Transform>>,
}

#[derive(Debug, Clone, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
#[schemars(extend(
    "allOf" = [
        {
            "if": {"properties": {"gate": {"const": "equivalence"}}, "required": ["gate"]},
            "then": {"required": ["slope_margin"]}
        },
        {
            "if": {"properties": {"pooling_rule": {"const": "equivalence"}}, "required": ["pooling_rule"]},
            "then": {
                "required": ["procedure", "pooling_slope_margin", "pooling_intercept_margin"],
                "properties": {"procedure": {"const": "lot-pooling"}}
            }
        },
        {
            "anyOf": [
                {"not": {"anyOf": [
                    {"required": ["pooling_slope_margin"]},
                    {"required": ["pooling_intercept_margin"]}
                ]}},
                {"required": ["pooling_rule"], "properties": {"pooling_rule": {"const": "equivalence"}}}
            ]
        }
    ]
))]
pub(super) struct RawTests {
    /// Level of the group comparisons and of the intervals (which are at 1 - alpha).
    /// Strictly between 0 and 1: write 0.05, not 5.
    #[schemars(with = "Option<f64>", extend("exclusiveMinimum" = 0, "exclusiveMaximum" = 1, "default" = 0.05, "examples" = [0.01]))]
    pub alpha: Option<Spanned<f64>>,
    /// Level of the equal-slopes gate: below it the slopes are taken to differ and the
    /// groups are compared along the covariate instead of by adjusted means. Strictly
    /// between 0 and 1.
    #[schemars(with = "Option<f64>", extend("exclusiveMinimum" = 0, "exclusiveMaximum" = 1, "default" = 0.05, "examples" = [0.1]))]
    pub slopes_alpha: Option<Spanned<f64>>,
    /// Multiplicity adjustment of the pairwise p-values: "none", "bonferroni", "holm"
    /// (step-down) or "tukey-kramer" (studentized range over all groups).
    #[schemars(with = "Option<Comparisons>", extend("default" = "holm", "examples" = ["holm"]))]
    pub comparisons: Option<Spanned<Comparisons>>,
    /// Johnson-Neyman regions when slopes differ: "pointwise" (t at each covariate
    /// value) or "simultaneous" (over the whole covariate range).
    #[schemars(with = "Option<Regions>", extend("default" = "pointwise", "examples" = ["simultaneous"]))]
    pub regions: Option<Spanned<Regions>>,
    /// Covariate values at which group differences are given when slopes differ.
    /// Default: the covariate's quartiles. Must not be empty.
    #[schemars(with = "Option<Vec<f64>>", extend("minItems" = 1, "examples" = [[20.0, 30.0]]))]
    pub compare_at: Option<Spanned<Vec<Spanned<f64>>>>,
    /// How the model for the rest of the report (and for [limits]) is chosen: "equal-slopes-gate"
    /// (the equal-slopes test at slopes_alpha) or "lot-pooling" (ICH Q1E,
    /// 2003: equal slopes, then equal intercepts, each at pooling_alpha).
    #[schemars(with = "Option<Procedure>", extend("default" = "equal-slopes-gate", "examples" = ["lot-pooling"]))]
    pub procedure: Option<Spanned<Procedure>>,
    /// Level of both lot-pooling tests when procedure = "lot-pooling". Strictly between
    /// 0 and 1.
    #[schemars(with = "Option<f64>", extend("exclusiveMinimum" = 0, "exclusiveMaximum" = 1, "default" = 0.25, "examples" = [0.1]))]
    pub pooling_alpha: Option<Spanned<f64>>,
    /// Covariance of the estimates behind the equal-slopes test, the slope
    /// differences, the adjusted means and their differences: "classical" (one pooled
    /// residual variance) or a heteroscedasticity-consistent form, "hc0" (White 1980),
    /// "hc1", "hc2" or "hc3" (MacKinnon & White 1985), for residual spreads that differ
    /// between rows. With an "hc" form the gate decides on its Wald test, and the
    /// report shows the classical result beside it when the two disagree.
    #[schemars(with = "Option<Covariance>", extend("default" = "classical", "examples" = ["hc3"]))]
    pub covariance: Option<Spanned<Covariance>>,
    /// The largest slope difference that does not matter, in response units per
    /// covariate unit on the measured scale (both columns untransformed). With it,
    /// every pair of slopes gets two one-sided tests against ±margin and a reading:
    /// shown equivalent, shown different (by more than the margin) or not settled.
    #[schemars(with = "Option<f64>", extend("exclusiveMinimum" = 0, "examples" = [0.05]))]
    pub slope_margin: Option<Spanned<f64>>,
    /// What the gate needs before it compares the groups on a common slope:
    /// "difference" (the equal-slopes test does not reject) or "equivalence" (every
    /// pair of slopes is shown equivalent within `slope_margin`, which it requires).
    #[schemars(with = "Option<GateRule>", extend("default" = "difference", "examples" = ["difference"]))]
    pub gate: Option<Spanned<GateRule>>,
    /// How lot pooling decides each step, with procedure = "lot-pooling":
    /// "difference" (ICH Q1E 2003: the equal-slopes, then the equal-intercepts test
    /// at pooling_alpha) or "equivalence" (every pair of slopes, then every pair of
    /// parallel lines, shown equivalent within pooling_slope_margin and
    /// pooling_intercept_margin by two one-sided tests at alpha; both margins
    /// required).
    #[schemars(with = "Option<GateRule>", extend("default" = "difference", "examples" = ["equivalence"]))]
    pub pooling_rule: Option<Spanned<GateRule>>,
    /// With pooling_rule = "equivalence": the largest slope difference between lots
    /// that does not matter, response units per covariate unit, measured scale.
    #[schemars(with = "Option<f64>", extend("exclusiveMinimum" = 0, "examples" = [0.05]))]
    pub pooling_slope_margin: Option<Spanned<f64>>,
    /// With pooling_rule = "equivalence": the largest vertical distance between two
    /// lots' parallel lines that does not matter, response units, measured scale.
    #[schemars(with = "Option<f64>", extend("exclusiveMinimum" = 0, "examples" = [1.0]))]
    pub pooling_intercept_margin: Option<Spanned<f64>>,
}

/// What the gate needs before it takes the common-slope branch.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum GateRule {
    /// The equal-slopes test does not reject.
    Difference,
    /// Every pair of slopes is shown equivalent within the margin.
    Equivalence,
}

/// The covariance of the estimates.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum Covariance {
    /// One pooled residual variance.
    Classical,
    /// White (1980): the squared residuals.
    Hc0,
    /// HC0 scaled by n/(n − p).
    Hc1,
    /// Squared residuals over 1 − h (MacKinnon & White 1985).
    Hc2,
    /// Squared residuals over (1 − h)², close to the jackknife (MacKinnon & White 1985).
    Hc3,
}

impl Covariance {
    /// The plan's name for the covariance.
    pub fn name(self) -> &'static str {
        match self {
            Covariance::Classical => "classical",
            Covariance::Hc0 => "hc0",
            Covariance::Hc1 => "hc1",
            Covariance::Hc2 => "hc2",
            Covariance::Hc3 => "hc3",
        }
    }
}

#[derive(Debug, Clone, Default, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
#[schemars(extend(
    "allOf" = [
        {"not": {"required": ["storage", "extrapolation_factor"]}},
        {"not": {"required": ["storage", "max_beyond"]}}
    ],
    "examples" = [{"lower": 95.0, "confidence": 0.95}]
))]
#[schemars(extend(
    "if" = {"properties": {"band": {"const": "simultaneous"}}, "required": ["band"]},
    "then" = {"not": {"properties": {"bound": {"const": "prediction"}}, "required": ["bound"]}}
))]
pub(super) struct RawLimits {
    /// The mean response must stay at or above this value (on the response's scale as
    /// measured).
    #[schemars(with = "Option<f64>", extend("examples" = [95.0]))]
    pub lower: Option<Spanned<f64>>,
    /// The mean response must stay at or below this value (on the response's scale as
    /// measured).
    #[schemars(with = "Option<f64>", extend("examples" = [105.0]))]
    pub upper: Option<Spanned<f64>>,
    /// One-sided confidence of the bound compared with the limits, strictly between 0.5
    /// and 1.
    #[schemars(with = "Option<f64>", extend("exclusiveMinimum" = 0.5, "exclusiveMaximum" = 1, "default" = 0.95, "examples" = [0.99]))]
    pub confidence: Option<Spanned<f64>>,
    /// Which bound is compared with the limits: "mean", the confidence bound of the
    /// mean line, or "prediction", the prediction bound for a single future result.
    #[schemars(with = "Option<BoundKind>", extend("default" = "mean", "examples" = ["prediction"]))]
    pub bound: Option<Spanned<BoundKind>>,
    /// Which confidence bound of the mean meets the limits: "pointwise" (Student's t
    /// at each covariate value) or "simultaneous" (the Working–Hotelling band at the
    /// limits' confidence, which holds for every covariate value at once and so for
    /// every crossing read from it). Only with bound = "mean".
    #[schemars(with = "Option<BandKind>", extend("default" = "pointwise", "examples" = ["simultaneous"]))]
    pub band: Option<Spanned<BandKind>>,
    /// Storage class whose extrapolation rule caps the supported period (covariate in
    /// months): "room" up to twice the covered period and at most 12 beyond it,
    /// "refrigerated" up to 1.5 times and at most 6 beyond (ICH Q1E 2003, quoted from
    /// memory), "frozen" no extrapolation (this tool's reading). Not together with
    /// extrapolation_factor / max_beyond.
    #[schemars(with = "Option<Storage>", extend("examples" = ["room"]))]
    pub storage: Option<Spanned<Storage>>,
    /// Explicit rule: the supported period is at most this many times the period the
    /// data cover (1 or more; without it, no factor limit). Not together with storage.
    #[schemars(with = "Option<f64>", extend("minimum" = 1, "examples" = [1.5]))]
    pub extrapolation_factor: Option<Spanned<f64>>,
    /// Explicit rule: the supported period goes at most this far beyond the last
    /// observation, in covariate units (0 or more; without it, no such limit). Not
    /// together with storage.
    #[schemars(with = "Option<f64>", extend("minimum" = 0, "examples" = [6]))]
    pub max_beyond: Option<Spanned<f64>>,
    /// The accelerated data showed significant change: no extrapolation beyond the
    /// observed period, whatever the storage rule.
    #[schemars(with = "Option<bool>", extend("default" = false, "examples" = [true]))]
    pub accelerated_change: Option<Spanned<bool>>,
    /// The supported period is rounded down to a multiple of this, in covariate units
    /// (above 0).
    #[schemars(with = "Option<f64>", extend("exclusiveMinimum" = 0, "default" = 1, "examples" = [3]))]
    pub round_to: Option<Spanned<f64>>,
}

/// Which bound of a line is compared with the limits.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, JsonSchema)]
#[serde(rename_all = "kebab-case")]
pub enum BoundKind {
    /// The confidence bound of the mean line (the default).
    Mean,
    /// The prediction bound for a single future result.
    Prediction,
}

/// The storage class whose extrapolation rule caps the supported period.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, JsonSchema)]
#[serde(rename_all = "kebab-case")]
pub enum Storage {
    /// Room temperature.
    Room,
    /// Refrigerated.
    Refrigerated,
    /// Frozen.
    Frozen,
}

/// How the model for the rest of the report is chosen.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, JsonSchema)]
#[serde(rename_all = "kebab-case")]
pub enum Procedure {
    /// The equal-slopes gate at `slopes_alpha`.
    EqualSlopesGate,
    /// ICH Q1E (2003) lot pooling: equal slopes, then equal intercepts, each at
    /// `pooling_alpha`.
    LotPooling,
}

#[derive(Debug, Clone, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub(super) struct RawChecks {
    /// The refit without the rows that matter (Cook's distance above the median of
    /// F(p, n − p), or a studentized residual beyond the Bonferroni t quantile),
    /// shown beside the full results. Left out, it runs whenever a row matters;
    /// true runs it always, false never.
    #[schemars(with = "Option<bool>", extend("examples" = [false]))]
    pub sensitivity: Option<Spanned<bool>>,
}

#[derive(Debug, Clone, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub(super) struct RawReport {
    /// Outputs to write, each once: "markdown" (report.md), "json" (results.json),
    /// "pdf" (report.pdf, needs the typst program). Must not be empty.
    #[schemars(with = "Option<Vec<Format>>", extend("minItems" = 1, "uniqueItems" = true, "default" = ["markdown", "json"], "examples" = [["markdown", "json"]]))]
    pub formats: Option<Spanned<Vec<Spanned<Format>>>>,
    /// Output folder, relative to the plan's folder; `--out DIR` on the command line
    /// overrides it.
    #[schemars(with = "Option<String>", extend("pattern" = "\\S", "examples" = ["../reports/nursery-2026"]))]
    pub out: Option<Spanned<String>>,
    /// Where the common-slope results (adjusted means and their differences) go when
    /// the equal-slopes test finds the slopes differ: "section" (default: a section of
    /// their own, titled as what they are, a what-if on slopes forced equal, after the
    /// slopes and regions) or "omit" (left out of the report; results.json keeps them).
    #[schemars(with = "Option<ForcedEqual>", extend("default" = "section"))]
    pub forced_equal: Option<Spanned<ForcedEqual>>,
    /// The most pairs of groups listed (slope differences, adjusted-mean differences,
    /// regions, equivalence): k groups give k(k − 1)/2 pairs. Beyond it the pairwise
    /// lists are left out with a note, so thousands of groups stay in bounded memory;
    /// the gate and the group-effect test still cover every group.
    #[schemars(with = "Option<u64>", extend("minimum" = 1, "default" = 5000, "examples" = [20000]))]
    pub max_pairs: Option<Spanned<u64>>,
    /// The bands around each line in the figures: "pointwise" (Student's t at each
    /// covariate value) or "simultaneous" (Working & Hotelling 1929: the whole line
    /// at once). results.json gives both critical values either way.
    #[schemars(with = "Option<BandKind>", extend("default" = "pointwise", "examples" = ["simultaneous"]))]
    pub bands: Option<Spanned<BandKind>>,
}

/// The bands drawn around each line.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, JsonSchema, Default)]
#[serde(rename_all = "lowercase")]
pub enum BandKind {
    /// Student's t at each covariate value.
    #[default]
    Pointwise,
    /// Working–Hotelling, for the whole line.
    Simultaneous,
}

/// Where the common-slope tables go when the slopes differ.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, JsonSchema, Default)]
#[serde(rename_all = "lowercase")]
pub enum ForcedEqual {
    /// A section of their own, after the slopes and regions.
    #[default]
    Section,
    /// Left out of the report.
    Omit,
}

/// A transform applied to a column before fitting.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum Transform {
    /// Values as read.
    None,
    /// Natural logarithm; values must be positive.
    Log,
    /// Base-10 logarithm; values must be positive.
    Log10,
    /// Square root; values must not be negative.
    Sqrt,
}

impl Transform {
    /// The plan's name for the transform.
    pub fn name(self) -> &'static str {
        match self {
            Transform::None => "none",
            Transform::Log => "log",
            Transform::Log10 => "log10",
            Transform::Sqrt => "sqrt",
        }
    }

    /// Applies the transform, or `None` when the value is outside its domain.
    pub fn apply(self, v: f64) -> Option<f64> {
        match self {
            Transform::None => Some(v),
            Transform::Log if v > 0.0 => Some(v.ln()),
            Transform::Log10 if v > 0.0 => Some(v.log10()),
            Transform::Sqrt if v >= 0.0 => Some(v.sqrt()),
            _ => None,
        }
    }

    /// The domain in words, for error messages.
    pub fn domain(self) -> &'static str {
        match self {
            Transform::None => "any finite number",
            Transform::Log | Transform::Log10 => "positive values",
            Transform::Sqrt => "values of zero or more",
        }
    }

    /// A column label that shows the transform, e.g. `log(height_cm)`.
    /// For a log transform, the value back on the measured scale (exp, or 10^x);
    /// `None` for the others, whose back-transformed means and differences have no
    /// plain reading.
    pub fn exp(self, v: f64) -> Option<f64> {
        match self {
            Transform::Log => Some(v.exp()),
            Transform::Log10 => Some(10f64.powf(v)),
            _ => None,
        }
    }

    /// The value on the measured scale that the transform maps to `v`.
    pub fn inverse(self, v: f64) -> f64 {
        match self {
            Transform::None => v,
            Transform::Log => v.exp(),
            Transform::Log10 => 10f64.powf(v),
            Transform::Sqrt => v * v,
        }
    }

    /// True for "log" and "log10".
    pub fn is_log(self) -> bool {
        matches!(self, Transform::Log | Transform::Log10)
    }

    pub fn label(self, column: &str) -> String {
        match self {
            Transform::None => column.to_string(),
            _ => format!("{}({column})", self.name()),
        }
    }
}

/// Multiplicity adjustment for the pairwise p-values.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, JsonSchema)]
#[serde(rename_all = "kebab-case")]
pub enum Comparisons {
    /// Unadjusted p-values.
    None,
    /// Bonferroni: each p-value times the number of pairs, capped at 1.
    Bonferroni,
    /// Holm's step-down procedure.
    Holm,
    /// Tukey–Kramer: the studentized range over all k groups.
    TukeyKramer,
    /// Many-to-one (Dunnett 1955): every group against the first level, with
    /// simultaneous p-values and intervals from the multivariate t.
    AgainstReference,
}

/// Which Johnson–Neyman regions to report when slopes differ.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum Regions {
    /// Johnson & Neyman (1936): t at 1 − alpha/2 at each covariate value.
    Pointwise,
    /// Potthoff (1964): simultaneous over the whole covariate range.
    Simultaneous,
}

impl Regions {
    /// The method's name in `results.json`.
    pub fn method(self) -> &'static str {
        match self {
            Regions::Pointwise => "johnson-neyman",
            Regions::Simultaneous => "johnson-neyman-simultaneous",
        }
    }
}

impl Comparisons {
    /// The plan's name for the adjustment.
    pub fn name(self) -> &'static str {
        match self {
            Comparisons::None => "none",
            Comparisons::Bonferroni => "bonferroni",
            Comparisons::Holm => "holm",
            Comparisons::TukeyKramer => "tukey-kramer",
            Comparisons::AgainstReference => "against-reference",
        }
    }
}

/// An output format.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum Format {
    /// `report.md`.
    Markdown,
    /// `results.json`.
    Json,
    /// `report.pdf`, through the external `typst` program.
    Pdf,
}

impl Format {
    /// The plan's name for the format.
    pub fn name(self) -> &'static str {
        match self {
            Format::Markdown => "markdown",
            Format::Json => "json",
            Format::Pdf => "pdf",
        }
    }
}

/// The JSON Schema of the plan, as schemars derives it from the types above
/// (subschemas inlined, so each table's keys sit under its `properties`).
pub fn derived_json_schema() -> serde_json::Value {
    let generator = schemars::generate::SchemaSettings::draft2020_12()
        .with(|s| s.inline_subschemas = true)
        .into_generator();
    generator.into_root_schema_for::<RawPlan>().to_value()
}
