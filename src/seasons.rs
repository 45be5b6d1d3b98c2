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

use std::collections::BTreeMap;
use std::sync::OnceLock;

use serde::{Deserialize, Serialize};

use crate::number::{p_value, sig, trimmed};
use crate::report::escape_markdown;
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
    /// Covariate value of the earlier run's adjusted means.
    pub adjust_at_old: f64,
    /// Covariate value of the later run's adjusted means.
    pub adjust_at_new: f64,
    /// One entry per group with an adjusted mean in both runs (empty when not compared).
    pub means: Vec<MeanChange>,
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
    let effect_old = ro.group_effect.p_value.map(|p| p < ro.model.alpha);
    let effect_new = rn.group_effect.p_value.map(|p| p < rn.model.alpha);
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
        adjust_at_old: ro.adjust_at,
        adjust_at_new: rn.adjust_at,
        means: Vec::new(),
    };
    let reason = match (ro.decision.homogeneous, rn.decision.homogeneous) {
        (true, true) if ro.adjust_at != rn.adjust_at => Some(format!(
            "The runs give adjusted means at different covariate values ({} before, {} now), \
             so the means are not comparable; fix adjust_at to one number in both plans to \
             compare them.",
            sig(ro.adjust_at, 6),
            sig(rn.adjust_at, 6)
        )),
        (true, true) => None,
        (false, false) => {
            Some("Neither run took the slopes as equal, so neither compared adjusted means.".into())
        }
        (false, true) => Some(
            "The earlier run did not take the slopes as equal, so it has no adjusted means \
             to compare."
                .into(),
        ),
        (true, false) => Some(
            "The later run did not take the slopes as equal, so it has no adjusted means \
             to compare."
                .into(),
        ),
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
    if let Some(last) = last {
        if runs.iter().any(|r| {
            r.results.model.response != last.response
                || r.results.model.covariate != last.covariate
                || r.results.model.response_transform != last.response_transform
                || r.results.model.covariate_transform != last.covariate_transform
        }) {
            notes.push(
                "The runs do not all model the same response on the same covariate with the \
                 same transforms; their slopes are not on one scale."
                    .into(),
            );
        }
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
// Formatting shared by the renderers.

/// A label with control characters written out (`\u{1b}`), so a hostile label can
/// neither steer a terminal nor break an SVG or a Markdown line.
fn plain(s: &str) -> String {
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

/// A label for Markdown: control characters written out, then Markdown escaped.
fn md(s: &str) -> String {
    escape_markdown(&plain(s))
}

fn num(x: f64) -> String {
    sig(x, 4)
}

fn opt(x: Option<f64>) -> String {
    x.map_or_else(|| "n/a".into(), num)
}

/// A change with its sign, so "+0.012" and "-0.012" read at a glance.
fn signed(x: f64) -> String {
    let s = num(x);
    if x > 0.0 { format!("+{s}") } else { s }
}

fn opt_t(x: Option<f64>) -> String {
    x.map_or_else(|| "n/a".into(), |t| sig(t, 3))
}

fn opt_p(p: Option<f64>) -> String {
    p.map_or_else(|| "n/a".into(), p_value)
}

fn p_phrase(p: Option<f64>) -> String {
    match p {
        Some(p) if p < 0.0001 => "p < 0.0001".into(),
        Some(p) => format!("p = {}", p_value(p)),
        None => "p not computable".into(),
    }
}

fn yes_no(b: bool) -> &'static str {
    if b { "yes" } else { "no" }
}

fn verdict(s: Option<bool>) -> &'static str {
    match s {
        Some(true) => "yes",
        Some(false) => "no",
        None => "not tested",
    }
}

fn equal_word(homogeneous: bool) -> &'static str {
    if homogeneous { "equal" } else { "unequal" }
}

fn effect_word(significant: Option<bool>) -> &'static str {
    match significant {
        Some(true) => "groups differ",
        Some(false) => "no group difference",
        None => "undecided",
    }
}

fn ci_text(ci: Option<[f64; 2]>) -> String {
    ci.map_or_else(
        || "n/a".into(),
        |[lo, hi]| format!("[{}, {}]", num(lo), num(hi)),
    )
}

/// The first 12 hex digits: enough to see a change; the full hash is in the JSON.
fn short_hash(h: &str) -> String {
    if h.is_empty() {
        "(none)".into()
    } else {
        let short: String = h.chars().take(12).collect();
        if short.len() < h.len() {
            format!("{}…", plain(&short))
        } else {
            plain(&short)
        }
    }
}

fn dropped(m: &BTreeMap<String, u64>) -> String {
    if m.is_empty() {
        return "none".into();
    }
    m.iter()
        .map(|(reason, n)| format!("{}: {n}", plain(reason)))
        .collect::<Vec<_>>()
        .join(", ")
}

fn level_text(x: f64) -> String {
    trimmed(x, 4)
}

fn gate_cell(homogeneous: bool, p: Option<f64>) -> String {
    format!("{} ({})", yes_no(homogeneous), p_phrase(p))
}

fn effect_cell(significant: Option<bool>, p: Option<f64>, alpha: f64) -> String {
    format!(
        "{} ({}, alpha {})",
        verdict(significant),
        p_phrase(p),
        level_text(alpha)
    )
}

/// How a column is aligned.
#[derive(Clone, Copy, PartialEq)]
enum Align {
    Left,
    Right,
}

/// A Markdown table; cells must already be escaped.
fn md_table(header: &[&str], align: &[Align], rows: &[Vec<String>]) -> String {
    let mut s = String::new();
    s.push_str("| ");
    s.push_str(&header.join(" | "));
    s.push_str(" |\n|");
    for a in align {
        s.push_str(if *a == Align::Right { "---:|" } else { ":---|" });
    }
    s.push('\n');
    for row in rows {
        s.push_str("| ");
        s.push_str(&row.join(" | "));
        s.push_str(" |\n");
    }
    s
}

/// A plain-text table with columns padded to their widest cell.
fn text_table(header: &[&str], align: &[Align], rows: &[Vec<String>]) -> String {
    let width = |s: &str| s.chars().count();
    let mut widths: Vec<usize> = header.iter().map(|h| width(h)).collect();
    for row in rows {
        for (w, cell) in widths.iter_mut().zip(row) {
            *w = (*w).max(width(cell));
        }
    }
    let line = |cells: Vec<&str>| {
        let mut out = String::new();
        for (i, cell) in cells.iter().enumerate() {
            if i > 0 {
                out.push_str("  ");
            }
            let pad = " ".repeat(widths[i] - width(cell));
            if align[i] == Align::Right {
                out.push_str(&pad);
                out.push_str(cell);
            } else {
                out.push_str(cell);
                out.push_str(&pad);
            }
        }
        let mut out = out.trim_end().to_string();
        out.push('\n');
        out
    };
    let mut s = line(header.to_vec());
    s.push_str(&line(
        widths
            .iter()
            .map(|w| "-".repeat(*w))
            .collect::<Vec<_>>()
            .iter()
            .map(String::as_str)
            .collect(),
    ));
    for row in rows {
        s.push_str(&line(row.iter().map(String::as_str).collect()));
    }
    s
}

/// Underlined heading for plain text.
fn text_heading(s: &mut String, title: &str, rule: char) {
    s.push_str(title);
    s.push('\n');
    s.push_str(&rule.to_string().repeat(title.chars().count()));
    s.push_str("\n\n");
}

// ---------------------------------------------------------------------------------
// Comparison renderers. Both show the same tables from the same cells; only the
// escaping and the table syntax differ.

/// Which renderer a cell is for: it decides how labels are escaped.
#[derive(Clone, Copy, PartialEq)]
enum Target {
    Markdown,
    Text,
}

impl Target {
    fn label(self, s: &str) -> String {
        match self {
            Target::Markdown => md(s),
            Target::Text => plain(s),
        }
    }

    fn table(self, header: &[&str], align: &[Align], rows: &[Vec<String>]) -> String {
        match self {
            Target::Markdown => md_table(header, align, rows),
            Target::Text => text_table(header, align, rows),
        }
    }

    fn heading(self, s: &mut String, title: &str) {
        match self {
            Target::Markdown => {
                s.push_str("## ");
                s.push_str(title);
                s.push_str("\n\n");
            }
            Target::Text => text_heading(s, title, '-'),
        }
    }

    fn bullet(self, s: &mut String, text: &str) {
        s.push_str(match self {
            Target::Markdown => "- ",
            Target::Text => "  * ",
        });
        s.push_str(text);
        s.push('\n');
    }

    fn strong(self, text: &str) -> String {
        match self {
            Target::Markdown => format!("**{text}**"),
            Target::Text => text.to_uppercase(),
        }
    }
}

/// Markdown text of a note or flag: its labels went through `plain` already.
fn prose(target: Target, text: &str) -> String {
    match target {
        Target::Markdown => escape_markdown(text),
        Target::Text => text.to_string(),
    }
}

fn render_comparison(c: &Comparison, target: Target) -> String {
    let mut s = String::new();
    let title = "Changes between two runs";
    match target {
        Target::Markdown => {
            s.push_str("# ");
            s.push_str(title);
            s.push_str("\n\n");
        }
        Target::Text => text_heading(&mut s, title, '='),
    }
    let intro = [
        format!("Before: {}", target.label(&c.old)),
        format!("Now:    {}", target.label(&c.new)),
    ];
    for line in &intro {
        s.push_str(line);
        s.push_str(if target == Target::Markdown {
            "  \n"
        } else {
            "\n"
        });
    }
    s.push('\n');
    let method = format!(
        "Changes are now minus before. Each is tested as a difference between two \
         independent estimates, t = change / sqrt(SE before² + SE now²), with \
         Welch–Satterthwaite degrees of freedom (Welch 1947; Satterthwaite 1946), \
         two-sided; significant when p < {}.",
        level_text(c.alpha)
    );
    s.push_str(&prose(target, &method));
    s.push_str("\n\n");

    target.heading(&mut s, "Flags");
    let flags = c.flags();
    if flags.is_empty() {
        s.push_str(&prose(
            target,
            &format!(
                "Nothing flagged: no decision flipped and no change is significant at {}.",
                level_text(c.alpha)
            ),
        ));
        s.push('\n');
    } else {
        for f in &flags {
            target.bullet(&mut s, &prose(target, &capitalize(f)));
        }
    }
    s.push('\n');

    target.heading(&mut s, "Decisions");
    let gate = &c.decisions.equal_slopes;
    let effect = &c.decisions.group_effect;
    let flip = |b: bool| {
        if b {
            target.strong("flipped")
        } else {
            "same".into()
        }
    };
    let rows = vec![
        vec![
            "Slopes taken as equal".to_string(),
            prose(target, &gate_cell(gate.homogeneous_old, gate.p_old)),
            prose(target, &gate_cell(gate.homogeneous_new, gate.p_new)),
            flip(gate.flipped),
        ],
        vec![
            "Groups differ (common slope)".to_string(),
            prose(
                target,
                &effect_cell(effect.significant_old, effect.p_old, effect.alpha_old),
            ),
            prose(
                target,
                &effect_cell(effect.significant_new, effect.p_new, effect.alpha_new),
            ),
            flip(effect.flipped),
        ],
    ];
    s.push_str(&target.table(
        &["Decision", "Before", "Now", "Change"],
        &[Align::Left; 4],
        &rows,
    ));
    s.push('\n');

    target.heading(&mut s, "Slope of each group");
    if c.slopes.is_empty() {
        s.push_str("No group is in both runs.\n\n");
    } else {
        let rows: Vec<Vec<String>> = c
            .slopes
            .iter()
            .map(|g| {
                vec![
                    target.label(&g.level),
                    g.n_old.to_string(),
                    g.n_new.to_string(),
                    num(g.slope_old),
                    opt(g.se_old),
                    num(g.slope_new),
                    opt(g.se_new),
                    signed(g.change),
                    opt(g.se),
                    opt_t(g.t),
                    opt(g.df),
                    opt_p(g.p_value),
                    verdict(g.significant).into(),
                ]
            })
            .collect();
        s.push_str(&target.table(
            &[
                "Group",
                "n before",
                "n now",
                "Slope before",
                "SE",
                "Slope now",
                "SE",
                "Change",
                "SE change",
                "t",
                "df",
                "p",
                "Significant",
            ],
            &change_align(),
            &rows,
        ));
        s.push('\n');
    }

    target.heading(&mut s, "Adjusted means");
    let am = &c.adjusted_means;
    if let Some(reason) = &am.reason {
        s.push_str(&prose(target, reason));
        s.push_str("\n\n");
    } else if am.means.is_empty() {
        s.push_str("No group has an adjusted mean in both runs.\n\n");
    } else {
        s.push_str(&prose(
            target,
            &format!(
                "Both runs give the means at covariate = {}; each mean's degrees of freedom \
                 are its run's common-slope model's n − k − 1.",
                trimmed(am.adjust_at_old, 6)
            ),
        ));
        s.push_str("\n\n");
        let rows: Vec<Vec<String>> = am
            .means
            .iter()
            .map(|m| {
                vec![
                    target.label(&m.level),
                    num(m.mean_old),
                    opt(m.se_old),
                    num(m.mean_new),
                    opt(m.se_new),
                    signed(m.change),
                    opt(m.se),
                    opt_t(m.t),
                    opt(m.df),
                    opt_p(m.p_value),
                    verdict(m.significant).into(),
                ]
            })
            .collect();
        let mut align = change_align();
        align.drain(1..3);
        s.push_str(&target.table(
            &[
                "Group",
                "Mean before",
                "SE",
                "Mean now",
                "SE",
                "Change",
                "SE change",
                "t",
                "df",
                "p",
                "Significant",
            ],
            &align,
            &rows,
        ));
        s.push('\n');
    }

    target.heading(&mut s, "Groups");
    if c.groups_added.is_empty() && c.groups_removed.is_empty() {
        s.push_str("The same groups in both runs.\n");
    } else {
        let list = |v: &[String]| {
            if v.is_empty() {
                "none".to_string()
            } else {
                v.iter()
                    .map(|l| target.label(l))
                    .collect::<Vec<_>>()
                    .join(", ")
            }
        };
        target.bullet(&mut s, &format!("New this run: {}", list(&c.groups_added)));
        target.bullet(
            &mut s,
            &format!("Gone this run: {}", list(&c.groups_removed)),
        );
    }
    s.push('\n');

    target.heading(&mut s, "Data and provenance");
    let d = &c.data;
    let changed = |old: &str, new: &str| {
        if old == new {
            "same".to_string()
        } else {
            target.strong("changed")
        }
    };
    let rows = vec![
        vec![
            "Rows read".to_string(),
            d.rows_read_old.to_string(),
            d.rows_read_new.to_string(),
            changed(&d.rows_read_old.to_string(), &d.rows_read_new.to_string()),
        ],
        vec![
            "Rows used".to_string(),
            d.rows_used_old.to_string(),
            d.rows_used_new.to_string(),
            changed(&d.rows_used_old.to_string(), &d.rows_used_new.to_string()),
        ],
        vec![
            "Rows dropped".to_string(),
            prose(target, &dropped(&d.rows_dropped_old)),
            prose(target, &dropped(&d.rows_dropped_new)),
            if d.rows_dropped_old == d.rows_dropped_new {
                "same".into()
            } else {
                target.strong("changed")
            },
        ],
        vec![
            "Data SHA-256".to_string(),
            prose(target, &short_hash(&d.data_sha256_old)),
            prose(target, &short_hash(&d.data_sha256_new)),
            changed(&d.data_sha256_old, &d.data_sha256_new),
        ],
        vec![
            "Plan SHA-256".to_string(),
            prose(target, &short_hash(&d.plan_sha256_old)),
            prose(target, &short_hash(&d.plan_sha256_new)),
            changed(&d.plan_sha256_old, &d.plan_sha256_new),
        ],
        vec![
            "Tool version".to_string(),
            target.label(&d.tool_version_old),
            target.label(&d.tool_version_new),
            changed(&d.tool_version_old, &d.tool_version_new),
        ],
    ];
    s.push_str(&target.table(&["", "Before", "Now", "Change"], &[Align::Left; 4], &rows));

    if !c.notes.is_empty() {
        s.push('\n');
        target.heading(&mut s, "Notes");
        for n in &c.notes {
            target.bullet(&mut s, &prose(target, n));
        }
    }
    s
}

fn change_align() -> Vec<Align> {
    let mut a = vec![Align::Left];
    a.extend([Align::Right; 11]);
    a.push(Align::Left);
    a
}

fn capitalize(s: &str) -> String {
    let mut c = s.chars();
    match c.next() {
        Some(first) => first.to_uppercase().chain(c).collect(),
        None => String::new(),
    }
}

/// The comparison as Markdown, for a file or a review.
pub fn comparison_markdown(c: &Comparison) -> String {
    render_comparison(c, Target::Markdown)
}

/// The comparison as plain terminal text: aligned columns, no colour.
pub fn comparison_text(c: &Comparison) -> String {
    render_comparison(c, Target::Text)
}

// ---------------------------------------------------------------------------------
// Trend renderers.

fn render_trend(t: &Trend, target: Target) -> String {
    let mut s = String::new();
    let title = "Slopes by season";
    match target {
        Target::Markdown => {
            s.push_str("# ");
            s.push_str(title);
            s.push_str("\n\n");
        }
        Target::Text => text_heading(&mut s, title, '='),
    }
    s.push_str(&prose(
        target,
        &format!(
            "Each group's slope of {} on {} in each run, in the order given, with its {}% \
             interval (t with n − 2 df, from the group's own fit).",
            plain(&t.response),
            plain(&t.covariate),
            level_text(100.0 * (1.0 - t.alpha))
        ),
    ));
    s.push_str("\n\n");
    let mut rows = Vec::new();
    for g in &t.groups {
        for p in &g.seasons {
            rows.push(match p.n {
                None => vec![
                    target.label(&g.level),
                    target.label(&p.season),
                    "absent".into(),
                    String::new(),
                    String::new(),
                    String::new(),
                ],
                Some(n) => vec![
                    target.label(&g.level),
                    target.label(&p.season),
                    n.to_string(),
                    opt(p.slope),
                    opt(p.se),
                    ci_text(p.slope_ci),
                ],
            });
        }
    }
    s.push_str(&target.table(
        &["Group", "Run", "n", "Slope", "SE", "Interval"],
        &[
            Align::Left,
            Align::Left,
            Align::Right,
            Align::Right,
            Align::Right,
            Align::Left,
        ],
        &rows,
    ));
    s.push('\n');
    target.heading(&mut s, "Equal-slopes gate by run");
    let rows: Vec<Vec<String>> = t
        .gates
        .iter()
        .map(|g| {
            vec![
                target.label(&g.season),
                yes_no(g.homogeneous).into(),
                opt_p(g.p_value),
            ]
        })
        .collect();
    s.push_str(&target.table(
        &["Run", "Slopes taken as equal", "p"],
        &[Align::Left, Align::Left, Align::Right],
        &rows,
    ));
    if !t.notes.is_empty() {
        s.push('\n');
        target.heading(&mut s, "Notes");
        for n in &t.notes {
            target.bullet(&mut s, &prose(target, n));
        }
    }
    s
}

/// The trend table as Markdown: one row per group and run.
pub fn trend_markdown(t: &Trend) -> String {
    render_trend(t, Target::Markdown)
}

/// The trend table as plain terminal text: aligned columns, no colour.
pub fn trend_text(t: &Trend) -> String {
    render_trend(t, Target::Text)
}

// ---------------------------------------------------------------------------------
// Trend figure.

/// The font every figure's text is measured and named with; plotters' ab_glyph
/// backend knows only registered fonts, so it is registered once per process.
const FONT: &[u8] = crate::report::figures::FONT_BYTES;

fn ensure_font() -> Result<(), String> {
    static REGISTERED: OnceLock<Result<(), String>> = OnceLock::new();
    REGISTERED
        .get_or_init(|| {
            plotters::style::register_font("sans-serif", plotters::style::FontStyle::Normal, FONT)
                .map_err(|_| "the bundled font could not be read".to_string())
        })
        .clone()
}

/// Colours told apart with the common forms of colour blindness (Okabe & Ito 2008),
/// yellow left out because it vanishes on white.
const PALETTE: [(u8, u8, u8); 7] = [
    (0, 114, 178),
    (213, 94, 0),
    (0, 158, 115),
    (204, 121, 167),
    (86, 180, 233),
    (230, 159, 0),
    (0, 0, 0),
];

/// Marker shapes, so groups stay apart in grey print too.
#[derive(Clone, Copy)]
enum Shape {
    Circle,
    Square,
    Triangle,
    Diamond,
    Cross,
    OpenCircle,
}

const SHAPES: [Shape; 6] = [
    Shape::Circle,
    Shape::Square,
    Shape::Triangle,
    Shape::Diamond,
    Shape::Cross,
    Shape::OpenCircle,
];

/// A label cut to `max` characters (keeping the end, where a path's distinctive part
/// is) so axis labels do not overlap.
fn clip_label(s: &str, max: usize) -> String {
    let s = plain(s);
    let n = s.chars().count();
    if n <= max {
        s
    } else {
        let tail: String = s.chars().skip(n - (max - 1)).collect();
        format!("…{tail}")
    }
}

/// Draws each group's slope and interval across the runs: runs along x in the order
/// given, groups side by side within a run, by colour and marker shape, each group's
/// points joined where it is present in consecutive runs.
pub fn trend_svg(t: &Trend) -> Result<String, String> {
    use plotters::prelude::*;

    if t.seasons.is_empty() {
        return Err("a trend needs at least one run".into());
    }
    ensure_font()?;
    let seasons = t.seasons.len();
    let groups = t.groups.len().max(1);
    const LEGEND_WIDTH: u32 = 170;
    let width = (260 + LEGEND_WIDTH + 150 * seasons as u32).clamp(800, 2600);
    let height = (100 + 22 * groups as u32).clamp(480, 2400);

    let mut lo = f64::INFINITY;
    let mut hi = f64::NEG_INFINITY;
    for g in &t.groups {
        for p in &g.seasons {
            for v in p.slope.into_iter().chain(p.slope_ci.into_iter().flatten()) {
                if v.is_finite() {
                    lo = lo.min(v);
                    hi = hi.max(v);
                }
            }
        }
    }
    if !lo.is_finite() {
        (lo, hi) = (-1.0, 1.0);
    }
    let span = if hi > lo {
        hi - lo
    } else {
        lo.abs().max(1.0) * 0.2
    };
    let (y0, y1) = (lo - 0.08 * span, hi + 0.08 * span);
    // Runs sit at multiples of STEP on an integer axis (integer coordinates carry
    // plotters' default tick formatting, which fixed key points need); groups are
    // dodged side by side within a run.
    const STEP: i32 = 1000;
    let dodge = (600 / groups as i32).min(150);
    let offset = |i: usize| ((2 * i as i32 - (groups as i32 - 1)) * dodge) / 2;

    let mut svg = String::new();
    {
        let err = |e: String| format!("trend figure: {e}");
        let root = SVGBackend::with_string(&mut svg, (width, height)).into_drawing_area();
        root.fill(&WHITE).map_err(|e| err(e.to_string()))?;
        // The key gets a strip of its own on the right so it never hides a point.
        let (plot, key) = root.split_horizontally(width - LEGEND_WIDTH);
        let labels: Vec<String> = t.seasons.iter().map(|s| clip_label(s, 22)).collect();
        let keys: Vec<i32> = (0..seasons as i32).map(|i| i * STEP).collect();
        let mut chart = ChartBuilder::on(&plot)
            .caption(
                format!(
                    "Slope of each group by run, with {}% intervals",
                    level_text(100.0 * (1.0 - t.alpha))
                ),
                ("sans-serif", 20).into_font(),
            )
            .margin(16)
            .x_label_area_size(44)
            .y_label_area_size(70)
            .build_cartesian_2d(
                (-STEP / 2..seasons as i32 * STEP - STEP / 2).with_key_points(keys),
                y0..y1,
            )
            .map_err(|e| err(e.to_string()))?;
        chart
            .configure_mesh()
            .disable_x_mesh()
            .x_desc("Run")
            .y_desc(format!(
                "Slope of {} on {}",
                clip_label(&t.response, 30),
                clip_label(&t.covariate, 30)
            ))
            .x_label_formatter(&|x| {
                let i = x / STEP;
                if x % STEP == 0 && (0..labels.len() as i32).contains(&i) {
                    labels[i as usize].clone()
                } else {
                    String::new()
                }
            })
            .y_label_formatter(&|y| sig(*y, 3))
            .label_style(("sans-serif", 13))
            .axis_desc_style(("sans-serif", 14))
            .draw()
            .map_err(|e| err(e.to_string()))?;

        for (gi, g) in t.groups.iter().enumerate() {
            let (r, gr, b) = PALETTE[gi % PALETTE.len()];
            let colour = RGBColor(r, gr, b);
            let shape = SHAPES[gi % SHAPES.len()];
            let x = |si: usize| si as i32 * STEP + offset(gi);
            // Lines join points present in consecutive runs; an absence breaks them.
            let mut segment: Vec<(i32, f64)> = Vec::new();
            let mut segments = Vec::new();
            for (si, p) in g.seasons.iter().enumerate() {
                match p.slope {
                    Some(v) => segment.push((x(si), v)),
                    None => segments.push(std::mem::take(&mut segment)),
                }
            }
            segments.push(segment);
            for seg in segments.into_iter().filter(|s| s.len() > 1) {
                chart
                    .draw_series(LineSeries::new(seg, colour.mix(0.6).stroke_width(1)))
                    .map_err(|e| err(e.to_string()))?;
            }
            for (si, p) in g.seasons.iter().enumerate() {
                if let Some([l, h]) = p.slope_ci {
                    let xi = x(si);
                    let cap = dodge / 4;
                    let style = colour.stroke_width(2);
                    chart
                        .draw_series([
                            PathElement::new(vec![(xi, l), (xi, h)], style),
                            PathElement::new(vec![(xi - cap, l), (xi + cap, l)], style),
                            PathElement::new(vec![(xi - cap, h), (xi + cap, h)], style),
                        ])
                        .map_err(|e| err(e.to_string()))?;
                }
            }
            let points: Vec<(i32, f64)> = g
                .seasons
                .iter()
                .enumerate()
                .filter_map(|(si, p)| p.slope.map(|v| (x(si), v)))
                .collect();
            chart
                .draw_series(points.into_iter().map(|c| marker(shape, colour, c)))
                .map_err(|e| err(e.to_string()))?;
            let y = 60 + 22 * gi as i32;
            key.draw(&marker(shape, colour, (14, y)))
                .map_err(|e| err(e.to_string()))?;
            key.draw(&Text::new(
                clip_label(&g.level, 20),
                (28, y - 7),
                ("sans-serif", 13).into_font(),
            ))
            .map_err(|e| err(e.to_string()))?;
        }
        key.draw(&Text::new("Group", (6, 34), ("sans-serif", 14).into_font()))
            .map_err(|e| err(e.to_string()))?;
        root.present().map_err(|e| err(e.to_string()))?;
    }
    Ok(svg)
}

/// A pixel offset from a marker's centre.
type Px = (i32, i32);

/// The outline of a marker of radius 5 px: a 16-gon with the vertices rounded by
/// hand, so every platform draws the same pixels.
const ROUND: [(i32, i32); 16] = [
    (5, 0),
    (5, 2),
    (4, 4),
    (2, 5),
    (0, 5),
    (-2, 5),
    (-4, 4),
    (-5, 2),
    (-5, 0),
    (-5, -2),
    (-4, -4),
    (-2, -5),
    (0, -5),
    (2, -5),
    (4, -4),
    (5, -2),
];

/// A marker: a filled area and an outline, in pixels around one point. Every shape
/// has this one type, so the plot and the key draw them through the same code.
type Marker<C, DB> = plotters::element::ComposedElement<
    C,
    DB,
    plotters::element::Polygon<(i32, i32)>,
    plotters::element::PathElement<(i32, i32)>,
>;

/// One marker of `shape` centred on `at` (in chart or pixel coordinates).
fn marker<C, DB: plotters::prelude::DrawingBackend>(
    shape: Shape,
    colour: plotters::style::RGBColor,
    at: C,
) -> Marker<C, DB> {
    use plotters::prelude::*;
    let closed = |pts: &[(i32, i32)]| {
        let mut v = pts.to_vec();
        v.push(pts[0]);
        v
    };
    let (fill, outline): (Vec<Px>, Vec<Px>) = match shape {
        Shape::Circle => (ROUND.to_vec(), closed(&ROUND)),
        Shape::Square => {
            let p = [(-4, -4), (4, -4), (4, 4), (-4, 4)];
            (p.to_vec(), closed(&p))
        }
        Shape::Triangle => {
            let p = [(0, -6), (5, 3), (-5, 3)];
            (p.to_vec(), closed(&p))
        }
        Shape::Diamond => {
            let p = [(0, -6), (6, 0), (0, 6), (-6, 0)];
            (p.to_vec(), closed(&p))
        }
        // An X drawn as one stroke: the second diagonal starts from the centre.
        Shape::Cross => (Vec::new(), vec![(-5, -5), (5, 5), (0, 0), (-5, 5), (5, -5)]),
        Shape::OpenCircle => (Vec::new(), closed(&ROUND)),
    };
    // An open shape gets a fully transparent fill, which the SVG backend skips.
    let fill_style = if fill.is_empty() {
        colour.mix(0.0).filled()
    } else {
        colour.filled()
    };
    EmptyElement::at(at)
        + Polygon::new(fill, fill_style)
        + PathElement::new(outline, colour.stroke_width(2))
}
