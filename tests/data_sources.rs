//! One plan, several sources: the same invented demo data as CSV, as an .xlsx
//! workbook and as an .ods spreadsheet (tests/reference/generate_sheets.py wrote the
//! two from demo-data/stability-lots-2026.csv with openpyxl and odfpy, versions
//! pinned there) give the same results and the same report, number for number.

use std::path::{Path, PathBuf};

use slopewise::plan::Plan;
use slopewise::results::{Provenance, Results};
use slopewise::{analysis, data, plan, report};

fn root() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).to_path_buf()
}

fn plan_for(path: &str, sheet_keys: &str) -> Plan {
    let text = format!(
        "title = \"Sources (invented demo data)\"\n[data]\npath = \"{path}\"\n{sheet_keys}\n[model]\nresponse = \"assay_pct\"\ncovariate = \"months\"\ngroup = \"lot\"\n[limits]\nlower = 95.0\n[tests]\nprocedure = \"lot-pooling\"\n"
    );
    plan::load("plan.toml", &text).unwrap()
}

fn run(plan: &Plan, dataset: &data::Dataset) -> Results {
    analysis::run(plan, dataset, Provenance::default()).unwrap()
}

#[test]
fn csv_xlsx_and_ods_give_the_same_results_and_report() {
    let csv = std::fs::read(root().join("demo-data/stability-lots-2026.csv")).unwrap();
    let csv_plan = plan_for("data.csv", "");
    let from_csv = run(&csv_plan, &data::load(&csv_plan, &csv).unwrap());
    let keys = "sheet = \"assays\"\nheader_row = 3";
    for file in ["stability_sheets.xlsx", "stability_sheets.ods"] {
        let bytes = std::fs::read(root().join("tests/reference/data").join(file)).unwrap();
        let sheet_plan = plan_for(file, keys);
        let from_sheet = run(&sheet_plan, &data::load_sheet(&sheet_plan, &bytes).unwrap());
        // The same doubles in, so the same numbers out: compared exactly.
        assert_eq!(from_csv, from_sheet, "{file}");
        assert_eq!(
            report::markdown(&from_csv, &[]).unwrap(),
            report::markdown(&from_sheet, &[]).unwrap(),
            "{file}"
        );
    }
    // And the data arrive whole: 54 rows in four lots, none dropped.
    assert_eq!(from_csv.data.rows_used, 54);
    assert_eq!(from_csv.groups.len(), 4);
}

#[test]
fn parquet_gives_the_results_of_the_same_csv() {
    // tests/reference/generate_parquet.py (pyarrow, pinned there) wrote the demo data
    // with the first row's assay null; the CSV twin has that cell empty.
    let csv = std::fs::read_to_string(root().join("demo-data/stability-lots-2026.csv")).unwrap();
    let mut lines: Vec<String> = csv.lines().map(str::to_string).collect();
    let first = lines[1].rsplit_once(',').unwrap().0.to_string();
    lines[1] = format!("{first},");
    let csv = lines.join("\n") + "\n";
    let csv_plan = plan_for("data.csv", "");
    let from_csv = run(&csv_plan, &data::load(&csv_plan, csv.as_bytes()).unwrap());
    let bytes = std::fs::read(root().join("tests/reference/data/stability.parquet")).unwrap();
    let pq_plan = plan_for("stability.parquet", "");
    let from_parquet = run(&pq_plan, &data::load_parquet(&pq_plan, &bytes).unwrap());
    assert_eq!(from_csv, from_parquet);
    // The null is a missing response, counted as such.
    assert_eq!(from_parquet.data.rows_used, 53);
    assert_eq!(
        from_parquet.data.rows_dropped.get("missing_response"),
        Some(&1)
    );
}
