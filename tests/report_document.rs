//! Every report of every demo plan, read back the way a reader's renderer reads it.
//!
//! The Markdown is parsed with a CommonMark/GFM parser (pulldown-cmark): every table
//! row must have as many cells as its header (issue 12 measured the Johnson–Neyman
//! table splitting rows), the rendered text must show no escape (`` \` ``) and no
//! stray `**`, and the references list must be exactly the works cited, sorted.

use std::path::{Path, PathBuf};
use std::process::Command;

use pulldown_cmark::{Event, Options, Parser, Tag, TagEnd};
use slopewise::report::cite::Work;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn typst_present() -> bool {
    Command::new("typst")
        .arg("--version")
        .output()
        .is_ok_and(|o| o.status.success())
}

/// Runs a plan; without typst, a stand-in writes an empty PDF so the Markdown and
/// the PDF's data file are still written (the PDF itself is tests/pdf.rs' concern).
fn run(plan: &Path, out: &Path, scratch: &Path) {
    let mut cmd = Command::new(env!("CARGO_BIN_EXE_slopewise"));
    cmd.arg("run").arg(plan).arg("--out").arg(out);
    if !typst_present() {
        let stub = scratch.join("typst-stub.sh");
        std::fs::write(
            &stub,
            "#!/bin/sh\nfor a in \"$@\"; do last=$a; done\n: > \"$last\"\n",
        )
        .unwrap();
        #[cfg(unix)]
        {
            use std::os::unix::fs::PermissionsExt;
            std::fs::set_permissions(&stub, std::fs::Permissions::from_mode(0o755)).unwrap();
        }
        cmd.env("SLOPEWISE_TYPST", &stub);
    }
    let o = cmd.output().unwrap();
    assert!(
        o.status.success(),
        "{}: {}",
        plan.display(),
        String::from_utf8_lossy(&o.stderr)
    );
}

fn demo_reports(name: &str) -> Vec<(String, PathBuf)> {
    let dir = std::env::temp_dir().join(format!("slopewise-doc-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let mut plans: Vec<PathBuf> = std::fs::read_dir(root().join("plans"))
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|e| e == "toml"))
        .collect();
    plans.sort();
    assert!(plans.len() >= 3);
    plans
        .iter()
        .map(|plan| {
            let stem = plan.file_stem().unwrap().to_string_lossy().into_owned();
            let out = dir.join(&stem);
            run(plan, &out, &dir);
            (stem, out)
        })
        .collect()
}

/// What a renderer shows: the text of every text and code event, and the cell
/// counts of every table (header first).
struct Rendered {
    text: String,
    tables: Vec<Vec<usize>>,
    /// Text before the references list, and the list's items.
    body: String,
    references: Vec<String>,
}

fn render(md: &str) -> Rendered {
    let mut r = Rendered {
        text: String::new(),
        tables: Vec::new(),
        body: String::new(),
        references: Vec::new(),
    };
    let mut cells = 0;
    let mut heading = String::new();
    let mut in_heading = false;
    let mut in_refs = false;
    let mut item: Option<String> = None;
    for ev in Parser::new_ext(md, Options::ENABLE_TABLES) {
        if matches!(ev, Event::End(_)) {
            r.text.push(' ');
            if !in_refs {
                r.body.push(' ');
            }
        }
        match ev {
            Event::Start(Tag::Table(_)) => r.tables.push(Vec::new()),
            Event::Start(Tag::TableHead) | Event::Start(Tag::TableRow) => cells = 0,
            Event::End(TagEnd::TableHead) | Event::End(TagEnd::TableRow) => {
                r.tables.last_mut().unwrap().push(cells)
            }
            Event::Start(Tag::TableCell) => cells += 1,
            Event::Start(Tag::Heading { .. }) => {
                in_heading = true;
                heading.clear();
            }
            Event::End(TagEnd::Heading(_)) => {
                in_heading = false;
                in_refs = heading == "References";
            }
            Event::Start(Tag::Item) if in_refs => item = Some(String::new()),
            Event::End(TagEnd::Item) if in_refs => r.references.push(item.take().unwrap()),
            Event::Text(s) | Event::Code(s) => {
                // A parser may cut one text at an escape: the pieces join as they
                // read, and blocks are kept apart by the space added at their end.
                r.text.push_str(&s);
                if in_heading {
                    heading.push_str(&s);
                }
                match item.as_mut() {
                    Some(i) => i.push_str(&s),
                    None if !in_refs => r.body.push_str(&s),
                    None => {}
                }
            }
            Event::SoftBreak | Event::HardBreak => {
                r.text.push(' ');
                r.body.push(' ');
            }
            _ => {}
        }
    }
    r
}

/// What every Markdown report must satisfy once rendered.
fn check_markdown(stem: &str, md: &str, min_tables: usize) {
    let r = render(md);
    assert!(
        r.tables.len() >= min_tables,
        "{stem}: {} tables",
        r.tables.len()
    );
    for (i, t) in r.tables.iter().enumerate() {
        assert!(
            t.iter().all(|&n| n == t[0]),
            "{stem}: table {i} has rows of {t:?} cells"
        );
    }
    assert!(!r.text.contains("\\`"), "{stem}: an escaped backtick shows");
    assert!(!r.text.contains("**"), "{stem}: a literal ** shows");
    assert!(!r.text.contains('`'), "{stem}: a backtick shows");
    // The references are exactly the works cited in the text, in author–year
    // order, each once.
    let cited: Vec<&str> = Work::ALL
        .iter()
        .filter(|w| r.body.contains(w.short()))
        .map(|w| w.entry())
        .collect();
    let mut sorted = cited.clone();
    sorted.sort();
    assert!(!r.references.is_empty(), "{stem}: no references");
    assert_eq!(r.references, sorted, "{stem}: references against citations");
}

#[test]
fn every_demo_report_renders_clean_tables_text_and_references() {
    let reports = demo_reports("md");
    for (stem, out) in &reports {
        let md = std::fs::read_to_string(out.join("report.md")).unwrap();
        check_markdown(stem, &md, 5);
        // The PDF's data holds the same text: no escaped backtick there either.
        if let Ok(data) = std::fs::read_to_string(out.join("report-data.json")) {
            assert!(!data.contains("\\\\`"), "{stem}: report-data.json");
            assert!(
                !data.contains('`'),
                "{stem}: report-data.json shows a backtick"
            );
        }
    }
}

#[test]
fn the_nursery_report_cites_no_work_it_does_not_use() {
    // Issue 12 measured the 2026 nursery report listing Potthoff and Dunn without
    // citing them: it uses pointwise regions and Holm adjustment.
    let reports = demo_reports("refs");
    let (_, out) = reports.iter().find(|(s, _)| s == "nursery-2026").unwrap();
    let r = render(&std::fs::read_to_string(out.join("report.md")).unwrap());
    for w in [Work::Potthoff1964, Work::Dunn1961] {
        assert!(!r.references.iter().any(|e| e == w.entry()), "{w:?} listed");
    }
    assert!(r.references.iter().any(|e| e == Work::Holm1979.entry()));
    assert!(
        r.references
            .iter()
            .any(|e| e == Work::JohnsonNeyman1936.entry())
    );
}

/// A tool's standard output, or None when it is not installed. `pdftotext` gets
/// `-` after the file, so it prints instead of writing a file beside the PDF.
fn tool(name: &str, args: &[&str], file: &Path) -> Option<String> {
    let mut cmd = Command::new(name);
    cmd.args(args).arg(file);
    if name == "pdftotext" {
        cmd.arg("-");
    }
    let o = cmd.output().ok()?;
    assert!(o.status.success(), "{name} failed on {}", file.display());
    Some(String::from_utf8_lossy(&o.stdout).into_owned())
}

#[test]
fn every_demo_pdf_is_bold_free_of_escapes_and_has_no_near_empty_page() {
    if !typst_present() {
        assert!(
            std::env::var_os("SLOPEWISE_REQUIRE_PDF_TOOLS").is_none(),
            "typst is missing and SLOPEWISE_REQUIRE_PDF_TOOLS forbids skipping"
        );
        eprintln!("note: typst is not installed; the PDF checks are skipped");
        return;
    }
    for (stem, out) in demo_reports("pdf") {
        let pdf = out.join("report.pdf");
        if !pdf.exists() {
            continue;
        }
        let Some(fonts) = tool("pdffonts", &[], &pdf) else {
            return;
        };
        assert!(
            fonts.contains("DejaVuSans-Bold"),
            "{stem}: no bold face\n{fonts}"
        );
        let text = tool("pdftotext", &["-layout"], &pdf).unwrap();
        assert!(
            text.contains("In brief"),
            "{stem}: no text read from the PDF"
        );
        assert!(!text.contains("\\`"), "{stem}: an escaped backtick shows");
        // pdftotext separates pages with a form feed; the last page may be short.
        let pages: Vec<&str> = text
            .split('\u{c}')
            .filter(|p| !p.trim().is_empty())
            .collect();
        for (i, page) in pages.iter().enumerate().take(pages.len().saturating_sub(1)) {
            let lines = page.lines().filter(|l| !l.trim().is_empty()).count();
            assert!(lines >= 8, "{stem}: page {} holds {lines} lines", i + 1);
        }
    }
}

#[test]
fn the_diff_report_renders_clean_tables_text_and_references() {
    let reports = demo_reports("diff");
    let run = |s: &str| reports.iter().find(|(x, _)| x == s).unwrap().1.clone();
    let (old, new) = (run("nursery-2025"), run("nursery-2026"));
    let md = old.parent().unwrap().join("diff.md");
    let o = Command::new(env!("CARGO_BIN_EXE_slopewise"))
        .args(["diff"])
        .args([&old, &new, &new])
        .arg("--markdown")
        .arg(&md)
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    check_markdown("diff", &std::fs::read_to_string(&md).unwrap(), 5);
}

#[test]
fn labels_differing_only_in_whitespace_stay_apart_in_every_output() {
    // Invented rows: three groups whose labels differ only in a line break, a space
    // and a doubled space.
    let dir = std::env::temp_dir().join(format!("slopewise-ws-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let mut csv = String::from("g,x,y\n");
    for (k, label) in ["\"new\nline\"", "new line", "new  line"]
        .iter()
        .enumerate()
    {
        for i in 0..6 {
            let x = i as f64;
            let y = 1.0 + k as f64 + 0.5 * x + [0.1, -0.2, 0.15, -0.05, 0.2, -0.1][i];
            csv.push_str(&format!("{label},{x},{y}\n"));
        }
    }
    std::fs::write(dir.join("d.csv"), csv).unwrap();
    let formats = if typst_present() {
        "[\"markdown\", \"json\", \"pdf\"]"
    } else {
        "[\"markdown\", \"json\"]"
    };
    std::fs::write(
        dir.join("p.toml"),
        format!(
            "title = \"ws\"\n[data]\npath = \"d.csv\"\n[model]\nresponse = \"y\"\ncovariate = \"x\"\ngroup = \"g\"\n[report]\nformats = {formats}\n"
        ),
    )
    .unwrap();
    let out = dir.join("out");
    run(&dir.join("p.toml"), &out, &dir);
    let md = render(&std::fs::read_to_string(out.join("report.md")).unwrap()).text;
    for shown in ["new\\nline", "new line", "new \\sline"] {
        assert!(md.contains(shown), "report.md lacks {shown}");
    }
    let svg = std::fs::read_to_string(out.join("figures/lines.svg")).unwrap();
    for shown in ["new\\nline", "new line", "new \\sline"] {
        assert!(svg.contains(shown), "lines.svg lacks {shown}");
    }
    if typst_present() {
        let data = std::fs::read_to_string(out.join("report-data.json")).unwrap();
        assert!(data.contains("new\\\\nline") && data.contains("new \\\\sline"));
        if let Some(text) = tool("pdftotext", &[], &out.join("report.pdf")) {
            assert!(
                text.contains("new\\nline") && text.contains("new \\sline"),
                "{text}"
            );
        }
    }
    let _ = std::fs::remove_dir_all(&dir);
}
