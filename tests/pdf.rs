//! The PDF report: text, hostile labels, determinism, and a missing typst.
//!
//! These tests need `typst` (typst-cli, the version in src/app.rs) and `pdftotext`
//! (poppler-utils). Where either is missing they say so and skip, unless
//! SLOPEWISE_REQUIRE_PDF_TOOLS is set, as `.ci/run` does: then they fail.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn tools_present() -> bool {
    let ok = |cmd: &str, arg: &str| {
        Command::new(cmd)
            .arg(arg)
            .output()
            .is_ok_and(|o| o.status.success())
    };
    let present = ok("typst", "--version") && ok("pdftotext", "-v");
    if !present {
        assert!(
            std::env::var_os("SLOPEWISE_REQUIRE_PDF_TOOLS").is_none(),
            "typst or pdftotext is missing, and SLOPEWISE_REQUIRE_PDF_TOOLS forbids skipping"
        );
        eprintln!("skipped: typst or pdftotext is not installed");
    }
    present
}

fn scratch(name: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("slopewise-pdf-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

fn run(dir: &Path, plan: &str, out: &str, envs: &[(&str, &str)]) -> Output {
    let mut cmd = Command::new(env!("CARGO_BIN_EXE_slopewise"));
    cmd.current_dir(dir).args(["run", plan, "--out", out]);
    for (k, v) in envs {
        cmd.env(k, v);
    }
    cmd.output().unwrap()
}

fn pdf_text(pdf: &Path) -> String {
    let out = Command::new("pdftotext")
        .arg(pdf)
        .arg("-")
        .output()
        .unwrap();
    assert!(out.status.success());
    String::from_utf8(out.stdout).unwrap()
}

/// Whitespace runs collapsed, so wrapped lines still match.
fn squash(s: &str) -> String {
    s.split_whitespace().collect::<Vec<_>>().join(" ")
}

/// Markdown source with backslash escapes removed: what a renderer shows.
fn unescape_markdown(s: &str) -> String {
    let mut out = String::new();
    let mut chars = s.chars().peekable();
    while let Some(c) = chars.next() {
        if c == '\\' && chars.peek().is_some_and(|n| n.is_ascii_punctuation()) {
            out.push(chars.next().unwrap());
        } else {
            out.push(c);
        }
    }
    out
}

const HOSTILE: [&str; 6] = [
    "#read(\"/etc/passwd\")",
    "a*b_c$d",
    "<b>bold</b>",
    "[x](y)|z",
    "back\\slash@home",
    "plain",
];

/// Invented data: six groups with hostile labels, two hostile column names.
fn hostile_case(dir: &Path) {
    let mut csv = String::from("\"<i>mass</i> #g\",\"len_$[cm]\",grp\n");
    for (gi, label) in HOSTILE.iter().enumerate() {
        for i in 0..8 {
            let x = 1.0 + i as f64;
            let e = [0.3, -0.2, 0.1, -0.4, 0.2, 0.0, -0.1, 0.25][i];
            let y = 2.0 + gi as f64 + (1.0 + 0.1 * gi as f64) * x + e;
            let quoted = label.replace('"', "\"\"");
            csv.push_str(&format!("{y},{x},\"{quoted}\"\n"));
        }
    }
    std::fs::write(dir.join("data.csv"), csv).unwrap();
    std::fs::write(
        dir.join("plan.toml"),
        "title = \"Hostile #labels <test> (invented data)\"\n[data]\npath = \"data.csv\"\n[model]\nresponse = \"<i>mass</i> #g\"\ncovariate = \"len_$[cm]\"\ngroup = \"grp\"\n[report]\nformats = [\"markdown\", \"json\", \"pdf\"]\n",
    )
    .unwrap();
}

#[test]
fn the_pdf_holds_the_report_and_matches_the_markdown() {
    if !tools_present() {
        return;
    }
    let dir = scratch("demo");
    let plan = Path::new(env!("CARGO_MANIFEST_DIR")).join("plans/nursery-2026.toml");
    let o = run(&dir, plan.to_str().unwrap(), "out", &[]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let text = squash(&pdf_text(&dir.join("out/report.pdf")));
    let json: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(dir.join("out/results.json")).unwrap())
            .unwrap();
    let md = std::fs::read_to_string(dir.join("out/report.md")).unwrap();
    assert!(text.contains(json["title"].as_str().unwrap()), "title");
    for g in json["groups"].as_array().unwrap() {
        assert!(text.contains(g["level"].as_str().unwrap()), "group {g}");
    }
    // The gate's F and p exactly as the Markdown prints them.
    let line = md
        .lines()
        .find(|l| l.starts_with("Separate lines against parallel lines: F = "))
        .unwrap();
    let f_and_p = line
        .trim_start_matches("Separate lines against parallel lines: ")
        .split(';')
        .next()
        .unwrap();
    assert!(text.contains(f_and_p), "PDF lacks `{f_and_p}`");
    assert!(text.contains("professional judgement"));
    assert!(text.contains("Where these numbers came from"));
    // Provenance is on every page's footer.
    let pages = pdf_text(&dir.join("out/report.pdf"))
        .matches('\u{c}')
        .count()
        .max(1);
    let footers = text
        .matches(&format!(
            "plan SHA-256 {}",
            &json["provenance"]["plan_sha256"].as_str().unwrap()[..16]
        ))
        .count();
    assert!(footers >= pages, "{footers} footers on {pages} pages");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn hostile_labels_print_literally_and_run_nothing() {
    if !tools_present() {
        return;
    }
    let dir = scratch("hostile");
    hostile_case(&dir);
    let o = run(&dir, "plan.toml", "out", &[]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let pdf = squash(&pdf_text(&dir.join("out/report.pdf")));
    let md = unescape_markdown(&std::fs::read_to_string(dir.join("out/report.md")).unwrap());
    for label in HOSTILE.iter().chain(&["<i>mass</i> #g", "len_$[cm]"]) {
        assert!(pdf.contains(label), "PDF lacks {label}");
        assert!(md.contains(label), "Markdown lacks {label}");
    }
    // Nothing was read from the file system: /etc/passwd starts with root's entry.
    assert!(!pdf.contains("root:"), "the PDF shows file contents");
    let svg = std::fs::read_to_string(dir.join("out/figures/lines.svg")).unwrap_or_default();
    assert!(!svg.contains("<b>bold</b>"), "raw markup in an SVG");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn two_runs_give_identical_pdf_and_figures() {
    if !tools_present() {
        return;
    }
    let dir = scratch("twice");
    hostile_case(&dir);
    for out in ["a", "b"] {
        let o = run(&dir, "plan.toml", out, &[]);
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    }
    let mut compared = 0;
    for entry in walk(&dir.join("a")) {
        let rel = entry.strip_prefix(dir.join("a")).unwrap();
        let other = dir.join("b").join(rel);
        assert_eq!(
            std::fs::read(&entry).unwrap(),
            std::fs::read(&other).unwrap(),
            "{}",
            rel.display()
        );
        compared += 1;
    }
    assert!(compared >= 6, "{compared} files");
    assert!(dir.join("a/report.pdf").exists());
    let _ = std::fs::remove_dir_all(&dir);
}

fn walk(dir: &Path) -> Vec<PathBuf> {
    let mut out = Vec::new();
    for e in std::fs::read_dir(dir).unwrap() {
        let p = e.unwrap().path();
        if p.is_dir() {
            out.extend(walk(&p))
        } else {
            out.push(p)
        }
    }
    out.sort();
    out
}

#[test]
fn without_typst_the_other_outputs_are_written_and_the_run_fails() {
    let dir = scratch("no-typst");
    hostile_case(&dir);
    let o = run(
        &dir,
        "plan.toml",
        "out",
        &[("SLOPEWISE_TYPST", "/nonexistent/typst")],
    );
    assert!(!o.status.success());
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("the PDF was not written: the `typst` program was not found"),
        "{err}"
    );
    assert!(
        err.contains("cargo install typst-cli --version 0.15.1 --locked"),
        "{err}"
    );
    assert!(!err.contains("panicked"));
    assert!(dir.join("out/report.md").exists() && dir.join("out/results.json").exists());
    assert!(!dir.join("out/report.pdf").exists());
    assert!(!dir.join("out/.fonts").exists());
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_failing_typst_shows_its_message() {
    let dir = scratch("bad-typst");
    hostile_case(&dir);
    // A stand-in typst that fails with a message of its own.
    let fake = dir.join("fake-typst");
    std::fs::write(
        &fake,
        "#!/bin/sh\necho 'error: something broke in typst' >&2\nexit 3\n",
    )
    .unwrap();
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        std::fs::set_permissions(&fake, std::fs::Permissions::from_mode(0o755)).unwrap();
    }
    let o = run(
        &dir,
        "plan.toml",
        "out",
        &[("SLOPEWISE_TYPST", fake.to_str().unwrap())],
    );
    assert!(!o.status.success());
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(err.contains("typst failed"), "{err}");
    assert!(err.contains("error: something broke in typst"), "{err}");
    let _ = std::fs::remove_dir_all(&dir);
}
