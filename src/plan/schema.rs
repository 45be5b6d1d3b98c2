//! Serde types that mirror the plan file one to one. Unknown keys are refused and
//! every value keeps its byte span, so validation can point at it.

use serde::Deserialize;
use toml::Spanned;

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawPlan {
    pub title: Spanned<String>,
    pub data: Spanned<RawData>,
    pub model: Spanned<RawModel>,
    pub tests: Option<Spanned<RawTests>>,
    pub checks: Option<RawChecks>,
    pub limits: Option<Spanned<RawLimits>>,
    pub report: Option<Spanned<RawReport>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawData {
    pub path: Spanned<String>,
    pub missing: Option<Spanned<Vec<String>>>,
    pub sha256: Option<Spanned<String>>,
    pub delimiter: Option<Spanned<String>>,
    #[serde(default)]
    pub keep: Vec<Spanned<RawKeep>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawKeep {
    pub column: Spanned<String>,
    pub equals: Option<Spanned<String>>,
    pub one_of: Option<Spanned<Vec<String>>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawModel {
    pub response: Spanned<String>,
    pub covariate: Spanned<String>,
    pub group: Spanned<String>,
    pub levels: Option<Spanned<Vec<Spanned<String>>>>,
    pub adjust_at: Option<Spanned<toml::Value>>,
    pub transform: Option<RawTransform>,
    pub units: Option<RawUnits>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawUnits {
    pub response: Option<String>,
    pub covariate: Option<String>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawTransform {
    pub response: Option<Spanned<Transform>>,
    pub covariate: Option<Spanned<Transform>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawTests {
    pub alpha: Option<Spanned<f64>>,
    pub slopes_alpha: Option<Spanned<f64>>,
    pub comparisons: Option<Spanned<Comparisons>>,
    pub regions: Option<Spanned<Regions>>,
    pub compare_at: Option<Spanned<Vec<Spanned<f64>>>>,
    pub procedure: Option<Spanned<Procedure>>,
    pub pooling_alpha: Option<Spanned<f64>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawLimits {
    pub lower: Option<Spanned<f64>>,
    pub upper: Option<Spanned<f64>>,
    pub confidence: Option<Spanned<f64>>,
    pub bound: Option<Spanned<BoundKind>>,
    pub storage: Option<Spanned<Storage>>,
    pub extrapolation_factor: Option<Spanned<f64>>,
    pub max_beyond: Option<Spanned<f64>>,
    pub accelerated_change: Option<Spanned<bool>>,
    pub round_to: Option<Spanned<f64>>,
}

/// Which bound of a line is compared with the limits.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum BoundKind {
    /// The confidence bound of the mean line (the default).
    Mean,
    /// The prediction bound for a single future result.
    Prediction,
}

/// The storage class whose extrapolation rule caps the supported period.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize)]
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
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Procedure {
    /// The equal-slopes gate at `slopes_alpha`.
    EqualSlopesGate,
    /// ICH Q1E (2003) lot pooling: equal slopes, then equal intercepts, each at
    /// `pooling_alpha`.
    LotPooling,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawChecks {
    pub sensitivity: Option<bool>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawReport {
    pub formats: Option<Spanned<Vec<Spanned<Format>>>>,
    pub out: Option<Spanned<String>>,
}

/// A transform applied to a column before fitting.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize)]
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
    pub fn label(self, column: &str) -> String {
        match self {
            Transform::None => column.to_string(),
            _ => format!("{}({column})", self.name()),
        }
    }
}

/// Multiplicity adjustment for the pairwise p-values.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize)]
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
}

/// Which Johnson–Neyman regions to report when slopes differ.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize)]
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
        }
    }
}

/// An output format.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize)]
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
