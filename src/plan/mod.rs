//! The plan: what to analyse and how, read from a TOML file kept in git.
//!
//! Parsing goes in two steps. [`schema`] holds the serde types that mirror the file
//! (unknown keys are refused, every value keeps its span); [`load`] turns them into a
//! validated [`Plan`] of plain values plus a [`PlanSpans`] table, so a later stage that
//! finds, say, a response column absent from the data can still point at the TOML
//! line that named it. Nothing here reads data or touches the file system.

mod error;
mod margins;
mod responses;
mod schema;
mod source;

pub use source::DataFormat;

pub use error::PlanError;
pub use schema::{
    BandKind, BoundKind, Comparisons, Covariance, ForcedEqual, Format, GateRule, Procedure,
    Regions, Storage, Transform, derived_json_schema,
};

use std::ops::Range;
use toml::Spanned;

/// Covariate values a plan names beyond this size are refused: squared in a
/// standard error they would overflow (1e308 did, and failed later as a defect).
pub const MAX_COVARIATE_VALUE: f64 = 1e100;

/// A covariate value written in the plan: finite and of a size the arithmetic can
/// square. Whether it lies in the observed range is the analysis's warning.
fn covariate_value(
    v: f64,
    span: std::ops::Range<usize>,
    key: &str,
    err: &dyn Fn(std::ops::Range<usize>, String, &str) -> PlanError,
) -> Result<f64, PlanError> {
    if !v.is_finite() {
        return Err(err(
            span,
            format!("{key} must hold finite numbers; {v} is not"),
            "write covariate values such as 10.0, within the range of the data",
        ));
    }
    if v.abs() > MAX_COVARIATE_VALUE {
        return Err(err(
            span,
            format!("{key} holds {v:e}, beyond ±1e100"),
            "write a covariate value within the range of the data",
        ));
    }
    Ok(v)
}

/// Pairs of groups listed by default: 100 groups.
pub const DEFAULT_MAX_PAIRS: u64 = 5000;

/// A validated plan.
#[derive(Debug, Clone, PartialEq)]
pub struct Plan {
    /// Report title.
    pub title: String,
    /// Where the data are and how to read them.
    pub data: DataSpec,
    /// Which columns play which part.
    pub model: ModelSpec,
    /// Levels and procedures of the tests.
    pub tests: TestSpec,
    /// Assumption checks and their options.
    pub checks: CheckSpec,
    /// Limits the mean response must respect, if any.
    pub limits: Option<LimitSpec>,
    /// What to write and where.
    pub report: ReportSpec,
    /// Spans of the values, for error messages that point into the plan.
    pub spans: PlanSpans,
    /// With `[[responses]]`: one whole single-response plan per attribute, in the
    /// plan's order (this plan is the first of them). Empty for a single response.
    pub attributes: Vec<Plan>,
}

/// The `[data]` table.
#[derive(Debug, Clone, PartialEq)]
pub struct DataSpec {
    /// Data path as written in the plan (relative to the plan's folder).
    pub path: String,
    /// Cell texts read as missing (compared after trimming spaces).
    pub missing: Vec<String>,
    /// Optional pin of the data file's SHA-256 (lower-case hex).
    pub sha256: Option<String>,
    /// Row filters; a row must pass all of them.
    pub keep: Vec<KeepRule>,
    /// Field delimiter byte (default `,`).
    pub delimiter: u8,
    /// What kind of file `path` names, from its extension.
    pub format: DataFormat,
    /// For a spreadsheet: the sheet by name (None: the first).
    pub sheet: Option<String>,
    /// For a spreadsheet: the 1-based row holding the column names.
    pub header_row: u32,
    /// True when `path` names a file of per-group moments (`data.moments`), not rows.
    pub moments: bool,
}

/// One `[[data.keep]]` filter.
#[derive(Debug, Clone, PartialEq)]
pub struct KeepRule {
    /// Column whose text is compared.
    pub column: String,
    /// Accepted texts (one for `equals`, several for `one_of`).
    pub accepted: Vec<String>,
}

/// The `[model]` table.
#[derive(Debug, Clone, PartialEq)]
pub struct ModelSpec {
    /// Numeric response column.
    pub response: String,
    /// Numeric covariate column.
    pub covariate: String,
    /// Grouping column, read as text labels.
    pub group: String,
    /// Optional order of the levels; the first is the reference.
    pub levels: Option<Vec<String>>,
    /// Covariate value at which adjusted means are given, on the analysis
    /// (transformed) scale.
    pub adjust_at: AdjustAt,
    /// That value as the plan wrote it, on the measured scale; `None` for "mean".
    pub adjust_at_measured: Option<f64>,
    /// Transform applied to the response before fitting.
    pub response_transform: Transform,
    /// Transform applied to the covariate before fitting.
    pub covariate_transform: Transform,
    /// Unit of the response as measured (for axis titles), e.g. "g".
    pub response_units: Option<String>,
    /// Unit of the covariate as measured, e.g. "cm".
    pub covariate_units: Option<String>,
}

/// Where along the covariate adjusted means are evaluated.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum AdjustAt {
    /// The mean of the (transformed) covariate over the rows used.
    Mean,
    /// A fixed value, on the transformed (analysis) scale once loaded; the plan
    /// writes it on the measured scale.
    Value(f64),
}

/// The `[tests]` table.
#[derive(Debug, Clone, PartialEq)]
pub struct TestSpec {
    /// Level for group comparisons and intervals.
    pub alpha: f64,
    /// Level of the equal-slopes gate.
    pub slopes_alpha: f64,
    /// Multiplicity adjustment of pairwise p-values.
    pub comparisons: Comparisons,
    /// Johnson–Neyman form when slopes differ.
    pub regions: Regions,
    /// Covariate values at which group differences are given when slopes differ, on
    /// the analysis scale (the plan writes them measured); `None` means the quartiles
    /// of the covariate.
    pub compare_at: Option<Vec<f64>>,
    /// How the model for limits is chosen.
    pub procedure: Procedure,
    /// Level of both lot-pooling tests.
    pub pooling_alpha: f64,
    /// Covariance of the estimates: classical or heteroscedasticity-consistent.
    pub covariance: Covariance,
    /// The slope difference that does not matter (measured scale), if given.
    pub slope_margin: Option<f64>,
    /// What the gate needs for the common-slope branch.
    pub gate: GateRule,
    /// How lot pooling decides each step.
    pub pooling_rule: GateRule,
    /// Under the equivalence rule: the slope and the intercept margins (measured
    /// scale, both columns untransformed).
    pub pooling_margins: Option<PoolingMargins>,
}

/// The margins of equivalence-based lot pooling.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PoolingMargins {
    /// Largest slope difference that does not matter.
    pub slope: f64,
    /// Largest distance between parallel lines that does not matter.
    pub intercept: f64,
}

/// The `[limits]` table: where the mean response must stay.
#[derive(Debug, Clone, PartialEq)]
pub struct LimitSpec {
    /// The mean must stay at or above this.
    pub lower: Option<f64>,
    /// The mean must stay at or below this.
    pub upper: Option<f64>,
    /// Confidence of the bound compared with the limits: one-sided with one limit;
    /// with both limits each side uses the one-sided level (1 + confidence)/2.
    pub confidence: f64,
    /// The mean line's confidence bound or the prediction bound of one result.
    pub bound: BoundKind,
    /// Pointwise or simultaneous (Working–Hotelling) confidence bound of the mean.
    pub band: BandKind,
    /// How far beyond the observed period the supported period may go, if a rule
    /// was given.
    pub extrapolation: Option<Extrapolation>,
    /// The accelerated data showed significant change: no extrapolation.
    pub accelerated_change: bool,
    /// The supported period is rounded down to a multiple of this (covariate units).
    pub round_to: f64,
}

impl LimitSpec {
    /// The one-sided level each side's bound uses: the plan's confidence with one
    /// limit, (1 + confidence)/2 with both (two-sided criteria, ICH Q1E 2003, from
    /// memory).
    pub fn one_sided_level(&self) -> f64 {
        if self.lower.is_some() && self.upper.is_some() {
            0.5 * (1.0 + self.confidence)
        } else {
            self.confidence
        }
    }
}

/// An extrapolation rule: a storage class's rule or explicit numbers.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Extrapolation {
    /// The rule for a storage class (see `analysis::limits` for the values).
    Storage(Storage),
    /// At most `factor` times the observed period and at most `max_beyond` beyond it
    /// (either infinite when the plan leaves it out).
    Explicit { factor: f64, max_beyond: f64 },
}

/// The `[checks]` table.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct CheckSpec {
    /// The rerun without the rows that matter: `None` runs it whenever a row
    /// matters, `Some(true)` always (saying so when there is nothing to leave out),
    /// `Some(false)` never.
    pub sensitivity: Option<bool>,
}

/// The `[report]` table.
#[derive(Debug, Clone, PartialEq)]
pub struct ReportSpec {
    /// Outputs to write, in the order given.
    pub formats: Vec<Format>,
    /// Output folder as written in the plan (relative to the plan's folder).
    pub out: Option<String>,
    /// Where the common-slope tables go when the slopes differ.
    pub forced_equal: ForcedEqual,
    /// The most pairs of groups listed.
    pub max_pairs: u64,
    /// The bands drawn around each line in the figures.
    pub bands: BandKind,
}

/// Byte spans of plan values that later stages may need to point at.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct PlanSpans {
    /// `data.path`.
    pub data_path: Range<usize>,
    /// `data.sha256`, when given.
    pub data_sha256: Option<Range<usize>>,
    /// `model.response`.
    pub response: Range<usize>,
    /// `model.covariate`.
    pub covariate: Range<usize>,
    /// `model.group`.
    pub group: Range<usize>,
    /// Each entry of `model.levels`.
    pub levels: Vec<Range<usize>>,
    /// `column` of each keep rule.
    pub keep_columns: Vec<Range<usize>>,
    /// `model.transform.response`, or the `[model]` table when absent.
    pub response_transform: Range<usize>,
    /// `model.transform.covariate`, or the `[model]` table when absent.
    pub covariate_transform: Range<usize>,
    /// `tests.comparisons`, when given.
    pub comparisons: Option<Range<usize>>,
    /// `data.sheet`, when given.
    pub sheet: Option<Range<usize>>,
}

/// Default cell texts read as missing.
pub const DEFAULT_MISSING: [&str; 2] = ["", "NA"];

/// Parses and validates a plan. `file` is the name shown in messages.
pub fn load(file: &str, source: &str) -> Result<Plan, PlanError> {
    let raw: schema::RawPlan =
        toml::from_str(source).map_err(|e| PlanError::from_toml(file, source, &e))?;
    if raw.responses.is_empty() {
        from_raw(file, source, &raw)
    } else {
        responses::several(file, source, raw)
    }
}

/// Validates one parsed plan with a single response.
fn from_raw(file: &str, source: &str, raw: &schema::RawPlan) -> Result<Plan, PlanError> {
    let err = |span: Range<usize>, message: String, help: &str| {
        PlanError::new(file, source, span, message, help)
    };

    let title = nonempty(&raw.title, "title", &err)?;

    let data = raw.data.get_ref();
    let (path, path_span, moments) = source::file(data, raw.data.span(), &err)?;
    let missing = match &data.missing {
        Some(list) => list.get_ref().clone(),
        None => DEFAULT_MISSING.iter().map(|s| s.to_string()).collect(),
    };
    let sha256 = match &data.sha256 {
        Some(pin) => {
            let hex = pin.get_ref().trim().to_ascii_lowercase();
            if hex.len() != 64 || !hex.bytes().all(|b| b.is_ascii_hexdigit()) {
                return Err(err(
                    pin.span(),
                    "data.sha256 must be 64 hexadecimal digits".into(),
                    "compute it with `sha256sum FILE` and paste the first field",
                ));
            }
            Some(hex)
        }
        None => None,
    };
    let (format, sheet, header_row) = source::kind_and_keys(data, &path, &err)?;
    let delimiter = match &data.delimiter {
        None => b',',
        Some(d) => match d.get_ref().as_str() {
            "," => b',',
            ";" => b';',
            "\t" | "tab" => b'\t',
            "|" => b'|',
            other => {
                return Err(err(
                    d.span(),
                    format!(
                        "data.delimiter must be one of \",\", \";\", \"tab\" or \"|\", found {other:?}"
                    ),
                    "most files use \",\"; files saved with a decimal comma often use \";\"",
                ));
            }
        },
    };
    let mut keep = Vec::new();
    let mut keep_columns = Vec::new();
    for rule in &data.keep {
        let r = rule.get_ref();
        let column = nonempty(&r.column, "data.keep.column", &err)?;
        let accepted = match (&r.equals, &r.one_of) {
            (Some(v), None) => vec![v.get_ref().clone()],
            (None, Some(list)) if !list.get_ref().is_empty() => list.get_ref().clone(),
            (None, Some(list)) => {
                return Err(err(
                    list.span(),
                    "data.keep.one_of is empty, so no row could pass".into(),
                    "list at least one accepted value",
                ));
            }
            (Some(_), Some(_)) | (None, None) => {
                return Err(err(
                    rule.span(),
                    "each [[data.keep]] needs exactly one of `equals` or `one_of`".into(),
                    "write `equals = \"value\"` or `one_of = [\"a\", \"b\"]`",
                ));
            }
        };
        keep_columns.push(r.column.span());
        keep.push(KeepRule { column, accepted });
    }

    let model_span = raw.model.span();
    let model = raw.model.get_ref();
    let Some(response) = &model.response else {
        return Err(err(
            model_span,
            "[model] names no response".into(),
            "add `response = \"column\"` under [model], or list the attributes under [[responses]]",
        ));
    };
    let response_span = response.span();
    let response = nonempty(response, "model.response", &err)?;
    let covariate = nonempty(&model.covariate, "model.covariate", &err)?;
    let group = nonempty(&model.group, "model.group", &err)?;
    if covariate == response {
        return Err(err(
            model.covariate.span(),
            format!("model.covariate and model.response are both `{response}`"),
            "the covariate is the x of each line and the response its y: name two different columns",
        ));
    }
    if group == response || group == covariate {
        return Err(err(
            model.group.span(),
            format!("model.group `{group}` is also the response or the covariate"),
            "the group column holds labels such as site or lot: name a third column",
        ));
    }
    let (levels, level_spans) = match &model.levels {
        None => (None, Vec::new()),
        Some(list) => {
            let entries = list.get_ref();
            if entries.len() < 2 {
                return Err(err(
                    list.span(),
                    "model.levels lists fewer than two groups; comparing lines needs at least two"
                        .into(),
                    "list every group to compare, or remove `levels` to use all groups in sorted order",
                ));
            }
            let mut seen: Vec<&str> = Vec::new();
            for entry in entries {
                if seen.contains(&entry.get_ref().as_str()) {
                    return Err(err(
                        entry.span(),
                        format!(
                            "level `{}` is listed twice in model.levels",
                            entry.get_ref()
                        ),
                        "list each level once",
                    ));
                }
                seen.push(entry.get_ref());
            }
            (
                Some(entries.iter().map(|e| e.get_ref().clone()).collect()),
                entries.iter().map(|e| e.span()).collect(),
            )
        }
    };
    let adjust_at = match &model.adjust_at {
        None => AdjustAt::Mean,
        Some(value) => match value.get_ref() {
            toml::Value::String(s) if s == "mean" => AdjustAt::Mean,
            toml::Value::Float(f) if f.is_finite() => {
                AdjustAt::Value(covariate_value(*f, value.span(), "model.adjust_at", &err)?)
            }
            toml::Value::Integer(i) => AdjustAt::Value(covariate_value(
                *i as f64,
                value.span(),
                "model.adjust_at",
                &err,
            )?),
            _ => {
                return Err(err(
                    value.span(),
                    "model.adjust_at must be \"mean\" or a finite number".into(),
                    "write `adjust_at = \"mean\"` or a covariate value such as `adjust_at = 25.0` (on the measured scale)",
                ));
            }
        },
    };
    let (response_transform, covariate_transform, rt_span, ct_span) = match &model.transform {
        None => (
            Transform::None,
            Transform::None,
            model_span.clone(),
            model_span.clone(),
        ),
        Some(t) => (
            t.response
                .as_ref()
                .map_or(Transform::None, |s| *s.get_ref()),
            t.covariate
                .as_ref()
                .map_or(Transform::None, |s| *s.get_ref()),
            t.response
                .as_ref()
                .map_or(model_span.clone(), Spanned::span),
            t.covariate
                .as_ref()
                .map_or(model_span.clone(), Spanned::span),
        ),
    };

    // Every covariate value a plan holds is on the measured scale; the analysis works
    // on the transformed one (one rule for scales, issue 13).
    let to_analysis = |v: f64, span: Range<usize>, key: &str| -> Result<f64, PlanError> {
        covariate_transform.apply(v).ok_or_else(|| {
            err(
                span,
                format!(
                    "{key} = {v} is outside the domain of the covariate's {} transform (values in a plan are on the measured scale, and slopewise transforms them)",
                    covariate_transform.name()
                ),
                match covariate_transform {
                    Transform::Sqrt => "write a covariate value of 0 or more, as measured",
                    _ => "write a positive covariate value, as measured",
                },
            )
        })
    };
    let adjust_at_measured = match adjust_at {
        AdjustAt::Value(v) => Some(v),
        AdjustAt::Mean => None,
    };
    let adjust_at = match (adjust_at, &model.adjust_at) {
        (AdjustAt::Value(v), Some(value)) => {
            AdjustAt::Value(to_analysis(v, value.span(), "model.adjust_at")?)
        }
        (other, _) => other,
    };

    let tests = match &raw.tests {
        None => TestSpec {
            alpha: 0.05,
            slopes_alpha: 0.05,
            comparisons: Comparisons::Holm,
            regions: Regions::Pointwise,
            compare_at: None,
            procedure: Procedure::EqualSlopesGate,
            pooling_alpha: 0.25,
            covariance: Covariance::Classical,
            slope_margin: None,
            gate: GateRule::Difference,
            pooling_rule: GateRule::Difference,
            pooling_margins: None,
        },
        Some(t) => {
            let t = t.get_ref();
            TestSpec {
                alpha: level(t.alpha.as_ref(), "tests.alpha", &err)?,
                slopes_alpha: level(t.slopes_alpha.as_ref(), "tests.slopes_alpha", &err)?,
                comparisons: t
                    .comparisons
                    .as_ref()
                    .map_or(Comparisons::Holm, |c| *c.get_ref()),
                regions: t
                    .regions
                    .as_ref()
                    .map_or(Regions::Pointwise, |r| *r.get_ref()),
                procedure: t
                    .procedure
                    .as_ref()
                    .map_or(Procedure::EqualSlopesGate, |p| *p.get_ref()),
                covariance: t
                    .covariance
                    .as_ref()
                    .map_or(Covariance::Classical, |c| *c.get_ref()),
                slope_margin: margins::slope_margin(
                    t,
                    &(response_transform, covariate_transform),
                    &err,
                )?,
                gate: margins::gate_rule(t, &err)?,
                pooling_rule: t
                    .pooling_rule
                    .as_ref()
                    .map_or(GateRule::Difference, |r| *r.get_ref()),
                pooling_margins: margins::pooling_margins(
                    t,
                    &(response_transform, covariate_transform),
                    &err,
                )?,
                pooling_alpha: match &t.pooling_alpha {
                    None => 0.25,
                    Some(_) => level(t.pooling_alpha.as_ref(), "tests.pooling_alpha", &err)?,
                },
                compare_at: match &t.compare_at {
                    None => None,
                    Some(list) => {
                        if list.get_ref().is_empty() {
                            return Err(err(
                                list.span(),
                                "tests.compare_at is empty".into(),
                                "list covariate values such as [10.0, 20.0], or remove the key to use the quartiles",
                            ));
                        }
                        let mut values = Vec::new();
                        for v in list.get_ref() {
                            let measured =
                                covariate_value(*v.get_ref(), v.span(), "tests.compare_at", &err)?;
                            values.push(to_analysis(measured, v.span(), "tests.compare_at")?);
                        }
                        Some(values)
                    }
                },
            }
        }
    };

    let report = match &raw.report {
        None => ReportSpec {
            formats: vec![Format::Markdown, Format::Json],
            out: None,
            forced_equal: ForcedEqual::Section,
            max_pairs: DEFAULT_MAX_PAIRS,
            bands: BandKind::Pointwise,
        },
        Some(r) => {
            let r = r.get_ref();
            let formats = match &r.formats {
                None => vec![Format::Markdown, Format::Json],
                Some(list) => {
                    if list.get_ref().is_empty() {
                        return Err(err(
                            list.span(),
                            "report.formats is empty, so the run would write nothing".into(),
                            "use `formats = [\"markdown\", \"json\"]`",
                        ));
                    }
                    let mut formats = Vec::new();
                    for f in list.get_ref() {
                        if formats.contains(f.get_ref()) {
                            return Err(err(
                                f.span(),
                                format!("format \"{}\" is listed twice", f.get_ref().name()),
                                "list each format once",
                            ));
                        }
                        formats.push(*f.get_ref());
                    }
                    formats
                }
            };
            let out = match &r.out {
                Some(o) => Some(nonempty(o, "report.out", &err)?),
                None => None,
            };
            let max_pairs = match &r.max_pairs {
                None => DEFAULT_MAX_PAIRS,
                Some(m) if *m.get_ref() == 0 => {
                    return Err(err(
                        m.span(),
                        "report.max_pairs must be at least 1".into(),
                        "give the most pairs of groups to list, such as 5000",
                    ));
                }
                Some(m) => *m.get_ref(),
            };
            ReportSpec {
                max_pairs,
                bands: r
                    .bands
                    .as_ref()
                    .map_or(BandKind::Pointwise, |b| *b.get_ref()),
                formats,
                out,
                forced_equal: r
                    .forced_equal
                    .as_ref()
                    .map_or(ForcedEqual::Section, |f| *f.get_ref()),
            }
        }
    };

    let limits = match &raw.limits {
        None => None,
        Some(l) => {
            let span = l.span();
            let l = l.get_ref();
            let finite = |v: &Option<Spanned<f64>>, key: &str| -> Result<Option<f64>, PlanError> {
                match v {
                    Some(v) if !v.get_ref().is_finite() => Err(err(
                        v.span(),
                        format!("{key} must be a finite number"),
                        "write the limit on the response's scale, e.g. 95.0",
                    )),
                    Some(v) => Ok(Some(*v.get_ref())),
                    None => Ok(None),
                }
            };
            let lower = finite(&l.lower, "limits.lower")?;
            let upper = finite(&l.upper, "limits.upper")?;
            if lower.is_none() && upper.is_none() {
                return Err(err(
                    span,
                    "[limits] names neither `lower` nor `upper`".into(),
                    "give the limit the mean response must respect, e.g. `lower = 95.0`",
                ));
            }
            if let (Some(lo), Some(hi)) = (lower, upper)
                && lo >= hi
            {
                return Err(err(
                    l.upper.as_ref().map_or(span.clone(), |u| u.span()),
                    format!("limits.lower ({lo}) must be below limits.upper ({hi})"),
                    "swap them, or check the numbers",
                ));
            }
            let confidence = match &l.confidence {
                None => 0.95,
                Some(c) if *c.get_ref() > 0.5 && *c.get_ref() < 1.0 => *c.get_ref(),
                Some(c) => {
                    return Err(err(
                        c.span(),
                        format!(
                            "limits.confidence must lie between 0.5 and 1, found {}",
                            c.get_ref()
                        ),
                        "a one-sided confidence such as 0.95",
                    ));
                }
            };
            let at_least = |v: &Spanned<f64>, key: &str, floor: f64, help: &str| {
                let x = *v.get_ref();
                if x.is_finite() && x >= floor {
                    Ok(x)
                } else {
                    Err(err(
                        v.span(),
                        format!("{key} must be a finite number of at least {floor}, found {x}"),
                        help,
                    ))
                }
            };
            let round_to = match &l.round_to {
                None => 1.0,
                Some(r) if r.get_ref().is_finite() && *r.get_ref() > 0.0 => *r.get_ref(),
                Some(r) => {
                    return Err(err(
                        r.span(),
                        format!(
                            "limits.round_to must be a number above 0, found {}",
                            r.get_ref()
                        ),
                        "the step the supported period is rounded down to, in covariate units, e.g. 1 or 3",
                    ));
                }
            };
            let extrapolation = match (&l.storage, &l.extrapolation_factor, &l.max_beyond) {
                (None, None, None) => None,
                (Some(s), None, None) => Some(Extrapolation::Storage(*s.get_ref())),
                (Some(_), Some(e), _) | (Some(_), None, Some(e)) => {
                    return Err(err(
                        e.span(),
                        "limits.storage and an explicit extrapolation_factor / max_beyond are given together".into(),
                        "keep either `storage` (its rule sets the cap) or `extrapolation_factor` with `max_beyond`, not both",
                    ));
                }
                (None, f, m) => Some(Extrapolation::Explicit {
                    factor: match f {
                        Some(f) => at_least(
                            f,
                            "limits.extrapolation_factor",
                            1.0,
                            "a factor of 1 or more, e.g. 1.5 (1 means no extrapolation)",
                        )?,
                        None => f64::INFINITY,
                    },
                    max_beyond: match m {
                        Some(m) => at_least(
                            m,
                            "limits.max_beyond",
                            0.0,
                            "how far beyond the last observation the period may go, in covariate units, 0 or more, e.g. 6",
                        )?,
                        None => f64::INFINITY,
                    },
                }),
            };
            Some(LimitSpec {
                lower,
                upper,
                confidence,
                bound: l.bound.as_ref().map_or(BoundKind::Mean, |b| *b.get_ref()),
                band: match (&l.band, &l.bound) {
                    (Some(b), Some(k))
                        if *b.get_ref() == BandKind::Simultaneous
                            && *k.get_ref() == BoundKind::Prediction =>
                    {
                        return Err(err(
                            b.span(),
                            "limits.band = \"simultaneous\" is a band for the mean line, but limits.bound = \"prediction\" asks for a single future result".into(),
                            "use band = \"simultaneous\" with bound = \"mean\", or remove band to read the prediction bound pointwise",
                        ));
                    }
                    (Some(b), _) => *b.get_ref(),
                    (None, _) => BandKind::Pointwise,
                },
                extrapolation,
                accelerated_change: l.accelerated_change.as_ref().is_some_and(|a| *a.get_ref()),
                round_to,
            })
        }
    };

    let checks = CheckSpec {
        sensitivity: raw
            .checks
            .as_ref()
            .and_then(|c| c.sensitivity.as_ref().map(|s| *s.get_ref())),
    };
    if moments {
        source::without_rows(raw, &err)?;
    }

    Ok(Plan {
        attributes: Vec::new(),
        title,
        checks,
        limits,
        data: DataSpec {
            path,
            missing,
            sha256,
            keep,
            delimiter,
            format,
            sheet,
            header_row,
            moments,
        },
        model: ModelSpec {
            response,
            covariate,
            group,
            levels,
            adjust_at,
            adjust_at_measured,
            response_transform,
            covariate_transform,
            response_units: model.units.as_ref().and_then(|u| u.response.clone()),
            covariate_units: model.units.as_ref().and_then(|u| u.covariate.clone()),
        },
        tests,
        report,
        spans: PlanSpans {
            data_path: path_span,
            data_sha256: data.sha256.as_ref().map(Spanned::span),
            response: response_span,
            covariate: model.covariate.span(),
            group: model.group.span(),
            levels: level_spans,
            keep_columns,
            response_transform: rt_span,
            covariate_transform: ct_span,
            sheet: data.sheet.as_ref().map(Spanned::span),
            comparisons: raw
                .tests
                .as_ref()
                .and_then(|t| t.get_ref().comparisons.as_ref().map(Spanned::span)),
        },
    })
}

fn nonempty(
    value: &Spanned<String>,
    key: &str,
    err: &impl Fn(Range<usize>, String, &str) -> PlanError,
) -> Result<String, PlanError> {
    let text = value.get_ref().trim();
    if text.is_empty() {
        return Err(err(
            value.span(),
            format!("{key} is empty"),
            "give it a value",
        ));
    }
    Ok(value.get_ref().clone())
}

fn level(
    value: Option<&Spanned<f64>>,
    key: &str,
    err: &impl Fn(Range<usize>, String, &str) -> PlanError,
) -> Result<f64, PlanError> {
    let Some(value) = value else { return Ok(0.05) };
    let v = *value.get_ref();
    if !(v > 0.0 && v < 1.0) {
        return Err(err(
            value.span(),
            format!("{key} must lie strictly between 0 and 1, found {v}"),
            "use a level such as 0.05 (write 0.05, not 5 or 5%)",
        ));
    }
    Ok(v)
}

#[cfg(test)]
mod tests;
