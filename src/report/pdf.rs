//! The PDF report's sources: a fixed Typst template and a JSON data file.
//!
//! No data value is ever written into Typst markup. The template
//! (`templates/report.typ`) reads `report-data.json` with Typst's own `json()` and
//! shows every string as text, so a label such as `#read("/etc/passwd")` prints as
//! those characters and cannot run. Numbers arrive already formatted by
//! [`crate::number`], so the PDF prints them exactly as the Markdown does. The prose
//! comes from the same templates as the Markdown (rendered unescaped).
//! Compiling is the command layer's job (it runs the external `typst`).

use serde::Serialize;

use super::ReportError;
use super::markdown::{
    FigureRef, MAX_TABLE_ROWS, adjustment_name, confidence, drop_text, label, plain,
};
use crate::number::{p_equation, p_value, sig, trimmed};
use crate::results::Results;

/// The Typst template, compiled into the binary.
pub const TEMPLATE: &str = include_str!("../../templates/report.typ");

/// What the Typst template reads.
#[derive(Debug, Serialize)]
struct Document {
    title: String,
    subtitle: String,
    footer: String,
    blocks: Vec<Block>,
}

/// One piece of the document, in reading order.
#[derive(Debug, Serialize)]
#[serde(tag = "kind", rename_all = "lowercase")]
enum Block {
    Heading {
        level: u8,
        text: String,
    },
    Para {
        text: String,
    },
    Lead {
        label: String,
        text: String,
    },
    Bullets {
        items: Vec<String>,
    },
    Table {
        columns: Vec<String>,
        align: Vec<&'static str>,
        rows: Vec<Vec<String>>,
    },
    Figure {
        file: String,
        caption: String,
        width: u32,
    },
}

fn num(x: Option<f64>) -> String {
    x.map_or("n/a".into(), |v| sig(v, 4))
}

fn num3(x: Option<f64>) -> String {
    x.map_or("n/a".into(), |v| sig(v, 3))
}

fn p(x: Option<f64>) -> String {
    x.map_or("n/a".into(), p_value)
}

fn peq(x: Option<f64>) -> String {
    x.map_or("p not computable".into(), p_equation)
}

fn ci(x: Option<[f64; 2]>) -> String {
    x.map_or("n/a".into(), |[a, b]| {
        format!("{} to {}", sig(a, 4), sig(b, 4))
    })
}

fn int(x: f64) -> String {
    format!("{}", x.round() as i64)
}

struct Builder {
    blocks: Vec<Block>,
}

impl Builder {
    fn h(&mut self, level: u8, text: impl Into<String>) {
        self.blocks.push(Block::Heading {
            level,
            text: text.into(),
        });
    }
    fn para(&mut self, text: impl Into<String>) {
        self.blocks.push(Block::Para { text: text.into() });
    }
    fn lead(&mut self, label: &str, text: impl Into<String>) {
        self.blocks.push(Block::Lead {
            label: label.into(),
            text: text.into(),
        });
    }
    /// A table; the first `left` columns are left-aligned, the rest right-aligned.
    /// Long tables are cut at [`MAX_TABLE_ROWS`] with a note, as in the Markdown.
    fn table(&mut self, columns: Vec<String>, left: usize, mut rows: Vec<Vec<String>>) {
        let align = (0..columns.len())
            .map(|i| if i < left { "left" } else { "right" })
            .collect();
        let total = rows.len();
        rows.truncate(MAX_TABLE_ROWS);
        self.blocks.push(Block::Table {
            columns,
            align,
            rows,
        });
        if total > MAX_TABLE_ROWS {
            self.para(format!(
                "The first {MAX_TABLE_ROWS} of {total} rows are shown; results.json holds them all."
            ));
        }
    }
}

/// `report-data.json` for the Typst template.
pub fn data(r: &Results, figures: &[FigureRef]) -> Result<String, ReportError> {
    let y = label(&r.model.response, &r.model.response_transform);
    let x = label(&r.model.covariate, &r.model.covariate_transform);
    let g = r.model.group.clone();
    let conf = confidence(r);
    let adjust = adjustment_name(&r.model.comparisons);
    let mut b = Builder { blocks: Vec::new() };

    b.h(1, "In brief");
    for text in plain(r, "summary.j2")? {
        b.para(text);
    }

    b.h(1, "Rows in and out");
    let mut rows = vec![vec![
        "read from the data file".to_string(),
        r.data.rows_read.to_string(),
    ]];
    for (key, count) in &r.data.rows_dropped {
        rows.push(vec![
            format!("left out: {}", drop_text(key)),
            count.to_string(),
        ]);
    }
    rows.push(vec![
        "used in the fits".into(),
        r.data.rows_used.to_string(),
    ]);
    b.table(vec!["rows".into(), "count".into()], 1, rows);
    if !r.data.groups_excluded.is_empty() {
        let list: Vec<String> = r
            .data
            .groups_excluded
            .iter()
            .map(|e| format!("{} ({})", e.level, e.reason))
            .collect();
        b.para(format!("Groups left out: {}.", list.join("; ")));
    }

    b.h(1, "Each group's own line");
    b.para(format!(
        "Fitted separately to each group's rows; intervals at {conf} (t with n − 2 df)."
    ));
    b.table(
        vec![
            g.clone(),
            "n".into(),
            "slope".into(),
            "slope interval".into(),
            "intercept".into(),
            "R²".into(),
            "residual SD".into(),
        ],
        1,
        r.groups
            .iter()
            .map(|l| {
                vec![
                    l.level.clone(),
                    l.n.to_string(),
                    num(Some(l.slope)),
                    ci(l.slope_ci),
                    num(Some(l.intercept)),
                    num(l.r_squared),
                    num(l.residual_sd),
                ]
            })
            .collect(),
    );
    b.para(format!(
        "One line through all rows: slope {}, intercept {}, R² {}.",
        num(Some(r.one_line.slope)),
        num(Some(r.one_line.intercept)),
        num(r.one_line.r_squared)
    ));

    let es = &r.equal_slopes;
    b.h(1, "Do the slopes agree?");
    b.para(format!(
        "Separate lines against parallel lines: {} on {} and {} df, {}; partial η² = {}.",
        if es.status == "exact-fit" {
            "F infinite (exact fit)".to_string()
        } else {
            format!("F = {}", num(es.f))
        },
        int(es.df1),
        int(es.df2),
        if es.status == "exact-fit" {
            "p = 0".to_string()
        } else {
            peq(es.p_value)
        },
        num3(r.effect_sizes.equal_slopes_partial_eta2)
    ));
    b.para(r.decision.reason.clone());
    if r.decision.homogeneous {
        common(&mut b, r, &x, &y, &g, &conf, adjust);
        slope_pairs(&mut b, r, adjust);
    } else {
        slope_pairs(&mut b, r, adjust);
        regions(&mut b, r, &x, &conf);
        common(&mut b, r, &x, &y, &g, &conf, adjust);
    }
    if !r.limits.is_empty() {
        limits(&mut b, r, &x, &y);
    }
    checks(&mut b, r, &x, &g);

    if !figures.is_empty() {
        b.h(1, "Figures");
        for f in figures {
            b.blocks.push(Block::Figure {
                file: f.file.clone(),
                caption: format!("{}. {}", f.title, f.caption),
                width: f.width,
            });
        }
    }

    b.h(1, "Points to watch");
    if r.warnings.is_empty() {
        b.para("None.");
    } else {
        b.blocks.push(Block::Bullets {
            items: r.warnings.clone(),
        });
    }
    b.h(1, "How this was computed");
    for text in plain(r, "methods.md.j2")? {
        b.para(text);
    }
    b.h(1, "Before relying on these results");
    for text in plain(r, "cautions.j2")? {
        b.para(text);
    }
    let pv = &r.provenance;
    b.h(1, "Where these numbers came from");
    let mut rows = vec![
        vec!["slopewise version".into(), pv.tool_version.clone()],
        vec!["build commit".into(), pv.build_commit.clone()],
        vec!["compiler".into(), pv.rustc_version.clone()],
    ];
    if let Some(v) = &pv.typst_version {
        rows.push(vec!["typst".into(), v.clone()]);
    }
    for (name, hash) in &pv.font_sha256 {
        rows.push(vec![format!("font {name} SHA-256"), hash.clone()]);
    }
    for (name, hash) in &pv.template_sha256 {
        rows.push(vec![format!("template {name} SHA-256"), hash.clone()]);
    }
    rows.extend([
        vec!["plan file".into(), pv.plan_file.clone()],
        vec!["plan SHA-256".into(), pv.plan_sha256.clone()],
        vec!["data file".into(), pv.data_file.clone()],
        vec!["data SHA-256".into(), pv.data_sha256.clone()],
    ]);
    b.table(vec!["item".into(), "value".into()], 2, rows);
    b.para("The same plan and data give this report byte for byte; results.json beside it holds every number at full precision.");

    let doc = Document {
        title: r.title.clone(),
        subtitle: format!(
            "Regression lines of {y} on {x}, compared across the {} groups of {g}. Written by slopewise {} from the plan {}. Approval: not approved unless a record in the approvals folder beside this report says so and `slopewise verify` finds it holds; approving never edits this report.",
            r.groups.len(),
            pv.tool_version,
            pv.plan_file
        ),
        footer: format!(
            "slopewise {} · plan {} · plan SHA-256 {} · data SHA-256 {}",
            pv.tool_version,
            pv.plan_file,
            short(&pv.plan_sha256),
            short(&pv.data_sha256)
        ),
        blocks: b.blocks,
    };
    let mut s = serde_json::to_string_pretty(&doc).map_err(|e| ReportError::Json(e.to_string()))?;
    s.push('\n');
    Ok(s)
}

fn short(hash: &str) -> &str {
    &hash[..hash.len().min(16)]
}

fn slope_pairs(b: &mut Builder, r: &Results, adjust: &str) {
    b.h(2, "Slope differences, pair by pair");
    b.para(format!(
        "Difference = first − second. Pooled: residual variance of the separate-lines model ({} df). Unpooled: each group's own variance, Welch–Satterthwaite df. p-values adjusted: {adjust}.",
        int(r.separate_slopes.df)
    ));
    b.table(
        [
            "pair",
            "difference",
            "SE",
            "t",
            "p",
            "adjusted p",
            "unpooled SE",
            "unpooled df",
            "unpooled p",
        ]
        .map(String::from)
        .to_vec(),
        1,
        r.pairwise_slopes
            .iter()
            .map(|s| {
                vec![
                    format!("{} − {}", s.a, s.b),
                    num(Some(s.difference)),
                    num(s.se),
                    num(s.t),
                    p(s.p_value),
                    p(s.p_adjusted),
                    num(s.welch.se),
                    num3(s.welch.df),
                    p(s.welch.p_value),
                ]
            })
            .collect(),
    );
}

fn common(b: &mut Builder, r: &Results, x: &str, y: &str, g: &str, conf: &str, adjust: &str) {
    let cs = &r.common_slope;
    let ge = &r.group_effect;
    b.h(1, "Groups on a common slope");
    if !r.decision.homogeneous {
        b.para(format!(
            "The slopes differ, so this comparison describes the groups at {x} = {} only.",
            sig(r.adjust_at, 4)
        ));
    }
    b.para(format!(
        "Common slope {} (SE {}, {conf} interval {}, {} df). Group effect given the common slope: F = {} on {} and {} df, {}; partial η² = {}.",
        num(Some(cs.slope)),
        num(cs.se),
        ci(cs.ci),
        int(cs.df),
        num(ge.f),
        int(ge.df1),
        int(ge.df2),
        peq(ge.p_value),
        num3(r.effect_sizes.group_effect_partial_eta2)
    ));
    b.h(
        2,
        format!("Adjusted means at {x} = {}", sig(r.adjust_at, 4)),
    );
    b.table(
        vec![
            g.to_string(),
            format!("adjusted mean of {y}"),
            "SE".into(),
            format!("{conf} interval"),
            format!("within the group's {x} range"),
        ],
        1,
        r.adjusted_means
            .iter()
            .map(|m| {
                vec![
                    m.level.clone(),
                    num(Some(m.mean)),
                    num(m.se),
                    ci(m.ci),
                    if m.within_range {
                        "yes".into()
                    } else {
                        "no: extrapolated".into()
                    },
                ]
            })
            .collect(),
    );
    b.h(2, "Differences of adjusted means");
    b.para(format!(
        "Difference = first − second; p-values adjusted: {adjust}; intervals unadjusted. The last column is the Tukey–Kramer p-value (studentized range over all {} groups).",
        r.groups.len()
    ));
    b.table(
        vec![
            "pair".into(),
            "difference".into(),
            "SE".into(),
            format!("{conf} interval"),
            "t".into(),
            "p".into(),
            "adjusted p".into(),
            "Tukey–Kramer p".into(),
        ],
        1,
        r.pairwise_adjusted
            .iter()
            .map(|d| {
                vec![
                    format!("{} − {}", d.a, d.b),
                    num(Some(d.difference)),
                    num(d.se),
                    ci(d.ci),
                    num(d.t),
                    p(d.p_value),
                    p(d.p_adjusted),
                    p(d.p_tukey),
                ]
            })
            .collect(),
    );
}

fn regions(b: &mut Builder, r: &Results, x: &str, conf: &str) {
    b.h(1, format!("Where along {x} the groups differ"));
    let simultaneous = r
        .regions
        .first()
        .is_some_and(|g| g.method == "johnson-neyman-simultaneous");
    let range = r
        .regions
        .first()
        .map_or("n/a".into(), |g| ci(Some(g.observed_range)));
    b.para(format!(
        "With unequal slopes the difference between two groups changes with {x}. For each pair, the {x} values where the difference becomes significant at level {} ({}), and the stretches of the observed range ({range}) where it is.",
        trimmed(r.model.alpha, 4),
        if simultaneous { "simultaneous over the whole range, Potthoff 1964" } else { "pointwise, Johnson & Neyman 1936" }
    ));
    b.table(
        vec![
            "pair".into(),
            "bounds".into(),
            format!("groups differ for {x} in"),
        ],
        3,
        r.regions
            .iter()
            .map(|g| {
                let bounds = if g.bounds.is_empty() {
                    "none".to_string()
                } else {
                    g.bounds
                        .iter()
                        .map(|v| sig(*v, 4))
                        .collect::<Vec<_>>()
                        .join(", ")
                };
                let sig_text = if g.significant.is_empty() {
                    "nowhere in the observed range".to_string()
                } else {
                    g.significant
                        .iter()
                        .map(|s| ci(Some(*s)))
                        .collect::<Vec<_>>()
                        .join("; ")
                };
                vec![format!("{} − {}", g.a, g.b), bounds, sig_text]
            })
            .collect(),
    );
    b.h(2, format!("Differences at chosen values of {x}"));
    b.para(format!(
        "Line of the first group minus line of the second, from the separate-lines model; intervals at {conf}, unadjusted."
    ));
    b.table(
        vec![
            "pair".into(),
            x.to_string(),
            "difference".into(),
            "SE".into(),
            format!("{conf} interval"),
            "t".into(),
            "p".into(),
        ],
        1,
        r.differences_at
            .iter()
            .map(|d| {
                vec![
                    format!("{} − {}", d.a, d.b),
                    num(Some(d.at)),
                    num(Some(d.difference)),
                    num(d.se),
                    ci(d.ci),
                    num(d.t),
                    p(d.p_value),
                ]
            })
            .collect(),
    );
}

fn limits(b: &mut Builder, r: &Results, x: &str, y: &str) {
    b.h(1, "When the mean reaches a limit");
    if let Some(pool) = &r.pooling {
        b.para(format!(
            "Lines were pooled step by step (ICH Q1E 2003), each test at level {}.",
            trimmed(pool.alpha, 4)
        ));
        let (one, two) = match (pool.decision.as_str(), pool.stopped_at.as_deref()) {
            ("separate", _) => ("yes: separate lines", "not needed"),
            ("common-slope", _) => ("no: one slope", "yes: parallel lines"),
            (_, Some("slopes")) => ("test not computable (0/0): stopped", "not reached"),
            (_, Some(_)) => ("no: one slope", "test not computable (0/0): stopped"),
            _ => ("no: one slope", "no: one pooled line"),
        };
        b.table(
            vec![
                "step".into(),
                "question".into(),
                "p".into(),
                "outcome".into(),
            ],
            2,
            vec![
                vec![
                    "1".into(),
                    "do the slopes differ?".into(),
                    p(pool.slopes_p),
                    one.into(),
                ],
                vec![
                    "2".into(),
                    "given one slope, do the intercepts differ?".into(),
                    p(pool.intercepts_p),
                    two.into(),
                ],
            ],
        );
    }
    let model = r.limits.first().map_or("", |c| c.model.as_str());
    let conf = r.limits.first().map_or(String::new(), |c| {
        format!("{}%", trimmed(100.0 * c.confidence, 4))
    });
    b.para(format!(
        "Each crossing is the {x} value where the one-sided {conf} {} {y} meets the limit, read from {}.{}",
        if r.limits.first().is_some_and(|c| c.bound == "prediction") {
            "prediction bound for a single future"
        } else {
            "confidence bound of the mean"
        },
        match model {
            "not-decided" => "no line: the pooling steps stopped before choosing one",
            "pooled" => "the one pooled line",
            "common-slope" => "the parallel lines (one slope, each group's own intercept)",
            _ => "each group's own line and residual variance",
        },
        if r.limits.first().is_some_and(|c| c.two_sided) {
            " With both limits, each side uses the one-sided level (1 + confidence)/2, so the two sides together hold at the plan's confidence (ICH Q1E 2003)."
        } else {
            ""
        }
    ));
    b.table(
        vec![
            "line".into(),
            "limit".into(),
            format!("crossing at {x}"),
            format!("last observed {x}"),
            "beyond the data by".into(),
        ],
        2,
        r.limits
            .iter()
            .map(|c| {
                vec![
                    c.level.clone(),
                    format!("{} {}", c.side, sig(c.limit, 4)),
                    match (c.crossing, c.reason.as_deref()) {
                        (Some(v), _) => sig(v, 4),
                        (None, Some("beyond-at-start")) => {
                            "none: already past the limit at the first observation".into()
                        }
                        (None, Some("not-decided")) => {
                            "none: no line chosen (pooling stopped)".into()
                        }
                        _ => "none: the bound never meets the limit".into(),
                    },
                    sig(c.observed_max, 4),
                    if c.extrapolated {
                        format!("{} (extrapolated)", num3(c.beyond))
                    } else {
                        "within the data".into()
                    },
                ]
            })
            .collect(),
    );
    for e in &r.limits_earliest {
        b.para(if e.already_beyond {
            format!(
                "Earliest past the {} limit: {}, already at its first observation ({x} = {}).",
                e.side,
                e.level,
                sig(e.crossing, 4)
            )
        } else {
            format!(
                "Earliest {}-limit crossing: {} at {x} = {}.",
                e.side,
                e.level,
                sig(e.crossing, 4)
            )
        });
    }
    if let Some(s) = &r.limits_supported {
        let period = match (s.supported, s.reason.as_deref()) {
            (Some(v), _) => format!(
                "{x} = {}, rounded down to a step of {}",
                sig(v, 4),
                sig(s.round_to, 4)
            ),
            (None, Some("beyond-at-start")) => {
                "none, a line is past the limit from its first observation".into()
            }
            (None, Some("never-within")) => {
                "none, no bound meets a limit and the plan gives no extrapolation rule".into()
            }
            _ => "none, no line was chosen".into(),
        };
        let raw = match (s.raw_crossing, &s.limiting_level, &s.limiting_side) {
            (Some(v), Some(l), Some(side)) => format!("{} ({l}, {side} limit)", sig(v, 4)),
            _ => "none".into(),
        };
        let cap = match s.cap {
            Some(c) if s.capped => format!("{}, which sets the period", sig(c, 4)),
            Some(c) => sig(c, 4),
            None => "none".into(),
        };
        b.para(format!(
            "Supported period: {period}. Raw crossing: {raw}; the data cover {x} up to {}; cap: {cap}, because {}.",
            sig(s.covered, 4),
            s.cap_reason
        ));
    }
    b.para("These estimates support, and do not replace, the evaluation that the applicable guidance (for stability data, ICH Q1E) and a qualified person require. Whether, and how far, an estimate may be extrapolated beyond the observed data is for that guidance to decide.");
}

fn checks(b: &mut Builder, r: &Results, x: &str, g: &str) {
    let c = &r.checks;
    b.h(1, "Checking the assumptions");
    let n = &c.normality;
    b.lead(
        "Normal residuals.",
        format!(
            "Shapiro–Wilk on the residuals of the separate lines: W = {}, {}, on {} residuals{}.",
            num(n.statistic),
            peq(n.p_value),
            n.n,
            if n.subsampled {
                format!(" (a fixed-seed random subsample of the {} residuals: the method covers at most 5000 values)", n.residuals)
            } else {
                String::new()
            }
        ),
    );
    b.table(
        vec![
            g.to_string(),
            "residuals tested".into(),
            "W".into(),
            "p".into(),
        ],
        1,
        n.groups
            .iter()
            .map(|gn| {
                vec![
                    gn.level.clone(),
                    if gn.not_tested.is_some() {
                        "too few rows to check".to_string()
                    } else {
                        format!(
                            "{}{}",
                            gn.n,
                            if gn.subsampled { " (subsample)" } else { "" }
                        )
                    },
                    num(gn.statistic),
                    p(gn.p_value),
                ]
            })
            .collect(),
    );
    let ev = &c.equal_variance;
    b.lead(
        "Equal spread.",
        format!(
            "Brown–Forsythe test across groups: F = {} on {} and {} df, {}.",
            num(ev.statistic),
            int(ev.df1),
            int(ev.df2),
            peq(ev.p_value)
        ),
    );
    let cb = &c.covariate_balance;
    b.lead(
        "Covariate balance.",
        format!(
            "{x} across groups: F = {} on {} and {} df, {}. {}",
            num(cb.f),
            int(cb.df1),
            int(cb.df2),
            peq(cb.p_value),
            match cb.overlap {
                Some(o) => format!("Every group covers {x} from {}.", ci(Some(o))),
                None => format!("No range of {x} is covered by every group."),
            }
        ),
    );
    let inf = &c.influence;
    b.lead(
        "Influential rows.",
        format!(
            "Measured on the {} model the decision selected. Cut-offs (common practice): leverage above {} (2p/n), Cook's distance above {} (4/n), |externally studentized residual| above {}. Largest Cook's distance {}, largest leverage {}; {} row{} beyond a cut-off{}.",
            if inf.model == "common-slope" { "parallel-lines" } else { "separate-lines" },
            sig(inf.cutoffs.leverage, 3),
            sig(inf.cutoffs.cooks_distance, 3),
            sig(inf.cutoffs.studentized_residual, 2),
            num3(inf.max_cooks_distance),
            num3(inf.max_leverage),
            inf.flagged_total,
            if inf.flagged_total == 1 { "" } else { "s" },
            if inf.flagged_total > inf.flagged.len() as u64 {
                format!(" (the {} with the largest Cook's distance listed)", inf.flagged.len())
            } else {
                String::new()
            }
        ),
    );
    if !inf.flagged.is_empty() {
        b.table(
            vec![
                "data row".into(),
                g.to_string(),
                "Cook's distance".into(),
                "leverage".into(),
                "studentized residual".into(),
            ],
            0,
            inf.flagged
                .iter()
                .map(|f| {
                    vec![
                        f.row.to_string(),
                        f.level.clone(),
                        num3(f.cooks_distance),
                        num3(Some(f.leverage)),
                        num3(f.studentized_residual),
                    ]
                })
                .collect(),
        );
    }
    if let Some(s) = &r.sensitivity {
        b.h(2, "Without the influential rows");
        b.para(format!(
            "The same procedure on {} rows, leaving out the {} rows beyond the Cook's distance or studentized-residual cut-off; {} row{} beyond the leverage cut-off alone {} kept (leverage marks where a row sits on {x}, not how it fits). Adjusted means are taken at {x} = {}, as for all rows.",
            s.rows_used,
            s.rows_removed,
            s.rows_kept_leverage_only,
            if s.rows_kept_leverage_only == 1 { "" } else { "s" },
            if s.rows_kept_leverage_only == 1 { "is" } else { "are" },
            sig(s.adjust_at, 4)
        ));
        let yes = |v: bool| {
            if v {
                "yes".to_string()
            } else {
                "no".to_string()
            }
        };
        let mut rows = vec![
            vec![
                "equal-slopes F".into(),
                num(r.equal_slopes.f),
                num(s.equal_slopes.f),
            ],
            vec![
                "equal-slopes p".into(),
                p(r.equal_slopes.p_value),
                p(s.equal_slopes.p_value),
            ],
            vec![
                "slopes taken as equal".into(),
                yes(r.decision.homogeneous),
                yes(s.decision.homogeneous),
            ],
            vec![
                "common slope".into(),
                num(Some(r.common_slope.slope)),
                num(Some(s.common_slope.slope)),
            ],
            vec![
                "group-effect p".into(),
                p(r.group_effect.p_value),
                p(s.group_effect.p_value),
            ],
        ];
        for l in &r.groups {
            let other = s
                .groups
                .iter()
                .find(|o| o.level == l.level)
                .map(|o| o.slope);
            rows.push(vec![
                format!("slope of {}", l.level),
                num(Some(l.slope)),
                num(other),
            ]);
        }
        for m in &r.adjusted_means {
            let other = s
                .adjusted_means
                .iter()
                .find(|o| o.level == m.level)
                .map(|o| o.mean);
            rows.push(vec![
                format!("adjusted mean of {}", m.level),
                num(Some(m.mean)),
                num(other),
            ]);
        }
        b.table(
            vec!["quantity".into(), "all rows".into(), "without them".into()],
            1,
            rows,
        );
    }
}
