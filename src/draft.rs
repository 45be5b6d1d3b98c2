//! A first plan for a CSV, drafted from its header and a sample of its rows.
//!
//! Writing a plan by hand means looking up the column names and the keys; a draft
//! does the first and lists the second, so a person only has to check it. The draft
//! decides nothing it cannot see: it classifies each column as numeric or text from
//! a sample of rows, guesses the roles from those types and column order alone, and
//! says so in comments, so the guesses are never mistaken for decisions. Every value
//! taken from the data is written as an escaped TOML basic string (column names and
//! labels may hold quotes, backslashes, `#` or line breaks), and every optional key is
//! written commented out but valid, so uncommenting a line never breaks the file.
//!
//! The module is pure: bytes in, TOML text out. The command layer reads the file.

use std::collections::BTreeSet;
use std::fmt::Write as _;
use std::path::Path;

use crate::diagnostic::Diagnostic;
use crate::plan::DEFAULT_MISSING;

/// Data rows read to classify the columns. Enough to see a mixed column or a group
/// label that turns up late in a shuffled file, few enough to draft instantly.
pub const SAMPLE_ROWS: usize = 1000;

/// Most distinct labels a column may hold to be guessed as the group. More than this
/// is an identifier column (tray, animal, sample id) rather than groups to compare.
pub const MAX_GROUP_LABELS: usize = 200;

/// Width at which the lists in the draft's comments are wrapped.
const COMMENT_WIDTH: usize = 88;

/// Why no draft could be written. Each message says what is wrong with the file;
/// [`DraftError::diagnostic`] adds how to fix it.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum DraftError {
    /// No header row: the bytes are empty or blank.
    #[error("{file} is empty: a plan needs a CSV file with a header row and data rows")]
    Empty {
        /// The CSV's name as given.
        file: String,
    },
    /// A header row and nothing else.
    #[error("{file} has a header row but no data rows, so the column types cannot be seen")]
    HeaderOnly {
        /// The CSV's name as given.
        file: String,
    },
    /// Comparing lines needs a numeric response and a numeric covariate.
    #[error(
        "{file} has {} numeric column(s) in the {rows} data row(s) read ({}); a plan needs two, the response and the covariate",
        .numeric.len(),
        quoted_list(.numeric)
    )]
    FewerThanTwoNumeric {
        /// The CSV's name as given.
        file: String,
        /// Names of the numeric columns found.
        numeric: Vec<String>,
        /// Data rows sampled.
        rows: usize,
    },
    /// The groups are read from a text column, and there is none.
    #[error(
        "{file} has no text column in the {rows} data row(s) read to hold the group labels (every column is numeric or empty)"
    )]
    NoTextColumn {
        /// The CSV's name as given.
        file: String,
        /// Data rows sampled.
        rows: usize,
    },
    /// Two header names that are equal after trimming; the run would refuse the file.
    #[error("{file}: the header names column {first} and column {second} both `{name}`")]
    DuplicateColumn {
        /// The CSV's name as given.
        file: String,
        /// The repeated name.
        name: String,
        /// 1-based position of its first use.
        first: usize,
        /// 1-based position of its second use.
        second: usize,
    },
    /// A row whose number of cells differs from the header's.
    #[error("{file}, line {line}: the row has {found} field(s) but the header has {expected}")]
    Ragged {
        /// The CSV's name as given.
        file: String,
        /// 1-based line of the file.
        line: u64,
        /// Fields in the header.
        expected: usize,
        /// Fields in the row.
        found: usize,
    },
    /// A header name or cell that is not UTF-8 text.
    #[error("{file}, line {line}, column {column}: the text is not valid UTF-8")]
    NotUtf8 {
        /// The CSV's name as given.
        file: String,
        /// 1-based line of the file.
        line: u64,
        /// 1-based column number.
        column: usize,
    },
    /// The CSV reader itself gave up.
    #[error("{file} could not be read as CSV near line {line}: {message}")]
    Syntax {
        /// The CSV's name as given.
        file: String,
        /// 1-based line of the file.
        line: u64,
        /// The reader's words.
        message: String,
    },
    /// The path to write into `data.path` is blank, which no plan accepts.
    #[error("the data path to write into the plan is empty")]
    EmptyDataPath,
}

impl DraftError {
    /// The error as the command layer shows it: what is wrong and how to fix it.
    pub fn diagnostic(&self) -> Diagnostic {
        let d = Diagnostic::new(self.to_string());
        match self {
            DraftError::Empty { .. } | DraftError::HeaderOnly { .. } => d.help(
                "the file needs a header row naming the columns, then one row per observation",
            ),
            DraftError::FewerThanTwoNumeric { .. } => d
                .help("a column counts as numeric when every cell that is not \"\" or \"NA\" is a finite number")
                .help("if a column uses another missing-value marker such as \"-\", write the plan by hand and list it in data.missing"),
            DraftError::NoTextColumn { .. } => d.help(
                "add a column naming each row's group (a site, bed or lot), or write the plan by hand",
            ),
            DraftError::DuplicateColumn { .. } => {
                d.help("rename one of the columns so every header name is unique")
            }
            DraftError::Ragged { .. } => d.help(
                "every row needs as many fields as the header; check for a stray or missing delimiter, or quote fields that contain commas",
            ),
            DraftError::NotUtf8 { .. } => d.help("save the file as UTF-8 text"),
            DraftError::Syntax { .. } => d.help("check the quoting on that line"),
            DraftError::EmptyDataPath => d.help("pass the CSV's path as the plan should name it"),
        }
    }
}

/// The group guess: among text columns with 2 to [`MAX_GROUP_LABELS`] labels and at
/// least 3 rows per label (an id column has one row per label, and a line needs 3),
/// the one with the fewest labels, preferring 3 or more over a two-label flag such as
/// a status column; ties go to the earlier column. Failing that, the first text column
/// with 2 to `MAX_GROUP_LABELS` labels.
fn guess_group(text: &[usize], columns: &[Column]) -> Option<usize> {
    let fits = |i: &usize| (2..=MAX_GROUP_LABELS).contains(&columns[*i].labels.len());
    text.iter()
        .copied()
        .filter(fits)
        .filter(|&i| columns[i].filled >= 3 * columns[i].labels.len())
        .min_by_key(|&i| (columns[i].labels.len() < 3, columns[i].labels.len()))
        .or_else(|| text.iter().copied().find(fits))
}

/// What the sample says about one column.
#[derive(Debug)]
struct Column {
    name: String,
    /// Non-missing cells seen.
    filled: usize,
    /// Whether every non-missing cell parsed as a finite number.
    all_numeric: bool,
    /// Distinct non-missing cell texts (trimmed), sorted.
    labels: BTreeSet<String>,
    /// Parsed values, kept while the column may still be numeric.
    values: Vec<f64>,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Kind {
    Numeric,
    Text,
    /// Every sampled cell is missing: nothing to say about its type.
    Empty,
}

impl Column {
    fn kind(&self) -> Kind {
        if self.filled == 0 {
            Kind::Empty
        } else if self.all_numeric {
            Kind::Numeric
        } else {
            Kind::Text
        }
    }

    /// Columns without a name cannot be named by a plan (blank names are refused).
    fn usable(&self) -> bool {
        !self.name.is_empty()
    }
}

/// Drafts a plan for a CSV.
///
/// - `csv_name`: the file's name or path; its stem gives the title and the output
///   folder, and it is quoted in the comments.
/// - `data_path_in_plan`: written into `data.path` as given (relative to the plan's
///   folder, the caller's business).
/// - `header_and_sample`: the start of the file, or all of it; reading stops after
///   [`SAMPLE_ROWS`] data rows. A caller that reads only a prefix should cut it at a
///   line break; a last row that is cut short (too few fields) is ignored when the
///   bytes do not end with a line break.
///
/// Cells are trimmed, a UTF-8 byte-order mark is ignored and `""` and `"NA"` are read
/// as missing, as a plan with the default `data.missing` reads them. The result is
/// accepted by [`crate::plan::load`].
pub fn draft_plan(
    csv_name: &str,
    data_path_in_plan: &str,
    header_and_sample: &[u8],
) -> Result<String, DraftError> {
    if data_path_in_plan.trim().is_empty() {
        return Err(DraftError::EmptyDataPath);
    }
    let file = csv_name.to_string();
    let sample = read_sample(&file, header_and_sample)?;
    let columns = &sample.columns;

    let numeric: Vec<usize> = (0..columns.len())
        .filter(|&i| columns[i].usable() && columns[i].kind() == Kind::Numeric)
        .collect();
    let text: Vec<usize> = (0..columns.len())
        .filter(|&i| columns[i].usable() && columns[i].kind() == Kind::Text)
        .collect();
    if numeric.len() < 2 {
        return Err(DraftError::FewerThanTwoNumeric {
            file,
            numeric: numeric.iter().map(|&i| columns[i].name.clone()).collect(),
            rows: sample.rows,
        });
    }
    if text.is_empty() {
        return Err(DraftError::NoTextColumn {
            file,
            rows: sample.rows,
        });
    }
    let response = numeric[numeric.len() - 1];
    let covariate = numeric[0];
    let group_guess = guess_group(&text, columns);

    let stem = Path::new(csv_name)
        .file_stem()
        .map(|s| s.to_string_lossy().trim().to_string())
        .filter(|s| !s.is_empty())
        .unwrap_or_else(|| "data".to_string());
    let seen = if sample.more {
        format!("the first {} data rows", sample.rows)
    } else if sample.rows == 1 {
        "its only data row".to_string()
    } else {
        format!("all {} data rows", sample.rows)
    };

    let mut out = String::new();
    let w = &mut out;
    line(w, "# DRAFT plan: review every line before you run it.");
    line(
        w,
        &format!(
            "# Written by slopewise from the header and {seen} of {}.",
            toml_string(csv_name)
        ),
    );
    line(
        w,
        "# The column roles under [model] are guesses made from the column types and their",
    );
    line(
        w,
        "# order alone; nothing was fitted. Optional keys are commented out with their",
    );
    line(
        w,
        "# defaults; remove the `#` to use one. Unknown keys are refused when the plan runs.",
    );
    line(w, "");
    line(w, "# The report's title: say what is compared, and when.");
    line(w, &format!("title = {}", toml_string(&stem)));
    line(w, "");

    line(w, "[data]");
    line(w, "# The CSV, relative to this plan's folder.");
    line(w, &format!("path = {}", toml_string(data_path_in_plan)));
    line(
        w,
        "# Cell texts read as missing (compared after trimming spaces).",
    );
    line(
        w,
        &format!(
            "missing = [{}]",
            DEFAULT_MISSING
                .iter()
                .map(|m| toml_string(m))
                .collect::<Vec<_>>()
                .join(", ")
        ),
    );
    line(
        w,
        "# Pin the data: paste the first field of `sha256sum FILE`; a different file is refused.",
    );
    line(w, "# sha256 = \"…\"");
    line(w, "");
    line(w, "# Optional row filters; a row must pass all of them.");
    line(w, "# [[data.keep]]");
    line(w, "# column = \"COLUMN\"");
    line(
        w,
        "# equals = \"VALUE\"            # or: one_of = [\"VALUE\", \"OTHER\"]",
    );
    line(w, "");

    line(w, &format!("# Columns seen in {seen}:"));
    let names = |idx: &[usize]| -> Vec<String> {
        idx.iter().map(|&i| toml_string(&columns[i].name)).collect()
    };
    wrapped(w, "#   numeric: ", &names(&numeric));
    let text_items: Vec<String> = text
        .iter()
        .map(|&i| {
            let n = columns[i].labels.len();
            format!(
                "{} ({n} label{})",
                toml_string(&columns[i].name),
                if n == 1 { "" } else { "s" }
            )
        })
        .collect();
    wrapped(w, "#   text:    ", &text_items);
    let empty: Vec<usize> = (0..columns.len())
        .filter(|&i| columns[i].usable() && columns[i].kind() == Kind::Empty)
        .collect();
    if !empty.is_empty() {
        wrapped(w, "#   no values (type unknown): ", &names(&empty));
    }
    let unnamed = columns.iter().filter(|c| !c.usable()).count();
    if unnamed > 0 {
        line(
            w,
            &format!("#   {unnamed} column(s) without a header name, which a plan cannot name"),
        );
    }
    line(w, "[model]");
    line(
        w,
        "# The three roles are GUESSES; the columns listed above are the candidates.",
    );
    line(
        w,
        "# GUESS, check it: the response (y) is the last numeric column.",
    );
    line(
        w,
        &format!("response = {}", toml_string(&columns[response].name)),
    );
    line(
        w,
        "# GUESS, check it: the covariate (x) is the first other numeric column.",
    );
    line(
        w,
        &format!("covariate = {}", toml_string(&columns[covariate].name)),
    );
    let group = match group_guess {
        Some(g) => {
            line(
                w,
                &format!(
                    "# GUESS, check it: the group is the text column with the fewest labels (3 or more preferred, at most {MAX_GROUP_LABELS}) that has at least 3 rows per label."
                ),
            );
            line(w, &format!("group = {}", toml_string(&columns[g].name)));
            g
        }
        None => {
            // Still name a column, so the draft loads and the run's own messages can
            // guide the fix; the comment makes clear the choice is a placeholder.
            let g = text[0];
            let n = columns[g].labels.len();
            line(
                w,
                &format!(
                    "# PLACEHOLDER, replace it: no text column has 2 to {MAX_GROUP_LABELS} distinct labels"
                ),
            );
            line(
                w,
                &format!(
                    "# in the sample, so none looks like a grouping column. {} has {n}.",
                    toml_string(&columns[g].name)
                ),
            );
            line(
                w,
                "# Name the column whose labels say which group (site, bed, lot) each row is in.",
            );
            line(w, &format!("group = {}", toml_string(&columns[g].name)));
            g
        }
    };
    let labels = &columns[group].labels;
    line(
        w,
        "# Order of the groups; the first is the reference. Default: all labels, sorted.",
    );
    if (2..=MAX_GROUP_LABELS).contains(&labels.len()) {
        line(
            w,
            "# The labels below are those seen in the sample; the whole file must hold no others.",
        );
        let items: Vec<String> = labels.iter().map(|l| toml_string(l)).collect();
        line(w, &format!("# levels = [{}]", items.join(", ")));
    } else {
        // A list of one label would be refused (comparing needs two) and one of
        // hundreds is no help, so the line is a placeholder that still loads.
        line(
            w,
            &format!(
                "# levels = [\"FIRST\", \"SECOND\"]   # {} label(s) in the sample: not listed",
                labels.len()
            ),
        );
    }
    line(
        w,
        "# Covariate value for the adjusted means: \"mean\" or a number (transformed scale).",
    );
    line(w, "# adjust_at = \"mean\"");
    line(w, "");
    line(
        w,
        "# Transforms before fitting: \"none\" | \"log\" | \"log10\" | \"sqrt\"",
    );
    line(
        w,
        "# (\"log\" and \"log10\" need positive values, \"sqrt\" values of zero or more).",
    );
    line(w, "# [model.transform]");
    line(w, "# response = \"none\"");
    line(w, "# covariate = \"none\"");
    line(w, "");
    line(w, "# Units as measured, for the axis titles.");
    line(w, "# [model.units]");
    line(w, "# response = \"UNIT\"");
    line(w, "# covariate = \"UNIT\"");
    line(w, "");

    line(w, "[tests]");
    line(
        w,
        "# Level of the comparisons and intervals, and of the equal-slopes gate.",
    );
    line(w, "alpha = 0.05");
    line(w, "slopes_alpha = 0.05");
    line(
        w,
        "# Adjustment of pairwise p-values: \"none\" | \"bonferroni\" | \"holm\" | \"tukey-kramer\",",
    );
    line(
        w,
        "# or \"against-reference\": each group against the first level (Dunnett 1955)",
    );
    line(w, "comparisons = \"holm\"");
    line(
        w,
        "# Johnson-Neyman regions when slopes differ: \"pointwise\" | \"simultaneous\"",
    );
    line(w, "regions = \"pointwise\"");
    line(
        w,
        "# Covariate values for group differences when slopes differ (default: its quartiles;",
    );
    line(
        w,
        "# like every value in a plan, on the measured scale: slopewise transforms them).",
    );
    line(
        w,
        &format!(
            "# compare_at = [{}]",
            quartiles(&columns[covariate].values)
                .iter()
                .map(|v| format!("{v:?}"))
                .collect::<Vec<_>>()
                .join(", ")
        ),
    );
    line(w, "");
    line(
        w,
        "# true: rerun without the influential rows and show both side by side.",
    );
    line(w, "# [checks]");
    line(w, "# sensitivity = false");
    line(w, "");

    line(w, "[report]");
    line(w, "# \"pdf\" may be added; it needs the typst program.");
    line(w, "formats = [\"markdown\", \"json\"]");
    line(
        w,
        "# Output folder, relative to this plan's folder (`--out DIR` overrides it).",
    );
    line(
        w,
        &format!("out = {}", toml_string(&format!("../reports/{stem}"))),
    );
    Ok(out)
}

/// The header and the sampled rows.
struct Sample {
    columns: Vec<Column>,
    rows: usize,
    /// Whether the bytes hold rows beyond the sample.
    more: bool,
}

fn read_sample(file: &str, bytes: &[u8]) -> Result<Sample, DraftError> {
    let syntax = |e: csv::Error| DraftError::Syntax {
        file: file.to_string(),
        line: e.position().map_or(1, |p| p.line()),
        message: e.to_string(),
    };
    let mut reader = csv::ReaderBuilder::new()
        .has_headers(true)
        // Ragged rows are reported with their line below, not as a reader error.
        .flexible(true)
        .from_reader(bytes);
    let header = reader.byte_headers().map_err(syntax)?.clone();
    let mut columns = Vec::with_capacity(header.len());
    for (i, raw) in header.iter().enumerate() {
        let raw = crate::data::header_cell(i, raw);
        let name = std::str::from_utf8(raw)
            .map_err(|_| DraftError::NotUtf8 {
                file: file.to_string(),
                line: 1,
                column: i + 1,
            })?
            .trim()
            .to_string();
        // The run refuses repeated names, blank ones included, so the draft does too.
        if let Some(first) = columns.iter().position(|c: &Column| c.name == name) {
            return Err(DraftError::DuplicateColumn {
                file: file.to_string(),
                name,
                first: first + 1,
                second: i + 1,
            });
        }
        columns.push(Column {
            name,
            filled: 0,
            all_numeric: true,
            labels: BTreeSet::new(),
            values: Vec::new(),
        });
    }
    if columns.iter().all(|c| c.name.is_empty()) && columns.len() <= 1 {
        return Err(DraftError::Empty {
            file: file.to_string(),
        });
    }

    let ends_cleanly = matches!(bytes.last(), Some(b'\n' | b'\r'));
    let mut record = csv::ByteRecord::new();
    let mut rows = 0;
    let mut more = false;
    loop {
        if !reader.read_byte_record(&mut record).map_err(syntax)? {
            break;
        }
        if rows == SAMPLE_ROWS {
            more = true;
            break;
        }
        let line = record.position().map_or(rows as u64 + 2, |p| p.line());
        if record.len() != columns.len() {
            // A prefix of a longer file may end inside its last row.
            let start = record.position().map_or(0, |p| p.byte() as usize);
            let last_line = !bytes[start.min(bytes.len())..]
                .iter()
                .any(|b| matches!(b, b'\n' | b'\r'));
            if !ends_cleanly && last_line {
                break;
            }
            return Err(DraftError::Ragged {
                file: file.to_string(),
                line,
                expected: columns.len(),
                found: record.len(),
            });
        }
        rows += 1;
        for (i, raw) in record.iter().enumerate() {
            let cell = std::str::from_utf8(raw)
                .map_err(|_| DraftError::NotUtf8 {
                    file: file.to_string(),
                    line,
                    column: i + 1,
                })?
                .trim();
            if DEFAULT_MISSING.contains(&cell) {
                continue;
            }
            let column = &mut columns[i];
            column.filled += 1;
            if column.all_numeric {
                // The same parser, and the same rule (whole cell, finite), as the
                // data stage, so a column called numeric here reads as numbers there.
                match fast_float2::parse::<f64, _>(cell) {
                    Ok(v) if v.is_finite() => column.values.push(v),
                    _ => {
                        column.all_numeric = false;
                        column.values = Vec::new();
                    }
                }
            }
            if !column.labels.contains(cell) {
                column.labels.insert(cell.to_string());
            }
        }
    }
    if rows == 0 {
        return Err(DraftError::HeaderOnly {
            file: file.to_string(),
        });
    }
    Ok(Sample {
        columns,
        rows,
        more,
    })
}

/// The sample's lower quartile, median and upper quartile by nearest rank, each kept
/// once (common practice, no source: any rough spread suffices for a commented hint).
fn quartiles(values: &[f64]) -> Vec<f64> {
    let mut sorted = values.to_vec();
    sorted.sort_by(f64::total_cmp);
    let mut out: Vec<f64> = Vec::new();
    for q in [0.25, 0.5, 0.75] {
        let rank = ((q * sorted.len() as f64).ceil() as usize).clamp(1, sorted.len());
        let v = sorted[rank - 1];
        if out.last() != Some(&v) {
            out.push(v);
        }
    }
    out
}

/// `text` as a TOML basic string: quotes and backslashes escaped, and every control
/// character (which TOML forbids raw in strings and comments) written as an escape.
pub fn toml_string(text: &str) -> String {
    let mut out = String::with_capacity(text.len() + 2);
    out.push('"');
    for c in text.chars() {
        match c {
            '"' => out.push_str("\\\""),
            '\\' => out.push_str("\\\\"),
            '\n' => out.push_str("\\n"),
            '\r' => out.push_str("\\r"),
            '\t' => out.push_str("\\t"),
            '\u{8}' => out.push_str("\\b"),
            '\u{c}' => out.push_str("\\f"),
            c if c.is_control() => {
                let _ = write!(out, "\\u{:04X}", u32::from(c));
            }
            c => out.push(c),
        }
    }
    out.push('"');
    out
}

fn quoted_list(names: &[String]) -> String {
    if names.is_empty() {
        "none".to_string()
    } else {
        names
            .iter()
            .map(|n| toml_string(n))
            .collect::<Vec<_>>()
            .join(", ")
    }
}

fn line(out: &mut String, text: &str) {
    out.push_str(text);
    out.push('\n');
}

/// Writes `items` as comment lines of at most [`COMMENT_WIDTH`] characters where the
/// items allow, the first line starting with `lead` and the rest indented to match.
fn wrapped(out: &mut String, lead: &str, items: &[String]) {
    let indent = format!("#{}", " ".repeat(lead.chars().count() - 1));
    let mut current = lead.to_string();
    let mut on_line = 0;
    for (i, item) in items.iter().enumerate() {
        let piece = if i + 1 < items.len() {
            format!("{item},")
        } else {
            item.clone()
        };
        if on_line > 0 && current.chars().count() + 1 + piece.chars().count() > COMMENT_WIDTH {
            line(out, &current);
            current = indent.clone();
            on_line = 0;
        }
        if on_line > 0 {
            current.push(' ');
        }
        current.push_str(&piece);
        on_line += 1;
    }
    if items.is_empty() {
        current.push_str("none");
    }
    line(out, &current);
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn toml_string_round_trips_hostile_text() {
        // TOML 1.0, "String": basic strings escape `"`, `\` and control characters.
        for text in [
            "plain",
            "quo\"te",
            "back\\slash",
            "hash # not a comment",
            "line\nbreak\r\n",
            "tab\there",
            "nul\u{0}del\u{7f}",
            "unicode é ✓ 🐖",
            "'single' and \"\"\" triple",
        ] {
            let doc = format!("v = {}", toml_string(text));
            let parsed: toml::Table = toml::from_str(&doc).expect(&doc);
            assert_eq!(parsed["v"].as_str(), Some(text), "{doc}");
        }
    }

    #[test]
    fn quartiles_by_nearest_rank() {
        // Nearest rank: the ceil(q n)-th smallest value (common practice, no source).
        assert_eq!(quartiles(&[4.0, 1.0, 3.0, 2.0]), vec![1.0, 2.0, 3.0]);
        assert_eq!(quartiles(&[5.0]), vec![5.0]);
    }

    #[test]
    fn wrapped_lists_stay_in_comments() {
        let items: Vec<String> = (0..40).map(|i| toml_string(&format!("col_{i}"))).collect();
        let mut out = String::new();
        wrapped(&mut out, "#   numeric: ", &items);
        assert!(out.lines().count() > 1);
        for l in out.lines() {
            assert!(l.starts_with('#'), "{l}");
            assert!(l.chars().count() <= COMMENT_WIDTH, "{l}");
        }
        let joined: String = out.lines().map(|l| l.trim_start_matches('#')).collect();
        for item in &items {
            assert!(joined.contains(item.as_str()));
        }
    }
}
