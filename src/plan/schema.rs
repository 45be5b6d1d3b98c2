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
    pub report: Option<Spanned<RawReport>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawData {
    pub path: Spanned<String>,
    pub missing: Option<Spanned<Vec<String>>>,
    pub sha256: Option<Spanned<String>>,
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
#[serde(rename_all = "lowercase")]
pub enum Comparisons {
    /// Unadjusted p-values.
    None,
    /// Bonferroni: each p-value times the number of pairs, capped at 1.
    Bonferroni,
    /// Holm's step-down procedure.
    Holm,
}

impl Comparisons {
    /// The plan's name for the adjustment.
    pub fn name(self) -> &'static str {
        match self {
            Comparisons::None => "none",
            Comparisons::Bonferroni => "bonferroni",
            Comparisons::Holm => "holm",
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
}

impl Format {
    /// The plan's name for the format.
    pub fn name(self) -> &'static str {
        match self {
            Format::Markdown => "markdown",
            Format::Json => "json",
        }
    }
}
