//! One way to show an error to a person: what is wrong, where, and how to fix it.
//!
//! Every stage has its own error type; each converts to a [`Diagnostic`], and the
//! command layer renders it once, on stderr. A diagnostic that concerns the plan
//! carries a [`Snippet`] so the message shows the TOML line with a caret under the
//! offending span, the way compilers do.

use std::fmt::Write as _;
use std::ops::Range;

/// An error ready to be shown.
#[derive(Debug, Clone, PartialEq)]
pub struct Diagnostic {
    /// What is wrong, in one sentence.
    pub message: String,
    /// Where, when the error is tied to a span of a text file (the plan).
    pub snippet: Option<Snippet>,
    /// Where, when the error is tied to a file but no span (a data file, say).
    pub file: Option<String>,
    /// How to fix it; one line each.
    pub help: Vec<String>,
}

/// A span of a named source text.
#[derive(Debug, Clone, PartialEq)]
pub struct Snippet {
    /// The file name as the user gave it.
    pub file: String,
    /// The whole source text.
    pub source: String,
    /// Byte range of the offending part.
    pub span: Range<usize>,
    /// A short label printed after the caret.
    pub label: String,
}

impl Diagnostic {
    /// A diagnostic with a message only.
    pub fn new(message: impl Into<String>) -> Self {
        Diagnostic {
            message: message.into(),
            snippet: None,
            file: None,
            help: Vec::new(),
        }
    }

    /// Adds a line of advice.
    pub fn help(mut self, help: impl Into<String>) -> Self {
        self.help.push(help.into());
        self
    }

    /// Ties the diagnostic to a file without a span.
    pub fn in_file(mut self, file: impl Into<String>) -> Self {
        self.file = Some(file.into());
        self
    }

    /// Ties the diagnostic to a span of a source text.
    pub fn at(mut self, snippet: Snippet) -> Self {
        self.snippet = Some(snippet);
        self
    }

    /// Renders the diagnostic as plain text (no colour, so logs and tests read it).
    pub fn render(&self) -> String {
        let mut out = String::new();
        let _ = writeln!(out, "error: {}", self.message);
        if let Some(file) = &self.file {
            let _ = writeln!(out, "  --> {file}");
        }
        if let Some(snippet) = &self.snippet {
            render_snippet(&mut out, snippet);
        }
        for help in &self.help {
            let _ = writeln!(out, "  = help: {help}");
        }
        out
    }
}

/// Line and column (both 1-based, column counted in characters) of a byte offset.
pub fn line_col(source: &str, offset: usize) -> (usize, usize) {
    let offset = offset.min(source.len());
    let before = &source[..floor_char_boundary(source, offset)];
    let line = before.matches('\n').count() + 1;
    let line_start = before.rfind('\n').map_or(0, |i| i + 1);
    let col = before[line_start..].chars().count() + 1;
    (line, col)
}

fn floor_char_boundary(s: &str, mut i: usize) -> usize {
    while i > 0 && !s.is_char_boundary(i) {
        i -= 1;
    }
    i
}

fn render_snippet(out: &mut String, snippet: &Snippet) {
    let source = snippet.source.as_str();
    let start = floor_char_boundary(source, snippet.span.start.min(source.len()));
    let end = floor_char_boundary(source, snippet.span.end.min(source.len())).max(start);
    let (line, col) = line_col(source, start);
    let _ = writeln!(out, "  --> {}:{line}:{col}", snippet.file);
    let line_start = source[..start].rfind('\n').map_or(0, |i| i + 1);
    let line_end = source[start..]
        .find('\n')
        .map_or(source.len(), |i| start + i);
    let text = source[line_start..line_end].trim_end_matches('\r');
    let number = line.to_string();
    let pad = " ".repeat(number.len());
    let _ = writeln!(out, " {pad} |");
    // The line is shown with its tabs expanded, so the caret's place is known
    // whatever the terminal does with a tab; wide (CJK) and combining characters
    // are measured by their display width (unicode-width).
    let _ = writeln!(out, " {number} | {}", text.replace('\t', TAB));
    let caret_end = end.min(line_end).max(start);
    let before = display_width(&source[line_start..start]);
    let width = display_width(&source[start..caret_end]).max(1);
    let _ = writeln!(
        out,
        " {pad} | {}{} {}",
        " ".repeat(before),
        "^".repeat(width),
        snippet.label
    );
}

/// A tab in a shown source line.
const TAB: &str = "    ";

/// Columns a text takes on a terminal: tabs as [`TAB`], wide characters two,
/// combining and zero-width characters none.
fn display_width(s: &str) -> usize {
    s.chars()
        .map(|c| match c {
            '\t' => TAB.len(),
            c => unicode_width::UnicodeWidthChar::width(c).unwrap_or(0),
        })
        .sum()
}

/// The closest of `candidates` to `word`, when one is close enough to be a likely typo.
pub fn did_you_mean<'a>(
    word: &str,
    candidates: impl IntoIterator<Item = &'a str>,
) -> Option<&'a str> {
    let lower = word.to_lowercase();
    candidates
        .into_iter()
        .map(|c| (strsim::jaro_winkler(&lower, &c.to_lowercase()), c))
        .filter(|(score, _)| *score >= 0.8)
        .max_by(|a, b| a.0.total_cmp(&b.0))
        .map(|(_, c)| c)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn line_and_column_count_characters() {
        let src = "a = 1\nbé = 2\n";
        assert_eq!(line_col(src, 0), (1, 1));
        assert_eq!(line_col(src, 6), (2, 1));
        // "bé " is 4 bytes but 3 characters, so '=' (byte 10) is column 4.
        assert_eq!(line_col(src, 10), (2, 4));
    }

    #[test]
    fn snippet_puts_caret_under_span() {
        let d = Diagnostic::new("alpha must lie strictly between 0 and 1")
            .at(Snippet {
                file: "p.toml".into(),
                source: "[tests]\nalpha = 1.5\n".into(),
                span: 16..19,
                label: "here".into(),
            })
            .help("use a level such as 0.05");
        let text = d.render();
        assert!(text.contains("--> p.toml:2:9"), "{text}");
        assert!(text.contains(" 2 | alpha = 1.5"), "{text}");
        assert!(text.contains("   |         ^^^ here"), "{text}");
        assert!(text.contains("= help: use a level such as 0.05"), "{text}");
    }

    #[test]
    fn suggestions_only_for_near_misses() {
        let keys = ["alpha", "slopes_alpha", "comparisons"];
        assert_eq!(did_you_mean("alpah", keys), Some("alpha"));
        assert_eq!(did_you_mean("comparison", keys), Some("comparisons"));
        assert_eq!(did_you_mean("zzz", keys), None);
    }
}
