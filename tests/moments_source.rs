//! `data.moments`: per-group moments instead of rows. The moments files in
//! tests/reference/data were written by tests/reference/generate_moments.py from the
//! invented demo data, exactly (Python fractions, one rounding to the nearest
//! double), so the fits, the gate, the comparisons, the pooling and the limits from
//! them must agree with the run on the rows to rounding (1e-12 relative; the rows'
//! residual sums come from the residuals, the moments' from Syy − Sxy²/Sxx).

use std::path::{Path, PathBuf};

use serde_json::Value;
use slopewise::plan::Plan;
use slopewise::results::{Provenance, Results};
use slopewise::{analysis, data, plan};

fn root() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).to_path_buf()
}

fn reference(file: &str) -> Vec<u8> {
    std::fs::read(root().join("tests/reference/data").join(file)).unwrap()
}

fn demo(file: &str) -> Vec<u8> {
    std::fs::read(root().join("demo-data").join(file)).unwrap()
}

fn plan_text(data_line: &str, rest: &str) -> String {
    format!("title = \"Moments (invented demo data)\"\n[data]\n{data_line}\n{rest}")
}

const NURSERY: &str = "[[data.keep]]\ncolumn = \"status\"\nequals = \"measured\"\n[model]\nresponse = \"dry_mass_g\"\ncovariate = \"height_cm\"\ngroup = \"bed\"\n[tests]\ncomparisons = \"holm\"\ncompare_at = [25.0, 30.0]\n";
const STABILITY: &str = "[model]\nresponse = \"assay_pct\"\ncovariate = \"months\"\ngroup = \"lot\"\n[limits]\nlower = 95.0\n[tests]\nprocedure = \"lot-pooling\"\ncompare_at = [6.0]\n";

fn load(text: &str) -> Plan {
    plan::load("plan.toml", text).unwrap()
}

fn run(plan: &Plan, dataset: &data::Dataset) -> Results {
    analysis::run(plan, dataset, Provenance::default()).unwrap()
}

/// Walks two results.json trees: the same keys and texts, numbers within `tol`
/// relative.
fn agree(a: &Value, b: &Value, path: &str, tol: f64, bad: &mut Vec<String>) {
    match (a, b) {
        (Value::Number(x), Value::Number(y)) => {
            let (x, y) = (x.as_f64().unwrap(), y.as_f64().unwrap());
            if (x - y).abs() > tol * x.abs().max(y.abs()) {
                bad.push(format!("{path}: {x} vs {y}"));
            }
        }
        (Value::Object(x), Value::Object(y)) => {
            for (k, v) in x {
                match y.get(k) {
                    Some(w) => agree(v, w, &format!("{path}.{k}"), tol, bad),
                    None => bad.push(format!("{path}.{k}: absent from the second")),
                }
            }
            for k in y.keys().filter(|k| !x.contains_key(*k)) {
                bad.push(format!("{path}.{k}: absent from the first"));
            }
        }
        // An interval's ends are judged on the interval's scale: an end near zero is
        // the difference of an estimate and a half-width, each good to 1e-12 of
        // itself. A Johnson–Neyman bound far outside the data is a root where the
        // quadratic is flat, so its digits are fewer: 1e-11 there.
        (Value::Array(x), Value::Array(y))
            if x.len() == 2 && y.len() == 2 && x.iter().chain(y).all(Value::is_number) =>
        {
            let f = |v: &Value| v.as_f64().unwrap();
            let scale = x.iter().chain(y).map(|v| f(v).abs()).fold(0.0, f64::max);
            let tol = if path.ends_with(".bounds") {
                1e-11
            } else {
                tol
            };
            for i in 0..2 {
                if (f(&x[i]) - f(&y[i])).abs() > tol * scale {
                    bad.push(format!("{path}[{i}]: {} vs {}", x[i], y[i]));
                }
            }
        }
        (Value::Array(x), Value::Array(y)) if x.len() == y.len() => {
            for (i, (v, w)) in x.iter().zip(y).enumerate() {
                agree(v, w, &format!("{path}[{i}]"), tol, bad);
            }
        }
        _ if a == b => {}
        _ => bad.push(format!("{path}: {a} vs {b}")),
    }
}

/// What the moments cannot give, or give differently by design: the checks on
/// residuals, the rows' account, the warnings and the decision's words about them.
const BY_DESIGN: [&str; 6] = [
    "checks",
    "data",
    "warnings",
    "decision",
    "sensitivity",
    "provenance",
];

fn compare(rows: &Results, moments: &Results) {
    compare_within(rows, moments, 1e-12);
}

fn compare_within(rows: &Results, moments: &Results, tol: f64) {
    let mut a = serde_json::to_value(rows).unwrap();
    let mut b = serde_json::to_value(moments).unwrap();
    for key in BY_DESIGN {
        a.as_object_mut().unwrap().remove(key);
        b.as_object_mut().unwrap().remove(key);
    }
    let mut bad = Vec::new();
    agree(&a, &b, "results", tol, &mut bad);
    assert!(
        bad.is_empty(),
        "{} differences:\n{}",
        bad.len(),
        bad.join("\n")
    );
    // The decision itself is the same.
    assert_eq!(rows.decision.homogeneous, moments.decision.homogeneous);
    assert_eq!(rows.decision.lead, moments.decision.lead);
    assert_eq!(rows.data.rows_used, moments.data.rows_used);
}

#[test]
fn nursery_moments_give_the_fits_gate_and_regions_of_the_rows() {
    let rows_plan = load(&plan_text("path = \"nursery-2026.csv\"", NURSERY));
    let from_rows = run(
        &rows_plan,
        &data::load(&rows_plan, &demo("nursery-2026.csv")).unwrap(),
    );
    let m_plan = load(&plan_text("moments = \"nursery_moments.csv\"", NURSERY));
    let dataset = data::load_moments(&m_plan, &reference("nursery_moments.csv")).unwrap();
    assert!(dataset.from_moments);
    let from_moments = run(&m_plan, &dataset);
    // The demo's slopes differ, so regions and differences at values are compared too.
    assert!(!from_rows.decision.homogeneous);
    assert!(!from_rows.regions.is_empty());
    compare(&from_rows, &from_moments);
    // What could not run is said, in results.json and in the summary's findings.
    assert_eq!(
        from_moments.checks.not_run,
        ["normality", "equal_variance", "influence"]
    );
    assert!(from_rows.checks.not_run.is_empty());
    assert_eq!(from_moments.data.source.as_deref(), Some("moments"));
    assert!(
        from_moments
            .decision
            .findings
            .iter()
            .any(|f| f.check == "not-checked")
    );
}

#[test]
fn stability_moments_as_csv_and_parquet_give_the_pooling_and_limits_of_the_rows() {
    let rows_plan = load(&plan_text("path = \"stability.csv\"", STABILITY));
    let from_rows = run(
        &rows_plan,
        &data::load(&rows_plan, &demo("stability-lots-2026.csv")).unwrap(),
    );
    assert!(from_rows.pooling.is_some() && !from_rows.limits.is_empty());
    for file in ["stability_moments.csv", "stability_moments.parquet"] {
        let m_plan = load(&plan_text(&format!("moments = \"{file}\""), STABILITY));
        let from_moments = run(
            &m_plan,
            &data::load_moments(&m_plan, &reference(file)).unwrap(),
        );
        compare(&from_rows, &from_moments);
    }
}

#[test]
fn without_compare_at_the_moments_compare_the_lines_at_the_mean() {
    let text = NURSERY.replace("compare_at = [25.0, 30.0]\n", "");
    let m_plan = load(&plan_text("moments = \"nursery_moments.csv\"", &text));
    let r = run(
        &m_plan,
        &data::load_moments(&m_plan, &reference("nursery_moments.csv")).unwrap(),
    );
    assert_eq!(r.model.compare_at_rule, "mean");
    let at: Vec<f64> = r.differences_at.iter().map(|d| d.at).collect();
    assert!(at.iter().all(|a| *a == r.covariate_mean), "{at:?}");
    assert!(r.warnings.iter().any(|w| w.contains("tests.compare_at")));
}

/// One moments file edited, and the error it must give.
fn refused(edit: impl Fn(&str) -> String) -> String {
    let text = String::from_utf8(reference("stability_moments.csv")).unwrap();
    let m_plan = load(&plan_text("moments = \"m.csv\"", STABILITY));
    match data::load_moments(&m_plan, edit(&text).as_bytes()) {
        Ok(_) => panic!("accepted:\n{}", edit(&text)),
        Err(e) => e.diagnostic().render(),
    }
}

/// The second line's field `k` replaced by `value`.
fn set(text: &str, k: usize, value: &str) -> String {
    let mut lines: Vec<String> = text.lines().map(str::to_string).collect();
    let mut fields: Vec<&str> = lines[1].split(',').collect();
    fields[k] = value;
    lines[1] = fields.join(",");
    lines.join("\n") + "\n"
}

/// An edit of a moments file's text.
type Edit = Box<dyn Fn(&str) -> String>;

#[test]
fn impossible_moments_are_refused_at_their_cell() {
    let cases: [(Edit, &[&str]); 8] = [
        (
            Box::new(|t| set(t, 4, "-1.5")),
            &["data row 1", "`sxx`", "cannot be negative"],
        ),
        (
            Box::new(|t| set(t, 5, "-0.1")),
            &["`syy`", "cannot be negative"],
        ),
        (
            Box::new(|t| set(t, 1, "2")),
            &["`n`", "2 rows", "at least 3"],
        ),
        (Box::new(|t| set(t, 1, "2.5")), &["`n`", "whole number"]),
        (
            Box::new(|t| set(t, 6, "-500")),
            &["`sxy`", "which no data can give"],
        ),
        (
            Box::new(|t| set(t, 2, "30")),
            &["`mean_x`", "outside the range"],
        ),
        (
            Box::new(|t| set(t, 3, "abc")),
            &["`mean_y`", "not a number"],
        ),
        (
            Box::new(|t| {
                let second = t.lines().nth(1).unwrap().to_string();
                format!("{t}{second}\n")
            }),
            &["`group`", "TB-2601", "has a row already (data row 1)"],
        ),
    ];
    for (edit, words) in cases {
        let message = refused(edit);
        for w in words {
            assert!(message.contains(w), "{w:?} not in: {message}");
        }
    }
    let missing = refused(|t| t.replacen("sxy", "cov", 1));
    assert!(
        missing.contains("lacks the column(s) `sxy`") && missing.contains("has others: `cov`"),
        "{missing}"
    );
    let only_header = refused(|t| t.lines().next().unwrap().to_string() + "\n");
    assert!(only_header.contains("no data rows"), "{only_header}");
}

#[test]
fn options_that_need_rows_are_plan_errors_with_a_moments_file() {
    let cases = [
        (
            plan_text(
                "moments = \"m.csv\"",
                &STABILITY.replace("[tests]\n", "[tests]\ncovariance = \"hc3\"\n"),
            ),
            "needs every residual",
            "covariance",
        ),
        (
            plan_text(
                "moments = \"m.csv\"",
                &format!("{STABILITY}[checks]\nsensitivity = true\n"),
            ),
            "gives no rows",
            "sensitivity",
        ),
        (
            plan_text("moments = \"m.csv\"\npath = \"d.csv\"", STABILITY),
            "both `path` and `moments`",
            "path",
        ),
        (
            plan_text("", STABILITY),
            "neither `path` nor `moments`",
            "[data]",
        ),
        (
            plan_text("moments = \"m.xlsx\"", STABILITY),
            "must name a CSV or Parquet file",
            "m.xlsx",
        ),
        (
            plan_text("moments = \"m.csv\"\nmissing = [\"NA\"]", STABILITY),
            "data.missing applies to rows",
            "missing",
        ),
    ];
    for (text, words, at) in cases {
        let e = plan::load("plan.toml", &text).expect_err(&text);
        let shown = e.diagnostic().render();
        assert!(shown.contains(words), "{words:?} not in: {shown}");
        // The message points at the key: its line is quoted in the snippet.
        assert!(shown.contains(at), "{at:?} not in: {shown}");
    }
}

/// The scratch database of the PostgreSQL tests: `SLOPEWISE_PG_DATABASE`, default
/// `slopewise_test` (`.ci/run` creates it). Connection through the standard
/// libpq environment variables (PGHOST, PGUSER, ...), never a password here.
fn pg_database() -> String {
    std::env::var("SLOPEWISE_PG_DATABASE").unwrap_or_else(|_| "slopewise_test".into())
}

/// `psql` on the scratch database with `script` on stdin; its stdout, or None when
/// no server answers (the caller skips, or fails under SLOPEWISE_REQUIRE_POSTGRES).
fn psql(script: &str, csv: bool) -> Result<String, String> {
    use std::io::Write;
    let mut cmd = std::process::Command::new("psql");
    cmd.args(["-X", "-q", "-v", "ON_ERROR_STOP=1", "-d", &pg_database()]);
    if csv {
        cmd.arg("--csv");
    }
    let mut child = cmd
        .stdin(std::process::Stdio::piped())
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .map_err(|e| format!("cannot start psql: {e}"))?;
    child
        .stdin
        .take()
        .unwrap()
        .write_all(script.as_bytes())
        .unwrap();
    let out = child.wait_with_output().unwrap();
    if out.status.success() {
        Ok(String::from_utf8(out.stdout).unwrap())
    } else {
        Err(String::from_utf8_lossy(&out.stderr).into_owned())
    }
}

/// True when a server answers; otherwise says why the test skips, or panics when
/// CI requires the server.
fn postgres_available(test: &str) -> bool {
    match psql("SELECT 1;", false) {
        Ok(_) => true,
        Err(why) => {
            assert!(
                std::env::var_os("SLOPEWISE_REQUIRE_POSTGRES").is_none(),
                "SLOPEWISE_REQUIRE_POSTGRES is set but PostgreSQL does not answer: {why}"
            );
            eprintln!(
                "{test}: skipped, no PostgreSQL server answers ({})",
                why.trim()
            );
            false
        }
    }
}

#[test]
fn postgres_runs_the_printed_query_to_the_moments_of_the_rows_with_hostile_names() {
    if !postgres_available("postgres_runs_the_printed_query") {
        return;
    }
    // The demo data with a group column and a label that would end a quoted name or
    // literal and start a statement, were they pasted into SQL unquoted.
    let group = "bed\"; DROP TABLE seedlings; --";
    let label = "north'1; DROP TABLE seedlings; --";
    let csv = String::from_utf8(demo("nursery-2026.csv"))
        .unwrap()
        .replacen("bed", &format!("\"{}\"", group.replace('"', "\"\"")), 1)
        .replace("north-1", label);
    let quoted_group = format!("\"{}\"", group.replace('"', "\"\""));
    let table = format!("seedlings_{}", std::process::id());
    // Loaded as text, then typed with the plan's missing tokens as null: a database
    // column holds numbers or null, never "NA".
    let numeric =
        |c: &str| format!("CAST(NULLIF(NULLIF(TRIM({c}), ''), 'NA') AS DOUBLE PRECISION)");
    let setup = format!(
        "CREATE TEMP TABLE raw (tray TEXT, grp TEXT, height_cm TEXT, dry_mass_g TEXT, status TEXT);\n\
         COPY raw FROM STDIN WITH (FORMAT csv, HEADER true);\n{}\\.\n\
         CREATE TABLE {table} AS SELECT tray, NULLIF(NULLIF(TRIM(grp), ''), 'NA') AS {quoted_group}, {} AS height_cm, {} AS dry_mass_g, status FROM raw;\n",
        csv,
        numeric("height_cm"),
        numeric("dry_mass_g"),
    );
    psql(&setup, false).unwrap();
    let plan_toml = plan_text(
        "moments = \"m.csv\"",
        &NURSERY.replace(
            "group = \"bed\"",
            &format!("group = {}", toml_string(group)),
        ),
    );
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("plan.toml"), &plan_toml).unwrap();
    let printed = std::process::Command::new(env!("CARGO_BIN_EXE_slopewise"))
        .args([
            "sql",
            "plan.toml",
            "--dialect",
            "postgres",
            "--table",
            &table,
        ])
        .current_dir(dir.path())
        .output()
        .unwrap();
    assert!(
        printed.status.success(),
        "{}",
        String::from_utf8_lossy(&printed.stderr)
    );
    let query = String::from_utf8(printed.stdout).unwrap();
    let result = psql(&query, true);
    // The table is still there: nothing in the names ran as a statement.
    let count = psql(
        &format!("SELECT count(*) FROM {table};\nDROP TABLE {table};"),
        true,
    );
    let moments = result.unwrap();
    let count = count.unwrap();

    let m_plan = load(&plan_toml);
    let from_engine = run(
        &m_plan,
        &data::load_moments(&m_plan, moments.as_bytes()).unwrap(),
    );
    let rows_plan = load(&plan_toml.replace("moments = \"m.csv\"", "path = \"d.csv\""));
    let from_rows = run(&rows_plan, &data::load(&rows_plan, csv.as_bytes()).unwrap());
    assert!(from_rows.groups.iter().any(|g| g.level == label));
    assert_eq!(
        count.lines().nth(1),
        Some(from_rows.data.rows_read.to_string().as_str())
    );
    compare(&from_rows, &from_engine);
}

/// A TOML basic string.
fn toml_string(s: &str) -> String {
    format!("\"{}\"", s.replace('\\', "\\\\").replace('"', "\\\""))
}

#[test]
fn a_bad_moments_file_through_the_binary_fails_and_writes_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let text = String::from_utf8(reference("stability_moments.csv")).unwrap();
    std::fs::write(dir.path().join("m.csv"), set(&text, 4, "-2")).unwrap();
    let plan = plan_text(
        "moments = \"m.csv\"",
        &format!("{STABILITY}[report]\nformats = [\"markdown\", \"json\"]\nout = \"out\"\n"),
    );
    std::fs::write(dir.path().join("plan.toml"), plan).unwrap();
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_slopewise"))
        .args(["run", "plan.toml"])
        .current_dir(dir.path())
        .output()
        .unwrap();
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(!out.status.success());
    assert!(
        stderr.contains("m.csv") && stderr.contains("`sxx`"),
        "{stderr}"
    );
    assert!(!dir.path().join("out").exists());
    // The same plan with the file as written runs.
    std::fs::write(dir.path().join("m.csv"), &text).unwrap();
    let ok = std::process::Command::new(env!("CARGO_BIN_EXE_slopewise"))
        .args(["run", "plan.toml"])
        .current_dir(dir.path())
        .output()
        .unwrap();
    assert!(
        ok.status.success(),
        "{}",
        String::from_utf8_lossy(&ok.stderr)
    );
    let results = std::fs::read_to_string(dir.path().join("out/results.json")).unwrap();
    assert!(results.contains("\"not_run\"") && results.contains("\"source\": \"moments\""));
}

/// True when python3 has pyspark and a Java runtime is present; otherwise says why
/// the test skips, or panics when CI requires Spark (`SLOPEWISE_REQUIRE_SPARK`).
fn spark_available(test: &str) -> bool {
    let ok = std::process::Command::new("python3")
        .args(["-c", "import pyspark"])
        .output()
        .is_ok_and(|o| o.status.success())
        && std::process::Command::new("java")
            .arg("-version")
            .output()
            .is_ok_and(|o| o.status.success());
    if !ok {
        assert!(
            std::env::var_os("SLOPEWISE_REQUIRE_SPARK").is_none(),
            "SLOPEWISE_REQUIRE_SPARK is set but python3 cannot import pyspark or java is missing"
        );
        eprintln!("{test}: skipped, needs python3 with pyspark and a Java runtime");
    }
    ok
}

#[test]
fn spark_runs_the_printed_query_to_the_moments_of_the_rows_with_hostile_names() {
    if !spark_available("spark_runs_the_printed_query") {
        return;
    }
    // A group column that would end a backquoted name, a label and a filter value
    // that would end a literal (a quote, and a backslash that Spark reads as an
    // escape), were they pasted in unquoted.
    let group = "bed`; DROP TABLE seedlings; --";
    let label = "north'1 \\' --";
    let status = "meas'ured\\";
    let csv = String::from_utf8(demo("nursery-2026.csv"))
        .unwrap()
        .replacen("bed", group, 1)
        .replace("north-1", label)
        .replace("measured", status);
    let nursery = NURSERY
        .replace(
            "group = \"bed\"",
            &format!("group = {}", toml_string(group)),
        )
        .replace(
            "equals = \"measured\"",
            &format!("equals = {}", toml_string(status)),
        );
    let plan_toml = plan_text("moments = \"m.csv\"", &nursery);
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("plan.toml"), &plan_toml).unwrap();
    std::fs::write(dir.path().join("d.csv"), &csv).unwrap();
    let printed = std::process::Command::new(env!("CARGO_BIN_EXE_slopewise"))
        .args([
            "sql",
            "plan.toml",
            "--dialect",
            "spark",
            "--table",
            "seedlings",
        ])
        .current_dir(dir.path())
        .output()
        .unwrap();
    assert!(
        printed.status.success(),
        "{}",
        String::from_utf8_lossy(&printed.stderr)
    );
    std::fs::write(dir.path().join("q.sql"), &printed.stdout).unwrap();
    let script = root().join("tests/engines/spark_moments.py");
    let spark = std::process::Command::new("python3")
        .arg(script)
        .args([
            "q.sql",
            "d.csv",
            "seedlings",
            "m.csv",
            "height_cm",
            "dry_mass_g",
        ])
        .current_dir(dir.path())
        .output()
        .unwrap();
    assert!(
        spark.status.success(),
        "{}",
        String::from_utf8_lossy(&spark.stderr)
    );
    let moments = std::fs::read(dir.path().join("m.csv")).unwrap();

    let m_plan = load(&plan_toml);
    let from_engine = run(&m_plan, &data::load_moments(&m_plan, &moments).unwrap());
    let rows_plan = load(&plan_toml.replace("moments = \"m.csv\"", "path = \"d.csv\""));
    let from_rows = run(&rows_plan, &data::load(&rows_plan, csv.as_bytes()).unwrap());
    assert!(from_rows.groups.iter().any(|g| g.level == label));
    assert_eq!(from_rows.data.rows_used, 363);
    // Spark sums in its own order across partitions: 1e-9, as the issue asks.
    compare_within(&from_rows, &from_engine, 1e-9);
}
