//! Drafted plans and the plan's JSON Schema, checked against the loader that runs
//! plans (`slopewise::plan::load`) and against the data files themselves.
//!
//! - Drafts: for every demo and reference CSV, the draft loads, names columns of the
//!   file with the types the draft claims (re-derived here from the file with the
//!   standard library's number parser), reads through the data stage, and still does
//!   so with every commented optional key switched on.
//! - Schema: it is a valid 2020-12 schema (the meta-schema shipped in the jsonschema
//!   crate), accepts every committed plan, and agrees with the loader on a list of
//!   broken plans.
//! - Drift: every key the schema lists is accepted by the loader with each of the
//!   schema's own example and enum values, and every key and enum value of the serde
//!   types in `src/plan/schema.rs` is in the schema.

use std::collections::{BTreeMap, BTreeSet};
use std::path::PathBuf;

use serde_json::{Value, json};
use slopewise::draft::{DraftError, MAX_GROUP_LABELS, SAMPLE_ROWS, draft_plan};
use slopewise::plan::{self, Plan, PlanSpans};
use slopewise::schema::plan_schema;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn files_in(dir: &str, ext: &str) -> Vec<PathBuf> {
    let mut files: Vec<PathBuf> = std::fs::read_dir(root().join(dir))
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|e| e == ext))
        .collect();
    files.sort();
    assert!(!files.is_empty(), "no .{ext} files in {dir}");
    files
}

fn all_csvs() -> Vec<PathBuf> {
    let mut files = files_in("demo-data", "csv");
    files.extend(files_in("tests/reference/data", "csv"));
    files
}

fn all_plans() -> Vec<PathBuf> {
    let mut files = files_in("plans", "toml");
    files.extend(files_in("tests/reference/plans", "toml"));
    files
}

/// The loader's verdict, its error as the message a person sees.
fn load(text: &str) -> Result<Plan, String> {
    plan::load("draft.toml", text).map_err(|e| e.to_string())
}

fn draft(name: &str, bytes: &[u8]) -> String {
    draft_plan(name, "data.csv", bytes).unwrap_or_else(|e| panic!("{name}: {e}"))
}

// ---------------------------------------------------------------------------------
// The file as this test reads it, independently of the draft module: the csv
// crate's records, trimmed cells, "" and "NA" missing, numbers by `str::parse`.

struct Table {
    header: Vec<String>,
    rows: Vec<Vec<String>>,
}

fn read_table(bytes: &[u8]) -> Table {
    let text = std::str::from_utf8(bytes).unwrap();
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let mut reader = csv::Reader::from_reader(text.as_bytes());
    let header = reader
        .headers()
        .unwrap()
        .iter()
        .map(|h| h.trim().to_string())
        .collect();
    let rows = reader
        .records()
        .map(|r| r.unwrap().iter().map(|c| c.trim().to_string()).collect())
        .collect();
    Table { header, rows }
}

impl Table {
    fn column(&self, name: &str) -> Vec<&str> {
        let i = self.header.iter().position(|h| h == name).unwrap();
        self.rows
            .iter()
            .take(SAMPLE_ROWS)
            .map(|r| r[i].as_str())
            .filter(|c| !c.is_empty() && *c != "NA")
            .collect()
    }

    fn is_numeric(&self, name: &str) -> bool {
        let cells = self.column(name);
        !cells.is_empty()
            && cells
                .iter()
                .all(|c| c.parse::<f64>().is_ok_and(f64::is_finite))
    }

    fn labels(&self, name: &str) -> BTreeSet<String> {
        self.column(name).into_iter().map(str::to_string).collect()
    }
}

/// Switches on every optional key the draft leaves commented out with a value, so
/// the test sees that uncommenting them keeps the plan valid. `sha256` and the
/// `[[data.keep]]` example are placeholders and stay off.
fn uncomment_optional(draft: &str) -> String {
    const KEYS: [&str; 9] = [
        "# levels = ",
        "# adjust_at = ",
        "# [model.transform]",
        "# [model.units]",
        "# response = ",
        "# covariate = ",
        "# compare_at = ",
        "# [checks]",
        "# sensitivity = ",
    ];
    draft
        .lines()
        .map(|l| match KEYS.iter().find(|k| l.starts_with(*k)) {
            Some(_) => &l[2..],
            None => l,
        })
        .collect::<Vec<_>>()
        .join("\n")
}

// ---------------------------------------------------------------------------------
// (a) Drafts.

#[test]
fn drafts_of_every_demo_and_reference_csv_load_and_name_real_columns() {
    for path in all_csvs() {
        let name = path.file_name().unwrap().to_string_lossy().into_owned();
        let bytes = std::fs::read(&path).unwrap();
        let table = read_table(&bytes);
        let text = draft(&name, &bytes);
        let plan = load(&text).unwrap_or_else(|e| panic!("{name}: {e}\n{text}"));

        // The rule the draft documents, re-derived from the file: the response is
        // the last numeric column, the covariate the first other one, the group the
        // text column with the fewest labels (3 or more preferred) among those with
        // 2 to 200 labels and at least 3 rows per label, else the first with 2 to 200.
        let numeric: Vec<&String> = table
            .header
            .iter()
            .filter(|h| table.is_numeric(h))
            .collect();
        let text_columns: Vec<&String> = table
            .header
            .iter()
            .filter(|h| !table.is_numeric(h) && !table.column(h).is_empty())
            .collect();
        let fits = |h: &&&String| (2..=MAX_GROUP_LABELS).contains(&table.labels(h).len());
        let group = text_columns
            .iter()
            .filter(fits)
            .filter(|h| table.column(h).len() >= 3 * table.labels(h).len())
            .min_by_key(|h| (table.labels(h).len() < 3, table.labels(h).len()))
            .or_else(|| text_columns.iter().find(fits))
            .expect("every committed CSV has a grouping column");
        assert_eq!(&&plan.model.response, numeric.last().unwrap(), "{name}");
        assert_eq!(&plan.model.covariate, numeric[0], "{name}");
        assert_eq!(&&plan.model.group, group, "{name}");
        for column in [
            &plan.model.response,
            &plan.model.covariate,
            &plan.model.group,
        ] {
            assert!(table.header.contains(column), "{name}: {column}");
        }
        assert_eq!(plan.data.path, "data.csv");
        assert_eq!(plan.data.missing, ["", "NA"]);
        assert_eq!(plan.title, path.file_stem().unwrap().to_string_lossy());
        assert_eq!(
            plan.report.out.as_deref(),
            Some(format!("../reports/{}", plan.title).as_str())
        );
        assert!(
            text.starts_with("# DRAFT plan: review every line"),
            "{text}"
        );
        assert!(text.contains("GUESS, check it"), "{text}");

        // The data stage reads the file with the drafted plan: the numeric columns
        // parse as numbers in every row, not only in the sample.
        let data = slopewise::data::load(&plan, bytes.as_slice())
            .unwrap_or_else(|e| panic!("{name}: {e}"));
        assert_eq!(data.rows_read as usize, table.rows.len(), "{name}");

        // With every optional key switched on, the plan still loads and the data
        // still read: the listed levels are exactly the file's labels (each committed
        // CSV is shorter than the sample), in sorted order.
        assert!(table.rows.len() <= SAMPLE_ROWS, "{name}");
        let full = uncomment_optional(&text);
        let plan = load(&full).unwrap_or_else(|e| panic!("{name}: {e}\n{full}"));
        let labels: Vec<String> = table.labels(&plan.model.group).into_iter().collect();
        assert_eq!(plan.model.levels.as_ref(), Some(&labels), "{name}");
        assert_eq!(plan.model.response_units.as_deref(), Some("UNIT"));
        assert!(
            plan.tests
                .compare_at
                .as_ref()
                .is_some_and(|v| !v.is_empty())
        );
        let data = slopewise::data::load(&plan, bytes.as_slice())
            .unwrap_or_else(|e| panic!("{name} with levels: {e}"));
        let levels: Vec<&str> = data.groups.iter().map(|g| g.level.as_str()).collect();
        assert_eq!(levels, labels, "{name}");
    }
}

#[test]
fn iris_draft_picks_the_columns_its_header_implies() {
    // tests/reference/data/iris.csv: header sepal_length, sepal_width, petal_length,
    // petal_width, species; Fisher's (1936) three species.
    let bytes = std::fs::read(root().join("tests/reference/data/iris.csv")).unwrap();
    let plan = load(&uncomment_optional(&draft("iris.csv", &bytes))).unwrap();
    assert_eq!(plan.model.response, "petal_width");
    assert_eq!(plan.model.covariate, "sepal_length");
    assert_eq!(plan.model.group, "species");
    assert_eq!(
        plan.model.levels.unwrap(),
        ["setosa", "versicolor", "virginica"]
    );
    assert_eq!(plan.tests.alpha, 0.05);
    assert_eq!(plan.tests.slopes_alpha, 0.05);
    assert_eq!(plan.tests.comparisons, plan::Comparisons::Holm);
    assert_eq!(plan.tests.regions, plan::Regions::Pointwise);
    assert_eq!(
        plan.report.formats,
        [plan::Format::Markdown, plan::Format::Json]
    );
    // Nearest-rank quartiles of sepal_length in iris.csv, computed here from the
    // file: the 38th, 75th and 113th of the 150 sorted values.
    let mut x: Vec<f64> = read_table(&bytes)
        .column("sepal_length")
        .iter()
        .map(|c| c.parse().unwrap())
        .collect();
    x.sort_by(f64::total_cmp);
    assert_eq!(plan.tests.compare_at.unwrap(), [x[37], x[74], x[112]]);
}

#[test]
fn hostile_names_and_labels_are_escaped() {
    // Names with TOML's special characters, a line break inside a quoted CSV field,
    // a BOM, and spaces that the data stage trims.
    let names = [
        "weight \"net\" kg",
        "back\\slash # hash",
        "line\nbreak",
        "tab\tand ' quote",
    ];
    let labels = ["a \"b\"", "c\\d", "#e", "f\ng", "ünï ✓"];
    let mut csv = String::from("\u{feff}");
    let header: Vec<String> = ["id", names[0], names[1], names[2], names[3]]
        .iter()
        .map(|n| format!("\"{}\"", n.replace('"', "\"\"")))
        .collect();
    csv.push_str(&header.join(","));
    csv.push('\n');
    for i in 0..20 {
        let label = labels[i % labels.len()].replace('"', "\"\"");
        csv.push_str(&format!(
            "r{i}, {}.5 ,\"{label}\",{},{}\n",
            i,
            i * 2 + 1,
            if i == 3 { "NA" } else { "x" }
        ));
    }
    let text = draft("odd \"name\".csv", csv.as_bytes());
    let plan = load(&text).unwrap_or_else(|e| panic!("{e}\n{text}"));
    assert_eq!(plan.model.response, names[2]);
    assert_eq!(plan.model.covariate, names[0]);
    // "id" comes first but has one row per label; the hostile labels have four each.
    assert_eq!(plan.model.group, names[1]);
    assert_eq!(plan.title, "odd \"name\"");
    assert_eq!(plan.report.out.as_deref(), Some("../reports/odd \"name\""));

    // Every comment line stays a comment: the TOML parser sees only these keys.
    let table: toml::Table = toml::from_str(&text).unwrap();
    let keys: Vec<&String> = table.keys().collect();
    assert_eq!(keys, ["data", "model", "report", "tests", "title"]);
    assert_eq!(table["model"].as_table().unwrap().len(), 3);

    // Header names and cells are trimmed, as the data stage trims them.
    assert_eq!(
        draft("x.csv", b" g , x,y \na , 1,2\nb,2 ,3\n"),
        draft("x.csv", b"g,x,y\na,1,2\nb,2,3\n")
    );

    // Without the id column, the hostile labels make the first text column.
    let mut csv3 = String::new();
    csv3.push_str(&header[1..].join(","));
    csv3.push('\n');
    for i in 0..20 {
        let label = labels[i % labels.len()].replace('"', "\"\"");
        csv3.push_str(&format!("{i}.5,\"{label}\",{},x\n", i * 2 + 1));
    }
    let text3 = draft("hostile.csv", csv3.as_bytes());
    let plan3 = load(&uncomment_optional(&text3)).unwrap_or_else(|e| panic!("{e}\n{text3}"));
    assert_eq!(plan3.model.group, names[1]);
    let mut sorted: Vec<String> = labels.iter().map(|s| s.to_string()).collect();
    sorted.sort();
    assert_eq!(plan3.model.levels.unwrap(), sorted);
    let data = slopewise::data::load(&load(&text3).unwrap(), csv3.as_bytes()).unwrap();
    assert_eq!(data.groups.len(), labels.len());
}

#[test]
fn only_the_sample_is_read() {
    // A column numeric in the first SAMPLE_ROWS rows and text after them is numeric
    // for the draft; the comments say how many rows were seen.
    let mut csv = String::from("g,x,y\n");
    for i in 0..SAMPLE_ROWS + 500 {
        let y = if i == SAMPLE_ROWS + 10 {
            "oops".to_string()
        } else {
            format!("{i}")
        };
        csv.push_str(&format!("{},{i},{y}\n", ["a", "b"][i % 2]));
    }
    let text = draft("big.csv", csv.as_bytes());
    assert!(
        text.contains(&format!("the first {SAMPLE_ROWS} data rows")),
        "{text}"
    );
    let plan = load(&text).unwrap();
    assert_eq!(plan.model.response, "y");

    // A prefix cut inside a row: the cut row is ignored.
    let short = "g,x,y\na,1,2\nb,2,3\na,3,4\nb,4";
    let plan = load(&draft("cut.csv", short.as_bytes())).unwrap();
    assert_eq!(plan.model.group, "g");
    // But a short row that is followed by more rows is an error, with its line.
    let err = draft_plan("bad.csv", "bad.csv", b"g,x,y\na,1,2\nb,2\na,3,4\n").unwrap_err();
    assert_eq!(
        err,
        DraftError::Ragged {
            file: "bad.csv".into(),
            line: 3,
            expected: 3,
            found: 2
        }
    );
}

#[test]
fn unsuitable_group_columns_give_a_loadable_placeholder() {
    // One label only, and more than MAX_GROUP_LABELS labels: neither looks like a
    // grouping column.
    let mut one = String::from("site,x,y\n");
    let mut many = String::from("id,x,y\n");
    for i in 0..(MAX_GROUP_LABELS + 1) {
        one.push_str(&format!("only,{i},{}\n", i * 3));
        many.push_str(&format!("id{i},{i},{}\n", i * 3));
    }
    for (csv, n) in [(one, 1), (many, MAX_GROUP_LABELS + 1)] {
        let text = draft("f.csv", csv.as_bytes());
        assert!(text.contains("PLACEHOLDER, replace it"), "{text}");
        assert!(text.contains(&format!(" has {n}.")), "{text}");
        let plan = load(&uncomment_optional(&text)).unwrap_or_else(|e| panic!("{e}\n{text}"));
        // A one-label list would not load and a list of hundreds helps nobody, so
        // the levels line is a placeholder in both cases.
        assert_eq!(plan.model.levels.unwrap(), ["FIRST", "SECOND"]);
        assert_eq!(plan.model.group, if n == 1 { "site" } else { "id" });
    }
}

#[test]
fn errors_say_what_is_wrong() {
    let err = |bytes: &[u8]| draft_plan("f.csv", "f.csv", bytes).unwrap_err();
    assert_eq!(
        err(b""),
        DraftError::Empty {
            file: "f.csv".into()
        }
    );
    assert_eq!(
        err(b"\xEF\xBB\xBF\n"),
        DraftError::Empty {
            file: "f.csv".into()
        }
    );
    assert_eq!(
        err(b"g,x,y\n"),
        DraftError::HeaderOnly {
            file: "f.csv".into()
        }
    );
    assert_eq!(
        err(b"g,x,y"),
        DraftError::HeaderOnly {
            file: "f.csv".into()
        }
    );
    assert_eq!(
        err(b"g,x,y\na,1,z\nb,NA,\n"),
        DraftError::FewerThanTwoNumeric {
            file: "f.csv".into(),
            numeric: vec!["x".into()],
            rows: 2
        }
    );
    assert_eq!(
        err(b"a,x,y\n1,2,3\n4,5,NA\n"),
        DraftError::NoTextColumn {
            file: "f.csv".into(),
            rows: 2
        }
    );
    // An all-missing column has no type, so it is neither numeric nor text.
    assert_eq!(
        err(b"x,y,g\n1,2,\n3,4,NA\n"),
        DraftError::NoTextColumn {
            file: "f.csv".into(),
            rows: 2
        }
    );
    // Infinite values are not numbers the run accepts.
    assert!(matches!(
        err(b"g,x,y\na,1,inf\nb,2,3\n"),
        DraftError::FewerThanTwoNumeric { .. }
    ));
    assert_eq!(
        err(b"g,x, g \na,1,2\n"),
        DraftError::DuplicateColumn {
            file: "f.csv".into(),
            name: "g".into(),
            first: 1,
            second: 3
        }
    );
    assert_eq!(
        err(b"g,x,y\na,1,2\n\xff,2,3\n"),
        DraftError::NotUtf8 {
            file: "f.csv".into(),
            line: 3,
            column: 1
        }
    );
    assert_eq!(
        draft_plan("f.csv", " ", b"g,x,y\na,1,2\n").unwrap_err(),
        DraftError::EmptyDataPath
    );
    for e in [
        err(b""),
        err(b"g,x,y\n"),
        err(b"g,x,y\na,1,z\n"),
        err(b"a,x,y\n1,2,3\n"),
    ] {
        let rendered = e.diagnostic().render();
        assert!(rendered.contains("f.csv"), "{rendered}");
        assert!(rendered.contains("help:"), "{rendered}");
    }
    let msg = err(b"g,x,y\na,1,z\n").to_string();
    assert!(
        msg.contains("1 numeric column(s) in the 1 data row(s) read") && msg.contains("\"x\""),
        "{msg}"
    );
}

// ---------------------------------------------------------------------------------
// (b) The schema.

fn schema() -> Value {
    serde_json::from_str(&plan_schema()).expect("the derived schema is JSON")
}

fn validator() -> jsonschema::Validator {
    jsonschema::draft202012::new(&schema()).expect("the schema compiles")
}

/// The plan as a TOML tool hands it to a JSON Schema validator.
fn as_json(toml_text: &str) -> Value {
    toml::from_str(toml_text).unwrap_or_else(|e| panic!("{e}\n{toml_text}"))
}

fn schema_errors(v: &jsonschema::Validator, doc: &Value) -> Vec<String> {
    v.iter_errors(doc)
        .map(|e| format!("{}: {e}", e.instance_path()))
        .collect()
}

#[test]
fn schema_is_a_valid_2020_12_schema() {
    let schema = schema();
    assert_eq!(
        schema["$schema"],
        "https://json-schema.org/draft/2020-12/schema"
    );
    // The 2020-12 meta-schema, as shipped in the jsonschema crate.
    jsonschema::draft202012::meta::validate(&schema).unwrap();
}

#[test]
fn schema_accepts_every_committed_plan_and_every_draft() {
    let v = validator();
    for path in all_plans() {
        let text = std::fs::read_to_string(&path).unwrap();
        load(&text).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
        let errors = schema_errors(&v, &as_json(&text));
        assert!(errors.is_empty(), "{}: {errors:?}", path.display());
    }
    for path in all_csvs() {
        let text = draft("f.csv", &std::fs::read(&path).unwrap());
        for text in [text.clone(), uncomment_optional(&text)] {
            let errors = schema_errors(&v, &as_json(&text));
            assert!(errors.is_empty(), "{}: {errors:?}\n{text}", path.display());
        }
    }
}

const GOOD: &str = r#"
title = "t"
[data]
path = "d.csv"
[model]
response = "y"
covariate = "x"
group = "g"
[tests]
alpha = 0.05
"#;

#[test]
fn schema_and_loader_refuse_the_same_broken_plans() {
    let v = validator();
    assert!(schema_errors(&v, &as_json(GOOD)).is_empty());
    load(GOOD).unwrap();
    let cases: [(&str, String); 31] = [
        ("unknown top-level key", format!("colour = \"red\"\n{GOOD}")),
        (
            "unknown key in [tests]",
            GOOD.replace("alpha = 0.05", "alpha = 0.05\nalfa = 0.1"),
        ),
        ("alpha = 1.5", GOOD.replace("alpha = 0.05", "alpha = 1.5")),
        ("alpha = 0", GOOD.replace("alpha = 0.05", "alpha = 0.0")),
        ("alpha = 1", GOOD.replace("alpha = 0.05", "alpha = 1.0")),
        (
            "slopes_alpha = -0.1",
            GOOD.replace("alpha = 0.05", "slopes_alpha = -0.1"),
        ),
        (
            "unknown comparisons",
            GOOD.replace("alpha = 0.05", "comparisons = \"tukey\""),
        ),
        (
            "unknown regions",
            GOOD.replace("alpha = 0.05", "regions = \"both\""),
        ),
        (
            "empty compare_at",
            GOOD.replace("alpha = 0.05", "compare_at = []"),
        ),
        (
            "text in compare_at",
            GOOD.replace("alpha = 0.05", "compare_at = [\"10\"]"),
        ),
        ("missing title", GOOD.replace("title = \"t\"", "")),
        (
            "blank title",
            GOOD.replace("title = \"t\"", "title = \"  \""),
        ),
        ("missing group", GOOD.replace("group = \"g\"", "")),
        (
            "one level",
            GOOD.replace("group = \"g\"", "group = \"g\"\nlevels = [\"a\"]"),
        ),
        (
            "repeated level",
            GOOD.replace("group = \"g\"", "group = \"g\"\nlevels = [\"a\", \"a\"]"),
        ),
        (
            "adjust_at median",
            GOOD.replace("group = \"g\"", "group = \"g\"\nadjust_at = \"median\""),
        ),
        (
            "unknown transform",
            format!("{GOOD}[model.transform]\nresponse = \"ln\"\n"),
        ),
        (
            "unknown key in units",
            format!("{GOOD}[model.units]\nx = \"cm\"\n"),
        ),
        (
            "short sha256",
            GOOD.replace("path = \"d.csv\"", "path = \"d.csv\"\nsha256 = \"abc\""),
        ),
        (
            "keep with both",
            format!("{GOOD}[[data.keep]]\ncolumn = \"s\"\nequals = \"a\"\none_of = [\"b\"]\n"),
        ),
        (
            "keep with neither",
            format!("{GOOD}[[data.keep]]\ncolumn = \"s\"\n"),
        ),
        (
            "keep with empty one_of",
            format!("{GOOD}[[data.keep]]\ncolumn = \"s\"\none_of = []\n"),
        ),
        ("empty formats", format!("{GOOD}[report]\nformats = []\n")),
        (
            "pooling margin without the equivalence rule",
            GOOD.replace("alpha = 0.05", "alpha = 0.05\npooling_slope_margin = 0.05"),
        ),
        (
            "equivalence pooling without lot pooling",
            GOOD.replace(
                "alpha = 0.05",
                "pooling_rule = \"equivalence\"\npooling_slope_margin = 0.05\npooling_intercept_margin = 1.0",
            ),
        ),
        (
            "equivalence pooling without its intercept margin",
            GOOD.replace(
                "alpha = 0.05",
                "procedure = \"lot-pooling\"\npooling_rule = \"equivalence\"\npooling_slope_margin = 0.05",
            ),
        ),
        (
            "a sheet for a CSV file",
            GOOD.replace("path = \"d.csv\"", "path = \"d.csv\"\nsheet = \"s\""),
        ),
        (
            "a delimiter for a Parquet file",
            GOOD.replace("path = \"d.csv\"", "path = \"d.parquet\"\ndelimiter = \";\""),
        ),
        (
            "a delimiter for a spreadsheet",
            GOOD.replace("path = \"d.csv\"", "path = \"d.xlsx\"\ndelimiter = \";\""),
        ),
        (
            "a simultaneous band for a prediction bound",
            format!("{GOOD}[limits]\nlower = 1.0\nbound = \"prediction\"\nband = \"simultaneous\"\n"),
        ),
        (
            "repeated format",
            format!("{GOOD}[report]\nformats = [\"json\", \"json\"]\n"),
        ),
    ];
    for (what, text) in &cases {
        assert!(load(text).is_err(), "the loader accepts {what}:\n{text}");
        let errors = schema_errors(&v, &as_json(text));
        assert!(!errors.is_empty(), "the schema accepts {what}:\n{text}");
    }
    let more = [
        (
            "unknown key in [checks]",
            format!("{GOOD}[checks]\nsensitive = true\n"),
        ),
        (
            "unknown key in [report]",
            format!("{GOOD}[report]\nfolder = \"x\"\n"),
        ),
        (
            "unknown format",
            format!("{GOOD}[report]\nformats = [\"html\"]\n"),
        ),
        (
            "sensitivity as text",
            format!("{GOOD}[checks]\nsensitivity = \"yes\"\n"),
        ),
        (
            "unknown key in keep",
            format!("{GOOD}[[data.keep]]\ncolumn = \"s\"\nequals = \"a\"\nis = \"b\"\n"),
        ),
        (
            "limits without a limit",
            format!("{GOOD}[limits]\nconfidence = 0.95\n"),
        ),
        (
            "limits confidence 0.4",
            format!("{GOOD}[limits]\nlower = 1.0\nconfidence = 0.4\n"),
        ),
        (
            "unknown key in [limits]",
            format!("{GOOD}[limits]\nlow = 1.0\n"),
        ),
        (
            "unknown bound",
            format!("{GOOD}[limits]\nlower = 1.0\nbound = \"interval\"\n"),
        ),
        (
            "max_beyond negative",
            format!("{GOOD}[limits]\nlower = 1.0\nextrapolation_factor = 1.5\nmax_beyond = -6\n"),
        ),
        (
            "extrapolation_factor below 1",
            format!("{GOOD}[limits]\nlower = 1.0\nextrapolation_factor = 0.5\nmax_beyond = 6\n"),
        ),
        (
            "storage with an explicit factor",
            format!(
                "{GOOD}[limits]\nlower = 1.0\nstorage = \"room\"\nextrapolation_factor = 1.5\nmax_beyond = 6\n"
            ),
        ),
        (
            "unknown storage",
            format!("{GOOD}[limits]\nlower = 1.0\nstorage = \"cold\"\n"),
        ),
        (
            "round_to 0",
            format!("{GOOD}[limits]\nlower = 1.0\nround_to = 0\n"),
        ),
        (
            "unknown procedure",
            GOOD.replace("alpha = 0.05", "procedure = \"pooling\""),
        ),
        (
            "pooling_alpha = 1.5",
            GOOD.replace("alpha = 0.05", "pooling_alpha = 1.5"),
        ),
    ];
    for (what, text) in &more {
        assert!(load(text).is_err(), "the loader accepts {what}");
        assert!(
            !schema_errors(&v, &as_json(text)).is_empty(),
            "the schema accepts {what}"
        );
    }
}

// ---------------------------------------------------------------------------------
// (c) Drift between the schema and the loader.

/// One step of a property path: a key, or `[]` for the items of an array.
type PathSteps = Vec<String>;

/// Every property of the schema, with its path and its schema node.
fn property_paths(node: &Value, prefix: &PathSteps, out: &mut Vec<(PathSteps, Value)>) {
    if let Some(props) = node.get("properties").and_then(Value::as_object) {
        for (key, child) in props {
            let mut path = prefix.clone();
            path.push(key.clone());
            out.push((path.clone(), child.clone()));
            property_paths(child, &path, out);
        }
    }
    if let Some(items) = node.get("items").filter(|i| i.get("properties").is_some()) {
        let mut path = prefix.clone();
        path.push("[]".into());
        property_paths(items, &path, out);
    }
}

fn all_property_paths() -> Vec<(PathSteps, Value)> {
    let mut out = Vec::new();
    property_paths(&schema(), &Vec::new(), &mut out);
    out
}

fn example(node: &Value) -> Value {
    node["examples"][0].clone()
}

/// The smallest object the schema allows: its required keys, each an example (or,
/// for a table, that table's own smallest object).
fn minimal(node: &Value) -> Value {
    let mut object = serde_json::Map::new();
    for key in node["required"].as_array().into_iter().flatten() {
        let key = key.as_str().unwrap();
        let child = &node["properties"][key];
        let value = if child.get("examples").is_some() {
            example(child)
        } else {
            minimal(child)
        };
        object.insert(key.to_string(), value);
    }
    Value::Object(object)
}

/// Sets `value` at `path` in `doc`, filling in each table on the way with its
/// required keys and, where the table needs one of several keys (`oneOf` of
/// `required`), the first of them.
fn set(doc: &mut Value, node: &Value, path: &[String], value: Value) {
    let key = &path[0];
    let child = &node["properties"][key.as_str()];
    let object = doc.as_object_mut().unwrap();
    if path.len() == 1 {
        object.insert(key.clone(), value);
    } else if path[1] == "[]" {
        let items = &child["items"];
        let mut item = minimal(items);
        set(&mut item, items, &path[2..], value);
        object.insert(key.clone(), Value::Array(vec![item]));
    } else {
        let entry = object.entry(key.clone()).or_insert_with(|| minimal(child));
        set(entry, child, &path[1..], value);
    }
    let object = doc.as_object_mut().unwrap();
    let branches = node["oneOf"].as_array().or(node["anyOf"].as_array());
    if let Some(branches) = branches.filter(|b| b.iter().all(|b| b["required"].is_array())) {
        let satisfied = branches.iter().any(|b| {
            b["required"]
                .as_array()
                .unwrap()
                .iter()
                .all(|k| object.contains_key(k.as_str().unwrap()))
        });
        if !satisfied {
            for k in branches[0]["required"].as_array().unwrap() {
                let k = k.as_str().unwrap();
                object.insert(k.to_string(), example(&node["properties"][k]));
            }
        }
    }
}

/// The values to try at a key: the schema's examples and every enum value.
fn probe_values(node: &Value) -> Vec<Value> {
    let mut values: Vec<Value> = node["examples"].as_array().cloned().unwrap_or_default();
    for v in node["enum"].as_array().into_iter().flatten() {
        values.push(v.clone());
    }
    for v in node["items"]["enum"].as_array().into_iter().flatten() {
        values.push(json!([v]));
    }
    values
}

fn without_spans(mut plan: Plan) -> Plan {
    plan.spans = PlanSpans::default();
    plan
}

#[test]
fn every_schema_key_is_described_closed_and_accepted_by_the_loader() {
    let schema = schema();
    let v = validator();
    let mut base = minimal(&schema);
    // A response is required unless [[responses]] lists the attributes.
    base["model"]["response"] = json!("dry_mass_g");
    // The data are `path` or `moments`, one of the two.
    base["data"]["path"] = json!("../demo-data/nursery-2026.csv");
    let base_text = toml::to_string(&base).unwrap();
    let base_plan = without_spans(load(&base_text).unwrap());
    let paths = all_property_paths();
    for (path, node) in &paths {
        let name = path.join(".");
        assert!(
            node["description"].as_str().is_some_and(|d| !d.is_empty()),
            "{name} has no description"
        );
        if node.get("properties").is_some() || node["items"].get("properties").is_some() {
            let table = if node.get("properties").is_some() {
                node
            } else {
                &node["items"]
            };
            assert_eq!(
                table["additionalProperties"],
                json!(false),
                "{name} allows unknown keys"
            );
        }
        let values = probe_values(node);
        let is_leaf = node.get("properties").is_none() && node["items"].get("properties").is_none();
        // Leaves carry examples; a table is tested through its keys (and through
        // its own examples where it has them).
        assert!(
            !is_leaf || !values.is_empty(),
            "{name} has no examples to test it with"
        );
        for value in values {
            let mut doc = base.clone();
            // A value that needs a companion key gets it, as the schema's if/then says.
            if name == "tests.gate" && value == json!("equivalence") {
                let companion = ["tests".to_string(), "slope_margin".to_string()];
                set(&mut doc, &schema, &companion, json!(0.05));
            }
            let pooling_keys = [
                "tests.pooling_rule",
                "tests.pooling_slope_margin",
                "tests.pooling_intercept_margin",
            ];
            if pooling_keys.contains(&name.as_str())
                && (name != "tests.pooling_rule" || value == json!("equivalence"))
            {
                for (key, v) in [
                    ("procedure", json!("lot-pooling")),
                    ("pooling_rule", json!("equivalence")),
                    ("pooling_slope_margin", json!(0.05)),
                    ("pooling_intercept_margin", json!(1.0)),
                ] {
                    set(
                        &mut doc,
                        &schema,
                        &["tests".to_string(), key.to_string()],
                        v,
                    );
                }
            }
            // A sheet's keys need a spreadsheet's path.
            if name == "data.sheet" || name == "data.header_row" {
                doc["data"]["path"] = json!("data.xlsx");
            }
            // Moments take the place of the rows' path.
            if name == "data.moments" {
                doc["data"].as_object_mut().unwrap().remove("path");
            }
            // [[responses]] takes the place of model.response.
            if path[0] == "responses" {
                doc["model"].as_object_mut().unwrap().remove("response");
            }
            set(&mut doc, &schema, path, value.clone());
            // A single response's [limits] needs a limit of its own.
            if path[0] == "limits" {
                let limits = doc["limits"].as_object_mut().unwrap();
                if !limits.contains_key("lower") && !limits.contains_key("upper") {
                    limits.insert("lower".into(), json!(-1.0e9));
                }
            }
            let errors = schema_errors(&v, &doc);
            assert!(errors.is_empty(), "{name} = {value}: {errors:?}");
            let text = toml::to_string(&doc).unwrap();
            let plan = load(&text).unwrap_or_else(|e| panic!("{name} = {value}: {e}\n{text}"));
            // A value that is neither the base plan's nor the documented default
            // must change what the loader read: the key is read, not just tolerated.
            let at_base = path
                .iter()
                .try_fold(&base, |v, k| v.get(k.as_str()))
                .cloned();
            let is_default = node.get("default") == Some(&value);
            if at_base.as_ref() != Some(&value) && !is_default {
                assert_ne!(
                    without_spans(plan),
                    base_plan,
                    "{name} = {value} changed nothing\n{text}"
                );
            }
        }
    }
    assert_eq!(schema["additionalProperties"], json!(false));
}

/// The serde struct behind each table of the plan, and where it sits in the schema.
const TABLES: [(&str, &str); 12] = [
    ("RawPlan", ""),
    ("RawData", "data"),
    ("RawKeep", "data.keep.[]"),
    ("RawModel", "model"),
    ("RawTransform", "model.transform"),
    ("RawUnits", "model.units"),
    ("RawTests", "tests"),
    ("RawChecks", "checks"),
    ("RawLimits", "limits"),
    ("RawReport", "report"),
    ("RawResponse", "responses.[]"),
    ("RawResponseLimits", "responses.[].limits"),
];

/// The serde enums of plan values, and the schema nodes that hold their names.
const ENUMS: [(&str, &[&str]); 7] = [
    (
        "Transform",
        &[
            "model.transform.response",
            "model.transform.covariate",
            "responses.[].transform",
        ],
    ),
    ("Comparisons", &["tests.comparisons"]),
    ("Regions", &["tests.regions"]),
    ("Procedure", &["tests.procedure"]),
    ("Format", &["report.formats.[]"]),
    ("BoundKind", &["limits.bound"]),
    ("Storage", &["limits.storage"]),
];

/// Struct and enum blocks of `src/plan/schema.rs`: name -> (fields or variants, the
/// `rename_all` rule above it).
fn serde_items(kind: &str) -> BTreeMap<String, (Vec<String>, Option<String>)> {
    let source = std::fs::read_to_string(root().join("src/plan/schema.rs")).unwrap();
    let mut out = BTreeMap::new();
    let mut rename: Option<String> = None;
    let mut current: Option<(String, Vec<String>, Option<String>)> = None;
    for line in source.lines() {
        let t = line.trim();
        if let Some((name, mut items, rule)) = current.take() {
            if t == "}" {
                out.insert(name, (items, rule));
                continue;
            }
            let word = if kind == "struct" {
                t.strip_prefix("pub ")
                    .and_then(|r| r.split_once(':'))
                    .map(|(f, _)| f)
            } else {
                t.strip_suffix(',')
                    .filter(|w| w.chars().all(char::is_alphanumeric))
            };
            if let Some(w) = word {
                items.push(w.to_string());
            }
            current = Some((name, items, rule));
            continue;
        }
        if let Some(rule) = t
            .strip_prefix("#[serde(rename_all = \"")
            .and_then(|r| r.strip_suffix("\")]"))
        {
            rename = Some(rule.to_string());
        }
        let head = t
            .strip_prefix(&format!("pub(super) {kind} "))
            .or_else(|| t.strip_prefix(&format!("pub {kind} ")));
        if let Some(name) = head.and_then(|h| h.strip_suffix(" {")) {
            current = Some((name.to_string(), Vec::new(), rename.take()));
        } else if t.starts_with("pub ") || t.starts_with("pub(") || t.starts_with("impl") {
            rename = None;
        }
    }
    out
}

fn node_at<'a>(schema: &'a Value, dotted: &str) -> &'a Value {
    let mut node = schema;
    for step in dotted.split('.').filter(|s| !s.is_empty()) {
        node = if step == "[]" {
            &node["items"]
        } else {
            &node["properties"][step]
        };
        assert!(!node.is_null(), "the schema has no {dotted}");
    }
    node
}

fn renamed(variant: &str, rule: &str) -> String {
    match rule {
        "lowercase" => variant.to_lowercase(),
        "kebab-case" => {
            let mut out = String::new();
            for (i, c) in variant.chars().enumerate() {
                if c.is_uppercase() && i > 0 {
                    out.push('-');
                }
                out.extend(c.to_lowercase());
            }
            out
        }
        other => panic!("rename rule {other} is not handled here"),
    }
}

#[test]
fn every_serde_key_and_value_is_in_the_schema() {
    let schema = schema();
    let structs = serde_items("struct");
    let mapped: BTreeSet<&str> = TABLES.iter().map(|t| t.0).collect();
    let found: BTreeSet<&str> = structs.keys().map(String::as_str).collect();
    assert_eq!(
        found, mapped,
        "a plan table was added or renamed in src/plan/schema.rs: map it in TABLES and the schema"
    );
    for (name, dotted) in TABLES {
        let fields: BTreeSet<&str> = structs[name].0.iter().map(String::as_str).collect();
        let node = node_at(&schema, dotted);
        let keys: BTreeSet<&str> = node["properties"]
            .as_object()
            .unwrap()
            .keys()
            .map(String::as_str)
            .collect();
        assert_eq!(keys, fields, "{name} against the schema's `{dotted}`");
        let required: BTreeSet<&str> = node["required"]
            .as_array()
            .into_iter()
            .flatten()
            .map(|k| k.as_str().unwrap())
            .collect();
        // Required in the schema exactly when the serde field is neither an Option
        // nor defaulted; checked by the loader: dropping it must fail.
        for key in &required {
            let mut steps: PathSteps = dotted
                .split('.')
                .filter(|s| !s.is_empty())
                .map(str::to_string)
                .collect();
            steps.push(key.to_string());
            let key_node = &node["properties"][*key];
            let value = if key_node.get("examples").is_some() {
                example(key_node)
            } else {
                minimal(key_node)
            };
            let mut doc = minimal(&schema);
            set(&mut doc, &schema, &steps, value);
            // A response is required unless [[responses]] lists the attributes.
            if steps[0] != "responses" {
                doc["model"]["response"] = json!("dry_mass_g");
            }
            if doc["data"].get("path").is_none() {
                doc["data"]["path"] = json!("../demo-data/nursery-2026.csv");
            }
            let text = toml::to_string(&doc).unwrap();
            load(&text).unwrap_or_else(|e| panic!("{dotted}.{key}: {e}\n{text}"));
            let parent = steps[..steps.len() - 1]
                .iter()
                .try_fold(&mut doc, |d, k| {
                    if k == "[]" {
                        d.get_mut(0)
                    } else {
                        d.get_mut(k.as_str())
                    }
                })
                .unwrap();
            parent.as_object_mut().unwrap().remove(*key);
            let text = toml::to_string(&doc).unwrap();
            assert!(
                load(&text).is_err(),
                "`{dotted}.{key}` is required in the schema, but the loader accepts a plan without it:\n{text}"
            );
        }
    }

    let enums = serde_items("enum");
    for (name, nodes) in ENUMS {
        let (variants, rule) = &enums[name];
        let rule = rule.as_deref().expect("a rename_all rule");
        let names: BTreeSet<String> = variants.iter().map(|v| renamed(v, rule)).collect();
        assert!(names.len() >= 2, "{name}: {variants:?}");
        for dotted in nodes {
            let listed: BTreeSet<String> = node_at(&schema, dotted)["enum"]
                .as_array()
                .unwrap_or_else(|| panic!("{dotted} has no enum"))
                .iter()
                .map(|v| v.as_str().unwrap().to_string())
                .collect();
            assert_eq!(listed, names, "{name} against the schema's `{dotted}`");
        }
    }
}

#[test]
fn schema_accepts_every_whole_plan_in_the_readme() {
    // A README block is a whole plan when it has a title and the data and model
    // tables; fragments (one table shown alone) are left to the loader's tests.
    let v = validator();
    let readme = std::fs::read_to_string(root().join("README.md")).unwrap();
    let mut whole = 0;
    for block in readme.split("```toml").skip(1) {
        let text = block.split("```").next().unwrap();
        if !(text.contains("title =") && text.contains("[data]") && text.contains("[model]")) {
            continue;
        }
        whole += 1;
        let errors = schema_errors(&v, &as_json(text));
        assert!(errors.is_empty(), "README plan: {errors:?}\n{text}");
    }
    assert!(whole >= 1, "no whole plan found in the README");
}
