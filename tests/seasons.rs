//! `seasons`: comparing two runs and following slopes over several.
//!
//! The runs come from the library itself on the invented nursery demo data
//! (`demo-data/nursery-2025.csv`, `-2026.csv` with `plans/nursery-2025.toml`,
//! `-2026.toml`; see `demo-data/README.md`: 2025 has parallel lines, 2026 a shade
//! bed with a lower slope). Each test recomputes what it checks from the two
//! `Results` with the formulas written out here, and the p-values are checked
//! against scipy.

use std::path::Path;

use slopewise::digest::sha256_hex;
use slopewise::report::figures::trend_svg;
use slopewise::report::seasons::{
    comparison_markdown, comparison_text, trend_markdown, trend_text,
};
use slopewise::results::{Provenance, Results};
use slopewise::seasons::{self, Comparison, Run};
use slopewise::{analysis, data, plan};

fn read(rel: &str) -> String {
    std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join(rel)).unwrap()
}

/// Runs a plan's text on CSV text through the library as the binary does, with
/// real hashes so the provenance comparison has something to compare.
fn run_text(plan_file: &str, plan_text: &str, csv: &str) -> Results {
    let plan = plan::load(plan_file, plan_text).unwrap();
    let dataset = data::load(&plan, csv.as_bytes()).unwrap();
    let provenance = Provenance {
        tool_version: slopewise::TOOL_VERSION.into(),
        plan_sha256: sha256_hex(plan_text.as_bytes()),
        data_sha256: sha256_hex(csv.as_bytes()),
        plan_file: plan_file.into(),
        data_file: plan.data.path.clone(),
        ..Provenance::default()
    };
    analysis::run(&plan, &dataset, provenance).unwrap()
}

/// One demo season as its plan and data stand.
fn season(year: u32) -> Run {
    let plan_file = format!("plans/nursery-{year}.toml");
    Run {
        label: plan_file.clone(),
        results: run_text(
            &plan_file,
            &read(&plan_file),
            &read(&format!("demo-data/nursery-{year}.csv")),
        ),
    }
}

/// An invented third run: the 2026 data with bed `south-1` relabelled `south-9`.
fn relabelled() -> Run {
    let csv = read("demo-data/nursery-2026.csv").replace(",south-1,", ",south-9,");
    Run {
        label: "relabelled-2026".into(),
        results: run_text("relabelled.toml", &read("plans/nursery-2026.toml"), &csv),
    }
}

/// The difference of two independent estimates, written out: change = b2 − b1,
/// se = √(s1² + s2²), t = change / se, and the Welch–Satterthwaite degrees of
/// freedom ν = (s1² + s2²)² / (s1⁴/ν1 + s2⁴/ν2) (Welch 1947; Satterthwaite 1946).
fn hand(b1: f64, s1: f64, df1: f64, b2: f64, s2: f64, df2: f64) -> (f64, f64, f64, f64) {
    let change = b2 - b1;
    let se = (s1 * s1 + s2 * s2).sqrt();
    let t = change / se;
    let df = (s1 * s1 + s2 * s2).powi(2) / (s1.powi(4) / df1 + s2.powi(4) / df2);
    (change, se, t, df)
}

fn close(got: f64, want: f64, rel: f64) -> bool {
    (got - want).abs() <= rel * want.abs().max(1e-300)
}

fn nursery() -> (Run, Run, Comparison) {
    let (old, new) = (season(2025), season(2026));
    let c = seasons::compare(&old, &new, 0.05);
    (old, new, c)
}

#[test]
fn slope_changes_match_a_hand_computation() {
    let (old, new, c) = nursery();
    assert_eq!(c.slopes.len(), 4, "all four beds are in both seasons");
    for s in &c.slopes {
        let go = old
            .results
            .groups
            .iter()
            .find(|g| g.level == s.level)
            .unwrap();
        let gn = new
            .results
            .groups
            .iter()
            .find(|g| g.level == s.level)
            .unwrap();
        let (change, se, t, df) = hand(
            go.slope,
            go.slope_se.unwrap(),
            go.n as f64 - 2.0,
            gn.slope,
            gn.slope_se.unwrap(),
            gn.n as f64 - 2.0,
        );
        assert_eq!(s.slope_old, go.slope);
        assert_eq!(s.slope_new, gn.slope);
        assert!(close(s.change, change, 1e-14), "{}: change", s.level);
        assert!(close(s.se.unwrap(), se, 1e-14), "{}: se", s.level);
        assert!(close(s.t.unwrap(), t, 1e-12), "{}: t", s.level);
        assert!(close(s.df.unwrap(), df, 1e-12), "{}: df", s.level);
        let p = s.p_value.unwrap();
        assert_eq!(s.significant, Some(p < 0.05));
        assert!(s.note.is_none());
    }

    // p-values from scipy 1.17.1 (the venv of rules.md):
    //   2 * scipy.stats.t.sf(abs(t), df)
    // for the t and df printed by the hand computation above on the demo data at the
    // time of writing. The t and df are checked first, so a change in the demo data
    // shows up as that, not as a wrong p-value.
    let scipy = SCIPY_SLOPE_P;
    for (level, t_want, df_want, p_want) in scipy {
        let s = c.slopes.iter().find(|s| s.level == level).unwrap();
        assert!(
            close(s.t.unwrap(), t_want, 1e-9) && close(s.df.unwrap(), df_want, 1e-9),
            "{level}: t {} df {} (the demo data changed?)",
            s.t.unwrap(),
            s.df.unwrap()
        );
        assert!(
            close(s.p_value.unwrap(), p_want, 1e-8),
            "{level}: p {} against scipy {p_want}",
            s.p_value.unwrap()
        );
    }

    // The shade bed's slope fell from about 0.30 to about 0.17 (demo-data/README.md):
    // that change must be significant; the other beds' built-in slopes moved by 0.01.
    let shade = c.slopes.iter().find(|s| s.level == "shade-1").unwrap();
    assert!(shade.change < -0.08 && shade.significant == Some(true));
}

/// (level, t, df, two-sided p) for 2025 → 2026; see the test above for the source.
const SCIPY_SLOPE_P: [(&str, f64, f64, f64); 4] = [
    (
        "north-1",
        1.2935203741862547,
        166.96736565066578,
        0.1976177774642402,
    ),
    (
        "north-2",
        0.21938366835134956,
        188.8719923081411,
        0.8265880995736878,
    ),
    (
        "south-1",
        1.5676754397463852,
        131.92082401432776,
        0.11935248253089463,
    ),
    (
        "shade-1",
        -6.286778033985204,
        221.21049550180803,
        1.7064593514713863e-09,
    ),
];

#[test]
fn the_2025_to_2026_decision_flip_is_reported() {
    let (old, new, c) = nursery();
    // demo-data/README.md: 2025 has parallel lines (gate passes, p ≈ 0.80), 2026 a
    // shade bed with a lower slope (gate fails, p ≈ 5e-14).
    let gate = &c.decisions.equal_slopes;
    assert!(gate.homogeneous_old && !gate.homogeneous_new && gate.flipped);
    assert!(gate.p_old.unwrap() > 0.7 && gate.p_new.unwrap() < 1e-10);
    let effect = &c.decisions.group_effect;
    let sig_old = old.results.group_effect.p_value.unwrap() < old.results.model.alpha;
    let sig_new = new.results.group_effect.p_value.unwrap() < new.results.model.alpha;
    assert_eq!(effect.significant_old, Some(sig_old));
    assert_eq!(effect.significant_new, Some(sig_new));
    assert_eq!(effect.flipped, sig_old != sig_new);

    assert!(c.flagged());
    let flags = c.flags();
    assert!(
        flags
            .iter()
            .any(|f| f.contains("equal-slopes decision flipped"))
    );
    assert!(flags.iter().any(|f| f.contains("slope of shade-1")));

    // 2026 leads with its slopes but still prints adjusted means, as a what-if
    // (issue 13: diff must not say it has none). They are not compared because the
    // two runs give them at different covariate values, and the reason says so.
    assert!(!c.adjusted_means.compared && c.adjusted_means.means.is_empty());
    let reason = c.adjusted_means.reason.as_ref().unwrap();
    assert!(reason.contains("different covariate values"), "{reason}");
    assert!(!reason.contains("no adjusted means"), "{reason}");

    // Row counts from demo-data/README.md.
    let d = &c.data;
    assert_eq!((d.rows_read_old, d.rows_read_new), (383, 377));
    assert_eq!((d.rows_used_old, d.rows_used_new), (370, 363));
    assert!(d.data_changed && d.plan_changed);
    assert_eq!(d.tool_version_old, d.tool_version_new);
    assert_eq!(d.data_sha256_old, old.results.provenance.data_sha256);

    let md = comparison_markdown(&c);
    let gate_row = md
        .lines()
        .find(|l| l.starts_with("| Common slope used"))
        .unwrap();
    assert!(gate_row.contains("**flipped**"), "{gate_row}");
    assert!(md.contains("different covariate values"));
    let text = comparison_text(&c);
    assert!(
        text.lines()
            .any(|l| l.starts_with("Common slope used") && l.ends_with("FLIPPED"))
    );
    assert!(!text.contains("**") && !text.contains('|'));
}

#[test]
fn groups_added_and_removed_when_a_group_is_relabelled() {
    let new = season(2026);
    let third = relabelled();
    let c = seasons::compare(&new, &third, 0.05);
    assert_eq!(c.groups_removed, ["south-1"]);
    assert_eq!(c.groups_added, ["south-9"]);
    assert_eq!(
        c.slopes
            .iter()
            .map(|s| s.level.as_str())
            .collect::<Vec<_>>(),
        ["north-1", "north-2", "shade-1"]
    );
    // The other beds' rows are the same, so nothing moved: change 0, t 0, p 1.
    for s in &c.slopes {
        assert_eq!(s.change, 0.0, "{}", s.level);
        assert_eq!(s.t, Some(0.0));
        assert!(close(s.p_value.unwrap(), 1.0, 1e-12));
        assert_eq!(s.significant, Some(false));
    }
    assert!(!c.decisions.equal_slopes.flipped);
    assert!(!c.flagged(), "{:?}", c.flags());
    assert!(c.data.data_changed && !c.data.plan_changed);

    let md = comparison_markdown(&c);
    assert!(md.contains("- New this run: south-9\n- Gone this run: south-1\n"));
    assert!(md.contains("Nothing flagged"));
    let text = comparison_text(&c);
    assert!(text.contains("  * New this run: south-9\n  * Gone this run: south-1\n"));
}

/// `text` with `adjust_at = 30.0` under `[model]` and, when `three_beds`, a second
/// row filter that keeps the beds other than the shade bed.
fn fixed_at(plan_text: &str, three_beds: bool) -> String {
    let mut p = plan_text.replace("group = \"bed\"\n", "group = \"bed\"\nadjust_at = 30.0\n");
    if three_beds {
        p = p.replace(
            "equals = \"measured\"\n",
            "equals = \"measured\"\n\n[[data.keep]]\ncolumn = \"bed\"\n\
             one_of = [\"north-1\", \"north-2\", \"south-1\"]\n",
        );
    }
    assert_ne!(p, plan_text);
    p
}

#[test]
fn adjusted_means_are_compared_when_both_runs_use_a_common_slope() {
    // 2025 as planned, and 2026 without the shade bed (whose slope differs): both
    // pass the gate; both give the means at 30 cm.
    let a = Run {
        label: "2025 at 30 cm".into(),
        results: run_text(
            "a.toml",
            &fixed_at(&read("plans/nursery-2025.toml"), false),
            &read("demo-data/nursery-2025.csv"),
        ),
    };
    let b = Run {
        label: "2026 three beds at 30 cm".into(),
        results: run_text(
            "b.toml",
            &fixed_at(&read("plans/nursery-2026.toml"), true),
            &read("demo-data/nursery-2026.csv"),
        ),
    };
    assert!(a.results.decision.homogeneous && b.results.decision.homogeneous);
    let c = seasons::compare(&a, &b, 0.05);
    assert!(c.adjusted_means.compared && c.adjusted_means.reason.is_none());
    assert_eq!(c.groups_removed, ["shade-1"]);
    assert_eq!(c.adjusted_means.means.len(), 3);
    for m in &c.adjusted_means.means {
        let mo = a
            .results
            .adjusted_means
            .iter()
            .find(|x| x.level == m.level)
            .unwrap();
        let mn = b
            .results
            .adjusted_means
            .iter()
            .find(|x| x.level == m.level)
            .unwrap();
        // Each mean's df is its own common-slope model's n − k − 1.
        let (change, se, t, df) = hand(
            mo.mean,
            mo.se.unwrap(),
            a.results.common_slope.df,
            mn.mean,
            mn.se.unwrap(),
            b.results.common_slope.df,
        );
        assert_eq!(m.df_old, a.results.common_slope.df);
        assert!(close(m.change, change, 1e-14));
        assert!(close(m.se.unwrap(), se, 1e-14));
        assert!(close(m.t.unwrap(), t, 1e-12));
        assert!(close(m.df.unwrap(), df, 1e-12));
    }
    // scipy 1.17.1, 2 * scipy.stats.t.sf(abs(t), df), for the t and df above.
    let scipy = [
        (
            "north-1",
            4.273643653014609,
            594.8464521268116,
            2.2392213946906017e-05,
        ),
        (
            "north-2",
            3.0939521709778472,
            587.0784458524247,
            0.0020690318478877104,
        ),
        (
            "south-1",
            2.4480961426836596,
            580.6315056228991,
            0.014656237993007356,
        ),
    ];
    for (level, t, df, p) in scipy {
        let m = c
            .adjusted_means
            .means
            .iter()
            .find(|m| m.level == level)
            .unwrap();
        assert!(close(m.t.unwrap(), t, 1e-9) && close(m.df.unwrap(), df, 1e-9));
        assert!(
            close(m.p_value.unwrap(), p, 1e-8),
            "{level}: {:?}",
            m.p_value
        );
        assert_eq!(m.significant, Some(true));
    }
    assert!(c.flagged());
    assert!(comparison_markdown(&c).contains("at covariate = 30;"));

    // The same 2025 data with adjust_at left at the mean: the means sit at another
    // height, so they are not comparable, and the output says so.
    let mean_run = season(2025);
    assert_ne!(mean_run.results.adjust_at, 30.0);
    let c = seasons::compare(&mean_run, &a, 0.05);
    assert!(!c.adjusted_means.compared && c.adjusted_means.means.is_empty());
    let reason = c.adjusted_means.reason.clone().unwrap();
    assert!(reason.contains("different covariate values"), "{reason}");
    assert!(comparison_text(&c).contains("not comparable"));
}

#[test]
fn a_missing_standard_error_gives_a_null_test_and_a_note() {
    let old = season(2025);
    let mut new = season(2026);
    let shade = new
        .results
        .groups
        .iter_mut()
        .find(|g| g.level == "shade-1")
        .unwrap();
    shade.slope_se = None;
    let c = seasons::compare(&old, &new, 0.05);
    let s = c.slopes.iter().find(|s| s.level == "shade-1").unwrap();
    let go = old
        .results
        .groups
        .iter()
        .find(|g| g.level == "shade-1")
        .unwrap();
    let gn = new
        .results
        .groups
        .iter()
        .find(|g| g.level == "shade-1")
        .unwrap();
    assert_eq!(
        s.change,
        gn.slope - go.slope,
        "the change itself is still given"
    );
    assert_eq!((s.se, s.t, s.df, s.p_value), (None, None, None, None));
    assert_eq!(s.significant, None);
    let note = s.note.clone().unwrap();
    assert!(
        note.contains("shade-1") && note.contains("no standard error"),
        "{note}"
    );
    assert!(c.notes.contains(&note));
    // The other beds are still tested.
    assert!(
        c.slopes
            .iter()
            .filter(|s| s.level != "shade-1")
            .all(|s| s.t.is_some())
    );

    let json = serde_json::to_value(&c).unwrap();
    let i = c.slopes.iter().position(|s| s.level == "shade-1").unwrap();
    assert!(json["slopes"][i]["t"].is_null() && json["slopes"][i]["p_value"].is_null());
    let md = comparison_markdown(&c);
    let text = comparison_text(&c);
    for out in [serde_json::to_string(&c).unwrap(), md.clone(), text] {
        assert!(!out.contains("NaN") && !out.contains("inf"));
    }
    let row = md.lines().find(|l| l.starts_with("| shade-1")).unwrap();
    assert!(row.ends_with("| not tested |"), "{row}");
    assert!(md.contains("## Notes"));

    // Both standard errors zero (two perfect fits): no division by zero either.
    let mut old0 = season(2025);
    for r in [&mut old0.results, &mut new.results] {
        for g in &mut r.groups {
            g.slope_se = Some(0.0);
        }
    }
    let c = seasons::compare(&old0, &new, 0.05);
    assert!(
        c.slopes
            .iter()
            .all(|s| s.t.is_none() && s.significant.is_none())
    );
    assert!(
        c.notes
            .iter()
            .any(|n| n.contains("both standard errors are zero"))
    );
    assert!(!serde_json::to_string(&c).unwrap().contains("NaN"));
}

fn three_runs() -> Vec<Run> {
    vec![season(2025), season(2026), relabelled()]
}

#[test]
fn trend_has_one_row_per_group_and_season() {
    let runs = three_runs();
    let t = seasons::trend(&runs, 0.05);
    assert_eq!(t.seasons.len(), 3);
    let levels: Vec<&str> = t.groups.iter().map(|g| g.level.as_str()).collect();
    assert_eq!(
        levels,
        ["north-1", "north-2", "shade-1", "south-1", "south-9"]
    );
    assert!(t.groups.iter().all(|g| g.seasons.len() == 3));
    assert_eq!(
        t.gates.iter().map(|g| g.homogeneous).collect::<Vec<_>>(),
        [true, false, false]
    );

    // 95% critical values from scipy 1.17.1, scipy.stats.t.ppf(0.975, n - 2), for the
    // bed sizes of demo-data/README.md ("complete and measured").
    let t_crit = [
        (84, 1.989318557136572),
        (99, 1.9847231860139845),
        (75, 1.992997125889855),
        (112, 1.981765282132372),
        (87, 1.9882679074772216),
        (94, 1.98608631695113),
        (67, 1.9971379083920038),
        (115, 1.981180359414661),
    ];
    let mut present = 0;
    for g in &t.groups {
        for (p, run) in g.seasons.iter().zip(&runs) {
            assert_eq!(p.season, run.label);
            let Some(line) = run.results.groups.iter().find(|l| l.level == g.level) else {
                assert!(p.n.is_none() && p.slope.is_none() && p.slope_ci.is_none());
                continue;
            };
            present += 1;
            assert_eq!(
                (p.n, p.slope, p.se),
                (Some(line.n), Some(line.slope), line.slope_se)
            );
            let (_, tc) = t_crit.iter().find(|(n, _)| *n == line.n).unwrap();
            let half = tc * line.slope_se.unwrap();
            let [lo, hi] = p.slope_ci.unwrap();
            assert!(close(lo, line.slope - half, 1e-10) && close(hi, line.slope + half, 1e-10));
            // The run itself used alpha 0.05, so its own interval agrees.
            let own = line.slope_ci.unwrap();
            assert!(close(lo, own[0], 1e-10) && close(hi, own[1], 1e-10));
        }
    }
    assert_eq!(present, 12, "four beds in each of three runs");

    // The tables: one row per group and season (5 × 3), absent ones marked.
    let md = trend_markdown(&t);
    let rows: Vec<&str> = md
        .lines()
        .skip_while(|l| !l.starts_with("| Group"))
        .skip(2)
        .take_while(|l| l.starts_with('|'))
        .collect();
    assert_eq!(rows.len(), 15);
    assert_eq!(rows.iter().filter(|r| r.contains("| absent |")).count(), 3);
    let text = trend_text(&t);
    let text_rows = text
        .lines()
        .skip_while(|l| !l.starts_with("Group"))
        .skip(2)
        .take_while(|l| !l.is_empty())
        .count();
    assert_eq!(text_rows, 15);

    // The figure: valid SVG naming every group and run, one marker per present point.
    let svg = trend_svg(&t).unwrap();
    let doc = roxmltree::Document::parse(&svg).unwrap();
    let texts: Vec<String> = doc
        .descendants()
        .filter(|n| n.has_tag_name("text"))
        .map(|n| n.text().unwrap_or("").trim().to_string())
        .collect();
    for level in levels {
        assert!(
            texts.iter().any(|s| s == level),
            "{level} missing from the key"
        );
    }
    assert!(texts.iter().any(|s| s == "relabelled-2026"));
    assert!(texts.iter().any(|s| s.ends_with("nursery-2025.toml")));
}

#[test]
fn markdown_escapes_a_hostile_label() {
    let hostile = "x | *bold* [link](http://e) <script>\n# heading \u{1b}[31m";
    let old = Run {
        label: hostile.into(),
        ..season(2025)
    };
    // A bed label with Markdown and HTML in it, and a run label full of it.
    let csv = read("demo-data/nursery-2026.csv").replace(",north-2,", ",n|*_<b>_*,");
    let new = Run {
        label: hostile.into(),
        results: run_text("h.toml", &read("plans/nursery-2026.toml"), &csv),
    };
    let c = seasons::compare(&old, &new, 0.05);
    assert_eq!(c.groups_added, ["n|*_<b>_*"]);
    let md = comparison_markdown(&c);
    assert!(!md.contains("<script>") && !md.contains("<b>"));
    assert!(!md.lines().any(|l| l.starts_with("# heading")));
    assert!(!md.contains('\u{1b}'));
    // The line break is written out (`\n`, shown as such), so the would-be heading
    // stays inside the label.
    assert!(md.contains(r"x \| \*bold\* \[link\](http://e) \<script\>\\n\# heading"));
    assert!(md.contains(r"n\|\*\_\<b\>\_\*"));
    // Every row of the slope table still has its 13 columns: 14 unescaped pipes.
    let unescaped = |l: &str| {
        let b = l.as_bytes();
        (0..b.len())
            .filter(|&i| b[i] == b'|' && (i == 0 || b[i - 1] != b'\\'))
            .count()
    };
    let slope_rows: Vec<&str> = md
        .lines()
        .skip_while(|l| !l.starts_with("| Group | n before"))
        .take_while(|l| l.starts_with('|'))
        .collect();
    assert_eq!(slope_rows.len(), 2 + 3);
    assert!(
        slope_rows.iter().all(|l| unescaped(l) == 14),
        "{slope_rows:#?}"
    );
    // The terminal text gets no escape character either.
    let text = comparison_text(&c);
    assert!(!text.contains('\u{1b}') && text.contains(r"\u{1b}[31m"));

    let t = seasons::trend(&[old, new], 0.05);
    let md = trend_markdown(&t);
    assert!(!md.contains("<script>") && !md.contains('\u{1b}'));
    let svg = trend_svg(&t).unwrap();
    roxmltree::Document::parse(&svg).expect("hostile labels keep the SVG well formed");
    assert!(!svg.contains("<script>") && !svg.contains('\u{1b}'));
}

#[test]
fn renders_are_identical_run_to_run() {
    let (old, new, c1) = nursery();
    let c2 = seasons::compare(&old, &new, 0.05);
    assert_eq!(c1, c2);
    assert_eq!(comparison_markdown(&c1), comparison_markdown(&c2));
    assert_eq!(comparison_text(&c1), comparison_text(&c2));
    assert_eq!(
        serde_json::to_string(&c1).unwrap(),
        serde_json::to_string(&c2).unwrap()
    );
    // A comparison read back from its JSON renders the same.
    let back: Comparison = serde_json::from_str(&serde_json::to_string(&c1).unwrap()).unwrap();
    assert_eq!(comparison_markdown(&back), comparison_markdown(&c1));

    let (t1, t2) = (
        seasons::trend(&three_runs(), 0.05),
        seasons::trend(&three_runs(), 0.05),
    );
    assert_eq!(trend_markdown(&t1), trend_markdown(&t2));
    assert_eq!(trend_text(&t1), trend_text(&t2));
    assert_eq!(trend_svg(&t1).unwrap(), trend_svg(&t2).unwrap());
}

#[test]
fn terminal_columns_line_up() {
    let (_, _, c) = nursery();
    let text = comparison_text(&c);
    let lines: Vec<&str> = text
        .lines()
        .skip_while(|l| !l.starts_with("Group "))
        .take_while(|l| !l.is_empty())
        .collect();
    assert_eq!(lines.len(), 2 + 4);
    // Right-aligned numbers: every row's "p" cell ends where the header's "p" does,
    // and the left-aligned last column starts where its header starts.
    let header: Vec<char> = lines[0].chars().collect();
    let last = lines[0].find("Significant").unwrap();
    let last = lines[0][..last].chars().count();
    let p_end = last - 2;
    assert_eq!(header[p_end - 1], 'p');
    for l in &lines[2..] {
        let chars: Vec<char> = l.chars().collect();
        assert!(
            chars[p_end - 1].is_ascii_digit() && chars[p_end] == ' ',
            "{l}"
        );
        assert!(chars[last - 1] == ' ' && chars[last] != ' ', "{l}");
    }
}

#[test]
fn a_run_compared_with_itself_is_not_flagged() {
    let run = season(2026);
    let c = seasons::compare(&run, &run, 0.05);
    assert!(!c.flagged() && c.flags().is_empty());
    assert!(c.groups_added.is_empty() && c.groups_removed.is_empty());
    assert!(!c.data.data_changed && !c.data.plan_changed);
    assert!(
        c.slopes
            .iter()
            .all(|s| s.change == 0.0 && s.significant == Some(false))
    );
}
