//! The document as the PDF's data file, `report-data.json`.
//!
//! No value is ever written into Typst markup: the fixed template
//! (`templates/report.typ`) reads this file with Typst's own `json()` and shows every
//! string as text, so a label such as `#read("/etc/passwd")` prints as those
//! characters and cannot run. Inline runs arrive as tagged strings (`t` text, `b`
//! strong, `i` emphasis, `c` code), so headings and lead-ins are bold in the PDF
//! without any string ever being parsed as markup. [`shown`] is the one place that
//! prepares text for the page: values made visible, a true minus sign in numbers.

use serde::Serialize;

use crate::report::ReportError;
use crate::report::doc::{Align, Block, Document, Inline, Runs, visible};

/// The Typst template, compiled into the binary.
pub const TEMPLATE: &str = include_str!("../../../templates/report.typ");

/// Rows a table may have and still be kept on one page (not split across pages).
const UNBREAKABLE_ROWS: usize = 30;

#[derive(Serialize)]
struct Data<'a> {
    title: String,
    subtitle: Vec<Run>,
    footer: &'a str,
    blocks: Vec<B>,
}

/// One inline run: exactly one key, naming how it is shown.
#[derive(Serialize)]
enum Run {
    #[serde(rename = "t")]
    Text(String),
    #[serde(rename = "b")]
    Strong(String),
    #[serde(rename = "i")]
    Emph(String),
    #[serde(rename = "c")]
    Code(String),
}

#[derive(Serialize)]
#[serde(tag = "kind", rename_all = "lowercase")]
enum B {
    Heading {
        level: u8,
        text: Vec<Run>,
    },
    Para {
        text: Vec<Run>,
    },
    Bullets {
        items: Vec<Vec<Run>>,
    },
    Table {
        columns: Vec<Vec<Run>>,
        align: Vec<&'static str>,
        rows: Vec<Vec<Vec<Run>>>,
        notes: Vec<Vec<Run>>,
        breakable: bool,
    },
    Figure {
        file: String,
        title: String,
        caption: String,
        width: u32,
    },
    Caution {
        text: Vec<Run>,
    },
    References {
        items: Vec<String>,
    },
}

/// Text as the page shows it: a hyphen that stands for minus before a number
/// (`-0.15`, `1.2e-5`) becomes the true minus sign U+2212.
fn shown(s: &str) -> String {
    let chars: Vec<char> = s.chars().collect();
    let mut out = String::with_capacity(s.len());
    for (i, &c) in chars.iter().enumerate() {
        let next_digit = chars.get(i + 1).is_some_and(|n| {
            n.is_ascii_digit() || (*n == '.' && chars.get(i + 2).is_some_and(char::is_ascii_digit))
        });
        let prev = if i == 0 { None } else { Some(chars[i - 1]) };
        let starts_number = match prev {
            None => true,
            Some(p) if p.is_whitespace() || "([=/;:,".contains(p) => true,
            // An exponent: a digit, then e.
            Some('e') | Some('E') => i >= 2 && chars[i - 2].is_ascii_digit(),
            _ => false,
        };
        if c == '-' && next_digit && starts_number {
            out.push('\u{2212}');
        } else {
            out.push(c);
        }
    }
    out
}

fn runs(rs: &Runs) -> Vec<Run> {
    rs.iter()
        .map(|r| match r {
            Inline::Text(s) => Run::Text(shown(s)),
            Inline::Value(s) => Run::Text(visible(s)),
            Inline::Strong(s) => Run::Strong(shown(s)),
            Inline::Emph(s) => Run::Emph(shown(s)),
            Inline::Code(s) => Run::Code(visible(s)),
            Inline::Cite(w) => Run::Text(w.short().to_string()),
        })
        .collect()
}

/// `report-data.json` for the Typst template.
pub fn write(doc: &Document) -> Result<String, ReportError> {
    let blocks = doc
        .blocks
        .iter()
        .map(|b| match b {
            Block::Heading { level, text } => B::Heading {
                level: *level,
                text: runs(text),
            },
            Block::Paragraph(rs) => B::Para { text: runs(rs) },
            Block::List(items) => B::Bullets {
                items: items.iter().map(runs).collect(),
            },
            Block::Table(t) => B::Table {
                columns: t.header.iter().map(runs).collect(),
                align: t
                    .align
                    .iter()
                    .map(|a| match a {
                        Align::Left => "left",
                        Align::Right => "right",
                    })
                    .collect(),
                rows: t
                    .rows
                    .iter()
                    .map(|r| r.iter().map(runs).collect())
                    .collect(),
                notes: t.notes.iter().map(runs).collect(),
                breakable: t.rows.len() > UNBREAKABLE_ROWS,
            },
            Block::Figure(f) => B::Figure {
                file: f.file.clone(),
                title: shown(&f.title),
                caption: shown(&f.caption),
                width: f.width,
            },
            Block::Caution(rs) => B::Caution { text: runs(rs) },
            Block::References(works) => B::References {
                items: works.iter().map(|w| w.entry().to_string()).collect(),
            },
        })
        .collect();
    let data = Data {
        title: visible(&doc.title),
        subtitle: runs(&doc.subtitle),
        footer: &doc.footer,
        blocks,
    };
    let mut s =
        serde_json::to_string_pretty(&data).map_err(|e| ReportError::Json(e.to_string()))?;
    s.push('\n');
    Ok(s)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_get_a_true_minus_and_words_keep_their_hyphens() {
        assert_eq!(
            shown("slope -0.1557 (-1.2 to -0.5)"),
            "slope −0.1557 (−1.2 to −0.5)"
        );
        assert_eq!(shown("p = 1.2e-5"), "p = 1.2e−5");
        assert_eq!(
            shown("equal-slopes F; SHA-256; TB-2601; one-sided"),
            "equal-slopes F; SHA-256; TB-2601; one-sided"
        );
        assert_eq!(shown("-.5"), "−.5");
    }
}
