//! The document as GitHub-flavoured Markdown.
//!
//! All escaping happens in [`escape`] (text) and [`code`] (literals): a label like
//! `*a*|<b>` can neither format text nor break a table row, and line breaks inside a
//! value are shown as `\n` instead of ending the row.

use crate::report::doc::{Align, Block, Document, Inline, Runs, visible};

/// Escapes text for Markdown: a backslash before every character that could start
/// emphasis, code, a link, HTML, an entity, math or a table cell; line breaks become
/// spaces (values arrive with theirs already made visible).
pub fn escape(s: &str) -> String {
    let mut out = String::with_capacity(s.len() + 8);
    let mut chars = s.chars().peekable();
    while let Some(c) = chars.next() {
        // `<` opens HTML and `&` an entity only before a letter, `/`, `!`, `?`
        // or `#`; before a space or a digit (`p < 0.05`, `Brown & Forsythe`)
        // they are plain and stay unescaped.
        let next_plain = chars
            .peek()
            .is_none_or(|n| n.is_whitespace() || n.is_ascii_digit());
        match c {
            '<' | '&' if next_plain => out.push(c),
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

/// A code span around `s`: a fence one backtick longer than any run inside, padded
/// when the content touches a backtick. In a table a `|` is escaped, which GFM
/// requires even inside code.
fn code(s: &str, in_table: bool) -> String {
    let s = visible(s);
    let longest = s.split(|c| c != '`').map(str::len).max().unwrap_or(0);
    let fence = "`".repeat(longest + 1);
    let pad = if s.starts_with('`') || s.ends_with('`') || s.is_empty() {
        " "
    } else {
        ""
    };
    let body = if in_table { s.replace('|', "\\|") } else { s };
    format!("{fence}{pad}{body}{pad}{fence}")
}

fn runs(rs: &Runs, in_table: bool) -> String {
    let mut out = String::new();
    for r in rs {
        match r {
            Inline::Text(s) => out.push_str(&escape(s)),
            Inline::Value(s) => out.push_str(&escape(&visible(s))),
            Inline::Strong(s) => {
                out.push_str("**");
                out.push_str(&escape(s));
                out.push_str("**");
            }
            Inline::Emph(s) => {
                out.push('*');
                out.push_str(&escape(s));
                out.push('*');
            }
            Inline::Code(s) => out.push_str(&code(s, in_table)),
            Inline::Cite(w) => out.push_str(&escape(w.short())),
        }
    }
    out
}

/// A paragraph's first characters must not open a list or a heading.
fn block_text(rs: &Runs) -> String {
    let s = runs(rs, false);
    let digits = s.chars().take_while(char::is_ascii_digit).count();
    let rest = &s[digits..];
    if digits > 0 && (rest.starts_with(". ") || rest.starts_with(") ")) {
        return format!("{}\\{}", &s[..digits], rest);
    }
    if s.starts_with("- ") || s.starts_with("+ ") || s.starts_with("= ") {
        return format!("\\{s}");
    }
    s
}

fn row(cells: &[Runs]) -> String {
    let cells: Vec<String> = cells.iter().map(|c| runs(c, true)).collect();
    format!("| {} |\n", cells.join(" | "))
}

/// Renders the document as `report.md`.
pub fn write(doc: &Document) -> String {
    let mut out = String::new();
    out.push_str("# ");
    out.push_str(&escape(&visible(&doc.title)));
    out.push_str("\n\n");
    if !doc.subtitle.is_empty() {
        out.push_str(&block_text(&doc.subtitle));
        out.push_str("\n\n");
    }
    for b in &doc.blocks {
        match b {
            Block::Heading { level, text } => {
                out.push_str(&"#".repeat(usize::from(*level) + 1));
                out.push(' ');
                out.push_str(&runs(text, false));
            }
            Block::Paragraph(rs) => out.push_str(&block_text(rs)),
            Block::List(items) => {
                let lines: Vec<String> = items
                    .iter()
                    .map(|i| format!("- {}", runs(i, false)))
                    .collect();
                out.push_str(&lines.join("\n"));
            }
            Block::Table(t) => {
                out.push_str(&row(&t.header));
                out.push('|');
                for a in &t.align {
                    out.push_str(match a {
                        Align::Left => ":--|",
                        Align::Right => "--:|",
                    });
                }
                out.push('\n');
                for r in &t.rows {
                    out.push_str(&row(r));
                }
                for note in &t.notes {
                    out.push('\n');
                    out.push_str(&block_text(note));
                    out.push('\n');
                }
                // The table's own last newline is the block's.
                out.pop();
            }
            Block::Figure(f) => {
                out.push_str(&format!(
                    "![{}]({})\n\n{}",
                    escape(&f.title),
                    f.file,
                    escape(&f.caption)
                ));
            }
            Block::Caution(rs) => {
                out.push_str("> ");
                out.push_str(&runs(rs, false));
            }
            Block::References(works) => {
                let lines: Vec<String> = works
                    .iter()
                    .map(|w| format!("- {}", escape(w.entry())))
                    .collect();
                out.push_str(&lines.join("\n"));
            }
        }
        out.push_str("\n\n");
    }
    while out.ends_with("\n\n") {
        out.pop();
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::doc::{Builder, t, v};

    #[test]
    fn escaping_neutralises_markup() {
        assert_eq!(escape("a*b_c|d"), "a\\*b\\_c\\|d");
        assert_eq!(escape("<b>x</b>"), "\\<b\\>x\\</b\\>");
        assert_eq!(escape("#read(\"/etc/passwd\")"), "\\#read(\"/etc/passwd\")");
        assert_eq!(escape("plain north-1"), "plain north-1");
    }

    #[test]
    fn code_spans_survive_backticks_and_pipes() {
        assert_eq!(code("a`b", false), "``a`b``");
        assert_eq!(code("`x", false), "`` `x ``");
        assert_eq!(code("a|b", true), "`a\\|b`");
        assert_eq!(code("a|b", false), "`a|b`");
    }

    #[test]
    fn a_value_with_a_line_break_stays_in_its_row() {
        let mut b = Builder::default();
        b.table(
            vec![vec![t("group")], vec![t("n")]],
            1,
            vec![vec![vec![v("new\nline")], vec![t("3")]]],
        );
        let doc = Document {
            title: "x".into(),
            subtitle: vec![],
            footer: String::new(),
            blocks: b.blocks,
        };
        let md = write(&doc);
        assert!(md.contains("| new\\\\nline | 3 |"), "{md}");
    }
}
