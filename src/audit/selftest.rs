//! The self-test an installation runs to show it computes correctly: reference
//! datasets from published sources, embedded in the binary, run through the same
//! code a plan goes through, and compared with their certified or reference values.
//!
//! - NIST StRD linear least squares (NIST 2003, Statistical Reference Datasets):
//!   Norris through the closed-form line every group's fit uses, Longley (six
//!   predictors, so it applies only to the QR cross-check). Certified values in
//!   `tests/reference/nist/certified.toml`. The StRD's third two-parameter-class
//!   dataset with a polynomial model, Pontius, is not here: no registry package on
//!   this machine ships its certified values, and they are not typed from memory.
//! - statsmodels OLS on open datasets (the committed references of
//!   `tests/reference/`, written by `generate.py` with pinned versions): whole plans
//!   through plan, data and analysis, every number compared.
//!
//! Agreement is the log relative error, LRE = −log10(|value − reference| /
//! |reference|), capped at 15 (McCullough 1998, "Assessing the reliability of
//! statistical software", the measure NIST StRD results are reported in).

use serde::Serialize;
use serde_json::Value;

use crate::fit::{GroupLine, Moments, qr};
use crate::results::Provenance;
use crate::{analysis, data, plan};

const CERTIFIED: &str = include_str!("../../tests/reference/nist/certified.toml");
const NORRIS: &str = include_str!("../../tests/reference/nist/norris.csv");
const LONGLEY: &str = include_str!("../../tests/reference/nist/longley.csv");

/// NIST's source line for the StRD cases.
const NIST_SOURCE: &str = "NIST StRD linear least squares regression, certified values \
                           (tests/reference/nist/certified.toml)";

/// The committed statsmodels reference cases run whole: name, plan, data, expected.
/// Chosen to take both branches of the equal-slopes gate and a transformed, filtered
/// plan (see tests/reference/README.md).
const STATSMODELS_CASES: [(&str, &str, &str, &str); 3] = [
    (
        "iris_petal",
        include_str!("../../tests/reference/plans/iris_petal.toml"),
        include_str!("../../tests/reference/data/iris.csv"),
        include_str!("../../tests/reference/expected/iris_petal.json"),
    ),
    (
        "penguins_mass",
        include_str!("../../tests/reference/plans/penguins_mass.toml"),
        include_str!("../../tests/reference/data/penguins.csv"),
        include_str!("../../tests/reference/expected/penguins_mass.json"),
    ),
    (
        "grunfeld_log",
        include_str!("../../tests/reference/plans/grunfeld_log.toml"),
        include_str!("../../tests/reference/data/grunfeld.csv"),
        include_str!("../../tests/reference/expected/grunfeld_log.json"),
    ),
];

/// LRE that Norris must reach on the closed-form path (lower difficulty; the
/// certified values have 15 digits). The project's reference tests use the same.
const NORRIS_MIN_LRE: f64 = 12.0;
/// LRE that Longley must reach on the QR path (higher difficulty; common practice
/// for Householder QR on Longley, no source).
const LONGLEY_MIN_LRE: f64 = 8.0;
/// Agreement with statsmodels: 1e-9 relative, as the reference tests ask.
const STATSMODELS_MIN_LRE: f64 = 9.0;

/// One value compared with its reference.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Check {
    /// The case: "norris", "longley", or a statsmodels reference name.
    pub case: String,
    /// Where the reference value comes from.
    pub source: String,
    /// The quantity, e.g. "b1" or "equal_slopes.f".
    pub quantity: String,
    /// What this installation computed.
    pub value: Value,
    /// The certified or reference value.
    pub certified: Value,
    /// Log relative error, for numbers.
    pub lre: Option<f64>,
    /// The LRE the check needs, for numbers.
    pub min_lre: Option<f64>,
    /// Whether the check passed.
    pub pass: bool,
}

impl Check {
    /// One line for a terminal or a record.
    pub fn line(&self) -> String {
        let verdict = if self.pass { "pass" } else { "FAIL" };
        let agreement = match (self.lre, self.min_lre) {
            (Some(l), Some(m)) => format!("LRE {l:.1}, needs {m:.0}"),
            _ if self.pass => "equal".to_string(),
            _ => "differs".to_string(),
        };
        format!(
            "{verdict}  {} {}: value {}, certified {} ({agreement})",
            self.case, self.quantity, self.value, self.certified
        )
    }
}

/// Every check, and the corruption asked for, if any.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Outcome {
    /// In case order, then quantity order.
    pub checks: Vec<Check>,
    /// The certified value altered on request (to show the test can fail).
    pub corrupted: Option<String>,
}

impl Outcome {
    /// True when every check passed.
    pub fn passed(&self) -> bool {
        self.checks.iter().all(|c| c.pass)
    }

    /// The checks that failed.
    pub fn failures(&self) -> impl Iterator<Item = &Check> {
        self.checks.iter().filter(|c| !c.pass)
    }

    /// A summary per case: (case, source, checks, failed, lowest LRE).
    pub fn cases(&self) -> Vec<(String, String, usize, usize, Option<f64>)> {
        let mut out: Vec<(String, String, usize, usize, Option<f64>)> = Vec::new();
        for c in &self.checks {
            if out.last().is_none_or(|l| l.0 != c.case) {
                out.push((c.case.clone(), c.source.clone(), 0, 0, None));
            }
            if let Some(last) = out.last_mut() {
                last.2 += 1;
                last.3 += usize::from(!c.pass);
                if let Some(l) = c.lre {
                    last.4 = Some(last.4.map_or(l, |m: f64| m.min(l)));
                }
            }
        }
        out
    }
}

/// The embedded reference data could not be read: a defect of this build.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum SelftestError {
    /// Embedded data that do not parse.
    #[error("the embedded reference data {0} cannot be read: {1}")]
    Embedded(&'static str, String),
    /// A corruption was asked for a value no check compares.
    #[error("no certified value is named `{0}`; name one as case.quantity, e.g. norris.b1")]
    UnknownCorruption(String),
}

/// Runs every case. `corrupt` names one certified value ("case.quantity") to alter
/// by one part in a million before comparing, which must make that check fail.
pub fn run(corrupt: Option<&str>) -> Result<Outcome, SelftestError> {
    let mut checks = Vec::new();
    norris(&mut checks)?;
    longley(&mut checks)?;
    for (name, plan_text, csv, expected) in STATSMODELS_CASES {
        statsmodels_case(name, plan_text, csv, expected, &mut checks)?;
    }
    if let Some(target) = corrupt {
        let check = checks
            .iter_mut()
            .find(|c| format!("{}.{}", c.case, c.quantity) == target && c.lre.is_some())
            .ok_or_else(|| SelftestError::UnknownCorruption(target.to_string()))?;
        let certified = check.certified.as_f64().unwrap_or(0.0);
        let altered = if certified == 0.0 {
            1e-6
        } else {
            certified * (1.0 + 1e-6)
        };
        let value = check.value.as_f64().unwrap_or(f64::NAN);
        *check = number_check(
            &check.case,
            &check.source,
            &check.quantity,
            value,
            altered,
            check.min_lre.unwrap_or(15.0),
        );
    }
    Ok(Outcome {
        checks,
        corrupted: corrupt.map(str::to_string),
    })
}

/// Log relative error of `value` against `reference`, capped at 15; against a zero
/// reference the absolute error is used.
pub fn lre(value: f64, reference: f64) -> f64 {
    let scale = if reference == 0.0 {
        1.0
    } else {
        reference.abs()
    };
    let rel = (value - reference).abs() / scale;
    if !rel.is_finite() {
        0.0
    } else if rel == 0.0 {
        15.0
    } else {
        (-rel.log10()).clamp(0.0, 15.0)
    }
}

fn number_check(
    case: &str,
    source: &str,
    quantity: &str,
    value: f64,
    certified: f64,
    min_lre: f64,
) -> Check {
    let l = lre(value, certified);
    Check {
        case: case.into(),
        source: source.into(),
        quantity: quantity.into(),
        value: json_number(value),
        certified: json_number(certified),
        lre: Some(l),
        min_lre: Some(min_lre),
        pass: value.is_finite() && l >= min_lre,
    }
}

fn json_number(x: f64) -> Value {
    serde_json::Number::from_f64(x).map_or(Value::Null, Value::Number)
}

fn certified() -> Result<toml::Table, SelftestError> {
    CERTIFIED
        .parse()
        .map_err(|e: toml::de::Error| SelftestError::Embedded("certified.toml", e.to_string()))
}

fn table<'a>(t: &'a toml::Table, key: &'static str) -> Result<&'a toml::Table, SelftestError> {
    t.get(key)
        .and_then(toml::Value::as_table)
        .ok_or_else(|| SelftestError::Embedded("certified.toml", format!("no [{key}] table")))
}

fn float(t: &toml::Table, key: &str) -> Result<f64, SelftestError> {
    t.get(key)
        .and_then(toml::Value::as_float)
        .ok_or_else(|| SelftestError::Embedded("certified.toml", format!("no number `{key}`")))
}

fn floats(t: &toml::Table, key: &str) -> Result<Vec<f64>, SelftestError> {
    t.get(key)
        .and_then(toml::Value::as_array)
        .and_then(|a| a.iter().map(toml::Value::as_float).collect())
        .ok_or_else(|| SelftestError::Embedded("certified.toml", format!("no list `{key}`")))
}

/// Columns of a small numeric CSV with a header row.
fn columns(name: &'static str, text: &str) -> Result<Vec<Vec<f64>>, SelftestError> {
    let mut lines = text.lines().filter(|l| !l.trim().is_empty());
    let width = lines.next().map_or(0, |h| h.split(',').count());
    let mut cols = vec![Vec::new(); width];
    for (i, line) in lines.enumerate() {
        let cells: Vec<&str> = line.split(',').collect();
        if cells.len() != width {
            return Err(SelftestError::Embedded(
                name,
                format!("row {} width", i + 1),
            ));
        }
        for (col, cell) in cols.iter_mut().zip(cells) {
            col.push(
                cell.trim().parse().map_err(|_| {
                    SelftestError::Embedded(name, format!("row {}: `{cell}`", i + 1))
                })?,
            );
        }
    }
    Ok(cols)
}

/// Norris: y on x, the closed-form line from one-pass moments.
fn norris(out: &mut Vec<Check>) -> Result<(), SelftestError> {
    let cert = certified()?;
    let cert = table(&cert, "norris")?;
    let cols = columns("norris.csv", NORRIS)?;
    let (x, y) = (&cols[0], &cols[1]);
    let mut m = Moments::default();
    for (a, b) in x.iter().zip(y) {
        m.push(*a, *b);
    }
    let line = GroupLine::fit(&m)
        .ok_or_else(|| SelftestError::Embedded("norris.csv", "no line fits".into()))?
        .with_points(x.iter().copied().zip(y.iter().copied()));
    let nan = f64::NAN;
    let values = [
        ("b0", line.intercept),
        ("b0_sd", line.intercept_se().unwrap_or(nan)),
        ("b1", line.slope),
        ("b1_sd", line.slope_se().unwrap_or(nan)),
        ("residual_sd", line.sigma2().map_or(nan, f64::sqrt)),
        ("r_squared", line.r_squared().unwrap_or(nan)),
        ("residual_ss", line.rss),
    ];
    for (key, value) in values {
        let source = format!("{NIST_SOURCE}; Norris, closed-form line");
        out.push(number_check(
            "norris",
            &source,
            key,
            value,
            float(cert, key)?,
            NORRIS_MIN_LRE,
        ));
    }
    Ok(())
}

/// Longley: TOTEMP on six predictors, Householder QR (the cross-check path).
fn longley(out: &mut Vec<Check>) -> Result<(), SelftestError> {
    let cert = certified()?;
    let cert = table(&cert, "longley")?;
    let cols = columns("longley.csv", LONGLEY)?;
    if cols.len() != 7 {
        return Err(SelftestError::Embedded(
            "longley.csv",
            "not 7 columns".into(),
        ));
    }
    let n = cols[0].len();
    let x = nalgebra::DMatrix::from_fn(n, 7, |i, j| if j == 0 { 1.0 } else { cols[j][i] });
    let fit = qr::lstsq(x, nalgebra::DVector::from_vec(cols[0].clone()));
    let (b, b_sd) = (floats(cert, "b")?, floats(cert, "b_sd")?);
    let source = format!("{NIST_SOURCE}; Longley, QR cross-check");
    for j in 0..7 {
        out.push(number_check(
            "longley",
            &source,
            &format!("b{j}"),
            fit.beta[j],
            b[j],
            LONGLEY_MIN_LRE,
        ));
        out.push(number_check(
            "longley",
            &source,
            &format!("b{j}_sd"),
            fit.se(j),
            b_sd[j],
            LONGLEY_MIN_LRE,
        ));
    }
    out.push(number_check(
        "longley",
        &source,
        "residual_sd",
        (fit.rss / fit.df).sqrt(),
        float(cert, "residual_sd")?,
        LONGLEY_MIN_LRE,
    ));
    Ok(())
}

/// A whole reference plan through plan, data and analysis; every number compared.
fn statsmodels_case(
    name: &'static str,
    plan_text: &str,
    csv: &str,
    expected: &str,
    out: &mut Vec<Check>,
) -> Result<(), SelftestError> {
    let fail = |e: String| SelftestError::Embedded(name, e);
    let plan = plan::load(name, plan_text).map_err(|e| fail(e.to_string()))?;
    let dataset = data::load(&plan, csv.as_bytes()).map_err(|e| fail(e.to_string()))?;
    let results =
        analysis::run(&plan, &dataset, Provenance::default()).map_err(|e| fail(e.to_string()))?;
    let got = serde_json::to_value(results).map_err(|e| fail(e.to_string()))?;
    let mut want: Value = serde_json::from_str(expected).map_err(|e| fail(e.to_string()))?;
    let source = want
        .as_object_mut()
        .and_then(|o| o.remove("source"))
        .and_then(|s| s.as_str().map(str::to_string))
        .unwrap_or_else(|| "statsmodels reference".into());
    let source = format!("{source} (tests/reference/expected/{name}.json)");
    compare(name, &source, &want, &got, "", out);
    Ok(())
}

/// Every leaf of `want` against the same path in `got`.
fn compare(case: &str, source: &str, want: &Value, got: &Value, path: &str, out: &mut Vec<Check>) {
    let join = |k: &str| {
        if path.is_empty() {
            k.to_string()
        } else {
            format!("{path}.{k}")
        }
    };
    match (want, got) {
        (Value::Object(w), _) => {
            for (k, wv) in w {
                compare(
                    case,
                    source,
                    wv,
                    got.get(k).unwrap_or(&Value::Null),
                    &join(k),
                    out,
                );
            }
        }
        (Value::Array(w), Value::Array(g)) if w.len() == g.len() => {
            for (i, (wv, gv)) in w.iter().zip(g).enumerate() {
                compare(case, source, wv, gv, &format!("{path}[{i}]"), out);
            }
        }
        (Value::Number(w), Value::Number(g)) => {
            let (w, g) = (
                w.as_f64().unwrap_or(f64::NAN),
                g.as_f64().unwrap_or(f64::NAN),
            );
            // Relative to the larger magnitude, as the reference tests compare.
            let scale = w.abs().max(g.abs());
            let l = if w == g {
                15.0
            } else {
                lre_scaled(g, w, scale)
            };
            let mut c = number_check(case, source, path, g, w, STATSMODELS_MIN_LRE);
            c.lre = Some(l);
            c.pass = l >= STATSMODELS_MIN_LRE;
            out.push(c);
        }
        (w, g) => out.push(Check {
            case: case.into(),
            source: source.into(),
            quantity: path.into(),
            value: g.clone(),
            certified: w.clone(),
            lre: None,
            min_lre: None,
            pass: w == g,
        }),
    }
}

fn lre_scaled(value: f64, reference: f64, scale: f64) -> f64 {
    let rel = (value - reference).abs() / scale;
    if rel.is_finite() && rel > 0.0 {
        (-rel.log10()).clamp(0.0, 15.0)
    } else {
        0.0
    }
}

/// What the dated record says about where it ran; read at the edge.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Setting {
    /// When, RFC 3339 UTC.
    pub when: String,
    /// Operating system and processor, e.g. "linux x86_64".
    pub platform: String,
    /// The host's name, when known.
    pub host: Option<String>,
}

/// The record an auditor files: JSON.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Record<'a> {
    /// Always "slopewise self-test record, version 1".
    pub record: &'static str,
    /// When and where.
    #[serde(flatten)]
    pub setting: &'a Setting,
    /// slopewise version.
    pub tool_version: &'static str,
    /// Commit it was built from.
    pub build_commit: &'static str,
    /// The compiler that built it.
    pub rustc_version: &'static str,
    /// True when every check passed.
    pub passed: bool,
    /// Number of checks.
    pub checks_run: usize,
    /// Number failed.
    pub checks_failed: usize,
    /// A certified value altered on request; such a record qualifies nothing.
    pub corrupted: Option<&'a str>,
    /// Every check.
    pub checks: &'a [Check],
}

/// The JSON record's bytes.
pub fn record_json(outcome: &Outcome, setting: &Setting) -> Vec<u8> {
    let record = Record {
        record: "slopewise self-test record, version 1",
        setting,
        tool_version: crate::TOOL_VERSION,
        build_commit: crate::BUILD_COMMIT,
        rustc_version: crate::RUSTC_VERSION,
        passed: outcome.passed(),
        checks_run: outcome.checks.len(),
        checks_failed: outcome.failures().count(),
        corrupted: outcome.corrupted.as_deref(),
        checks: &outcome.checks,
    };
    let mut s = serde_json::to_string_pretty(&record).unwrap_or_default();
    s.push('\n');
    s.into_bytes()
}

/// The terminal summary: one line per NIST check, one per statsmodels case, and
/// every failure.
pub fn summary(outcome: &Outcome) -> String {
    let mut s = String::new();
    let mut seen = std::collections::BTreeSet::new();
    for c in &outcome.checks {
        if c.case == "norris" || c.case == "longley" {
            if seen.insert(c.case.clone()) {
                s.push_str(&format!("{}: {}\n", c.case, c.source));
            }
            s.push_str(&format!("  {}\n", c.line()));
        }
    }
    for (case, source, n, failed, low) in outcome.cases() {
        if case == "norris" || case == "longley" {
            continue;
        }
        let verdict = if failed == 0 { "pass" } else { "FAIL" };
        let low = low.map_or(String::new(), |l| format!(", lowest LRE {l:.1}"));
        s.push_str(&format!("{case}: {source}\n  {verdict}  {n} values, {failed} failed{low} (needs {STATSMODELS_MIN_LRE:.0})\n"));
        for c in outcome.checks.iter().filter(|c| c.case == case && !c.pass) {
            s.push_str(&format!("  {}\n", c.line()));
        }
    }
    if let Some(name) = &outcome.corrupted {
        s.push_str(&format!(
            "note: the certified value {name} was altered on request; this run qualifies nothing\n"
        ));
    }
    let failed = outcome.failures().count();
    if failed == 0 {
        s.push_str(&format!(
            "self-test passed: {} checks\n",
            outcome.checks.len()
        ));
    } else {
        s.push_str(&format!(
            "self-test FAILED: {failed} of {} checks\n",
            outcome.checks.len()
        ));
    }
    s
}

/// The Markdown record: the summary, then every check in a table.
pub fn record_markdown(outcome: &Outcome, setting: &Setting) -> String {
    let verdict = if outcome.passed() { "passed" } else { "FAILED" };
    let mut s = format!(
        "# slopewise self-test record\n\n\
         | item | value |\n|:--|:--|\n\
         | result | {verdict} ({} checks, {} failed) |\n\
         | when | {} |\n| platform | {} |\n| host | {} |\n\
         | slopewise version | {} |\n| build commit | {} |\n| compiler | {} |\n",
        outcome.checks.len(),
        outcome.failures().count(),
        setting.when,
        setting.platform,
        setting.host.as_deref().unwrap_or("unknown"),
        crate::TOOL_VERSION,
        crate::BUILD_COMMIT,
        crate::RUSTC_VERSION,
    );
    if let Some(name) = &outcome.corrupted {
        s.push_str(&format!(
            "\n**The certified value {name} was altered on request; this record qualifies nothing.**\n"
        ));
    }
    s.push_str(
        "\n## Cases\n\n| case | source | checks | failed | lowest LRE |\n|:--|:--|--:|--:|--:|\n",
    );
    for (case, source, n, failed, low) in outcome.cases() {
        let low = low.map_or("–".to_string(), |l| format!("{l:.1}"));
        s.push_str(&format!(
            "| {case} | {} | {n} | {failed} | {low} |\n",
            cell(&source)
        ));
    }
    s.push_str("\n## Every check\n\n| result | case | quantity | value | certified | LRE | needs |\n|:--|:--|:--|--:|--:|--:|--:|\n");
    for c in &outcome.checks {
        s.push_str(&format!(
            "| {} | {} | {} | {} | {} | {} | {} |\n",
            if c.pass { "pass" } else { "FAIL" },
            c.case,
            cell(&c.quantity),
            cell(&c.value.to_string()),
            cell(&c.certified.to_string()),
            c.lre.map_or("–".into(), |l| format!("{l:.1}")),
            c.min_lre.map_or("–".into(), |l| format!("{l:.0}")),
        ));
    }
    s
}

fn cell(text: &str) -> String {
    text.replace('|', "\\|").replace('\n', " ")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_reference_case_passes() {
        let outcome = run(None).unwrap();
        let failed: Vec<String> = outcome.failures().map(Check::line).collect();
        assert!(failed.is_empty(), "{}", failed.join("\n"));
        // Norris 7 values, Longley 15, and every number of three statsmodels cases.
        let cases = outcome.cases();
        assert_eq!(cases.len(), 5);
        assert_eq!((cases[0].2, cases[1].2), (7, 15));
        assert!(cases[2..].iter().all(|c| c.2 > 50), "{cases:?}");
    }

    #[test]
    fn a_corrupted_certified_value_fails_with_a_clear_line() {
        let outcome = run(Some("norris.b1")).unwrap();
        assert!(!outcome.passed());
        let failed: Vec<&Check> = outcome.failures().collect();
        assert_eq!(failed.len(), 1);
        assert_eq!(failed[0].quantity, "b1");
        assert!(
            failed[0]
                .line()
                .starts_with("FAIL  norris b1: value 1.00211681802045")
        );
        assert!(summary(&outcome).contains("self-test FAILED: 1 of"));
        let outcome = run(Some("iris_petal.equal_slopes.f")).unwrap();
        assert_eq!(outcome.failures().count(), 1);
        assert!(matches!(
            run(Some("norris.nothing")),
            Err(SelftestError::UnknownCorruption(_))
        ));
    }

    #[test]
    fn lre_counts_agreeing_digits() {
        // LRE definition (McCullough 1998): 1e-6 relative error is 6 digits.
        assert!((lre(1.000001, 1.0) - 6.0).abs() < 1e-6);
        assert_eq!(lre(2.0, 2.0), 15.0);
        assert_eq!(lre(f64::NAN, 2.0), 0.0);
    }
}
