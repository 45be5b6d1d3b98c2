//! Lot pooling: which line the limits' crossings are read from.
//!
//! Lot pooling follows ICH Q1E (2003): test equal slopes, then equal intercepts, each
//! at `pooling_alpha` (0.25 by default, the level the guideline recommends), and read
//! the estimate from separate lines, parallel lines, or one pooled line. With
//! `pooling_rule = "equivalence"` each step is decided by two one-sided tests of
//! every pair against its margin instead (see [`equivalence_pooling`]).

use crate::fit::{CommonSlopeFit, SeparateFit};
use crate::plan::{Plan, Procedure};
use crate::results::Pooling;

/// The lot-pooling decision from the two nested F tests already in the results.
///
/// An exact fit is p = 0 and the steps follow it. A step whose test cannot be
/// computed (0/0) stops the procedure: the decision is "not-decided", no crossing is
/// read, and the statement returned beside it says why (the caller puts it first
/// among the warnings).
pub(super) fn pooling(
    plan: &Plan,
    slopes_p: Option<f64>,
    intercepts_p: Option<f64>,
    levels: &[&str],
    separate: &SeparateFit,
    common: &CommonSlopeFit,
) -> Option<(Pooling, Option<String>)> {
    (plan.tests.procedure == Procedure::LotPooling).then(|| {
        let alpha = plan.tests.pooling_alpha;
        if let Some(margins) = plan.tests.pooling_margins {
            return (
                equivalence_pooling(
                    margins,
                    plan.tests.alpha,
                    (slopes_p, intercepts_p, alpha),
                    levels,
                    separate,
                    common,
                ),
                None,
            );
        }
        let (decision, stopped_at) = match slopes_p {
            None => ("not-decided", Some("slopes")),
            Some(p) if p < alpha => ("separate", None),
            Some(_) => match intercepts_p {
                None => ("not-decided", Some("intercepts")),
                Some(p) if p < alpha => ("common-slope", None),
                Some(_) => ("pooled", None),
            },
        };
        let statement = stopped_at.map(|step| {
            let test = if step == "slopes" {
                "equal-slopes"
            } else {
                "equal-intercepts (group-effect)"
            };
            format!(
                "Lot pooling stopped at its {step} step: the {test} test cannot be computed (no residual variation and no difference to test, 0/0), so no line was chosen and no crossing was read. Check that the response holds measured values, not fitted ones."
            )
        });
        (
            Pooling {
                slopes_p,
                intercepts_p,
                alpha,
                decision: decision.to_string(),
                stopped_at: stopped_at.map(str::to_string),
                rule: "difference".into(),
                slope_margin: None,
                intercept_margin: None,
                equivalence_alpha: None,
                slope_pairs: Vec::new(),
                intercept_pairs: Vec::new(),
            },
            statement,
        )
    })
}

/// Equivalence-based pooling: the lots share a slope when every pair of slopes is
/// shown equivalent within the slope margin, and share one line when, on the common
/// slope, every pair of parallel lines is also shown within the intercept margin —
/// two one-sided tests at `alpha` (Schuirmann 1987), the equivalence form of the
/// poolability question (Llabres et al. 2000; Tsong, Chen & Chen 2003). A pair not
/// shown equivalent keeps the lots apart, so a step that cannot be settled never
/// pools. Classical standard errors: slopes on the separate lines' residual variance,
/// line distances ȳ_a − ȳ_b − b (x̄_a − x̄_b) with s² (1/n_a + 1/n_b + (x̄_a −
/// x̄_b)²/Σ Sxx) on the parallel lines' (Snedecor & Cochran 1989, §18.3).
fn equivalence_pooling(
    margins: crate::plan::PoolingMargins,
    alpha: f64,
    (slopes_p, intercepts_p, tests_alpha): (Option<f64>, Option<f64>, f64),
    levels: &[&str],
    separate: &SeparateFit,
    common: &CommonSlopeFit,
) -> Pooling {
    use super::equivalence::{Difference, pair};
    let k = separate.lines.len();
    let all = super::pairwise::pair_indices(k, crate::plan::Comparisons::Holm);
    let s2_sep = separate.sigma2();
    let slope_pairs: Vec<_> = all
        .iter()
        .map(|&(i, j)| {
            let (a, b) = (&separate.lines[i], &separate.lines[j]);
            let se = s2_sep.map(|s2| (s2 * (1.0 / a.moments.sxx + 1.0 / b.moments.sxx)).sqrt());
            let d = Difference::new(levels[i], levels[j], a.slope - b.slope, se, separate.df);
            pair(&d, margins.slope, alpha)
        })
        .collect();
    let shown = |pairs: &[crate::results::EquivalencePair]| {
        !pairs.is_empty() && pairs.iter().all(|p| p.reading == "shown-equivalent")
    };
    let (decision, intercept_pairs) = if !shown(&slope_pairs) {
        ("separate", Vec::new())
    } else {
        let s2 = common.sigma2();
        let pairs: Vec<_> = all
            .iter()
            .map(|&(i, j)| {
                let (a, b) = (&separate.lines[i].moments, &separate.lines[j].moments);
                let dx = a.mean_x - b.mean_x;
                let d = a.mean_y - b.mean_y - common.slope * dx;
                let se = s2.map(|s2| {
                    (s2 * (1.0 / a.n as f64 + 1.0 / b.n as f64 + dx * dx / common.sxx_within))
                        .sqrt()
                });
                pair(
                    &Difference::new(levels[i], levels[j], d, se, common.df),
                    margins.intercept,
                    alpha,
                )
            })
            .collect();
        (
            if shown(&pairs) {
                "pooled"
            } else {
                "common-slope"
            },
            pairs,
        )
    };
    Pooling {
        slopes_p,
        intercepts_p,
        alpha: tests_alpha,
        decision: decision.to_string(),
        stopped_at: None,
        rule: "equivalence".into(),
        slope_margin: Some(margins.slope),
        intercept_margin: Some(margins.intercept),
        equivalence_alpha: Some(alpha),
        slope_pairs,
        intercept_pairs,
    }
}
