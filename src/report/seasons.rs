//! The season comparison and trend as Markdown and plain text (`slopewise diff`).
//!
//! The statistics of change are [`crate::seasons`]' (pure, no report imports); this
//! module only words and lays them out.

use std::collections::BTreeMap;

use super::cite::Work;
use super::doc::{Align, Block, Builder, Document, Inline, Runs, aligns, prose, t, v};
use super::write;
use crate::number::{p_value, sig, trimmed};
use crate::seasons::{Comparison, Trend, num, p_phrase, plain};

// Formatting shared by both documents.

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

fn cell(s: impl Into<String>) -> Runs {
    vec![t(s)]
}

fn vcell(s: impl Into<String>) -> Runs {
    vec![v(s)]
}

fn header(names: &[&str]) -> Vec<Runs> {
    names.iter().map(|n| cell(*n)).collect()
}

fn capitalize(s: &str) -> String {
    let mut c = s.chars();
    match c.next() {
        Some(first) => first.to_uppercase().chain(c).collect(),
        None => String::new(),
    }
}

/// One table of change: a group, before and now, the change and its test.
const CHANGE_ALIGN: &str = "lrrrrrrrrrrrl";

fn notes(b: &mut Builder, notes: &[String]) {
    if !notes.is_empty() {
        b.section(vec![t("Notes")]);
        b.push(Block::List(notes.iter().map(|n| prose(n)).collect()));
    }
}

/// The comparison of the last two runs as a document.
pub fn comparison_document(c: &Comparison) -> Document {
    let mut b = Builder::default();
    b.para(vec![t("Before: "), v(&c.old)]);
    b.para(vec![t("Now: "), v(&c.new)]);
    b.para(vec![
        t("Changes are now minus before. Each is tested as a difference between two independent estimates, t = change / sqrt(SE before² + SE now²), with Welch–Satterthwaite degrees of freedom ("),
        Inline::Cite(Work::Welch1947),
        t("; "),
        Inline::Cite(Work::Satterthwaite1946),
        t(format!(
            "), two-sided; significant when p < {}.",
            level_text(c.alpha)
        )),
    ]);

    b.section(vec![t("Flags")]);
    let flags = c.flags();
    if flags.is_empty() {
        b.para(vec![t(format!(
            "Nothing flagged: no decision flipped and no change is significant at {}.",
            level_text(c.alpha)
        ))]);
    } else {
        b.push(Block::List(
            flags.iter().map(|f| prose(&capitalize(f))).collect(),
        ));
    }

    b.section(vec![t("Decisions")]);
    let gate = &c.decisions.equal_slopes;
    let effect = &c.decisions.group_effect;
    let flip = |x: bool| {
        if x {
            vec![Inline::Strong("flipped".into())]
        } else {
            cell("same")
        }
    };
    b.table_aligned(
        header(&["Decision", "Before", "Now", "Change"]),
        vec![Align::Left; 4],
        vec![
            vec![
                cell("Common slope used"),
                cell(gate_cell(gate.homogeneous_old, gate.p_old)),
                cell(gate_cell(gate.homogeneous_new, gate.p_new)),
                flip(gate.flipped),
            ],
            vec![
                cell("Groups differ (common slope)"),
                cell(effect_cell(
                    effect.significant_old,
                    effect.p_old,
                    effect.alpha_old,
                )),
                cell(effect_cell(
                    effect.significant_new,
                    effect.p_new,
                    effect.alpha_new,
                )),
                flip(effect.flipped),
            ],
        ],
    );

    b.section(vec![t("Slope of each group")]);
    if c.slopes.is_empty() {
        b.para(vec![t("No group is in both runs.")]);
    } else {
        b.table_aligned(
            header(&[
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
            ]),
            aligns(CHANGE_ALIGN),
            c.slopes
                .iter()
                .map(|g| {
                    vec![
                        vcell(&g.level),
                        cell(g.n_old.to_string()),
                        cell(g.n_new.to_string()),
                        cell(num(g.slope_old)),
                        cell(opt(g.se_old)),
                        cell(num(g.slope_new)),
                        cell(opt(g.se_new)),
                        cell(crate::seasons::signed(g.change)),
                        cell(opt(g.se)),
                        cell(opt_t(g.t)),
                        cell(opt(g.df)),
                        cell(opt_p(g.p_value)),
                        cell(verdict(g.significant)),
                    ]
                })
                .collect(),
        );
    }

    b.section(vec![t("Adjusted means")]);
    let am = &c.adjusted_means;
    if let Some(reason) = &am.reason {
        b.para(prose(reason));
    } else if am.means.is_empty() {
        b.para(vec![t("No group has an adjusted mean in both runs.")]);
    } else {
        b.para(vec![t(format!(
            "Both runs give the means at covariate = {}; each mean's degrees of freedom are its run's common-slope model's n − k − 1.",
            trimmed(am.adjust_at_old, 6)
        ))]);
        if let Some(caution) = &am.caution {
            b.para(prose(caution));
        }
        let mut align = aligns(CHANGE_ALIGN);
        align.drain(1..3);
        b.table_aligned(
            header(&[
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
            ]),
            align,
            am.means
                .iter()
                .map(|m| {
                    vec![
                        vcell(&m.level),
                        cell(num(m.mean_old)),
                        cell(opt(m.se_old)),
                        cell(num(m.mean_new)),
                        cell(opt(m.se_new)),
                        cell(crate::seasons::signed(m.change)),
                        cell(opt(m.se)),
                        cell(opt_t(m.t)),
                        cell(opt(m.df)),
                        cell(opt_p(m.p_value)),
                        cell(verdict(m.significant)),
                    ]
                })
                .collect(),
        );
    }

    b.section(vec![t("Groups")]);
    if c.groups_added.is_empty() && c.groups_removed.is_empty() {
        b.para(vec![t("The same groups in both runs.")]);
    } else {
        let list = |lead: &str, labels: &[String]| {
            let mut runs = vec![t(lead)];
            if labels.is_empty() {
                runs.push(t("none"));
            }
            for (i, l) in labels.iter().enumerate() {
                if i > 0 {
                    runs.push(t(", "));
                }
                runs.push(v(l));
            }
            runs
        };
        b.push(Block::List(vec![
            list("New this run: ", &c.groups_added),
            list("Gone this run: ", &c.groups_removed),
        ]));
    }

    b.section(vec![t("Data and provenance")]);
    let d = &c.data;
    let changed = |same: bool| {
        if same {
            cell("same")
        } else {
            vec![Inline::Strong("changed".into())]
        }
    };
    b.table_aligned(
        header(&["", "Before", "Now", "Change"]),
        vec![Align::Left; 4],
        vec![
            vec![
                cell("Rows read"),
                cell(d.rows_read_old.to_string()),
                cell(d.rows_read_new.to_string()),
                changed(d.rows_read_old == d.rows_read_new),
            ],
            vec![
                cell("Rows used"),
                cell(d.rows_used_old.to_string()),
                cell(d.rows_used_new.to_string()),
                changed(d.rows_used_old == d.rows_used_new),
            ],
            vec![
                cell("Rows dropped"),
                cell(dropped(&d.rows_dropped_old)),
                cell(dropped(&d.rows_dropped_new)),
                changed(d.rows_dropped_old == d.rows_dropped_new),
            ],
            vec![
                cell("Data SHA-256"),
                cell(short_hash(&d.data_sha256_old)),
                cell(short_hash(&d.data_sha256_new)),
                changed(d.data_sha256_old == d.data_sha256_new),
            ],
            vec![
                cell("Plan SHA-256"),
                cell(short_hash(&d.plan_sha256_old)),
                cell(short_hash(&d.plan_sha256_new)),
                changed(d.plan_sha256_old == d.plan_sha256_new),
            ],
            vec![
                cell("Tool version"),
                vcell(&d.tool_version_old),
                vcell(&d.tool_version_new),
                changed(d.tool_version_old == d.tool_version_new),
            ],
        ],
    );
    notes(&mut b, &c.notes);
    b.section(vec![t("References")]);
    b.push(Block::References(Vec::new()));
    let mut doc = Document {
        title: "Changes between two runs".into(),
        subtitle: Vec::new(),
        footer: String::new(),
        blocks: b.blocks,
    };
    doc.resolve_references();
    doc
}

/// The comparison as Markdown, for a file or a review.
pub fn comparison_markdown(c: &Comparison) -> String {
    write::markdown::write(&comparison_document(c))
}

/// The comparison as plain terminal text: aligned columns, no colour.
pub fn comparison_text(c: &Comparison) -> String {
    write::text::write(&comparison_document(c))
}

/// Each group's slope across the runs as a document.
pub fn trend_document(tr: &Trend) -> Document {
    let mut b = Builder::default();
    b.para(vec![
        t("Each group's slope of "),
        v(&tr.response),
        t(" on "),
        v(&tr.covariate),
        t(format!(
            " in each run, in the order given, with its {}% interval (t with n − 2 df, from the group's own fit).",
            level_text(100.0 * (1.0 - tr.alpha))
        )),
    ]);
    let mut rows = Vec::new();
    for g in &tr.groups {
        for p in &g.seasons {
            rows.push(match p.n {
                None => vec![
                    vcell(&g.level),
                    vcell(&p.season),
                    cell("absent"),
                    cell(""),
                    cell(""),
                    cell(""),
                ],
                Some(n) => vec![
                    vcell(&g.level),
                    vcell(&p.season),
                    cell(n.to_string()),
                    cell(opt(p.slope)),
                    cell(opt(p.se)),
                    cell(ci_text(p.slope_ci)),
                ],
            });
        }
    }
    b.table_aligned(
        header(&["Group", "Run", "n", "Slope", "SE", "Interval"]),
        aligns("llrrrl"),
        rows,
    );
    b.section(vec![t("Equal-slopes gate by run")]);
    b.table_aligned(
        header(&["Run", "Common slope used", "p"]),
        aligns("llr"),
        tr.gates
            .iter()
            .map(|g| {
                vec![
                    vcell(&g.season),
                    cell(yes_no(g.homogeneous)),
                    cell(opt_p(g.p_value)),
                ]
            })
            .collect(),
    );
    notes(&mut b, &tr.notes);
    Document {
        title: "Slopes by season".into(),
        subtitle: Vec::new(),
        footer: String::new(),
        blocks: b.blocks,
    }
}

/// The trend table as Markdown: one row per group and run.
pub fn trend_markdown(tr: &Trend) -> String {
    write::markdown::write(&trend_document(tr))
}

/// The trend table as plain terminal text: aligned columns, no colour.
pub fn trend_text(tr: &Trend) -> String {
    write::text::write(&trend_document(tr))
}
