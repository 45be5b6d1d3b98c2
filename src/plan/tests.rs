use super::*;

const MINIMAL: &str = r#"title = "t"
[data]
path = "d.csv"
[model]
response = "y"
covariate = "x"
group = "g"
"#;

fn err(text: &str) -> PlanError {
    load("p.toml", text).expect_err("plan should be refused")
}

#[test]
fn defaults_follow_the_contract() {
    let p = load("p.toml", MINIMAL).unwrap();
    assert_eq!(p.data.missing, vec!["".to_string(), "NA".to_string()]);
    assert_eq!(p.tests.alpha, 0.05);
    assert_eq!(p.tests.slopes_alpha, 0.05);
    assert_eq!(p.tests.comparisons, Comparisons::Holm);
    assert_eq!(p.report.formats, vec![Format::Markdown, Format::Json]);
    assert_eq!(p.model.adjust_at, AdjustAt::Mean);
    assert_eq!(p.model.response_transform, Transform::None);
    assert_eq!(p.report.out, None);
}

#[test]
fn unknown_key_gets_a_suggestion_and_position() {
    let e = err(&format!("{MINIMAL}[tests]\nalpah = 0.1\n"));
    assert_eq!(e.message, "unknown key `alpah`");
    assert!(
        e.help.iter().any(|h| h == "did you mean `alpha`?"),
        "{:?}",
        e.help
    );
    assert_eq!((e.line, e.column), (9, 1));
}

#[test]
fn alpha_outside_the_unit_interval_points_at_the_value() {
    for bad in ["1.5", "0.0", "-0.1", "1.0"] {
        let e = err(&format!("{MINIMAL}[tests]\nslopes_alpha = {bad}\n"));
        assert!(
            e.message
                .starts_with("tests.slopes_alpha must lie strictly between 0 and 1"),
            "{}",
            e.message
        );
        assert_eq!((e.line, e.column), (9, 16));
    }
}

#[test]
fn wrong_type_and_syntax_errors_are_explained() {
    let e = err(&format!("{MINIMAL}[tests]\nalpha = \"0.05\"\n"));
    assert_eq!(
        e.message,
        "tests.alpha must be a number, found the text \"0.05\""
    );
    assert_eq!(e.line, 9);
    let e = err(&MINIMAL.replace("group = \"g\"", "group = \"g\"\nlevels = \"a\""));
    assert_eq!(
        e.message,
        "model.levels must be a list in [ ], found the text \"a\""
    );
    let e = err("title = \"t\n");
    assert!(
        e.message.starts_with("the plan is not valid TOML"),
        "{}",
        e.message
    );
    assert_eq!(e.line, 1);
}

#[test]
fn missing_required_key_is_named() {
    let e =
        err("title = \"t\"\n[data]\npath = \"d.csv\"\n[model]\nresponse = \"y\"\ngroup = \"g\"\n");
    assert_eq!(e.message, "required key `covariate` is missing");
}

#[test]
fn unknown_transform_gets_a_suggestion() {
    let e = err(&format!(
        "{MINIMAL}[model.transform]\nresponse = \"lg10\"\n"
    ));
    assert_eq!(e.message, "unknown value \"lg10\"");
    assert!(
        e.help.iter().any(|h| h == "did you mean \"log10\"?"),
        "{:?}",
        e.help
    );
}

#[test]
fn keep_rules_need_exactly_one_test() {
    let both =
        format!("{MINIMAL}[[data.keep]]\ncolumn = \"s\"\nequals = \"a\"\none_of = [\"b\"]\n")
            .replace(
                "[model]",
                "[[data.keep]]\ncolumn = \"s\"\nequals = \"a\"\none_of = [\"b\"]\n[model]",
            );
    let e = err(&both);
    assert!(
        e.message.contains("exactly one of `equals` or `one_of`"),
        "{}",
        e.message
    );
    let ok = MINIMAL.replace(
        "[model]",
        "[[data.keep]]\ncolumn = \"s\"\none_of = [\"a\", \"b\"]\n[model]",
    );
    let p = load("p.toml", &ok).unwrap();
    assert_eq!(
        p.data.keep[0].accepted,
        vec!["a".to_string(), "b".to_string()]
    );
}

#[test]
fn adjust_at_takes_mean_or_a_number() {
    let p = load(
        "p.toml",
        &MINIMAL.replace("group = \"g\"", "group = \"g\"\nadjust_at = 12"),
    )
    .unwrap();
    assert_eq!(p.model.adjust_at, AdjustAt::Value(12.0));
    let e = err(&MINIMAL.replace("group = \"g\"", "group = \"g\"\nadjust_at = \"median\""));
    assert!(
        e.message
            .contains("adjust_at must be \"mean\" or a finite number")
    );
}

#[test]
fn levels_must_be_distinct_and_at_least_two() {
    let e = err(&MINIMAL.replace(
        "group = \"g\"",
        "group = \"g\"\nlevels = [\"a\", \"b\", \"a\"]",
    ));
    assert_eq!(e.message, "level `a` is listed twice in model.levels");
    let e = err(&MINIMAL.replace("group = \"g\"", "group = \"g\"\nlevels = [\"a\"]"));
    assert!(e.message.contains("fewer than two groups"));
}

#[test]
fn roles_must_name_different_columns() {
    let e = err(&MINIMAL.replace("covariate = \"x\"", "covariate = \"y\""));
    assert!(e.message.contains("both `y`"), "{}", e.message);
}

#[test]
fn a_pin_must_look_like_a_digest() {
    let e = err(&MINIMAL.replace("path = \"d.csv\"", "path = \"d.csv\"\nsha256 = \"abc\""));
    assert_eq!(e.message, "data.sha256 must be 64 hexadecimal digits");
}

#[test]
fn diagnostic_shows_the_line_and_caret() {
    let e = err(&format!("{MINIMAL}[tests]\nalpha = 2\n"));
    let text = e.diagnostic().render();
    assert!(text.contains("--> p.toml:9:9"), "{text}");
    assert!(text.contains("9 | alpha = 2"), "{text}");
}
