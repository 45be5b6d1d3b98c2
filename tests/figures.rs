//! The report's figures, end to end on invented data (no real measurements): the
//! expected files for a homogeneous and a heterogeneous case, each a well-formed SVG
//! document (parsed with roxmltree, an XML parser from outside the project), group
//! labels present and escaped, the same bytes on every run, and under 1 MB for
//! 200,000 rows in 8 groups. The numbers behind the bands are checked against
//! statsmodels in `src/report/figures.rs`.

use slopewise::report::figures::{self, Figure};
use slopewise::results::{FigurePoints, Provenance, Results};
use slopewise::{analysis, data, plan};

/// A label that is markup if not escaped.
const AWKWARD: &str = "a<b>&\"c\"";
const AWKWARD_ESCAPED: &str = "a&lt;b&gt;&amp;&quot;c&quot;";

fn plan_text(extra: &str) -> String {
    format!(
        "title = \"figures (invented data)\"\n[data]\npath = \"unused.csv\"\n\
         [model]\nresponse = \"dry_mass_g\"\ncovariate = \"height_cm\"\ngroup = \"bed\"\n{extra}"
    )
}

/// Deterministic noise in [−0.5, 0.5) (xorshift).
struct Noise(u64);

impl Noise {
    fn next(&mut self) -> f64 {
        self.0 ^= self.0 << 13;
        self.0 ^= self.0 >> 7;
        self.0 ^= self.0 << 17;
        (self.0 % 10_000) as f64 / 10_000.0 - 0.5
    }
}

/// A CSV cell, quoted when it holds a quote or a comma.
fn cell(s: &str) -> String {
    if s.contains(['"', ',']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

/// Invented beds: `rows` rows in each, the bed's slope from `slope(g)`.
fn csv(levels: &[&str], rows: usize, slope: impl Fn(usize) -> f64) -> String {
    let mut noise = Noise(0x2545_f491_4f6c_dd1d);
    let mut s = String::from("bed,height_cm,dry_mass_g\n");
    for i in 0..rows {
        for (g, level) in levels.iter().enumerate() {
            let x = 8.0 + 16.0 * i as f64 / rows as f64 + 2.0 * noise.next();
            let y = 1.0 + 0.7 * g as f64 + slope(g) * x + 1.2 * noise.next();
            s.push_str(&format!("{},{x:.4},{y:.4}\n", cell(level)));
        }
    }
    s
}

fn run(plan_extra: &str, csv: &str) -> (Results, FigurePoints) {
    let plan = plan::load("p.toml", &plan_text(plan_extra)).unwrap();
    let dataset = data::load(&plan, csv.as_bytes()).unwrap();
    let provenance = Provenance {
        tool_version: String::new(),
        plan_sha256: String::new(),
        data_sha256: String::new(),
        plan_file: String::new(),
        data_file: String::new(),
        ..Provenance::default()
    };
    let results = analysis::run(&plan, &dataset, provenance).unwrap();
    let points = analysis::figure_points(&dataset, &results);
    (results, points)
}

const UNITS: &str = "[model.units]\nresponse = \"g\"\ncovariate = \"cm\"\n";

fn homogeneous() -> (Results, FigurePoints) {
    let (r, p) = run(UNITS, &csv(&["north", "ridge", "south"], 60, |_| 0.35));
    assert!(r.decision.homogeneous, "the invented beds share one slope");
    (r, p)
}

fn heterogeneous() -> (Results, FigurePoints) {
    let (r, p) = run(
        UNITS,
        &csv(&[AWKWARD, "ridge", "south"], 60, |g| 0.1 + 0.4 * g as f64),
    );
    assert!(!r.decision.homogeneous, "the invented slopes differ");
    assert!(!r.regions.is_empty());
    (r, p)
}

fn files(figs: &[Figure]) -> Vec<&str> {
    figs.iter().map(|f| f.file.as_str()).collect()
}

/// Parses the SVG and checks what every figure owes its reader: an `svg` root with
/// a size, its title and caption, and every text inside the canvas.
fn check_document(f: &Figure) -> roxmltree::Document<'_> {
    let doc = roxmltree::Document::parse(&f.svg)
        .unwrap_or_else(|e| panic!("{} is not well-formed XML: {e}", f.file));
    let root = doc.root_element();
    assert_eq!(root.tag_name().name(), "svg", "{}", f.file);
    let size = |k: &str| -> f64 { root.attribute(k).unwrap().parse().unwrap() };
    let (w, h) = (size("width"), size("height"));
    assert_eq!((w, h), (f.width as f64, f.height as f64), "{}", f.file);
    let child_text = |name: &str| {
        root.children()
            .find(|n| n.has_tag_name(name))
            .and_then(|n| n.text())
            .map(str::to_string)
    };
    assert_eq!(child_text("title").as_deref(), Some(f.title.as_str()));
    assert_eq!(child_text("desc").as_deref(), Some(f.caption.as_str()));
    for t in doc.descendants().filter(|n| n.has_tag_name("text")) {
        let at = |k: &str| -> f64 { t.attribute(k).unwrap().parse().unwrap() };
        let (x, y) = (at("x"), at("y"));
        assert!(
            (0.0..=w).contains(&x) && (0.0..=h).contains(&y),
            "{}: text at ({x}, {y})",
            f.file
        );
    }
    for bad in ["NaN", "inf", "\u{E000}"] {
        assert!(!f.svg.contains(bad), "{} contains {bad:?}", f.file);
    }
    doc
}

/// The texts the SVG shows, as a reader sees them (entities resolved).
fn texts(doc: &roxmltree::Document) -> Vec<String> {
    doc.descendants()
        .filter(|n| n.has_tag_name("text"))
        .filter_map(|n| n.text())
        .map(|t| t.trim().to_string())
        .collect()
}

#[test]
fn homogeneous_case_draws_three_figures() {
    let (r, p) = homogeneous();
    let figs = figures::render(&r, &p).unwrap();
    assert_eq!(
        files(&figs),
        [
            "figures/lines.svg",
            "figures/residuals.svg",
            "figures/normal-quantiles.svg"
        ]
    );
    for f in &figs {
        let doc = check_document(f);
        let shown = texts(&doc);
        if f.file != "figures/normal-quantiles.svg" {
            for g in &r.groups {
                assert!(shown.contains(&g.level), "{} lacks {}", f.file, g.level);
            }
        }
        if f.file == "figures/lines.svg" {
            // Axis titles carry the units from the plan.
            assert!(shown.contains(&"height_cm (cm)".to_string()), "{shown:?}");
            assert!(shown.contains(&"dry_mass_g (g)".to_string()), "{shown:?}");
        }
        // 180 rows in all: every one is drawn.
        assert!(
            f.file == "figures/normal-quantiles.svg"
                || f.caption.contains("All 180 rows are drawn.")
        );
    }
}

#[test]
fn heterogeneous_case_adds_the_difference_figure() {
    let (r, p) = heterogeneous();
    let figs = figures::render(&r, &p).unwrap();
    assert_eq!(
        files(&figs),
        [
            "figures/lines.svg",
            "figures/residuals.svg",
            "figures/normal-quantiles.svg",
            "figures/difference.svg"
        ]
    );
    for f in &figs {
        let doc = check_document(f);
        let shown = texts(&doc);
        if f.file != "figures/normal-quantiles.svg" {
            for g in &r.groups {
                assert!(
                    shown.iter().any(|t| t.contains(&g.level)),
                    "{} lacks {}",
                    f.file,
                    g.level
                );
            }
        }
    }
    let diff = &figs[3];
    // One panel per pair (three pairs), titled "a − b".
    let shown = texts(&check_document(diff));
    for region in &r.regions {
        let title = format!("{} − {}", region.a, region.b);
        assert!(shown.contains(&title), "{title} not in {shown:?}");
    }
}

#[test]
fn labels_are_escaped_never_raw_markup() {
    let (r, p) = heterogeneous();
    for f in figures::render(&r, &p).unwrap() {
        assert!(!f.svg.contains(AWKWARD), "{} holds the raw label", f.file);
        assert!(!f.svg.contains("<b>"), "{} holds raw markup", f.file);
        if f.file != "figures/normal-quantiles.svg" {
            assert!(
                f.svg.contains(AWKWARD_ESCAPED),
                "{} lacks the escaped label",
                f.file
            );
        }
        // The caption keeps the label as written; <desc> holds it escaped and
        // reads back unchanged (checked by check_document).
        check_document(&f);
    }
}

#[test]
fn same_results_give_the_same_bytes() {
    let (r, p) = heterogeneous();
    let first = figures::render(&r, &p).unwrap();
    let second = figures::render(&r, &p).unwrap();
    assert_eq!(first, second);
    // A fresh analysis of the same data draws the same bytes too.
    let (r2, p2) = heterogeneous();
    assert_eq!(first, figures::render(&r2, &p2).unwrap());
}

#[test]
fn many_rows_stay_under_one_megabyte() {
    let levels: Vec<String> = (0..8).map(|g| format!("plot-{g}")).collect();
    let names: Vec<&str> = levels.iter().map(String::as_str).collect();
    let (r, p) = run("", &csv(&names, 25_000, |g| 0.3 + 0.05 * g as f64));
    assert_eq!(r.data.rows_used, 200_000);
    let figs = figures::render(&r, &p).unwrap();
    assert!(figs.len() >= 3);
    for f in &figs {
        assert!(
            f.svg.len() < 1_000_000,
            "{} is {} bytes",
            f.file,
            f.svg.len()
        );
        check_document(f);
    }
    let lines = &figs[0];
    assert!(
        lines.caption.contains("of 200,000 rows")
            && lines.caption.contains("lines and bands use all rows"),
        "{}",
        lines.caption
    );
}
