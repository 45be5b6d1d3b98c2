//! The Markdown report.
//!
//! Every value a template prints goes through one formatter: text is escaped so a
//! group label or column name shows literally (a label like `*a*|<b>` can neither
//! format text nor break a table), and numbers are written by the rules of
//! [`crate::number`]. Filters `num`, `p`, `ci` and `int` mark their output as safe.

use minijinja::value::{Serde, Value, ValueKind};
use minijinja::{Environment, Error, ErrorKind, UndefinedBehavior, context};

use super::ReportError;
use crate::number::{p_equation, p_value, sig, trimmed};
use crate::results::{MeanPair, Results};

const REPORT: &str = include_str!("../../templates/report.md.j2");
const METHODS: &str = include_str!("../../templates/methods.md.j2");
const GATE: &str = include_str!("../../templates/gate.md.j2");
const SLOPE_PAIRS: &str = include_str!("../../templates/slope-pairs.md.j2");
const COMMON_SLOPE: &str = include_str!("../../templates/common-slope.md.j2");
const REGIONS: &str = include_str!("../../templates/regions.md.j2");
const CHECKS: &str = include_str!("../../templates/checks.md.j2");
const LIMITS: &str = include_str!("../../templates/limits.md.j2");
const SUMMARY: &str = include_str!("../../templates/summary.j2");
const CAUTIONS: &str = include_str!("../../templates/cautions.j2");

/// Escapes text for Markdown: backslash before every character that could start
/// emphasis, code, a link, HTML, an entity, math or a table cell; line breaks become
/// spaces so a value never ends a table row.
pub fn escape_markdown(s: &str) -> String {
    let mut out = String::with_capacity(s.len() + 8);
    for c in s.chars() {
        match c {
            '\\' | '`' | '*' | '_' | '{' | '}' | '[' | ']' | '<' | '>' | '#' | '|' | '$' | '&'
            | '~' | '!' | '^' => {
                out.push('\\');
                out.push(c);
            }
            '\n' | '\r' => out.push(' '),
            c => out.push(c),
        }
    }
    out
}

fn number(v: &Value) -> Option<f64> {
    match v.kind() {
        ValueKind::Number => f64::try_from(v.clone()).ok(),
        _ => None,
    }
}

fn safe(s: String) -> Value {
    Value::from_safe_string(s)
}

/// The template environment. With `markdown`, text values are escaped for
/// Markdown; without, they are written as they are (for the PDF's data file, where
/// Typst shows strings literally).
fn environment(markdown: bool) -> Result<Environment<'static>, Error> {
    let mut env = Environment::new();
    env.set_undefined_behavior(UndefinedBehavior::Strict);
    env.set_formatter(move |out, _state, value| {
        let text = if value.is_safe() {
            value.as_str().unwrap_or_default().to_string()
        } else if value.is_none() || value.is_undefined() {
            "n/a".to_string()
        } else if value.is_integer() {
            value.to_string()
        } else if let Some(x) = number(value) {
            sig(x, 4)
        } else if markdown {
            escape_markdown(&value.to_string())
        } else {
            value.to_string()
        };
        out.write_str(&text)
            .map_err(|_| Error::new(ErrorKind::WriteFailure, "write failed"))
    });
    env.add_filter("num", |v: Value, digits: Option<usize>| {
        safe(number(&v).map_or("n/a".into(), |x| sig(x, digits.unwrap_or(4))))
    });
    env.add_filter("p", |v: Value| {
        safe(number(&v).map_or("n/a".into(), p_value))
    });
    env.add_filter("peq", |v: Value| {
        safe(number(&v).map_or("p not computable".into(), p_equation))
    });
    env.add_filter("level", |v: Value| {
        safe(number(&v).map_or("n/a".into(), |x| trimmed(x, 4)))
    });
    env.add_filter("int", |v: Value| {
        safe(number(&v).map_or("n/a".into(), |x| format!("{}", x.round() as i64)))
    });
    env.add_filter("ci", |v: Value| {
        let pair = (v.get_item_by_index(0).ok(), v.get_item_by_index(1).ok());
        safe(match pair {
            (Some(a), Some(b)) => match (number(&a), number(&b)) {
                (Some(a), Some(b)) => format!("{} to {}", sig(a, 4), sig(b, 4)),
                _ => "n/a".into(),
            },
            _ => "n/a".into(),
        })
    });
    env.add_template("report.md.j2", REPORT)?;
    env.add_template("methods.md.j2", METHODS)?;
    env.add_template("gate.md.j2", GATE)?;
    env.add_template("slope-pairs.md.j2", SLOPE_PAIRS)?;
    env.add_template("common-slope.md.j2", COMMON_SLOPE)?;
    env.add_template("regions.md.j2", REGIONS)?;
    env.add_template("checks.md.j2", CHECKS)?;
    env.add_template("limits.md.j2", LIMITS)?;
    env.add_template("summary.j2", SUMMARY)?;
    env.add_template("cautions.j2", CAUTIONS)?;
    Ok(env)
}

/// Rows a pairwise table shows at most; results.json always holds every pair.
pub const MAX_TABLE_ROWS: usize = 200;

/// A figure as the reports list it.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct FigureRef {
    /// Path inside the run folder, e.g. `figures/lines.svg`.
    pub file: String,
    /// Short title.
    pub title: String,
    /// Caption, including how many points are drawn.
    pub caption: String,
    /// Width in pixels, so the PDF prints every figure's text at one size.
    pub width: u32,
}

/// Renders `report.md`.
pub fn markdown(r: &Results, figures: &[FigureRef]) -> Result<String, ReportError> {
    let mut text = render(r, figures, "report.md.j2", true)?;
    tidy(&mut text);
    Ok(text)
}

/// Renders one of the shared prose templates (`summary.j2`, `cautions.j2`,
/// `methods.md.j2`) as plain text: values unescaped, lines joined into paragraphs.
pub fn plain(r: &Results, template: &str) -> Result<Vec<String>, ReportError> {
    let text = render(r, &[], template, false)?;
    let paragraphs = text
        .split("\n\n")
        .map(|p| p.split_whitespace().collect::<Vec<_>>().join(" "))
        .filter(|p| !p.is_empty())
        .collect();
    Ok(paragraphs)
}

fn render(
    r: &Results,
    figures: &[FigureRef],
    name: &str,
    markdown: bool,
) -> Result<String, ReportError> {
    let fail = |e: Error| ReportError::Template(format!("{e:#}"));
    let env = environment(markdown).map_err(fail)?;
    let template = env.get_template(name).map_err(fail)?;
    let y = label(&r.model.response, &r.model.response_transform);
    let x = label(&r.model.covariate, &r.model.covariate_transform);
    let drops: Vec<Value> = r
        .data
        .rows_dropped
        .iter()
        .map(|(key, count)| context! { text => drop_text(key), count => *count })
        .collect();
    let low = r.groups.iter().min_by(|a, b| a.slope.total_cmp(&b.slope));
    let high = r.groups.iter().max_by(|a, b| a.slope.total_cmp(&b.slope));
    let largest: Option<&MeanPair> = r
        .pairwise_adjusted
        .iter()
        .max_by(|a, b| a.difference.abs().total_cmp(&b.difference.abs()));
    template
        .render(context! {
            r => Value::from(Serde(r)),
            c => Value::from(Serde(&r.checks)),
            alpha_text => format!("level {}", trimmed(r.model.alpha, 4)),
            y => y,
            x => x,
            g => r.model.group.clone(),
            k => r.groups.len(),
            drops => drops,
            steepest_low => Value::from(Serde(low)),
            steepest_high => Value::from(Serde(high)),
            largest => Value::from(Serde(largest)),
            conf => confidence(r),
            adjust_name => adjustment_name(&r.model.comparisons),
            figures => Value::from(Serde(figures)),
            max_rows => MAX_TABLE_ROWS,
            limit_model => r.limits.first().map(|c| c.model.clone()).unwrap_or_default(),
            limit_conf => r.limits.first().map(|c| format!("{}%", trimmed(100.0 * c.confidence, 4))).unwrap_or_default(),
        })
        .map_err(fail)
}

/// "95%" for alpha = 0.05.
pub fn confidence(r: &Results) -> String {
    format!("{}%", trimmed(100.0 * (1.0 - r.model.alpha), 4))
}

/// The adjustment's name as the report writes it.
pub fn adjustment_name(method: &str) -> &'static str {
    match method {
        "holm" => "Holm",
        "bonferroni" => "Bonferroni",
        "tukey-kramer" => "Tukey–Kramer",
        _ => "none",
    }
}

/// The axis and table label of a column: `log(height_cm)` for a transformed one.
pub fn label(column: &str, transform: &str) -> String {
    if transform == "none" {
        column.to_string()
    } else {
        format!("{transform}({column})")
    }
}

/// The plain words for a drop reason key.
pub fn drop_text(key: &str) -> String {
    match key {
        "filtered_out" => "did not pass the data.keep filters".into(),
        "missing_response" => "response missing".into(),
        "missing_covariate" => "covariate missing".into(),
        "missing_group" => "group missing".into(),
        "group_too_small" => "in a group with fewer than 3 usable rows".into(),
        "no_covariate_spread" => "in a group whose covariate does not vary".into(),
        other => other.replace('_', " "),
    }
}

/// Collapses runs of blank lines the template's conditionals leave behind and ends
/// the file with exactly one newline.
fn tidy(text: &mut String) {
    let mut out = String::with_capacity(text.len());
    let mut blank = 0;
    for line in text.lines() {
        let line = line.trim_end();
        if line.is_empty() {
            blank += 1;
            if blank > 1 {
                continue;
            }
        } else {
            blank = 0;
        }
        out.push_str(line);
        out.push('\n');
    }
    while out.ends_with("\n\n") {
        out.pop();
    }
    *text = out;
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn escaping_neutralises_markup() {
        assert_eq!(escape_markdown("a*b_c|d"), "a\\*b\\_c\\|d");
        assert_eq!(escape_markdown("<b>x</b>"), "\\<b\\>x\\</b\\>");
        assert_eq!(
            escape_markdown("#read(\"/etc/passwd\")"),
            "\\#read(\"/etc/passwd\")"
        );
        assert_eq!(escape_markdown("plain north-1"), "plain north-1");
        assert_eq!(escape_markdown("two\nlines"), "two lines");
    }
}
