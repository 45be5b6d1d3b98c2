//! What `slopewise run` does with bad input: each test is one line of the contract
//! ("Errors go to stderr and say what is wrong, where (file, TOML line and column,
//! data row and column), and how to fix it"; "Outputs appear whole or not at all";
//! "Exit status: 0 when every plan ran; non-zero otherwise").
//!
//! Every failing case also gets the harness's standing checks (see `common`): a
//! non-zero exit status, no panic, and the folder left exactly as it was, so no
//! report folder and no hidden `.NAME.partial-*` staging folder. Line and column
//! numbers are counted by hand in the plan text each test states (1-based, columns
//! in characters). All data are invented for these tests.

mod common;

use common::{BASE_PLAN, THREE_PLOTS, Test};

// ---- the data file ----------------------------------------------------------

#[test]
fn missing_data_file_points_at_data_path() {
    Test::new("missing_data_file")
        .plan(BASE_PLAN)
        .fails()
        .stderr_has(&[
            "error: cannot open the data file data.csv",
            "--> plan.toml:4:8",
            r#" 4 | path = "data.csv""#,
            "help: data.path is relative to the folder that holds the plan file",
        ])
        .run();
}

#[test]
fn empty_data_file() {
    Test::new("empty_data_file")
        .plan(BASE_PLAN)
        .file("data.csv", "")
        .fails()
        .stderr_has(&[
            "error: the data file is empty",
            "--> data.csv",
            "help: the file needs a header row naming the columns, then one row per observation",
        ])
        .run();
}

#[test]
fn header_only_data_file() {
    Test::new("header_only")
        .plan(BASE_PLAN)
        .data("plot,length_cm,mass_g")
        .fails()
        .stderr_has(&[
            "error: the data file has a header row but no data rows",
            "--> data.csv",
            "help: the file needs a header row naming the columns",
        ])
        .run();
}

#[test]
fn duplicate_column_names() {
    Test::new("duplicate_columns")
        .plan(BASE_PLAN)
        .data(
            "
            plot,length_cm,mass_g,length_cm
            north,4.0,1.12,4.1
            ",
        )
        .fails()
        .stderr_has(&[
            "error: column name `length_cm` appears twice in the header (columns 2 and 4)",
            "--> data.csv",
            "help: rename one of the columns so every header name is unique",
        ])
        .run();
}

#[test]
fn plan_column_absent_from_data_suggests_the_header_name() {
    Test::new("column_absent")
        .plan(
            r#"
            title = "Leaf mass by hillside plot (invented test data)"

            [data]
            path = "data.csv"

            [model]
            response = "mass-g"
            covariate = "length_cm"
            group = "plot"

            [report]
            out = "out"
            "#,
        )
        .data(THREE_PLOTS)
        .fails()
        .stderr_has(&[
            "error: column `mass-g` named by model.response is not in the data",
            "--> data.csv",
            "--> plan.toml:7:12",
            r#" 7 | response = "mass-g""#,
            "help: did you mean `mass_g`?",
            "help: columns in the data: plot, length_cm, mass_g",
        ])
        .run();
}

#[test]
fn non_numeric_cell_names_data_row_and_column() {
    Test::new("non_numeric_cell")
        .plan(BASE_PLAN)
        .data(
            "
            plot,length_cm,mass_g
            north,4.0,1.12
            north,5.5,n/a
            north,7.0,2.05
            ",
        )
        .fails()
        .stderr_has(&[
            "error: data row 2 (file line 3), column `mass_g` (column 3) holds `n/a`, which is not a number",
            "--> data.csv",
            "add that text to data.missing",
        ])
        .run();
}

#[test]
fn infinite_value_in_numeric_cell() {
    Test::new("infinite_value")
        .plan(BASE_PLAN)
        .data(
            "
            plot,length_cm,mass_g
            north,4.0,1.12
            north,inf,1.58
            north,7.0,2.05
            ",
        )
        .fails()
        .stderr_has(&[
            "error: data row 2 (file line 3), column `length_cm` (column 2) holds `inf`, which is not a finite number",
            "--> data.csv",
            "help: replace it with a finite value, or with a missing-value token from data.missing",
        ])
        .run();
}

#[test]
fn log_of_non_positive_values_names_the_first_rows() {
    Test::new("log_non_positive")
        .plan(
            r#"
            title = "Leaf mass by hillside plot (invented test data)"

            [data]
            path = "data.csv"

            [model]
            response = "mass_g"
            covariate = "length_cm"
            group = "plot"

            [model.transform]
            response = "log"

            [report]
            out = "out"
            "#,
        )
        .data(
            "
            plot,length_cm,mass_g
            north,4.0,1.12
            north,5.5,0
            north,7.0,2.05
            ridge,4.5,1.71
            ridge,6.0,-0.5
            ridge,7.5,2.66
            ",
        )
        .fails()
        .stderr_has(&[
            "error: log of `mass_g` needs positive values, but 2 used rows have other values",
            "first: data row 2 (0), data row 5 (-0.5)",
            "--> data.csv",
            "--> plan.toml:12:12",
            r#"12 | response = "log""#,
            "transform chosen here",
            "help: choose another transform in [model.transform], or exclude those rows with [[data.keep]]",
        ])
        .run();
}

#[test]
fn ragged_row() {
    Test::new("ragged_row")
        .plan(BASE_PLAN)
        .data(
            "
            plot,length_cm,mass_g
            north,4.0,1.12
            north,5.5,1.58,extra
            north,7.0,2.05
            ",
        )
        .fails()
        .stderr_has(&[
            "error: data row 2 (file line 3) has 4 fields, but the header has 3",
            "--> data.csv",
            "help: every row needs as many fields as the header",
        ])
        .run();
}

#[test]
fn data_sha256_pin_mismatch_shows_both_hashes() {
    // The pin is the SHA-256 of empty input; the actual value is THREE_PLOTS's,
    // both computed with GNU coreutils `sha256sum`.
    Test::new("sha256_mismatch")
        .plan(
            r#"
            title = "Leaf mass by hillside plot (invented test data)"

            [data]
            path = "data.csv"
            sha256 = "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855"

            [model]
            response = "mass_g"
            covariate = "length_cm"
            group = "plot"

            [report]
            out = "out"
            "#,
        )
        .data(THREE_PLOTS)
        .fails()
        .stderr_has(&[
            "error: the data file data.csv is not the one the plan pins",
            "its SHA-256 is a3e389a125124950acfd170de5c2c856608be881bab49275858eaa2d77991eae",
            "the plan expects e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855",
            "--> plan.toml:5:10",
            "pinned here",
            "help: if the new data are intended, update data.sha256; otherwise restore the pinned file",
        ])
        .run();
}

// ---- groups -------------------------------------------------------------------

#[test]
fn group_with_fewer_than_three_usable_rows_is_left_out_with_a_warning() {
    // `east` has three rows, but one lacks the response, so two are usable.
    let out = Test::new("group_too_small")
        .plan(BASE_PLAN)
        .data(&format!(
            "{THREE_PLOTS}east,5.0,1.40\neast,6.0,NA\neast,7.0,1.90\n"
        ))
        .succeeds()
        .stdout_has(&["plan.toml: wrote out"])
        .run();
    assert_eq!(
        out.entries("out"),
        [
            "figures",
            "manifest.json",
            "plan.toml",
            "report.md",
            "results.json"
        ]
    );
    let r = out.json("out/results.json");
    let warning = "Group `east` was left out: it has 2 usable rows; a line needs at least 3.";
    let warnings = r["warnings"].as_array().expect("warnings is a list");
    assert!(
        warnings.iter().any(|w| w == warning),
        "warnings: {warnings:?}"
    );
    assert_eq!(r["data"]["rows_read"], 18);
    assert_eq!(r["data"]["rows_used"], 15);
    assert_eq!(r["data"]["rows_dropped"]["group_too_small"], 2);
    assert_eq!(r["data"]["rows_dropped"]["missing_response"], 1);
    assert_eq!(r["data"]["groups_excluded"][0]["level"], "east");
    let levels: Vec<&str> = r["groups"]
        .as_array()
        .expect("groups is a list")
        .iter()
        .map(|g| g["level"].as_str().expect("level is text"))
        .collect();
    assert_eq!(levels, ["north", "ridge", "south"]);
    let report = out.read("out/report.md");
    assert!(
        report.contains("was left out: it has 2 usable rows; a line needs at least 3"),
        "{report}"
    );
}

#[test]
fn group_without_covariate_spread_is_left_out_with_a_warning() {
    let out = Test::new("no_covariate_spread")
        .plan(BASE_PLAN)
        .data(&format!(
            "{THREE_PLOTS}east,6.0,1.40\neast,6.0,1.70\neast,6.0,1.90\n"
        ))
        .succeeds()
        .run();
    let r = out.json("out/results.json");
    let warning = "Group `east` was left out: it has the same covariate value in every row, so it has no slope.";
    let warnings = r["warnings"].as_array().expect("warnings is a list");
    assert!(
        warnings.iter().any(|w| w == warning),
        "warnings: {warnings:?}"
    );
    assert_eq!(r["data"]["rows_used"], 15);
    assert_eq!(r["data"]["rows_dropped"]["no_covariate_spread"], 3);
    assert_eq!(r["groups"].as_array().map(Vec::len), Some(3));
    let report = out.read("out/report.md");
    assert!(
        report.contains("was left out: it has the same covariate value in every row"),
        "{report}"
    );
}

#[test]
fn only_one_group_left_after_exclusions() {
    Test::new("one_group_left")
        .plan(BASE_PLAN)
        .data(
            "
            plot,length_cm,mass_g
            north,4.0,1.12
            north,5.5,1.58
            north,7.0,2.05
            ridge,4.5,1.71
            ridge,6.0,2.10
            ",
        )
        .fails()
        .stderr_has(&[
            "error: only one group (`north`) has enough usable rows to fit a line; comparing lines needs at least two",
            "`ridge` has 2 usable rows; a line needs at least 3",
            "--> data.csv",
            "help: each group needs at least 3 usable rows with at least two different covariate values",
        ])
        .run();
}

#[test]
fn single_group_in_the_data() {
    Test::new("single_group")
        .plan(BASE_PLAN)
        .data(
            "
            plot,length_cm,mass_g
            north,4.0,1.12
            north,5.5,1.58
            north,7.0,2.05
            north,8.5,2.41
            ",
        )
        .fails()
        .stderr_has(&[
            "error: only one group (`north`) has enough usable rows to fit a line; comparing lines needs at least two",
            "--> data.csv",
            "check model.group, data.keep and data.missing",
        ])
        .run();
}

#[test]
fn level_listed_in_plan_but_absent_from_data() {
    Test::new("level_absent")
        .plan(
            r#"
            title = "Leaf mass by hillside plot (invented test data)"

            [data]
            path = "data.csv"

            [model]
            response = "mass_g"
            covariate = "length_cm"
            group = "plot"
            levels = ["north", "ridge", "south", "west"]

            [report]
            out = "out"
            "#,
        )
        .data(THREE_PLOTS)
        .fails()
        .stderr_has(&[
            "error: level `west` listed in model.levels does not occur in column `plot`",
            "--> plan.toml:10:38",
            "named here",
            "help: remove it from model.levels or check its spelling against the data",
        ])
        .run();
}

#[test]
fn misspelt_level_suggests_the_data_label() {
    // Observed: "error: data row 11 (file line 12) has group `south`, which
    // model.levels does not list" with help "add the label to model.levels, ...":
    // no hint that the listed `South` is the typo, and no plan line. (Besides,
    // `AbsentLevel`'s suggestion can never fire: when levels are listed the loader
    // never records the labels it meets, so it suggests from an empty list.)
    Test::new("level_misspelt")
        .plan(
            r#"
            title = "Leaf mass by hillside plot (invented test data)"

            [data]
            path = "data.csv"

            [model]
            response = "mass_g"
            covariate = "length_cm"
            group = "plot"
            levels = ["north", "ridge", "South"]

            [report]
            out = "out"
            "#,
        )
        .data(THREE_PLOTS)
        .fails()
        .stderr_has(&["`South`", "did you mean `south`?", "--> plan.toml:10:29"])
        .run();
}

#[test]
fn data_label_not_in_levels() {
    Test::new("label_not_listed")
        .plan(
            r#"
            title = "Leaf mass by hillside plot (invented test data)"

            [data]
            path = "data.csv"

            [model]
            response = "mass_g"
            covariate = "length_cm"
            group = "plot"
            levels = ["north", "ridge"]

            [report]
            out = "out"
            "#,
        )
        .data(THREE_PLOTS)
        .fails()
        .stderr_has(&[
            "error: data row 11 (file line 12) has group `south` in column `plot`, which model.levels does not list",
            "--> data.csv",
            "help: add the label to model.levels, or leave those rows out with a [[data.keep]] filter on the group column",
        ])
        .run();
}

// ---- the plan file ------------------------------------------------------------

#[test]
fn plan_file_that_does_not_exist() {
    Test::new("plan_missing")
        .args(&["run", "nursery.toml"])
        .fails()
        .stderr_has(&[
            "error: cannot read the plan file nursery.toml",
            "help: check the path",
        ])
        .run();
}

#[test]
fn unknown_plan_key_suggests_the_known_one() {
    Test::new("unknown_key")
        .plan(
            r#"
            title = "Leaf mass by hillside plot (invented test data)"

            [data]
            path = "data.csv"

            [model]
            response = "mass_g"
            covariate = "length_cm"
            group = "plot"
            adjst_at = "mean"

            [report]
            out = "out"
            "#,
        )
        .data(THREE_PLOTS)
        .fails()
        .stderr_has(&[
            "error: unknown key `adjst_at`",
            "--> plan.toml:10:1",
            r#"10 | adjst_at = "mean""#,
            "help: did you mean `adjust_at`?",
            "help: keys allowed here: response, covariate, group, levels, adjust_at, transform",
        ])
        .run();
}

/// `alpha = "0.05"`: a number written as text.
const QUOTED_ALPHA_PLAN: &str = r#"
    title = "Leaf mass by hillside plot (invented test data)"

    [data]
    path = "data.csv"

    [model]
    response = "mass_g"
    covariate = "length_cm"
    group = "plot"

    [tests]
    alpha = "0.05"

    [report]
    out = "out"
"#;

#[test]
fn wrong_type_of_value() {
    Test::new("wrong_type")
        .plan(QUOTED_ALPHA_PLAN)
        .data(THREE_PLOTS)
        .fails()
        .stderr_has(&[
            "error: tests.alpha must be a number, found the text \"0.05\"",
            "--> plan.toml:12:9",
            r#"12 | alpha = "0.05""#,
            r#"help: text goes in quotes ("..."), numbers without"#,
        ])
        .run();
}

#[test]
fn wrong_type_of_value_is_named_in_plain_words() {
    // Observed: "error: wrong type of value: invalid type: string \"0.05\", expected f64".
    // A plan author cannot be expected to know `f64`; the same goes for
    // `levels = "A"` -> "expected a sequence".
    let out = Test::new("wrong_type_plain")
        .plan(QUOTED_ALPHA_PLAN)
        .data(THREE_PLOTS)
        .fails()
        .stderr_has(&["tests.alpha", "a number"])
        .run();
    assert!(!out.stderr.contains("f64"), "{}", out.stderr);
}

#[test]
fn alpha_outside_zero_one() {
    for (name, value) in [("alpha_above_one", "1.5"), ("alpha_zero", "0")] {
        let what = format!("error: tests.alpha must lie strictly between 0 and 1, found {value}");
        Test::new(name)
            .plan(&format!(
                r#"
                title = "Leaf mass by hillside plot (invented test data)"

                [data]
                path = "data.csv"

                [model]
                response = "mass_g"
                covariate = "length_cm"
                group = "plot"

                [tests]
                alpha = {value}

                [report]
                out = "out"
                "#
            ))
            .data(THREE_PLOTS)
            .fails()
            .stderr_has(&[
                what.as_str(),
                "--> plan.toml:12:9",
                "help: use a level such as 0.05 (write 0.05, not 5 or 5%)",
            ])
            .run();
    }
}

#[test]
fn toml_syntax_error() {
    Test::new("toml_syntax")
        .plan(
            r#"
            title = "Leaf mass by hillside plot (invented test data)"

            [data]
            path = "data.csv"

            [model]
            response = "mass_g"
            covariate = "length_cm
            group = "plot"

            [report]
            out = "out"
            "#,
        )
        .data(THREE_PLOTS)
        .fails()
        .stderr_has(&[
            "error: the plan is not valid TOML",
            "--> plan.toml:8:23",
            r#" 8 | covariate = "length_cm"#,
            "help: check quotes, brackets and `=` signs on this line",
        ])
        .run();
}

#[test]
fn missing_required_key() {
    Test::new("missing_key")
        .plan(
            r#"
            title = "Leaf mass by hillside plot (invented test data)"

            [data]
            path = "data.csv"

            [model]
            response = "mass_g"
            group = "plot"

            [report]
            out = "out"
            "#,
        )
        .data(THREE_PLOTS)
        .fails()
        .stderr_has(&[
            "error: required key `covariate` is missing",
            "--> plan.toml:6:1",
            " 6 | [model]",
            "help: add `covariate = ...` to this table",
        ])
        .run();
}

// ---- the output folder ----------------------------------------------------------

#[test]
fn no_output_folder_configured() {
    Test::new("no_output_folder")
        .plan(
            r#"
            title = "Leaf mass by hillside plot (invented test data)"

            [data]
            path = "data.csv"

            [model]
            response = "mass_g"
            covariate = "length_cm"
            group = "plot"
            "#,
        )
        .data(THREE_PLOTS)
        .fails()
        .stderr_has(&[
            "error: the plan plan.toml names no output folder",
            r#"help: add `out = "../reports/NAME"` under [report], or pass `--out DIR`"#,
        ])
        .run();
}

#[test]
fn output_folder_holding_a_foreign_file_is_refused_and_left_untouched() {
    let notes = "field notes from the ridge plot, not written by slopewise\n";
    let out = Test::new("foreign_output")
        .plan(BASE_PLAN)
        .data(THREE_PLOTS)
        .file("out/notes.txt", notes)
        .fails()
        .stderr_has(&[
            "error: the output folder already exists and holds `notes.txt`, which slopewise did not write: out",
            "help: slopewise replaces only a folder it wrote for the same plan; move that file out, or choose a new folder with report.out or --out",
        ])
        .run();
    // The harness already checked that nothing changed; say it once more in words.
    assert_eq!(out.entries("out"), ["notes.txt"]);
    assert_eq!(out.read("out/notes.txt"), notes);
}

// ---- several plans ----------------------------------------------------------------

#[test]
fn several_plans_one_failing_the_others_still_write() {
    let all_plots = r#"
        title = "All plots (invented test data)"

        [data]
        path = "data.csv"

        [model]
        response = "mass_g"
        covariate = "length_cm"
        group = "plot"
    "#;
    let broken = r#"
        title = "A misspelt response (invented test data)"

        [data]
        path = "data.csv"

        [model]
        response = "mass-g"
        covariate = "length_cm"
        group = "plot"
    "#;
    let two_plots = r#"
        title = "North and ridge only (invented test data)"

        [data]
        path = "data.csv"

        [[data.keep]]
        column = "plot"
        one_of = ["north", "ridge"]

        [model]
        response = "mass_g"
        covariate = "length_cm"
        group = "plot"
    "#;
    let out = Test::new("several_plans")
        .file("all-plots.toml", common::unindent(all_plots))
        .file("broken.toml", common::unindent(broken))
        .file("two-plots.toml", common::unindent(two_plots))
        .data(THREE_PLOTS)
        .args(&[
            "run",
            "all-plots.toml",
            "broken.toml",
            "two-plots.toml",
            "--out",
            "reports",
        ])
        .fails_with_outputs()
        .stdout_has(&[
            "all-plots.toml: wrote reports/all-plots",
            "two-plots.toml: wrote reports/two-plots",
            "2 of 3 plans ran; 1 failed",
        ])
        .stderr_has(&[
            "error: column `mass-g` named by model.response is not in the data",
            "--> broken.toml:7:12",
        ])
        .run();
    assert_eq!(out.entries("reports"), ["all-plots", "two-plots"]);
    for (folder, title, groups) in [
        ("all-plots", "All plots (invented test data)", 3),
        ("two-plots", "North and ridge only (invented test data)", 2),
    ] {
        assert_eq!(
            out.entries(&format!("reports/{folder}")),
            [
                "figures",
                "manifest.json",
                "plan.toml",
                "report.md",
                "results.json"
            ]
        );
        let r = out.json(&format!("reports/{folder}/results.json"));
        assert_eq!(r["title"], title);
        assert_eq!(r["groups"].as_array().map(Vec::len), Some(groups));
    }
}

#[test]
fn several_plans_with_the_same_stem_are_refused() {
    // Observed: stdout "a/p.toml: wrote reports/p", "b/p.toml: wrote reports/p",
    // "2 of 2 plans ran; 0 failed", exit status 0; reports/p holds plan b's results
    // only, so plan a's report is lost without a word.
    let plan = |title: &str| {
        common::unindent(&format!(
            r#"
            title = "{title}"

            [data]
            path = "../data.csv"

            [model]
            response = "mass_g"
            covariate = "length_cm"
            group = "plot"
            "#
        ))
    };
    Test::new("same_stem")
        .file("a/p.toml", plan("Plan a (invented test data)"))
        .file("b/p.toml", plan("Plan b (invented test data)"))
        .data(THREE_PLOTS)
        .args(&["run", "a/p.toml", "b/p.toml", "--out", "reports"])
        .fails_with_outputs()
        .stderr_has(&["a/p.toml", "b/p.toml"])
        .run();
}

#[test]
fn more_than_two_hundred_groups_run_with_tables_cut_and_no_nan() {
    // Invented data: 210 plots of four leaves each, the same slope, shifted levels.
    let mut data = String::from("plot,length_cm,mass_g\n");
    for g in 0..210 {
        for (i, e) in [0.03, -0.02, 0.01, -0.04].iter().enumerate() {
            let x = 4.0 + 2.0 * i as f64;
            data.push_str(&format!(
                "p{g:03},{x},{}\n",
                0.5 + 0.01 * g as f64 + 0.25 * x + e
            ));
        }
    }
    // 21,945 pairs: above the default report.max_pairs, so the plan raises it to
    // see the pairwise tables cut at 200 rows.
    let plan = BASE_PLAN.replace("[report]\n", "[report]\n    max_pairs = 30000\n");
    let out = Test::new("many_groups")
        .plan(&plan)
        .data(&data)
        .succeeds()
        .run();
    let r = out.json("out/results.json");
    let pairs = 210 * 209 / 2;
    assert_eq!(r["groups"].as_array().map(Vec::len), Some(210));
    assert_eq!(r["pairwise_slopes"].as_array().map(Vec::len), Some(pairs));
    let warnings = r["warnings"].as_array().expect("warnings is a list");
    assert!(
        warnings
            .iter()
            .any(|w| w.as_str().is_some_and(|w| w.starts_with(
                "Tukey–Kramer p-values are left out (null): with 210 groups there are 21945 pairs"
            ))),
        "{warnings:?}"
    );
    let report = out.read("out/report.md");
    let cut = format!("The first 200 of {pairs} rows are shown; results.json holds them all.");
    assert!(report.contains(&cut), "no cut note in the report");
    for text in [report.as_str(), out.read("out/results.json").as_str()] {
        assert!(
            !text.contains("NaN") && !text.contains('∞'),
            "a non-finite number"
        );
    }
}

#[test]
fn bad_limits_keys_point_at_their_value() {
    // (name, the [limits] lines after `lower = 95.0`, message, line:column, help).
    let cases = [
        (
            "max_beyond_negative",
            "max_beyond = -6",
            "error: limits.max_beyond must be a finite number of at least 0, found -6",
            "--> plan.toml:13:14",
            "help: how far beyond the last observation the period may go",
        ),
        (
            "round_to_zero",
            "round_to = 0",
            "error: limits.round_to must be a number above 0, found 0",
            "--> plan.toml:13:12",
            "help: the step the supported period is rounded down to",
        ),
        (
            "lower_not_below_upper",
            "upper = 90.0",
            "error: limits.lower (95) must be below limits.upper (90)",
            "--> plan.toml:13:9",
            "help: swap them, or check the numbers",
        ),
        (
            "storage_and_factor",
            "storage = \"room\"\nextrapolation_factor = 1.5",
            "error: limits.storage and an explicit extrapolation_factor / max_beyond are given together",
            "--> plan.toml:14:24",
            "help: keep either `storage`",
        ),
    ];
    for (name, lines, what, at, help) in cases {
        let lines = lines.replace('\n', "\n                ");
        Test::new(name)
            .plan(&format!(
                r#"
                title = "Leaf mass by hillside plot (invented test data)"

                [data]
                path = "data.csv"

                [model]
                response = "mass_g"
                covariate = "length_cm"
                group = "plot"

                [limits]
                lower = 95.0
                {lines}

                [report]
                out = "out"
                "#
            ))
            .data(THREE_PLOTS)
            .fails()
            .stderr_has(&[what, at, help])
            .run();
    }
}

// ---- many-to-one comparisons ----------------------------------------------------

/// `BASE_PLAN` with many-to-one comparisons; `comparisons` sits at line 13, column 15,
/// and with `levels` the reference `east` at line 10, column 11.
fn many_to_one_plan(levels: bool) -> String {
    let model = if levels {
        "group = \"plot\"\n    levels = [\"east\", \"north\", \"ridge\", \"south\"]\n"
    } else {
        "group = \"plot\"\n\n"
    };
    BASE_PLAN.replace("group = \"plot\"\n", model).replace(
        "[report]\n",
        "[tests]\n    comparisons = \"against-reference\"\n\n    [report]\n",
    )
}

#[test]
fn many_to_one_with_one_usable_group_points_at_the_comparisons() {
    // Only `north` can carry a line: there is nothing to compare with it.
    let data = THREE_PLOTS
        .lines()
        .filter(|l| !l.starts_with("ridge") && !l.starts_with("south"))
        .collect::<Vec<_>>()
        .join("\n");
    Test::new("many_to_one_one_group")
        .plan(&many_to_one_plan(false))
        .data(&format!("{data}\nsouth,4.0,1.0\n"))
        .fails()
        .stderr_has(&[
            "only one group (`north`) has enough usable rows to fit a line; comparing lines needs at least two",
            "--> plan.toml:13:15",
            "many-to-one comparisons chosen here",
        ])
        .run();
}

#[test]
fn many_to_one_whose_reference_is_left_out_is_an_error_at_the_reference() {
    // `east`, named first in model.levels, has two usable rows: the next level must
    // not silently become the reference.
    Test::new("many_to_one_reference_out")
        .plan(&many_to_one_plan(true))
        .data(&format!("{THREE_PLOTS}east,5.0,1.40\neast,6.0,1.60\n"))
        .fails()
        .stderr_has(&[
            "comparisons = \"against-reference\" compares every group with the first level, `east`, but it has 2 usable rows; a line needs at least 3, so there is no reference line",
            "--> plan.toml:10:11",
            "the reference, named first here",
            "help: put a group with at least 3 usable rows and two covariate values first in model.levels",
        ])
        .run();
}

#[test]
fn many_to_one_is_not_a_choice_misspelt() {
    Test::new("many_to_one_misspelt")
        .plan(&many_to_one_plan(false).replace("against-reference", "against-control"))
        .data(THREE_PLOTS)
        .fails()
        .stderr_has(&["against-reference", "--> plan.toml:13:15"])
        .run();
}

#[test]
fn many_to_one_beyond_ten_groups_takes_the_bonferroni_bound_and_says_so() {
    // Eleven invented plots: ten differences, one more than the multivariate t is
    // integrated for (MAX_MANY_TO_ONE_GROUPS = 10).
    let mut data = String::from("plot,length_cm,mass_g\n");
    for g in 0..11 {
        for i in 0..5 {
            let x = 4.0 + 1.5 * i as f64;
            let e = [0.03, -0.02, 0.01, -0.04, 0.02][(i + g) % 5];
            data.push_str(&format!(
                "p{g:02},{x},{}\n",
                0.4 + 0.02 * g as f64 + 0.25 * x + e
            ));
        }
    }
    let out = Test::new("many_to_one_eleven")
        .plan(&many_to_one_plan(false))
        .data(&data)
        .succeeds()
        .run();
    let r = out.json("out/results.json");
    let family = &r["many_to_one"]["adjusted"];
    assert_eq!(family["method"], "bonferroni");
    let pairs = r["pairwise_adjusted"].as_array().unwrap();
    assert_eq!(pairs.len(), 10);
    for p in pairs {
        let single = p["p_value"].as_f64().unwrap();
        let adjusted = p["p_adjusted"].as_f64().unwrap();
        // Bonferroni (Dunn 1961): p·m capped at 1.
        assert_eq!(adjusted, (single * 10.0).min(1.0), "{p}");
        assert_eq!(p["b"], "p00");
    }
    let warnings = r["warnings"].to_string();
    assert!(
        warnings.contains("With 11 groups the many-to-one p-values and simultaneous intervals are the Bonferroni bound"),
        "{warnings}"
    );
    assert!(
        out.read("out/report.md")
            .contains("they are the Bonferroni bound, conservative")
    );
}

// ---- equivalence-based lot pooling ---------------------------------------------

/// `BASE_PLAN` with a `[tests]` table holding `keys` (one per line, from line 12).
fn pooling_plan(keys: &[&str]) -> String {
    let table = keys
        .iter()
        .map(|k| format!("    {k}\n"))
        .collect::<String>();
    BASE_PLAN.replace("[report]\n", &format!("[tests]\n{table}\n    [report]\n"))
}

#[test]
fn pooling_margins_are_checked_at_their_keys() {
    let lot = "procedure = \"lot-pooling\"";
    let rule = "pooling_rule = \"equivalence\"";
    let cases: [(&str, Vec<&str>, &str, &str); 5] = [
        (
            "pooling_margin_without_rule",
            vec![lot, "pooling_slope_margin = 0.05"],
            "tests.pooling_slope_margin is used only with pooling_rule = \"equivalence\"",
            "--> plan.toml:13:24",
        ),
        (
            "pooling_rule_without_lot_pooling",
            vec![
                rule,
                "pooling_slope_margin = 0.05",
                "pooling_intercept_margin = 1.0",
            ],
            "tests.pooling_rule = \"equivalence\" needs procedure = \"lot-pooling\"",
            "--> plan.toml:12:16",
        ),
        (
            "pooling_rule_missing_margin",
            vec![lot, rule, "pooling_slope_margin = 0.05"],
            "tests.pooling_rule = \"equivalence\" needs tests.pooling_intercept_margin",
            "--> plan.toml:13:16",
        ),
        (
            "pooling_margin_negative",
            vec![
                lot,
                rule,
                "pooling_slope_margin = -0.05",
                "pooling_intercept_margin = 1.0",
            ],
            "tests.pooling_slope_margin must be a positive number, found -0.05",
            "--> plan.toml:14:24",
        ),
        (
            "pooling_margin_zero",
            vec![
                lot,
                rule,
                "pooling_slope_margin = 0.05",
                "pooling_intercept_margin = 0.0",
            ],
            "tests.pooling_intercept_margin must be a positive number, found 0",
            "--> plan.toml:15:28",
        ),
    ];
    for (name, keys, message, at) in cases {
        Test::new(name)
            .plan(&pooling_plan(&keys))
            .data(THREE_PLOTS)
            .fails()
            .stderr_has(&[message, at])
            .run();
    }
}

#[test]
fn pooling_margins_refuse_a_transformed_scale() {
    let plan = pooling_plan(&[
        "procedure = \"lot-pooling\"",
        "pooling_rule = \"equivalence\"",
        "pooling_slope_margin = 0.05",
        "pooling_intercept_margin = 1.0",
    ])
    .replace(
        "group = \"plot\"\n",
        "group = \"plot\"\n    transform = { response = \"log\" }\n",
    );
    Test::new("pooling_margin_log")
        .plan(&plan)
        .data(THREE_PLOTS)
        .fails()
        .stderr_has(&[
            "tests.pooling_slope_margin is on the measured scale, but the plan transforms the response or the covariate",
        ])
        .run();
}

#[test]
fn a_simultaneous_band_for_a_prediction_bound_is_a_plan_error_at_the_band() {
    let plan = BASE_PLAN.replace(
        "[report]\n",
        "[limits]\n    lower = 1.0\n    bound = \"prediction\"\n    band = \"simultaneous\"\n\n    [report]\n",
    );
    Test::new("band_prediction")
        .plan(&plan)
        .data(THREE_PLOTS)
        .fails()
        .stderr_has(&[
            "limits.band = \"simultaneous\" is a band for the mean line, but limits.bound = \"prediction\" asks for a single future result",
            "--> plan.toml:14:8",
        ])
        .run();
}

#[test]
fn many_to_one_reports_simultaneous_intervals_and_says_how() {
    let out = Test::new("many_to_one_report")
        .plan(&many_to_one_plan(false))
        .data(THREE_PLOTS)
        .succeeds()
        .run();
    let r = out.json("out/results.json");
    assert_eq!(r["many_to_one"]["reference"], "north");
    assert_eq!(r["many_to_one"]["adjusted"]["method"], "multivariate-t");
    let report = out.read("out/report.md");
    for fragment in [
        "Every group is compared with the reference, north (the first level)",
        "| pair | differ? | difference | 95% interval | p, many-to-one | simultaneous 95% interval |",
        "simultaneous 95% interval | SE |",
        "Dunnett, C. W. (1955)",
        "Genz, A. & Bretz, F. (2002)",
        "| ridge − north |",
    ] {
        assert!(report.contains(fragment), "{fragment}\n{report}");
    }
    assert!(
        !report.contains("| ridge − south |"),
        "only pairs against the reference"
    );
    assert!(!report.contains("Tukey–Kramer p"), "no Tukey–Kramer column");
}

// ---- several attributes ([[responses]]) ----------------------------------------

/// Invented: two attributes of the three plots, leaf mass and a second column.
const TWO_ATTRIBUTES: &str = "\
plot,length_cm,mass_g,width_cm
north,4.0,1.12,2.0
north,5.5,1.58,2.6
north,7.0,2.05,3.1
north,8.5,2.41,3.9
ridge,4.5,1.71,2.2
ridge,6.0,2.10,2.8
ridge,7.5,2.66,3.3
ridge,9.0,3.02,4.1
";

/// A plan with two attributes: `extra` at line 7 (one line) or 7–8 (two), and with
/// a one-line `extra` the entries' first lines at 9 and 11.
fn attributes_plan(first: &str, second: &str, extra: &str) -> String {
    format!(
        "title = \"Two leaf attributes (invented test data)\"\n[data]\npath = \"data.csv\"\n[model]\ncovariate = \"length_cm\"\ngroup = \"plot\"\n{extra}\n[[responses]]\n{first}\n[[responses]]\n{second}\n[report]\nout = \"out\"\n"
    )
}

#[test]
fn several_attributes_refuse_what_would_be_ambiguous_or_lost() {
    let mass = "column = \"mass_g\"";
    let width = "column = \"width_cm\"";
    let cases: [(&str, String, &str, &str); 9] = [
        (
            "attributes_unknown_limit_key",
            attributes_plan(&format!("{mass}\nlimits = {{ lowr = 1.0 }}"), width, ""),
            "unknown key `lowr`",
            "--> plan.toml:10:12",
        ),
        (
            "attributes_and_response",
            attributes_plan(mass, width, "response = \"mass_g\""),
            "model.response is given beside [[responses]]",
            "--> plan.toml:7:12",
        ),
        (
            "attributes_twice",
            attributes_plan(mass, mass, ""),
            "[[responses]] lists the column `mass_g` twice",
            "--> plan.toml:11:10",
        ),
        (
            "attributes_shared_limit",
            attributes_plan(mass, width, "[limits]\nlower = 1.0"),
            "[limits] gives a lower or upper limit beside [[responses]]",
            "--> plan.toml:8:9",
        ),
        (
            "attributes_lower_above_upper",
            attributes_plan(
                &format!("{mass}\nlimits = {{ lower = 3.0, upper = 2.0 }}"),
                width,
                "",
            ),
            "limits.lower (3) must be below limits.upper (2)",
            "--> plan.toml:10:33",
        ),
        (
            "attributes_negative_max_beyond",
            attributes_plan(
                &format!("{mass}\nlimits = {{ lower = 1.0 }}"),
                width,
                "[limits]\nmax_beyond = -1.0",
            ),
            "limits.max_beyond must be a finite number of at least 0, found -1",
            "--> plan.toml:8:14",
        ),
        (
            "attributes_and_response_unit",
            attributes_plan(mass, width, "[model.units]\nresponse = \"g\""),
            "[model] sets the response's transform or unit beside [[responses]]",
            "--> plan.toml:4:1",
        ),
        (
            "attributes_and_response_transform",
            attributes_plan(mass, width, "transform = { response = \"log\" }"),
            "[model] sets the response's transform or unit beside [[responses]]",
            "--> plan.toml:4:1",
        ),
        (
            "attributes_with_data_on_stdin",
            attributes_plan(mass, width, "").replace("path = \"data.csv\"", "path = \"-\""),
            "a plan with several [[responses]] reads its data once per attribute, and standard input can be read only once",
            "--> plan.toml:3:8",
        ),
    ];
    for (name, plan, message, at) in cases {
        Test::new(name)
            .file("plan.toml", plan)
            .file("data.csv", TWO_ATTRIBUTES)
            .fails()
            .stderr_has(&[message, at])
            .run();
    }
}

#[test]
fn a_model_without_a_response_or_attributes_says_what_to_add() {
    let plan = BASE_PLAN.replace("    response = \"mass_g\"\n", "");
    Test::new("model_without_response")
        .plan(&plan)
        .data(THREE_PLOTS)
        .fails()
        .stderr_has(&[
            "[model] names no response",
            "add `response = \"column\"` under [model], or list the attributes under [[responses]]",
        ])
        .run();
}

#[test]
fn an_attribute_whose_column_is_absent_points_at_its_entry() {
    Test::new("attributes_absent_column")
        .file(
            "plan.toml",
            attributes_plan("column = \"mass_g\"", "column = \"widht_cm\"", ""),
        )
        .file("data.csv", TWO_ATTRIBUTES)
        .fails()
        .stderr_has(&["widht_cm", "width_cm", "--> plan.toml:11:10"])
        .run();
}

// ---- spreadsheets ----------------------------------------------------------------

/// The spreadsheet fixtures (tests/reference/generate_sheets.py: invented demo data).
fn sheet_fixture(file: &str) -> Vec<u8> {
    std::fs::read(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("tests/reference/data")
            .join(file),
    )
    .unwrap()
}

/// A plan reading `file`, its `[data]` keys from line 4 on.
fn sheet_plan(file: &str, keys: &str) -> String {
    format!(
        "title = \"Spreadsheet (invented demo data)\"\n[data]\npath = \"{file}\"\n{keys}\n[model]\nresponse = \"assay_pct\"\ncovariate = \"months\"\ngroup = \"lot\"\n[report]\nout = \"out\"\n"
    )
}

#[test]
fn spreadsheet_problems_name_the_sheet_or_the_cell() {
    let cases: [(&str, &str, &str, &[&str]); 9] = [
        (
            "sheet_missing",
            "stability_sheets.xlsx",
            "sheet = \"assay\"\nheader_row = 3",
            &[
                "error: the workbook has no sheet `assay`",
                "--> plan.toml:4:9",
                "sheets in the workbook: assays, blank, text, formula, merged",
            ],
        ),
        (
            "sheet_empty",
            "stability_sheets.xlsx",
            "sheet = \"blank\"",
            &[
                "sheet `blank` holds no rows from its header row down",
                "--> plan.toml:4:9",
            ],
        ),
        (
            "sheet_header_below_the_data",
            "stability_sheets.ods",
            "sheet = \"assays\"\nheader_row = 900",
            &["sheet `assays` holds no rows from its header row down"],
        ),
        (
            "sheet_text_cell_xlsx",
            "stability_sheets.xlsx",
            "sheet = \"text\"\nheader_row = 3",
            &[
                "cell D7 of sheet `text` (data row 4, column `assay_pct`) holds `n.d.`, which is not a number",
            ],
        ),
        (
            "sheet_text_cell_ods",
            "stability_sheets.ods",
            "sheet = \"text\"\nheader_row = 3",
            &[
                "cell D7 of sheet `text` (data row 4, column `assay_pct`) holds `n.d.`, which is not a number",
            ],
        ),
        (
            "sheet_formula",
            "stability_sheets.xlsx",
            "sheet = \"formula\"\nheader_row = 3",
            &[
                "cell D5 of sheet `formula` holds the formula `D4-0.1` but no saved value",
                "save it again, so every formula's value is stored",
            ],
        ),
        (
            "sheet_merged_xlsx",
            "stability_sheets.xlsx",
            "sheet = \"merged\"\nheader_row = 3",
            &[
                "sheet `merged` has merged cells (A5:A6)",
                "unmerge the cells",
            ],
        ),
        (
            "sheet_merged_ods",
            "stability_sheets.ods",
            "sheet = \"merged\"\nheader_row = 3",
            &["sheet `merged` has merged cells"],
        ),
        (
            "sheet_header_row_zero",
            "stability_sheets.xlsx",
            "header_row = 0",
            &[
                "data.header_row must be a row number of 1 or more, found 0",
                "--> plan.toml:4:14",
            ],
        ),
    ];
    for (name, file, keys, fragments) in cases {
        Test::new(name)
            .plan(&sheet_plan(file, keys))
            .file(file, sheet_fixture(file))
            .fails()
            .stderr_has(fragments)
            .run();
    }
}

#[test]
fn spreadsheet_keys_and_csv_keys_stay_with_their_files() {
    let cases: [(&str, &str, &str, &str, &str); 3] = [
        (
            "sheet_key_on_csv",
            "data.csv",
            "sheet = \"assays\"",
            "data.sheet applies to spreadsheets, but data.path names a CSV file",
            "--> plan.toml:4:9",
        ),
        (
            "delimiter_on_sheet",
            "stability_sheets.xlsx",
            "delimiter = \";\"",
            "data.delimiter applies to CSV files, but data.path names a spreadsheet",
            "--> plan.toml:4:13",
        ),
        (
            "csv_named_xlsx",
            "fake.xlsx",
            "",
            "the data file is a spreadsheet, but it cannot be read as an Office Open XML workbook (.xlsx)",
            "--> fake.xlsx",
        ),
    ];
    for (name, file, keys, message, at) in cases {
        Test::new(name)
            .plan(&sheet_plan(file, keys))
            .file(file, THREE_PLOTS)
            .fails()
            .stderr_has(&[message, at])
            .run();
    }
}

#[test]
fn parquet_problems_name_the_column_and_its_type() {
    Test::new("parquet_text_column")
        .plan(&sheet_plan("stability_text.parquet", ""))
        .file(
            "stability_text.parquet",
            sheet_fixture("stability_text.parquet"),
        )
        .fails()
        .stderr_has(&[
            "error: column `assay_pct` of the Parquet file holds text, not numbers",
            "--> plan.toml:6:12",
            "stored as integers, floats or decimals",
        ])
        .run();
    Test::new("parquet_not_parquet")
        .plan(&sheet_plan("fake.parquet", ""))
        .file("fake.parquet", THREE_PLOTS)
        .fails()
        .stderr_has(&["the data file is a Parquet file, but it cannot be read as Parquet"])
        .run();
    for (name, keys, message) in [
        (
            "parquet_delimiter",
            "delimiter = \";\"",
            "data.delimiter applies to CSV files, but data.path names a Parquet file",
        ),
        (
            "parquet_sheet",
            "sheet = \"x\"",
            "data.sheet applies to spreadsheets, but data.path names a Parquet file",
        ),
    ] {
        Test::new(name)
            .plan(&sheet_plan("stability.parquet", keys))
            .file("stability.parquet", sheet_fixture("stability.parquet"))
            .fails()
            .stderr_has(&[message, "--> plan.toml:4:"])
            .run();
    }
}
