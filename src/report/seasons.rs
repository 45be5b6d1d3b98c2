//! The season comparison and trend as Markdown and plain text (`slopewise diff`).
//!
//! The statistics of change are [`crate::seasons`]' (pure, no report imports); this
//! module only words and lays them out.

use std::collections::BTreeMap;

use crate::number::{p_value, sig, trimmed};
use crate::report::escape_markdown;
use crate::seasons::{Comparison, Trend, num, p_phrase, plain, signed};

// Formatting shared by the renderers.

/// A label for Markdown: control characters written out, then Markdown escaped.
fn md(s: &str) -> String {
    escape_markdown(&plain(s))
}

fn opt(x: Option<f64>) -> String {
    x.map_or_else(|| "n/a".into(), num)
}

fn opt_t(x: Option<f64>) -> String {
    x.map_or_else(|| "n/a".into(), |t| sig(t, 3))
}

fn opt_p(p: Option<f64>) -> String {
    p.map_or_else(|| "n/a".into(), p_value)
}

fn yes_no(b: bool) -> &'static str {
    if b { "yes" } else { "no" }
}

fn verdict(s: Option<bool>) -> &'static str {
    match s {
        Some(true) => "yes",
        Some(false) => "no",
        None => "not tested",
    }
}

fn ci_text(ci: Option<[f64; 2]>) -> String {
    ci.map_or_else(
        || "n/a".into(),
        |[lo, hi]| format!("[{}, {}]", num(lo), num(hi)),
    )
}

/// The first 12 hex digits: enough to see a change; the full hash is in the JSON.
fn short_hash(h: &str) -> String {
    if h.is_empty() {
        "(none)".into()
    } else {
        let short: String = h.chars().take(12).collect();
        if short.len() < h.len() {
            format!("{}…", plain(&short))
        } else {
            plain(&short)
        }
    }
}

fn dropped(m: &BTreeMap<String, u64>) -> String {
    if m.is_empty() {
        return "none".into();
    }
    m.iter()
        .map(|(reason, n)| format!("{}: {n}", plain(reason)))
        .collect::<Vec<_>>()
        .join(", ")
}

fn level_text(x: f64) -> String {
    trimmed(x, 4)
}

fn gate_cell(homogeneous: bool, p: Option<f64>) -> String {
    format!("{} ({})", yes_no(homogeneous), p_phrase(p))
}

fn effect_cell(significant: Option<bool>, p: Option<f64>, alpha: f64) -> String {
    format!(
        "{} ({}, alpha {})",
        verdict(significant),
        p_phrase(p),
        level_text(alpha)
    )
}

/// How a column is aligned.
#[derive(Clone, Copy, PartialEq)]
enum Align {
    Left,
    Right,
}

/// A Markdown table; cells must already be escaped.
fn md_table(header: &[&str], align: &[Align], rows: &[Vec<String>]) -> String {
    let mut s = String::new();
    s.push_str("| ");
    s.push_str(&header.join(" | "));
    s.push_str(" |\n|");
    for a in align {
        s.push_str(if *a == Align::Right { "---:|" } else { ":---|" });
    }
    s.push('\n');
    for row in rows {
        s.push_str("| ");
        s.push_str(&row.join(" | "));
        s.push_str(" |\n");
    }
    s
}

/// A plain-text table with columns padded to their widest cell.
fn text_table(header: &[&str], align: &[Align], rows: &[Vec<String>]) -> String {
    let width = |s: &str| s.chars().count();
    let mut widths: Vec<usize> = header.iter().map(|h| width(h)).collect();
    for row in rows {
        for (w, cell) in widths.iter_mut().zip(row) {
            *w = (*w).max(width(cell));
        }
    }
    let line = |cells: Vec<&str>| {
        let mut out = String::new();
        for (i, cell) in cells.iter().enumerate() {
            if i > 0 {
                out.push_str("  ");
            }
            let pad = " ".repeat(widths[i] - width(cell));
            if align[i] == Align::Right {
                out.push_str(&pad);
                out.push_str(cell);
            } else {
                out.push_str(cell);
                out.push_str(&pad);
            }
        }
        let mut out = out.trim_end().to_string();
        out.push('\n');
        out
    };
    let mut s = line(header.to_vec());
    s.push_str(&line(
        widths
            .iter()
            .map(|w| "-".repeat(*w))
            .collect::<Vec<_>>()
            .iter()
            .map(String::as_str)
            .collect(),
    ));
    for row in rows {
        s.push_str(&line(row.iter().map(String::as_str).collect()));
    }
    s
}

/// Underlined heading for plain text.
fn text_heading(s: &mut String, title: &str, rule: char) {
    s.push_str(title);
    s.push('\n');
    s.push_str(&rule.to_string().repeat(title.chars().count()));
    s.push_str("\n\n");
}

// ---------------------------------------------------------------------------------
// Comparison renderers. Both show the same tables from the same cells; only the
// escaping and the table syntax differ.

/// Which renderer a cell is for: it decides how labels are escaped.
#[derive(Clone, Copy, PartialEq)]
enum Target {
    Markdown,
    Text,
}

impl Target {
    fn label(self, s: &str) -> String {
        match self {
            Target::Markdown => md(s),
            Target::Text => plain(s),
        }
    }

    fn table(self, header: &[&str], align: &[Align], rows: &[Vec<String>]) -> String {
        match self {
            Target::Markdown => md_table(header, align, rows),
            Target::Text => text_table(header, align, rows),
        }
    }

    fn heading(self, s: &mut String, title: &str) {
        match self {
            Target::Markdown => {
                s.push_str("## ");
                s.push_str(title);
                s.push_str("\n\n");
            }
            Target::Text => text_heading(s, title, '-'),
        }
    }

    fn bullet(self, s: &mut String, text: &str) {
        s.push_str(match self {
            Target::Markdown => "- ",
            Target::Text => "  * ",
        });
        s.push_str(text);
        s.push('\n');
    }

    fn strong(self, text: &str) -> String {
        match self {
            Target::Markdown => format!("**{text}**"),
            Target::Text => text.to_uppercase(),
        }
    }
}

/// Markdown text of a note or flag: its labels went through `plain` already.
fn prose(target: Target, text: &str) -> String {
    match target {
        Target::Markdown => escape_markdown(text),
        Target::Text => text.to_string(),
    }
}

fn render_comparison(c: &Comparison, target: Target) -> String {
    let mut s = String::new();
    let title = "Changes between two runs";
    match target {
        Target::Markdown => {
            s.push_str("# ");
            s.push_str(title);
            s.push_str("\n\n");
        }
        Target::Text => text_heading(&mut s, title, '='),
    }
    let intro = [
        format!("Before: {}", target.label(&c.old)),
        format!("Now:    {}", target.label(&c.new)),
    ];
    for line in &intro {
        s.push_str(line);
        s.push_str(if target == Target::Markdown {
            "  \n"
        } else {
            "\n"
        });
    }
    s.push('\n');
    let method = format!(
        "Changes are now minus before. Each is tested as a difference between two \
         independent estimates, t = change / sqrt(SE before² + SE now²), with \
         Welch–Satterthwaite degrees of freedom (Welch 1947; Satterthwaite 1946), \
         two-sided; significant when p < {}.",
        level_text(c.alpha)
    );
    s.push_str(&prose(target, &method));
    s.push_str("\n\n");

    target.heading(&mut s, "Flags");
    let flags = c.flags();
    if flags.is_empty() {
        s.push_str(&prose(
            target,
            &format!(
                "Nothing flagged: no decision flipped and no change is significant at {}.",
                level_text(c.alpha)
            ),
        ));
        s.push('\n');
    } else {
        for f in &flags {
            target.bullet(&mut s, &prose(target, &capitalize(f)));
        }
    }
    s.push('\n');

    target.heading(&mut s, "Decisions");
    let gate = &c.decisions.equal_slopes;
    let effect = &c.decisions.group_effect;
    let flip = |b: bool| {
        if b {
            target.strong("flipped")
        } else {
            "same".into()
        }
    };
    let rows = vec![
        vec![
            "Slopes taken as equal".to_string(),
            prose(target, &gate_cell(gate.homogeneous_old, gate.p_old)),
            prose(target, &gate_cell(gate.homogeneous_new, gate.p_new)),
            flip(gate.flipped),
        ],
        vec![
            "Groups differ (common slope)".to_string(),
            prose(
                target,
                &effect_cell(effect.significant_old, effect.p_old, effect.alpha_old),
            ),
            prose(
                target,
                &effect_cell(effect.significant_new, effect.p_new, effect.alpha_new),
            ),
            flip(effect.flipped),
        ],
    ];
    s.push_str(&target.table(
        &["Decision", "Before", "Now", "Change"],
        &[Align::Left; 4],
        &rows,
    ));
    s.push('\n');

    target.heading(&mut s, "Slope of each group");
    if c.slopes.is_empty() {
        s.push_str("No group is in both runs.\n\n");
    } else {
        let rows: Vec<Vec<String>> = c
            .slopes
            .iter()
            .map(|g| {
                vec![
                    target.label(&g.level),
                    g.n_old.to_string(),
                    g.n_new.to_string(),
                    num(g.slope_old),
                    opt(g.se_old),
                    num(g.slope_new),
                    opt(g.se_new),
                    signed(g.change),
                    opt(g.se),
                    opt_t(g.t),
                    opt(g.df),
                    opt_p(g.p_value),
                    verdict(g.significant).into(),
                ]
            })
            .collect();
        s.push_str(&target.table(
            &[
                "Group",
                "n before",
                "n now",
                "Slope before",
                "SE",
                "Slope now",
                "SE",
                "Change",
                "SE change",
                "t",
                "df",
                "p",
                "Significant",
            ],
            &change_align(),
            &rows,
        ));
        s.push('\n');
    }

    target.heading(&mut s, "Adjusted means");
    let am = &c.adjusted_means;
    if let Some(reason) = &am.reason {
        s.push_str(&prose(target, reason));
        s.push_str("\n\n");
    } else if am.means.is_empty() {
        s.push_str("No group has an adjusted mean in both runs.\n\n");
    } else {
        s.push_str(&prose(
            target,
            &format!(
                "Both runs give the means at covariate = {}; each mean's degrees of freedom \
                 are its run's common-slope model's n − k − 1.",
                trimmed(am.adjust_at_old, 6)
            ),
        ));
        s.push_str("\n\n");
        let rows: Vec<Vec<String>> = am
            .means
            .iter()
            .map(|m| {
                vec![
                    target.label(&m.level),
                    num(m.mean_old),
                    opt(m.se_old),
                    num(m.mean_new),
                    opt(m.se_new),
                    signed(m.change),
                    opt(m.se),
                    opt_t(m.t),
                    opt(m.df),
                    opt_p(m.p_value),
                    verdict(m.significant).into(),
                ]
            })
            .collect();
        let mut align = change_align();
        align.drain(1..3);
        s.push_str(&target.table(
            &[
                "Group",
                "Mean before",
                "SE",
                "Mean now",
                "SE",
                "Change",
                "SE change",
                "t",
                "df",
                "p",
                "Significant",
            ],
            &align,
            &rows,
        ));
        s.push('\n');
    }

    target.heading(&mut s, "Groups");
    if c.groups_added.is_empty() && c.groups_removed.is_empty() {
        s.push_str("The same groups in both runs.\n");
    } else {
        let list = |v: &[String]| {
            if v.is_empty() {
                "none".to_string()
            } else {
                v.iter()
                    .map(|l| target.label(l))
                    .collect::<Vec<_>>()
                    .join(", ")
            }
        };
        target.bullet(&mut s, &format!("New this run: {}", list(&c.groups_added)));
        target.bullet(
            &mut s,
            &format!("Gone this run: {}", list(&c.groups_removed)),
        );
    }
    s.push('\n');

    target.heading(&mut s, "Data and provenance");
    let d = &c.data;
    let changed = |old: &str, new: &str| {
        if old == new {
            "same".to_string()
        } else {
            target.strong("changed")
        }
    };
    let rows = vec![
        vec![
            "Rows read".to_string(),
            d.rows_read_old.to_string(),
            d.rows_read_new.to_string(),
            changed(&d.rows_read_old.to_string(), &d.rows_read_new.to_string()),
        ],
        vec![
            "Rows used".to_string(),
            d.rows_used_old.to_string(),
            d.rows_used_new.to_string(),
            changed(&d.rows_used_old.to_string(), &d.rows_used_new.to_string()),
        ],
        vec![
            "Rows dropped".to_string(),
            prose(target, &dropped(&d.rows_dropped_old)),
            prose(target, &dropped(&d.rows_dropped_new)),
            if d.rows_dropped_old == d.rows_dropped_new {
                "same".into()
            } else {
                target.strong("changed")
            },
        ],
        vec![
            "Data SHA-256".to_string(),
            prose(target, &short_hash(&d.data_sha256_old)),
            prose(target, &short_hash(&d.data_sha256_new)),
            changed(&d.data_sha256_old, &d.data_sha256_new),
        ],
        vec![
            "Plan SHA-256".to_string(),
            prose(target, &short_hash(&d.plan_sha256_old)),
            prose(target, &short_hash(&d.plan_sha256_new)),
            changed(&d.plan_sha256_old, &d.plan_sha256_new),
        ],
        vec![
            "Tool version".to_string(),
            target.label(&d.tool_version_old),
            target.label(&d.tool_version_new),
            changed(&d.tool_version_old, &d.tool_version_new),
        ],
    ];
    s.push_str(&target.table(&["", "Before", "Now", "Change"], &[Align::Left; 4], &rows));

    if !c.notes.is_empty() {
        s.push('\n');
        target.heading(&mut s, "Notes");
        for n in &c.notes {
            target.bullet(&mut s, &prose(target, n));
        }
    }
    s
}

fn change_align() -> Vec<Align> {
    let mut a = vec![Align::Left];
    a.extend([Align::Right; 11]);
    a.push(Align::Left);
    a
}

fn capitalize(s: &str) -> String {
    let mut c = s.chars();
    match c.next() {
        Some(first) => first.to_uppercase().chain(c).collect(),
        None => String::new(),
    }
}

/// The comparison as Markdown, for a file or a review.
pub fn comparison_markdown(c: &Comparison) -> String {
    render_comparison(c, Target::Markdown)
}

/// The comparison as plain terminal text: aligned columns, no colour.
pub fn comparison_text(c: &Comparison) -> String {
    render_comparison(c, Target::Text)
}

// ---------------------------------------------------------------------------------
// Trend renderers.

fn render_trend(t: &Trend, target: Target) -> String {
    let mut s = String::new();
    let title = "Slopes by season";
    match target {
        Target::Markdown => {
            s.push_str("# ");
            s.push_str(title);
            s.push_str("\n\n");
        }
        Target::Text => text_heading(&mut s, title, '='),
    }
    s.push_str(&prose(
        target,
        &format!(
            "Each group's slope of {} on {} in each run, in the order given, with its {}% \
             interval (t with n − 2 df, from the group's own fit).",
            plain(&t.response),
            plain(&t.covariate),
            level_text(100.0 * (1.0 - t.alpha))
        ),
    ));
    s.push_str("\n\n");
    let mut rows = Vec::new();
    for g in &t.groups {
        for p in &g.seasons {
            rows.push(match p.n {
                None => vec![
                    target.label(&g.level),
                    target.label(&p.season),
                    "absent".into(),
                    String::new(),
                    String::new(),
                    String::new(),
                ],
                Some(n) => vec![
                    target.label(&g.level),
                    target.label(&p.season),
                    n.to_string(),
                    opt(p.slope),
                    opt(p.se),
                    ci_text(p.slope_ci),
                ],
            });
        }
    }
    s.push_str(&target.table(
        &["Group", "Run", "n", "Slope", "SE", "Interval"],
        &[
            Align::Left,
            Align::Left,
            Align::Right,
            Align::Right,
            Align::Right,
            Align::Left,
        ],
        &rows,
    ));
    s.push('\n');
    target.heading(&mut s, "Equal-slopes gate by run");
    let rows: Vec<Vec<String>> = t
        .gates
        .iter()
        .map(|g| {
            vec![
                target.label(&g.season),
                yes_no(g.homogeneous).into(),
                opt_p(g.p_value),
            ]
        })
        .collect();
    s.push_str(&target.table(
        &["Run", "Slopes taken as equal", "p"],
        &[Align::Left, Align::Left, Align::Right],
        &rows,
    ));
    if !t.notes.is_empty() {
        s.push('\n');
        target.heading(&mut s, "Notes");
        for n in &t.notes {
            target.bullet(&mut s, &prose(target, n));
        }
    }
    s
}

/// The trend table as Markdown: one row per group and run.
pub fn trend_markdown(t: &Trend) -> String {
    render_trend(t, Target::Markdown)
}

/// The trend table as plain terminal text: aligned columns, no colour.
pub fn trend_text(t: &Trend) -> String {
    render_trend(t, Target::Text)
}
