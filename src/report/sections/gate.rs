//! "Do the slopes agree?": the equal-slopes gate and its decision.

use super::{Ctx, cell, ci, int, level, num, num3, p, pair, peq};
use crate::number::sig;
use crate::report::cite::Work;
use crate::report::doc::{Builder, Inline, aligns, prose, t};

pub(super) fn section(b: &mut Builder, c: &Ctx) {
    let r = c.r;
    let es = &r.equal_slopes;
    b.section(vec![t("Do the slopes agree?")]);
    b.para(vec![t(format!(
        "Separate lines against parallel lines: {} on {} and {} df, {}; partial η² = {} (share of the slope-difference sum of squares in it plus the residual).",
        if es.status == "exact-fit" {
            "F infinite (exact fit)".to_string()
        } else {
            format!("F = {}", num(es.f))
        },
        int(es.df1),
        int(es.df2),
        if es.status == "exact-fit" {
            "p = 0".to_string()
        } else {
            peq(es.p_value)
        },
        num3(r.effect_sizes.equal_slopes_partial_eta2)
    ))]);
    let es_ = &r.effect_sizes;
    if let (Some(f2), Some(f2_ci), Some(eta_ci)) = (
        es_.equal_slopes_f2,
        es_.equal_slopes_f2_ci,
        es_.equal_slopes_partial_eta2_ci,
    ) {
        b.para(vec![
            t(format!(
                "Size of the slope differences: Cohen's f² = {} ({} interval {}); partial η² {} interval {}, from the noncentrality limits of the observed F (",
                num3(Some(f2)),
                c.conf,
                ci(Some(f2_ci)),
                c.conf,
                ci(Some(eta_ci)),
            )),
            Inline::Cite(Work::Steiger2004),
            t(")."),
        ]);
    }
    b.para(prose(&r.decision.reason));
    if let Some(e) = &r.equivalence {
        equivalence(b, c, e);
    }
}

/// The two one-sided tests of every pair against the margin.
fn equivalence(b: &mut Builder, c: &Ctx, e: &crate::results::Equivalence) {
    let m = sig(e.margin, 4);
    let mut runs = vec![t(format!("Is each slope difference within ±{m} "))];
    runs.extend(c.slope_unit());
    runs.extend([
        t(format!(
            "? Two one-sided tests at {} each (",
            level(e.alpha)
        )),
        Inline::Cite(Work::Schuirmann1987),
        t("; for slopes "),
        Inline::Cite(Work::DixonPechmann2005),
        t(format!(
            "), {} standard errors: a pair is shown equivalent when its {}% interval lies inside ±{m}, shown to differ by more than the margin when it lies wholly beyond one side, and not settled otherwise.",
            if e.covariance == "classical" { "pooled".to_string() } else { e.covariance.to_uppercase() },
            crate::number::trimmed(100.0 * (1.0 - 2.0 * e.alpha), 4)
        )),
    ]);
    b.para(runs);
    equivalence_table(b, &e.pairs, &m, e.alpha);
}

/// One row per pair: difference, (1 − 2α) interval, both one-sided p-values and the
/// reading, against ±`m` (the margin as the report writes it).
pub(super) fn equivalence_table(
    b: &mut Builder,
    pairs: &[crate::results::EquivalencePair],
    m: &str,
    alpha: f64,
) {
    b.table_aligned(
        vec![
            cell("pair"),
            cell("difference"),
            cell(format!(
                "{}% interval",
                crate::number::trimmed(100.0 * (1.0 - 2.0 * alpha), 4)
            )),
            cell(format!("p, at or below −{m}")),
            cell(format!("p, at or above +{m}")),
            cell("reading"),
        ],
        aligns("lrlrrl"),
        pairs
            .iter()
            .map(|q| {
                vec![
                    pair(&q.a, &q.b),
                    cell(num(Some(q.difference))),
                    cell(ci(q.ci)),
                    cell(p(q.p_lower)),
                    cell(p(q.p_upper)),
                    cell(match q.reading.as_str() {
                        "shown-equivalent" => "shown equivalent",
                        "shown-different" => "differ by more than the margin",
                        _ => "not settled",
                    }),
                ]
            })
            .collect(),
    );
}
