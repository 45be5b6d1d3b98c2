//! A small harness for the command-line tests.
//!
//! Each test states its input files (plan and CSV text), the command line, the
//! fragments stderr must contain and how the run must end; the harness runs the
//! real binary in a fresh folder and checks what every run owes its user whatever
//! the case: no panic, and on failure nothing written or touched (no report folder,
//! no hidden `.NAME.partial-*` staging folder, no input changed). That keeps each
//! test down to the few lines that say what is specific to it.

// Each test binary uses only part of the harness.
#![allow(dead_code)]

use std::collections::BTreeMap;
use std::fs;
use std::path::{Path, PathBuf};
use std::process::{Command, ExitStatus};

/// Invented data for these tests (no real measurements): leaf length (cm) and
/// leaf mass (g) of five leaves on each of three hillside plots. Every plot has
/// enough rows and spread in `length_cm` to carry a line of its own.
pub const THREE_PLOTS: &str = "\
plot,length_cm,mass_g
north,4.0,1.12
north,5.5,1.58
north,7.0,2.05
north,8.5,2.41
north,10.0,2.95
ridge,4.5,1.71
ridge,6.0,2.10
ridge,7.5,2.66
ridge,9.0,3.02
ridge,10.5,3.55
south,3.5,0.82
south,5.0,1.31
south,6.5,1.69
south,8.0,2.22
south,9.5,2.57
";

/// The plan most tests start from: `THREE_PLOTS` in `data.csv`, reports in `out`.
/// `model.response` sits at line 7, column 12.
pub const BASE_PLAN: &str = r#"
    title = "Leaf mass by hillside plot (invented test data)"

    [data]
    path = "data.csv"

    [model]
    response = "mass_g"
    covariate = "length_cm"
    group = "plot"

    [report]
    out = "out"
"#;

/// How the run must end.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Expect {
    /// Exit status 0.
    Success,
    /// Non-zero exit status, and the folder exactly as the test left it.
    Failure,
    /// Non-zero exit status, but some outputs may be written (several plans, one
    /// failing).
    FailureWithOutputs,
}

/// One run of `slopewise`, described before it happens.
#[must_use = "a test does nothing until .run()"]
pub struct Test {
    name: String,
    files: Vec<(String, Vec<u8>)>,
    args: Vec<String>,
    expect: Option<Expect>,
    stderr: Vec<String>,
    stdout: Vec<String>,
}

impl Test {
    /// A run named `name` (unique among the tests: it names the folder), with the
    /// command line `slopewise run plan.toml` run from that folder.
    pub fn new(name: &str) -> Self {
        Test {
            name: name.to_string(),
            files: Vec::new(),
            args: vec!["run".into(), "plan.toml".into()],
            expect: None,
            stderr: Vec::new(),
            stdout: Vec::new(),
        }
    }

    /// Writes `text` (unindented) as `plan.toml`.
    pub fn plan(self, text: &str) -> Self {
        self.file("plan.toml", unindent(text))
    }

    /// Writes `text` (unindented) as `data.csv`.
    pub fn data(self, text: &str) -> Self {
        self.file("data.csv", unindent(text))
    }

    /// Writes `bytes` exactly as given at `path` (relative to the test folder).
    pub fn file(mut self, path: &str, bytes: impl AsRef<[u8]>) -> Self {
        self.files.push((path.to_string(), bytes.as_ref().to_vec()));
        self
    }

    /// Replaces the command line (everything after the program name).
    pub fn args(mut self, args: &[&str]) -> Self {
        self.args = args.iter().map(|a| a.to_string()).collect();
        self
    }

    /// The run must exit with status 0.
    pub fn succeeds(mut self) -> Self {
        self.expect = Some(Expect::Success);
        self
    }

    /// The run must exit non-zero and leave the folder exactly as it found it.
    pub fn fails(mut self) -> Self {
        self.expect = Some(Expect::Failure);
        self
    }

    /// The run must exit non-zero; outputs of plans that did run may appear.
    pub fn fails_with_outputs(mut self) -> Self {
        self.expect = Some(Expect::FailureWithOutputs);
        self
    }

    /// Fragments that must all appear in stderr.
    pub fn stderr_has(mut self, fragments: &[&str]) -> Self {
        self.stderr.extend(fragments.iter().map(|f| f.to_string()));
        self
    }

    /// Fragments that must all appear in stdout.
    pub fn stdout_has(mut self, fragments: &[&str]) -> Self {
        self.stdout.extend(fragments.iter().map(|f| f.to_string()));
        self
    }

    /// Runs the binary and checks everything stated, plus the checks every run owes.
    pub fn run(self) -> Outcome {
        let expect = self
            .expect
            .expect("state how the run ends: .succeeds(), .fails() or .fails_with_outputs()");
        let dir = std::env::temp_dir().join(format!(
            "slopewise-cli-{}-{}",
            self.name,
            std::process::id()
        ));
        if dir.exists() {
            fs::remove_dir_all(&dir).expect("clear a stale test folder");
        }
        fs::create_dir_all(&dir).expect("create the test folder");
        for (path, bytes) in &self.files {
            let path = dir.join(path);
            if let Some(parent) = path.parent() {
                fs::create_dir_all(parent).expect("create a folder for an input file");
            }
            fs::write(&path, bytes).expect("write an input file");
        }
        let before = snapshot(&dir);

        let output = Command::new(env!("CARGO_BIN_EXE_slopewise"))
            .args(&self.args)
            .current_dir(&dir)
            .output()
            .expect("run the slopewise binary");
        let outcome = Outcome {
            dir: dir.clone(),
            status: output.status,
            stdout: String::from_utf8_lossy(&output.stdout).into_owned(),
            stderr: String::from_utf8_lossy(&output.stderr).into_owned(),
        };
        let context = format!(
            "test folder: {}\nstatus: {:?}\n--- stdout ---\n{}\n--- stderr ---\n{}",
            dir.display(),
            outcome.status,
            outcome.stdout,
            outcome.stderr
        );

        assert!(
            !outcome.stderr.contains("panicked"),
            "the run panicked\n{context}"
        );
        match expect {
            Expect::Success => assert!(
                outcome.status.success(),
                "expected exit status 0\n{context}"
            ),
            Expect::Failure | Expect::FailureWithOutputs => assert!(
                outcome.status.code().is_some_and(|c| c != 0),
                "expected a non-zero exit status (and no signal)\n{context}"
            ),
        }
        for fragment in &self.stderr {
            assert!(
                outcome.stderr.contains(fragment.as_str()),
                "stderr lacks {fragment:?}\n{context}"
            );
        }
        for fragment in &self.stdout {
            assert!(
                outcome.stdout.contains(fragment.as_str()),
                "stdout lacks {fragment:?}\n{context}"
            );
        }
        let after = snapshot(&dir);
        let leftovers: Vec<&PathBuf> = after
            .keys()
            .filter(|p| {
                p.file_name()
                    .and_then(|n| n.to_str())
                    .is_some_and(|n| n.contains(".partial-") || n.contains(".previous-"))
            })
            .collect();
        assert!(
            leftovers.is_empty(),
            "staging folders left behind: {leftovers:?}\n{context}"
        );
        if expect == Expect::Failure {
            let added: Vec<&PathBuf> = after.keys().filter(|p| !before.contains_key(*p)).collect();
            let changed: Vec<&PathBuf> = before
                .iter()
                .filter(|(p, bytes)| after.get(*p) != Some(bytes))
                .map(|(p, _)| p)
                .collect();
            assert!(
                added.is_empty() && changed.is_empty(),
                "a failed run must write nothing; added {added:?}, changed or removed {changed:?}\n{context}"
            );
            assert!(
                !outcome.stdout.contains("wrote"),
                "a failed run must not claim to have written anything\n{context}"
            );
        }
        outcome
    }
}

/// What a run left: its status, its output streams and its folder.
///
/// The folder is removed when the outcome is dropped, unless the test is failing,
/// so a failing test's files stay for a look.
pub struct Outcome {
    /// The test folder (the run's working directory).
    pub dir: PathBuf,
    /// Exit status.
    pub status: ExitStatus,
    /// Standard output.
    pub stdout: String,
    /// Standard error.
    pub stderr: String,
}

impl Outcome {
    /// Whether `path` (relative to the test folder) exists.
    pub fn exists(&self, path: &str) -> bool {
        self.dir.join(path).exists()
    }

    /// The text of `path`, relative to the test folder.
    pub fn read(&self, path: &str) -> String {
        let full = self.dir.join(path);
        fs::read_to_string(&full).unwrap_or_else(|e| panic!("read {}: {e}", full.display()))
    }

    /// `path` parsed as JSON.
    pub fn json(&self, path: &str) -> serde_json::Value {
        serde_json::from_str(&self.read(path))
            .unwrap_or_else(|e| panic!("{path} is not valid JSON: {e}"))
    }

    /// The entries of the folder `path` (relative to the test folder), sorted.
    pub fn entries(&self, path: &str) -> Vec<String> {
        let full = self.dir.join(path);
        let mut names: Vec<String> = fs::read_dir(&full)
            .unwrap_or_else(|e| panic!("list {}: {e}", full.display()))
            .map(|e| e.expect("read a folder entry").file_name())
            .map(|n| n.to_string_lossy().into_owned())
            .collect();
        names.sort();
        names
    }
}

impl Drop for Outcome {
    fn drop(&mut self) {
        if !std::thread::panicking() {
            let _ = fs::remove_dir_all(&self.dir);
        }
    }
}

/// Every path under `dir` (relative), with a file's bytes or `None` for a folder.
fn snapshot(dir: &Path) -> BTreeMap<PathBuf, Option<Vec<u8>>> {
    fn walk(root: &Path, dir: &Path, out: &mut BTreeMap<PathBuf, Option<Vec<u8>>>) {
        for entry in fs::read_dir(dir).expect("list the test folder") {
            let path = entry.expect("read a folder entry").path();
            let rel = path
                .strip_prefix(root)
                .expect("path under root")
                .to_path_buf();
            if path.is_dir() {
                out.insert(rel, None);
                walk(root, &path, out);
            } else {
                out.insert(rel, Some(fs::read(&path).expect("read a file")));
            }
        }
    }
    let mut out = BTreeMap::new();
    walk(dir, dir, &mut out);
    out
}

/// Lets tests write file texts indented like the code around them: drops a first
/// line break, then the indentation (spaces) common to all non-blank lines, and
/// ends the text with exactly one line break. Text without indentation comes back as is.
pub fn unindent(text: &str) -> String {
    let text = text.strip_prefix('\n').unwrap_or(text);
    let indent = text
        .lines()
        .filter(|l| !l.trim().is_empty())
        .map(|l| l.len() - l.trim_start_matches(' ').len())
        .min()
        .unwrap_or(0);
    let mut out: String = text
        .lines()
        .map(|l| l.get(indent..).unwrap_or(""))
        .collect::<Vec<_>>()
        .join("\n");
    let trimmed = out.trim_end_matches('\n').len();
    out.truncate(trimmed);
    out.push('\n');
    out
}

#[test]
fn unindent_keeps_line_numbers_of_the_stated_text() {
    assert_eq!(unindent("\n    a = 1\n\n      b\n    "), "a = 1\n\n  b\n");
    assert_eq!(unindent(THREE_PLOTS), THREE_PLOTS);
}
