//! The plan stage's error: a message tied to a span of the plan text.

use std::ops::Range;

use crate::diagnostic::{Diagnostic, Snippet, did_you_mean, line_col};

/// Something wrong in the plan file, with the span it concerns.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("{file}:{line}:{column}: {message}")]
pub struct PlanError {
    /// Plan file name as shown to the user.
    pub file: String,
    /// What is wrong.
    pub message: String,
    /// How to fix it.
    pub help: Vec<String>,
    /// 1-based line of the span's start.
    pub line: usize,
    /// 1-based column (characters) of the span's start.
    pub column: usize,
    snippet: Snippet,
}

impl PlanError {
    /// An error at `span` of the plan `source`.
    pub fn new(file: &str, source: &str, span: Range<usize>, message: String, help: &str) -> Self {
        let help = if help.is_empty() {
            Vec::new()
        } else {
            vec![help.to_string()]
        };
        Self::with_help(file, source, span, message, help)
    }

    fn with_help(
        file: &str,
        source: &str,
        span: Range<usize>,
        message: String,
        help: Vec<String>,
    ) -> Self {
        let (line, column) = line_col(source, span.start);
        PlanError {
            file: file.to_string(),
            message,
            help,
            line,
            column,
            snippet: Snippet {
                file: file.to_string(),
                source: source.to_string(),
                span,
                label: "here".to_string(),
            },
        }
    }

    /// Translates a TOML syntax or type error, adding a "did you mean" hint for
    /// unknown keys and unknown values.
    pub fn from_toml(file: &str, source: &str, e: &toml::de::Error) -> Self {
        let raw = e.message().trim().to_string();
        let span = e.span().unwrap_or(0..0);
        let mut help = Vec::new();
        let message;
        if let Some((word, expected)) = unknown_name(&raw, "unknown field `") {
            message = format!("unknown key `{word}`");
            if let Some(s) = did_you_mean(&word, expected.iter().map(String::as_str)) {
                help.push(format!("did you mean `{s}`?"));
            }
            if !expected.is_empty() {
                help.push(format!("keys allowed here: {}", expected.join(", ")));
            }
        } else if let Some((word, expected)) = unknown_name(&raw, "unknown variant `") {
            message = format!("unknown value \"{word}\"");
            if let Some(s) = did_you_mean(&word, expected.iter().map(String::as_str)) {
                help.push(format!("did you mean \"{s}\"?"));
            }
            if !expected.is_empty() {
                let quoted: Vec<String> = expected.iter().map(|e| format!("\"{e}\"")).collect();
                help.push(format!("values allowed here: {}", quoted.join(", ")));
            }
        } else if let Some(rest) = raw.strip_prefix("missing field `") {
            let key = rest.split('`').next().unwrap_or_default();
            message = format!("required key `{key}` is missing");
            help.push(format!(
                "add `{key} = ...` to this table; see the README's plan tour for what it takes"
            ));
        } else if let Some(rest) = raw.strip_prefix("invalid type: ") {
            let (found, expected) = rest.split_once(", expected ").unwrap_or((rest, ""));
            let key = key_at(source, span.start);
            message = format!(
                "{} must be {}, found {}",
                key.as_deref().unwrap_or("this value"),
                plain_expected(expected),
                plain_found(found)
            );
            help.push("text goes in quotes (\"...\"), numbers without, lists in [ ]".into());
        } else {
            message = format!("the plan is not valid TOML: {raw}");
            help.push("check quotes, brackets and `=` signs on this line".into());
        }
        Self::with_help(file, source, span, message, help)
    }

    /// The error as a diagnostic with the plan line and a caret.
    pub fn diagnostic(&self) -> Diagnostic {
        let mut d = Diagnostic::new(self.message.clone()).at(self.snippet.clone());
        d.help = self.help.clone();
        d
    }
}

/// The dotted key whose value starts at `offset`: the key before `=` on that line,
/// under the nearest `[table]` header above it.
fn key_at(source: &str, offset: usize) -> Option<String> {
    let offset = offset.min(source.len());
    let line_start = source[..offset].rfind('\n').map_or(0, |i| i + 1);
    let line = source[line_start..].lines().next().unwrap_or_default();
    let key = line.split_once('=')?.0.trim().trim_matches('"');
    if key.is_empty() || key.starts_with('[') {
        return None;
    }
    let table = source[..line_start]
        .lines()
        .rev()
        .map(str::trim)
        .find(|l| l.starts_with('['))
        .map(|l| l.trim_matches(|c| c == '[' || c == ']').trim().to_string());
    Some(match table {
        Some(t) if !t.is_empty() => format!("{t}.{key}"),
        _ => key.to_string(),
    })
}

/// serde's name of an expected type, in a plan author's words.
fn plain_expected(expected: &str) -> String {
    let e = expected.trim();
    if e.is_empty() {
        "another type of value".into()
    } else if e == "f64" || e == "f32" {
        "a number".into()
    } else if ["i64", "u64", "i32", "u32", "usize", "isize"].contains(&e) {
        "a whole number".into()
    } else if e.contains("string") || e.contains("str") {
        "text in quotes".into()
    } else if e.contains("sequence") {
        "a list in [ ]".into()
    } else if e.contains("bool") {
        "true or false".into()
    } else if e.contains("struct") || e.contains("map") {
        "a table".into()
    } else {
        e.to_string()
    }
}

/// serde's description of the value found, in a plan author's words.
fn plain_found(found: &str) -> String {
    let f = found.trim();
    for (prefix, words) in [
        ("string ", "the text "),
        ("integer ", "the number "),
        ("floating point ", "the number "),
        ("boolean ", ""),
    ] {
        if let Some(rest) = f.strip_prefix(prefix) {
            // serde writes very large integers as "`N` as i128"; the width is its own.
            let rest = rest.split(" as ").next().unwrap_or(rest);
            return format!("{words}{}", rest.trim_matches('`'));
        }
    }
    match f {
        "sequence" => "a list".into(),
        "map" => "a table".into(),
        other => other.to_string(),
    }
}

/// Picks `word` and the expected names out of serde's "unknown field `x`, expected
/// one of `a`, `b`" (or "expected `a`") message.
fn unknown_name(raw: &str, prefix: &str) -> Option<(String, Vec<String>)> {
    let rest = raw.strip_prefix(prefix)?;
    let (word, tail) = rest.split_once('`')?;
    let expected = tail
        .split('`')
        .skip(1)
        .step_by(2)
        .map(str::to_string)
        .collect();
    Some((word.to_string(), expected))
}
