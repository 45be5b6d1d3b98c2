//! The size of the slope differences, with an interval, and what next season needs.
//!
//! The effect size of the slope differences is Cohen's f² = F·df1/df2 (and partial
//! η² = f²/(1 + f²)); its interval comes from the noncentrality limits of the
//! observed F (Steiger 2004), with λ = f²·(df1 + df2 + 1) as Cohen (1988) relates
//! the two for fixed-effects F tests.
//!
//! For the next season, the equal-slopes test's power is computed from this season's
//! residual variance and each group's covariate spread per row (Sxx/n), for the pair
//! of groups whose slopes are hardest to tell apart: a slope difference δ between
//! them gives noncentrality δ²/(s²(1/(n v_a) + 1/(n v_b))) on (k − 1, kn − 2k) df.
//! With the plan's slope margin δ is that margin; without one, δ is the smallest
//! difference this season's rows detect with power 0.8. Post-hoc power at the
//! observed differences says nothing new beyond the p-value, so it is not given.

use crate::fit::SeparateFit;
use crate::results::NextSeason;
use crate::stats::noncentral_f::{SlopeDesign, noncentrality_limits};

/// (f², its interval, partial η²'s interval) from the equal-slopes F.
pub(super) fn effect_intervals(
    f: Option<f64>,
    df1: f64,
    df2: f64,
    alpha: f64,
) -> (Option<f64>, Option<[f64; 2]>, Option<[f64; 2]>) {
    let Some(f) = f.filter(|f| f.is_finite() && df1 > 0.0 && df2 > 0.0) else {
        return (None, None, None);
    };
    let f2 = f * df1 / df2;
    let n = df1 + df2 + 1.0;
    let limits = noncentrality_limits(f, df1, df2, 1.0 - alpha);
    let f2_ci = limits.map(|[a, b]| [a / n, b / n]);
    let eta_ci = f2_ci.map(|[a, b]| [a / (1.0 + a), b / (1.0 + b)]);
    (Some(f2), f2_ci, eta_ci)
}

/// Powers of this design for differences to detect.
const TARGETS: [f64; 2] = [0.8, 0.9];

/// What next season needs, or `None` with fewer than two groups or no spread.
pub(super) fn next_season(
    levels: &[&str],
    fit: &SeparateFit,
    alpha: f64,
    margin: Option<f64>,
) -> Option<NextSeason> {
    let k = fit.lines.len();
    let s2 = fit.sigma2().filter(|s| *s > 0.0 && s.is_finite())?;
    if k < 2 {
        return None;
    }
    let v: Vec<f64> = fit
        .lines
        .iter()
        .map(|l| l.moments.sxx / l.moments.n as f64)
        .collect();
    // The pair hardest to tell apart: the largest 1/v_a + 1/v_b (first such pair).
    let mut best: Option<(f64, usize, usize)> = None;
    for i in 0..k {
        for j in i + 1..k {
            let hardness = 1.0 / v[i] + 1.0 / v[j];
            if best.is_none_or(|(h, _, _)| hardness > h) {
                best = Some((hardness, i, j));
            }
        }
    }
    let (_, i, j) = best?;
    let rows_now = fit.lines[i].moments.n.min(fit.lines[j].moments.n);
    let design = |delta: f64| SlopeDesign {
        k: k as f64,
        delta,
        s2,
        v1: v[i],
        v2: v[j],
    };
    let (basis, difference, power_now) = match margin {
        Some(m) => (
            "slope-margin",
            m,
            Some(design(m).power(rows_now as f64, alpha)).filter(|p| p.is_finite()),
        ),
        None => {
            // The smallest δ with power 0.8 at this season's rows: power rises with δ.
            let at = |d: f64| design(d).power(rows_now as f64, alpha);
            let mut hi = (s2 * (1.0 / v[i] + 1.0 / v[j])).sqrt() / rows_now as f64;
            let mut steps = 0;
            while !(at(hi) >= TARGETS[0]) && steps < 200 {
                hi *= 2.0;
                steps += 1;
            }
            if !(at(hi) >= TARGETS[0]) {
                return None;
            }
            let mut lo = 0.0;
            for _ in 0..100 {
                let mid = 0.5 * (lo + hi);
                if at(mid) >= TARGETS[0] {
                    hi = mid;
                } else {
                    lo = mid;
                }
            }
            ("detectable-difference", hi, None)
        }
    };
    let d = design(difference);
    Some(NextSeason {
        alpha,
        basis: basis.into(),
        difference,
        pair: [levels[i].to_string(), levels[j].to_string()],
        residual_variance: s2,
        covariate_variance: [v[i], v[j]],
        rows_now,
        power_now,
        rows_for_80: d.rows_for(TARGETS[0], alpha),
        rows_for_90: d.rows_for(TARGETS[1], alpha),
    })
}
