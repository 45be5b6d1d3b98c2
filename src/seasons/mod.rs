//! Seasons: what changed between two runs of a plan, and how each group's slope moves
//! over several runs.
//!
//! A plan is rerun every season and the analyst needs to see what moved: each
//! group's slope, the adjusted means when both runs compared them, the decisions the
//! runs took, the groups that came and went, and whether the data or the plan
//! changed. Two runs' estimates come from different rows, so a change is tested as a
//! difference between independent estimates,
//!
//!   t = (b_new − b_old) / √(se_old² + se_new²),
//!
//! with the Welch–Satterthwaite degrees of freedom
//! ν = (v_old + v_new)² / (v_old²/ν_old + v_new²/ν_new), v = se²
//! (Welch 1947; Satterthwaite 1946).
//!
//! Pure: the caller loads each run's [`Results`] and names it; nothing here touches
//! files, the clock or the environment, so the same runs always render the same
//! bytes. A statistic that cannot be computed is `None` with a note saying why,
//! never NaN.

mod mismatch;
pub use mismatch::mismatches;

use std::collections::BTreeMap;

use serde::{Deserialize, Serialize};

use crate::number::{p_value, sig};
use crate::results::{AdjustedMean, GroupLineResult, Results};
use crate::stats::dist::{t_quantile, t_two_sided};
use crate::stats::welch::welch_df;

/// One run as the user named it.
#[derive(Debug, Clone, PartialEq)]
pub struct Run {
    /// The path the user gave, or the run folder's name: what the output calls it.
    pub label: String,
    /// The run's `results.json`, already loaded.
    pub results: Results,
}

/// Everything that changed from one run to the next.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Comparison {
    /// Label of the earlier run.
    pub old: String,
    /// Label of the later run.
    pub new: String,
    /// Level of the tests of change.
    pub alpha: f64,
    /// One entry per group present in both runs, in the earlier run's level order.
    pub slopes: Vec<SlopeChange>,
    /// Adjusted means, when both runs used the common-slope comparison.
    pub adjusted_means: MeansComparison,
    /// The runs' decisions and whether they flipped.
    pub decisions: Decisions,
    /// Groups in the later run only, in its level order.
    pub groups_added: Vec<String>,
    /// Groups in the earlier run only, in its level order.
    pub groups_removed: Vec<String>,
    /// Rows, hashes and versions of both runs.
    pub data: DataChanges,
    /// Things a reader must know to read the comparison, in plain words.
    pub notes: Vec<String>,
}

/// One group's slope then and now.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SlopeChange {
    /// Group label.
    pub level: String,
    /// Rows of the group in the earlier run.
    pub n_old: u64,
    /// Rows of the group in the later run.
    pub n_new: u64,
    /// Slope in the earlier run.
    pub slope_old: f64,
    /// Its standard error (the group's own residual variance).
    pub se_old: Option<f64>,
    /// Its degrees of freedom, n − 2.
    pub df_old: f64,
    /// Slope in the later run.
    pub slope_new: f64,
    /// Its standard error.
    pub se_new: Option<f64>,
    /// Its degrees of freedom, n − 2.
    pub df_new: f64,
    /// slope_new − slope_old.
    pub change: f64,
    /// √(se_old² + se_new²).
    pub se: Option<f64>,
    /// change / se.
    pub t: Option<f64>,
    /// Welch–Satterthwaite degrees of freedom.
    pub df: Option<f64>,
    /// Two-sided p-value.
    pub p_value: Option<f64>,
    /// p < alpha; `None` when the change could not be tested.
    pub significant: Option<bool>,
    /// Why the change was not tested, when it was not.
    pub note: Option<String>,
}

/// The adjusted means of both runs, or why they were not compared.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct MeansComparison {
    /// True when the means were compared.
    pub compared: bool,
    /// Why not, when they were not.
    pub reason: Option<String>,
    /// What the comparison stands on when a run printed its means as a what-if on
    /// slopes forced equal; null otherwise.
    #[serde(default)]
    pub caution: Option<String>,
    /// Covariate value of the earlier run's adjusted means.
    pub adjust_at_old: f64,
    /// Covariate value of the later run's adjusted means.
    pub adjust_at_new: f64,
    /// One entry per group with an adjusted mean in both runs (empty when not compared).
    pub means: Vec<MeanChange>,
}

/// Where a run's report prints its adjusted means: "main", "forced-equal" or
/// "omitted", from its decision record. Records written before the record held the
/// key printed them in both branches (as the lead or after the slopes).
fn printed_means(r: &Results) -> &str {
    match r.decision.common_slope_tables.as_str() {
        "" if r.decision.homogeneous => "main",
        "" => "forced-equal",
        other => other,
    }
}

/// Whether a run's group effect showed a difference, from its decision record
/// (older records: its p-value against its level).
fn effect_differs(r: &Results) -> Option<bool> {
    match r.decision.group_effect.as_str() {
        "differ" | "exact-fit" => Some(true),
        "not-shown-to-differ" => Some(false),
        "not-computable" => None,
        _ => r.group_effect.p_value.map(|p| p < r.model.alpha),
    }
}

/// One group's adjusted mean then and now.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct MeanChange {
    /// Group label.
    pub level: String,
    /// Adjusted mean in the earlier run.
    pub mean_old: f64,
    /// Its standard error.
    pub se_old: Option<f64>,
    /// Its degrees of freedom: the earlier common-slope model's n − k − 1.
    pub df_old: f64,
    /// Adjusted mean in the later run.
    pub mean_new: f64,
    /// Its standard error.
    pub se_new: Option<f64>,
    /// Its degrees of freedom: the later common-slope model's n − k − 1.
    pub df_new: f64,
    /// mean_new − mean_old.
    pub change: f64,
    /// √(se_old² + se_new²).
    pub se: Option<f64>,
    /// change / se.
    pub t: Option<f64>,
    /// Welch–Satterthwaite degrees of freedom.
    pub df: Option<f64>,
    /// Two-sided p-value.
    pub p_value: Option<f64>,
    /// p < alpha; `None` when the change could not be tested.
    pub significant: Option<bool>,
    /// Why the change was not tested, when it was not.
    pub note: Option<String>,
}

/// The decisions of both runs.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Decisions {
    /// The equal-slopes gate.
    pub equal_slopes: GateChange,
    /// The group effect given a common slope.
    pub group_effect: EffectChange,
}

/// The equal-slopes gate in both runs, each at its own `slopes_alpha`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct GateChange {
    /// Slopes taken as equal in the earlier run.
    pub homogeneous_old: bool,
    /// Slopes taken as equal in the later run.
    pub homogeneous_new: bool,
    /// The earlier gate's p-value.
    pub p_old: Option<f64>,
    /// The later gate's p-value.
    pub p_new: Option<f64>,
    /// The earlier gate's level.
    pub alpha_old: f64,
    /// The later gate's level.
    pub alpha_new: f64,
    /// The decision differs between the runs.
    pub flipped: bool,
}

/// The group effect in both runs, each judged at its own `model.alpha`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct EffectChange {
    /// p < alpha in the earlier run; `None` when its p-value is missing.
    pub significant_old: Option<bool>,
    /// p < alpha in the later run; `None` when its p-value is missing.
    pub significant_new: Option<bool>,
    /// The earlier p-value.
    pub p_old: Option<f64>,
    /// The later p-value.
    pub p_new: Option<f64>,
    /// The earlier run's level.
    pub alpha_old: f64,
    /// The later run's level.
    pub alpha_new: f64,
    /// Both runs decided and the decisions differ.
    pub flipped: bool,
}

/// What the two runs read and which tool and plan produced them.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct DataChanges {
    /// Data rows in the earlier file.
    pub rows_read_old: u64,
    /// Data rows in the later file.
    pub rows_read_new: u64,
    /// Rows the earlier fits used.
    pub rows_used_old: u64,
    /// Rows the later fits used.
    pub rows_used_new: u64,
    /// Rows the earlier run dropped, by reason.
    pub rows_dropped_old: BTreeMap<String, u64>,
    /// Rows the later run dropped, by reason.
    pub rows_dropped_new: BTreeMap<String, u64>,
    /// SHA-256 of the earlier data file.
    pub data_sha256_old: String,
    /// SHA-256 of the later data file.
    pub data_sha256_new: String,
    /// The data files differ.
    pub data_changed: bool,
    /// SHA-256 of the earlier plan file.
    pub plan_sha256_old: String,
    /// SHA-256 of the later plan file.
    pub plan_sha256_new: String,
    /// The plan files differ.
    pub plan_changed: bool,
    /// slopewise version of the earlier run.
    pub tool_version_old: String,
    /// slopewise version of the later run.
    pub tool_version_new: String,
}

impl Comparison {
    /// True when a decision flipped or a change is significant: what the exit-status
    /// option of `diff` reacts to, so a script can stop when a season needs a look.
    pub fn flagged(&self) -> bool {
        !self.flags().is_empty()
    }

    /// Each reason [`Comparison::flagged`] is true, in plain words (empty when it is
    /// false), so the caller can say why it exits non-zero.
    pub fn flags(&self) -> Vec<String> {
        let mut out = Vec::new();
        let gate = &self.decisions.equal_slopes;
        if gate.flipped {
            out.push(format!(
                "the equal-slopes decision flipped: slopes {} before, {} now",
                equal_word(gate.homogeneous_old),
                equal_word(gate.homogeneous_new)
            ));
        }
        let effect = &self.decisions.group_effect;
        if effect.flipped {
            out.push(format!(
                "the group-effect decision flipped: {} before, {} now",
                effect_word(effect.significant_old),
                effect_word(effect.significant_new)
            ));
        }
        for s in &self.slopes {
            if s.significant == Some(true) {
                out.push(format!(
                    "the slope of {} changed by {} ({})",
                    plain(&s.level),
                    signed(s.change),
                    p_phrase(s.p_value)
                ));
            }
        }
        for m in &self.adjusted_means.means {
            if m.significant == Some(true) {
                out.push(format!(
                    "the adjusted mean of {} changed by {} ({})",
                    plain(&m.level),
                    signed(m.change),
                    p_phrase(m.p_value)
                ));
            }
        }
        out
    }
}

/// Each group's slope over a sequence of runs, in the order given.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Trend {
    /// Intervals are at 1 − alpha.
    pub alpha: f64,
    /// Run labels, in order.
    pub seasons: Vec<String>,
    /// Response column of the last run (for axis titles).
    pub response: String,
    /// Covariate column of the last run.
    pub covariate: String,
    /// Every group present in any run, in order of first appearance.
    pub groups: Vec<TrendGroup>,
    /// The equal-slopes gate of each run, in order.
    pub gates: Vec<SeasonGate>,
    /// Things a reader must know, in plain words.
    pub notes: Vec<String>,
}

/// One group across the runs.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct TrendGroup {
    /// Group label.
    pub level: String,
    /// One entry per run, in run order; the fields are `None` where the group is absent.
    pub seasons: Vec<TrendPoint>,
}

/// One group in one run.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct TrendPoint {
    /// Run label.
    pub season: String,
    /// Rows of the group, or `None` when the group is absent from the run.
    pub n: Option<u64>,
    /// Slope.
    pub slope: Option<f64>,
    /// Its standard error.
    pub se: Option<f64>,
    /// Interval at 1 − alpha, t with n − 2 df.
    pub slope_ci: Option<[f64; 2]>,
}

/// One run's equal-slopes gate.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SeasonGate {
    /// Run label.
    pub season: String,
    /// Slopes taken as equal.
    pub homogeneous: bool,
    /// The gate's p-value.
    pub p_value: Option<f64>,
}

/// An estimate from one run with what its test needs.
struct Estimate {
    value: f64,
    se: Option<f64>,
    df: f64,
}

/// The test of a change between two independent estimates.
struct Tested {
    change: f64,
    se: Option<f64>,
    t: Option<f64>,
    df: Option<f64>,
    p_value: Option<f64>,
    significant: Option<bool>,
    note: Option<String>,
}

/// Tests `new − old` as a difference between independent estimates, with
/// Welch–Satterthwaite degrees of freedom (Welch 1947; Satterthwaite 1946). `what`
/// names the estimate in a note, should the test be impossible.
fn test_change(what: &str, old: &Estimate, new: &Estimate, alpha: f64) -> Tested {
    let change = new.value - old.value;
    let untested = |why: String| Tested {
        change,
        se: None,
        t: None,
        df: None,
        p_value: None,
        significant: None,
        note: Some(format!("{what}: change not tested: {why}")),
    };
    let (se_old, se_new) = match (old.se, new.se) {
        (Some(a), Some(b)) if a.is_finite() && b.is_finite() => (a, b),
        (None, Some(_)) => return untested("the earlier run has no standard error".into()),
        (Some(_), None) => return untested("the later run has no standard error".into()),
        _ => return untested("neither run has a standard error".into()),
    };
    if !(old.df > 0.0) || !(new.df > 0.0) {
        return untested("a run has no residual degrees of freedom".into());
    }
    let (v_old, v_new) = (se_old * se_old, se_new * se_new);
    let total = v_old + v_new;
    if !(total > 0.0) || !total.is_finite() {
        return untested("both standard errors are zero".into());
    }
    let se = total.sqrt();
    let t = change / se;
    let Some(df) = welch_df(v_old, old.df, v_new, new.df) else {
        return untested("the statistic is not finite".into());
    };
    let p = t_two_sided(t, df);
    if !t.is_finite() || !df.is_finite() || !p.is_finite() {
        return untested("the statistic is not finite".into());
    }
    Tested {
        change,
        se: Some(se),
        t: Some(t),
        df: Some(df),
        p_value: Some(p),
        significant: Some(p < alpha),
        note: None,
    }
}

/// Every level of the lists, in order of first appearance: one stable order for all runs.
fn union_order<'a>(lists: impl IntoIterator<Item = Vec<&'a str>>) -> Vec<String> {
    let mut out: Vec<String> = Vec::new();
    for list in lists {
        for level in list {
            if !out.iter().any(|l| l == level) {
                out.push(level.to_string());
            }
        }
    }
    out
}

fn group<'a>(r: &'a Results, level: &str) -> Option<&'a GroupLineResult> {
    r.groups.iter().find(|g| g.level == level)
}

fn adjusted<'a>(r: &'a Results, level: &str) -> Option<&'a AdjustedMean> {
    r.adjusted_means.iter().find(|m| m.level == level)
}

/// Compares two runs of a plan, `old` before `new`; changes are new − old, tested at
/// `alpha`.
pub fn compare(old: &Run, new: &Run, alpha: f64) -> Comparison {
    let (ro, rn) = (&old.results, &new.results);
    let mut notes = Vec::new();

    let slopes: Vec<SlopeChange> = ro
        .groups
        .iter()
        .filter_map(|go| group(rn, &go.level).map(|gn| (go, gn)))
        .map(|(go, gn)| {
            let df_old = go.n as f64 - 2.0;
            let df_new = gn.n as f64 - 2.0;
            let tested = test_change(
                &format!("slope of {}", plain(&go.level)),
                &Estimate {
                    value: go.slope,
                    se: go.slope_se,
                    df: df_old,
                },
                &Estimate {
                    value: gn.slope,
                    se: gn.slope_se,
                    df: df_new,
                },
                alpha,
            );
            SlopeChange {
                level: go.level.clone(),
                n_old: go.n,
                n_new: gn.n,
                slope_old: go.slope,
                se_old: go.slope_se,
                df_old,
                slope_new: gn.slope,
                se_new: gn.slope_se,
                df_new,
                change: tested.change,
                se: tested.se,
                t: tested.t,
                df: tested.df,
                p_value: tested.p_value,
                significant: tested.significant,
                note: tested.note,
            }
        })
        .collect();

    let adjusted_means = compare_means(ro, rn, alpha);

    let groups_added: Vec<String> = rn
        .groups
        .iter()
        .filter(|g| group(ro, &g.level).is_none())
        .map(|g| g.level.clone())
        .collect();
    let groups_removed: Vec<String> = ro
        .groups
        .iter()
        .filter(|g| group(rn, &g.level).is_none())
        .map(|g| g.level.clone())
        .collect();

    let gate = GateChange {
        homogeneous_old: ro.decision.homogeneous,
        homogeneous_new: rn.decision.homogeneous,
        p_old: ro.equal_slopes.p_value,
        p_new: rn.equal_slopes.p_value,
        alpha_old: ro.equal_slopes.alpha,
        alpha_new: rn.equal_slopes.alpha,
        flipped: ro.decision.homogeneous != rn.decision.homogeneous,
    };
    let effect_old = effect_differs(ro);
    let effect_new = effect_differs(rn);
    let effect = EffectChange {
        significant_old: effect_old,
        significant_new: effect_new,
        p_old: ro.group_effect.p_value,
        p_new: rn.group_effect.p_value,
        alpha_old: ro.model.alpha,
        alpha_new: rn.model.alpha,
        flipped: matches!((effect_old, effect_new), (Some(a), Some(b)) if a != b),
    };
    if effect_old.is_none() || effect_new.is_none() {
        notes.push(
            "A run has no group-effect p-value, so whether that decision flipped is unknown."
                .into(),
        );
    }

    let (mo, mn) = (&ro.model, &rn.model);
    let model_pairs = [
        ("response", &mo.response, &mn.response),
        ("covariate", &mo.covariate, &mn.covariate),
        ("group column", &mo.group, &mn.group),
        (
            "response transform",
            &mo.response_transform,
            &mn.response_transform,
        ),
        (
            "covariate transform",
            &mo.covariate_transform,
            &mn.covariate_transform,
        ),
    ];
    for (what, a, b) in model_pairs {
        if a != b {
            notes.push(format!(
                "The {what} differs ({} before, {} now): the estimates measure different \
                 things and their changes may mean nothing.",
                plain(a),
                plain(b)
            ));
        }
    }
    if mo.alpha != mn.alpha {
        notes.push(format!(
            "The runs used different levels (alpha {} before, {} now); each group-effect \
             decision is judged at its own run's level.",
            sig(mo.alpha, 4),
            sig(mn.alpha, 4)
        ));
    }
    if ro.equal_slopes.alpha != rn.equal_slopes.alpha {
        notes.push(format!(
            "The equal-slopes gate ran at different levels ({} before, {} now).",
            sig(ro.equal_slopes.alpha, 4),
            sig(rn.equal_slopes.alpha, 4)
        ));
    }
    for s in &slopes {
        notes.extend(s.note.clone());
    }
    for m in &adjusted_means.means {
        notes.extend(m.note.clone());
    }

    let (po, pn) = (&ro.provenance, &rn.provenance);
    let data = DataChanges {
        rows_read_old: ro.data.rows_read,
        rows_read_new: rn.data.rows_read,
        rows_used_old: ro.data.rows_used,
        rows_used_new: rn.data.rows_used,
        rows_dropped_old: ro.data.rows_dropped.clone(),
        rows_dropped_new: rn.data.rows_dropped.clone(),
        data_sha256_old: po.data_sha256.clone(),
        data_sha256_new: pn.data_sha256.clone(),
        data_changed: po.data_sha256 != pn.data_sha256,
        plan_sha256_old: po.plan_sha256.clone(),
        plan_sha256_new: pn.plan_sha256.clone(),
        plan_changed: po.plan_sha256 != pn.plan_sha256,
        tool_version_old: po.tool_version.clone(),
        tool_version_new: pn.tool_version.clone(),
    };

    Comparison {
        old: old.label.clone(),
        new: new.label.clone(),
        alpha,
        slopes,
        adjusted_means,
        decisions: Decisions {
            equal_slopes: gate,
            group_effect: effect,
        },
        groups_added,
        groups_removed,
        data,
        notes,
    }
}

/// Adjusted means are compared only when both runs took the slopes as equal (the
/// means exist to be read only then) and both give them at the same covariate value
/// (means at different points answer different questions).
fn compare_means(ro: &Results, rn: &Results, alpha: f64) -> MeansComparison {
    let mut out = MeansComparison {
        compared: false,
        reason: None,
        caution: None,
        adjust_at_old: ro.adjust_at,
        adjust_at_new: rn.adjust_at,
        means: Vec::new(),
    };
    // Read from each run's decision record: a diff speaks of adjusted means exactly
    // when both reports print them.
    let (po, pn) = (printed_means(ro), printed_means(rn));
    let reason = match (po, pn) {
        ("omitted", "omitted") => Some(
            "Neither run's report prints adjusted means (the slopes differ and the plans leave the what-if out), so there are none to compare."
                .into(),
        ),
        ("omitted", _) => Some(
            "The earlier run's report does not print adjusted means (its slopes differ and its plan leaves the what-if out), so there are none to compare."
                .into(),
        ),
        (_, "omitted") => Some(
            "The later run's report does not print adjusted means (its slopes differ and its plan leaves the what-if out), so there are none to compare."
                .into(),
        ),
        _ if ro.adjust_at != rn.adjust_at => Some(format!(
            "The runs give adjusted means at different covariate values ({} before, {} now), \
             so the means are not comparable; fix adjust_at to one number in both plans to \
             compare them.",
            sig(ro.adjust_at, 6),
            sig(rn.adjust_at, 6)
        )),
        _ => None,
    };
    out.caution = match (po, pn) {
        ("forced-equal", "forced-equal") => Some(
            "Both runs found that the slopes differ: their adjusted means are what-ifs on slopes forced equal, so these changes describe the groups at this covariate value only."
                .into(),
        ),
        ("forced-equal", _) => Some(
            "The earlier run found that the slopes differ: its adjusted means are a what-if on slopes forced equal, so these changes describe the groups at this covariate value only."
                .into(),
        ),
        (_, "forced-equal") => Some(
            "The later run found that the slopes differ: its adjusted means are a what-if on slopes forced equal, so these changes describe the groups at this covariate value only."
                .into(),
        ),
        _ => None,
    };
    if let Some(reason) = reason {
        out.reason = Some(reason);
        return out;
    }
    out.compared = true;
    let (df_old, df_new) = (ro.common_slope.df, rn.common_slope.df);
    out.means = ro
        .adjusted_means
        .iter()
        .filter_map(|mo| adjusted(rn, &mo.level).map(|mn| (mo, mn)))
        .map(|(mo, mn)| {
            let tested = test_change(
                &format!("adjusted mean of {}", plain(&mo.level)),
                &Estimate {
                    value: mo.mean,
                    se: mo.se,
                    df: df_old,
                },
                &Estimate {
                    value: mn.mean,
                    se: mn.se,
                    df: df_new,
                },
                alpha,
            );
            MeanChange {
                level: mo.level.clone(),
                mean_old: mo.mean,
                se_old: mo.se,
                df_old,
                mean_new: mn.mean,
                se_new: mn.se,
                df_new,
                change: tested.change,
                se: tested.se,
                t: tested.t,
                df: tested.df,
                p_value: tested.p_value,
                significant: tested.significant,
                note: tested.note,
            }
        })
        .collect();
    out
}

/// Each group's slope over `runs`, in the order given, with intervals at 1 − alpha
/// recomputed from each slope and its standard error (t with n − 2 df) so every
/// season is shown at the same level even when the plans' levels differ.
pub fn trend(runs: &[Run], alpha: f64) -> Trend {
    let levels = union_order(
        runs.iter()
            .map(|r| r.results.groups.iter().map(|g| g.level.as_str()).collect()),
    );
    let mut notes = Vec::new();
    let groups = levels
        .into_iter()
        .map(|level| {
            let seasons = runs
                .iter()
                .map(|run| match group(&run.results, &level) {
                    None => TrendPoint {
                        season: run.label.clone(),
                        n: None,
                        slope: None,
                        se: None,
                        slope_ci: None,
                    },
                    Some(g) => {
                        let slope_ci = interval(g.slope, g.slope_se, g.n as f64 - 2.0, alpha);
                        if slope_ci.is_none() {
                            notes.push(format!(
                                "{} in {}: no interval (no standard error or too few rows).",
                                plain(&level),
                                plain(&run.label)
                            ));
                        }
                        TrendPoint {
                            season: run.label.clone(),
                            n: Some(g.n),
                            slope: Some(g.slope),
                            se: g.slope_se,
                            slope_ci,
                        }
                    }
                })
                .collect();
            TrendGroup { level, seasons }
        })
        .collect();
    let last = runs.last().map(|r| &r.results.model);
    if let Some(last) = last
        && runs.iter().any(|r| {
            r.results.model.response != last.response
                || r.results.model.covariate != last.covariate
                || r.results.model.response_transform != last.response_transform
                || r.results.model.covariate_transform != last.covariate_transform
        })
    {
        notes.push(
            "The runs do not all model the same response on the same covariate with the \
                 same transforms; their slopes are not on one scale."
                .into(),
        );
    }
    Trend {
        alpha,
        seasons: runs.iter().map(|r| r.label.clone()).collect(),
        response: last.map(|m| m.response.clone()).unwrap_or_default(),
        covariate: last.map(|m| m.covariate.clone()).unwrap_or_default(),
        groups,
        gates: runs
            .iter()
            .map(|r| SeasonGate {
                season: r.label.clone(),
                homogeneous: r.results.decision.homogeneous,
                p_value: r.results.equal_slopes.p_value,
            })
            .collect(),
        notes,
    }
}

/// b ± t(1 − alpha/2, df)·se, or `None` when it cannot be computed.
fn interval(b: f64, se: Option<f64>, df: f64, alpha: f64) -> Option<[f64; 2]> {
    let se = se.filter(|s| s.is_finite())?;
    if !(df > 0.0 && alpha > 0.0 && alpha < 1.0) {
        return None;
    }
    let half = t_quantile(1.0 - alpha / 2.0, df) * se;
    let ci = [b - half, b + half];
    (ci[0].is_finite() && ci[1].is_finite()).then_some(ci)
}

// ---------------------------------------------------------------------------------
// Wording shared with the report: labels and numbers as the flags and tables write them.

/// A label with control characters written out (`\u{1b}`), so a hostile label can
/// neither steer a terminal nor break an SVG or a Markdown line.
pub(crate) fn plain(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        if c.is_control() {
            out.push_str(&c.escape_unicode().to_string());
        } else {
            out.push(c);
        }
    }
    out
}

pub(crate) fn num(x: f64) -> String {
    sig(x, 4)
}

/// A change with its sign, so "+0.012" and "-0.012" read at a glance.
pub(crate) fn signed(x: f64) -> String {
    let s = num(x);
    if x > 0.0 { format!("+{s}") } else { s }
}

pub(crate) fn p_phrase(p: Option<f64>) -> String {
    match p {
        Some(p) if p < 0.0001 => "p < 0.0001".into(),
        Some(p) => format!("p = {}", p_value(p)),
        None => "p not computable".into(),
    }
}

pub(crate) fn equal_word(homogeneous: bool) -> &'static str {
    if homogeneous { "equal" } else { "unequal" }
}

pub(crate) fn effect_word(significant: Option<bool>) -> &'static str {
    match significant {
        Some(true) => "groups differ",
        Some(false) => "no group difference",
        None => "undecided",
    }
}
