//! The report as a document: a small tree of blocks and inline runs.
//!
//! The report's sections build one [`Document`] from the results; the writers in
//! [`super::write`] turn it into Markdown, Typst data for the PDF and plain text. So
//! every format says the same thing, every table is data (never text pasted into a
//! template), and each writer escapes in exactly one place. The model knows which
//! text is ours ([`Inline::Text`]) and which came from the user's data
//! ([`Inline::Value`]: labels, column names, file names), so a writer can show the
//! latter so that two labels that differ only in whitespace or control characters
//! stay distinguishable (see [`visible`]).

use super::cite::Work;

/// One run of inline content.
#[derive(Debug, Clone, PartialEq)]
pub enum Inline {
    /// Our own prose, numbers included.
    Text(String),
    /// A value from the user's plan or data: shown literally, whitespace made visible.
    Value(String),
    /// Strong emphasis (a paragraph's lead-in).
    Strong(String),
    /// Emphasis.
    Emph(String),
    /// A literal: a setting to type, a name quoted from the plan.
    Code(String),
    /// A citation, shown author–year; the references list collects them.
    Cite(Work),
}

/// A sequence of runs: a paragraph, a table cell, a heading.
pub type Runs = Vec<Inline>;

/// Column alignment in a table.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Align {
    /// Text columns.
    Left,
    /// Number columns.
    Right,
}

/// A table: header, alignment, rows of cells, and notes printed under it.
#[derive(Debug, Clone, PartialEq)]
pub struct Table {
    /// One cell per column.
    pub header: Vec<Runs>,
    /// One per column.
    pub align: Vec<Align>,
    /// Each row has as many cells as the header.
    pub rows: Vec<Vec<Runs>>,
    /// Paragraphs under the table (e.g. that rows were cut).
    pub notes: Vec<Runs>,
}

/// A figure file with its caption.
#[derive(Debug, Clone, PartialEq)]
pub struct Figure {
    /// Path inside the run folder.
    pub file: String,
    /// Short title: the question the figure answers.
    pub title: String,
    /// What is drawn, and how many points.
    pub caption: String,
    /// Width in pixels, so the PDF prints every figure's text at one size.
    pub width: u32,
}

/// One block of the document, in reading order.
#[derive(Debug, Clone, PartialEq)]
pub enum Block {
    /// Level 1 is a section, 2 a subsection (the title sits above both); a report
    /// of several attributes nests each attribute's report one level down, to 3.
    Heading {
        /// 1, 2 or 3.
        level: u8,
        /// The heading's text.
        text: Runs,
    },
    /// A paragraph.
    Paragraph(Runs),
    /// A bulleted list.
    List(Vec<Runs>),
    /// A table.
    Table(Table),
    /// A figure.
    Figure(Figure),
    /// A boxed caution.
    Caution(Runs),
    /// The works the document cites, in author–year order; see [`Document::cited`].
    References(Vec<Work>),
}

/// A whole report.
#[derive(Debug, Clone, PartialEq)]
pub struct Document {
    /// The plan's title.
    pub title: String,
    /// The line under the title.
    pub subtitle: Runs,
    /// The PDF's page footer.
    pub footer: String,
    /// The body.
    pub blocks: Vec<Block>,
}

impl Document {
    /// Every work cited anywhere in the document, once each, in author–year order.
    pub fn cited(&self) -> Vec<Work> {
        let mut works = Vec::new();
        let mut take = |runs: &Runs| {
            for r in runs {
                if let Inline::Cite(w) = r {
                    works.push(*w);
                }
            }
        };
        take(&self.subtitle);
        for b in &self.blocks {
            match b {
                Block::Heading { text, .. } => take(text),
                Block::Paragraph(runs) | Block::Caution(runs) => take(runs),
                Block::List(items) => items.iter().for_each(&mut take),
                Block::Table(t) => {
                    t.header.iter().for_each(&mut take);
                    t.rows.iter().flatten().for_each(&mut take);
                    t.notes.iter().for_each(&mut take);
                }
                Block::Figure(_) | Block::References(_) => {}
            }
        }
        super::cite::sorted(works)
    }

    /// Fills every [`Block::References`] with exactly the works cited.
    pub fn resolve_references(&mut self) {
        let cited = self.cited();
        for b in &mut self.blocks {
            if let Block::References(list) = b {
                *list = cited.clone();
            }
        }
    }
}

/// Builds a document block by block.
#[derive(Debug, Default)]
pub struct Builder {
    /// The blocks so far.
    pub blocks: Vec<Block>,
}

impl Builder {
    /// A section heading.
    pub fn section(&mut self, text: Runs) {
        self.blocks.push(Block::Heading { level: 1, text });
    }
    /// A subsection heading.
    pub fn subsection(&mut self, text: Runs) {
        self.blocks.push(Block::Heading { level: 2, text });
    }
    /// A paragraph.
    pub fn para(&mut self, runs: Runs) {
        self.blocks.push(Block::Paragraph(runs));
    }
    /// A table; the first `left` columns are left-aligned, the rest right-aligned.
    /// Long tables are cut at [`MAX_TABLE_ROWS`] with a note.
    pub fn table(&mut self, header: Vec<Runs>, left: usize, rows: Vec<Vec<Runs>>) {
        let align = (0..header.len())
            .map(|i| if i < left { Align::Left } else { Align::Right })
            .collect();
        self.table_aligned(header, align, rows);
    }
    /// A table with the alignment of each column given.
    pub fn table_aligned(
        &mut self,
        header: Vec<Runs>,
        align: Vec<Align>,
        mut rows: Vec<Vec<Runs>>,
    ) {
        let total = rows.len();
        rows.truncate(MAX_TABLE_ROWS);
        let mut notes = Vec::new();
        if total > MAX_TABLE_ROWS {
            notes.push(text(format!(
                "The first {MAX_TABLE_ROWS} of {total} rows are shown; results.json holds them all."
            )));
        }
        self.blocks.push(Block::Table(Table {
            header,
            align,
            rows,
            notes,
        }));
    }
    /// Any other block.
    pub fn push(&mut self, block: Block) {
        self.blocks.push(block);
    }
}

/// Column alignments from a spec such as `"lrrl"`: `l` left, anything else right.
pub fn aligns(spec: &str) -> Vec<Align> {
    spec.chars()
        .map(|c| if c == 'l' { Align::Left } else { Align::Right })
        .collect()
}

/// Rows a table shows at most; results.json always holds every row.
pub const MAX_TABLE_ROWS: usize = 200;

/// Runs holding one piece of our own text.
pub fn text(s: impl Into<String>) -> Runs {
    vec![Inline::Text(s.into())]
}

/// Runs holding one value from the user's plan or data.
pub fn value(s: impl Into<String>) -> Runs {
    vec![Inline::Value(s.into())]
}

/// One run of our own text.
pub fn t(s: impl Into<String>) -> Inline {
    Inline::Text(s.into())
}

/// One run holding a user's value.
pub fn v(s: impl Into<String>) -> Inline {
    Inline::Value(s.into())
}

/// Splits a sentence written with backtick-quoted literals (the style of the
/// analysis' warnings and decision reasons: ``set `sensitivity = true` ``) into
/// text and code runs, so no writer ever shows a backtick or its escape.
pub fn prose(s: &str) -> Runs {
    let mut out = Vec::new();
    let mut parts = s.split('`');
    let mut code = false;
    let count = s.matches('`').count();
    for (i, part) in parts.by_ref().enumerate() {
        // An unpaired last backtick stays text.
        let unpaired = count % 2 == 1 && i == count;
        if code && !unpaired {
            out.push(Inline::Code(part.to_string()));
        } else if !part.is_empty() {
            let part = if unpaired {
                format!("`{part}")
            } else {
                part.to_string()
            };
            out.push(Inline::Text(part));
        }
        code = !code;
    }
    out
}

/// A value with its whitespace and control characters made visible: `\n`, `\r`,
/// `\t`, `\u{…}` for other control or invisible characters, and `\s` for a space at
/// either end or after another space, so `"new\nline"`, `"new line"` and
/// `"new  line"` are three different strings on the page. A backslash stays as it is
/// (a label such as `back\slash` prints literally). Every writer passes
/// [`Inline::Value`] through this once.
pub fn visible(s: &str) -> String {
    let chars: Vec<char> = s.chars().collect();
    let mut out = String::with_capacity(s.len());
    for (i, &c) in chars.iter().enumerate() {
        match c {
            '\n' => out.push_str("\\n"),
            '\r' => out.push_str("\\r"),
            '\t' => out.push_str("\\t"),
            ' ' if i == 0 || i + 1 == chars.len() || chars[i - 1] == ' ' => out.push_str("\\s"),
            c if c.is_control() || invisible(c) => {
                out.push_str(&format!("\\u{{{:x}}}", c as u32));
            }
            c => out.push(c),
        }
    }
    out
}

/// Whitespace other than the plain space, and format characters that print as
/// nothing (zero-width space and joiners, byte-order mark, soft hyphen).
fn invisible(c: char) -> bool {
    (c.is_whitespace() && c != ' ')
        || matches!(
            c,
            '\u{ad}' | '\u{200b}'..='\u{200f}' | '\u{2060}' | '\u{feff}'
        )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn labels_differing_in_whitespace_stay_distinct() {
        let labels = [
            "new\nline",
            "new line",
            "new  line",
            "new\tline",
            " new line",
        ];
        let shown: Vec<String> = labels.iter().map(|l| visible(l)).collect();
        for (i, a) in shown.iter().enumerate() {
            for b in &shown[i + 1..] {
                assert_ne!(a, b);
            }
            assert!(!a.chars().any(|c| c.is_control()), "{a}");
        }
        assert_eq!(visible("new\nline"), "new\\nline");
        assert_eq!(visible("new  line"), "new \\sline");
        assert_eq!(visible("plain B-1"), "plain B-1");
        assert_eq!(visible("a\u{a0}b"), "a\\u{a0}b");
        assert_eq!(visible("back\\slash"), "back\\slash");
    }

    #[test]
    fn backtick_literals_become_code_runs() {
        assert_eq!(
            prose("Set `sensitivity = true` under [checks]."),
            vec![
                t("Set "),
                Inline::Code("sensitivity = true".into()),
                t(" under [checks].")
            ]
        );
        assert_eq!(prose("no code"), vec![t("no code")]);
        assert_eq!(prose("odd ` one"), vec![t("odd "), t("` one")]);
    }
}
