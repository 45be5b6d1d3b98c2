//! The document as plain text for a terminal: underlined headings, tables padded to
//! their widest cell. [`visible`] is the one escape: a value's control characters
//! are written out, so a hostile label can neither steer a terminal nor hide.

use crate::report::doc::{Align, Block, Document, Inline, Runs, visible};

fn runs(rs: &Runs) -> String {
    let mut out = String::new();
    for r in rs {
        match r {
            Inline::Text(s) | Inline::Emph(s) => out.push_str(&flat(s)),
            Inline::Value(s) | Inline::Code(s) => out.push_str(&visible(s)),
            Inline::Strong(s) => out.push_str(&flat(s).to_uppercase()),
            Inline::Cite(w) => out.push_str(w.short()),
        }
    }
    out
}

/// Our own text, with any control character written out all the same.
fn flat(s: &str) -> String {
    if s.chars().any(char::is_control) {
        visible(s)
    } else {
        s.to_string()
    }
}

fn heading(out: &mut String, title: &str, rule: char) {
    out.push_str(title);
    out.push('\n');
    out.push_str(&rule.to_string().repeat(title.chars().count()));
    out.push('\n');
}

fn table(out: &mut String, header: &[String], align: &[Align], rows: &[Vec<String>]) {
    let width = |s: &str| s.chars().count();
    let mut widths: Vec<usize> = header.iter().map(|h| width(h)).collect();
    for row in rows {
        for (w, cell) in widths.iter_mut().zip(row) {
            *w = (*w).max(width(cell));
        }
    }
    let line = |out: &mut String, cells: &[String]| {
        let mut s = String::new();
        for (i, cell) in cells.iter().enumerate() {
            if i > 0 {
                s.push_str("  ");
            }
            let pad = " ".repeat(widths[i] - width(cell));
            if align[i] == Align::Right {
                s.push_str(&pad);
                s.push_str(cell);
            } else {
                s.push_str(cell);
                s.push_str(&pad);
            }
        }
        out.push_str(s.trim_end());
        out.push('\n');
    };
    line(out, header);
    let rules: Vec<String> = widths.iter().map(|w| "-".repeat(*w)).collect();
    line(out, &rules);
    for row in rows {
        line(out, row);
    }
}

/// Renders the document as plain text.
pub fn write(doc: &Document) -> String {
    let mut out = String::new();
    heading(&mut out, &visible(&doc.title), '=');
    out.push('\n');
    if !doc.subtitle.is_empty() {
        out.push_str(&runs(&doc.subtitle));
        out.push_str("\n\n");
    }
    for b in &doc.blocks {
        match b {
            Block::Heading { level, text } => heading(
                &mut out,
                &runs(text),
                match level {
                    1 => '-',
                    2 => '~',
                    _ => '.',
                },
            ),
            Block::Paragraph(rs) => {
                out.push_str(&runs(rs));
                out.push('\n');
            }
            Block::List(items) => {
                for i in items {
                    out.push_str("  * ");
                    out.push_str(&runs(i));
                    out.push('\n');
                }
            }
            Block::Table(t) => {
                let header: Vec<String> = t.header.iter().map(runs).collect();
                let rows: Vec<Vec<String>> = t
                    .rows
                    .iter()
                    .map(|r| r.iter().map(runs).collect())
                    .collect();
                table(&mut out, &header, &t.align, &rows);
                for n in &t.notes {
                    out.push('\n');
                    out.push_str(&runs(n));
                    out.push('\n');
                }
            }
            Block::Figure(f) => {
                out.push_str(&format!("[figure {}] {}: {}\n", f.file, f.title, f.caption));
            }
            Block::Caution(rs) => {
                out.push_str("! ");
                out.push_str(&runs(rs));
                out.push('\n');
            }
            Block::References(works) => {
                for w in works {
                    out.push_str("  ");
                    out.push_str(w.entry());
                    out.push('\n');
                }
            }
        }
        out.push('\n');
    }
    while out.ends_with("\n\n") {
        out.pop();
    }
    out
}
