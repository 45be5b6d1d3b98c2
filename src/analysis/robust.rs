//! The gate and the comparisons with a heteroscedasticity-consistent covariance.
//!
//! Every estimate here is linear in the responses, θ = Σ c_i y_i, so its sandwich
//! variance is Σ c_i² ω_i with ω_i the row's squared residual, scaled as White (1980)
//! and MacKinnon & White (1985) define: HC0 ω = e², HC1 ω = e² n/(n − p), HC2
//! ω = e²/(1 − h), HC3 ω = e²/(1 − h)², with h the row's leverage in the model and p
//! its number of parameters. No n × n matrix is built: the weights are closed forms.
//!
//! - Separate lines: group g's slope has weights (x_i − x̄_g)/Sxx_g on its own rows,
//!   so v_g = Σ (x − x̄_g)² ω / Sxx_g², and slopes of different groups are
//!   uncorrelated. The Wald statistic of equal slopes is then
//!   W = Σ (b_g − b̄)²/v_g with b̄ the inverse-variance mean (the same for any full set
//!   of contrasts), reported as F = W/(k − 1) on (k − 1, n − 2k) df.
//! - Parallel lines: the common slope has weights w_i = (x_i − x̄_g)/Σ Sxx on every
//!   row; an adjusted mean ȳ_g + b(x₀ − x̄_g) adds 1/n_g on its own rows. With per-group
//!   sums A = Σ ω, B = Σ ω w, C = Σ ω w², each variance is a few products of them.
//!
//! Leverages are the closed forms of [`super::influence`]: 1/n_g + (x − x̄_g)²/Sxx_g for
//! separate lines, 1/n_g + (x − x̄_g)²/Σ Sxx for parallel lines.

use super::interval;
use super::pairwise::{adjust_pairs, covariance, fill_many_to_one, pair_indices};
use crate::data::GroupData;
use crate::fit::{CommonSlopeFit, SeparateFit};
use crate::plan::{Comparisons, Covariance};
use crate::results::{Robust, RobustDifference, RobustMean, RobustWald, SimultaneousFamily};
use crate::stats::dist::{f_sf, t_two_sided};

/// The robust weight of one row: its squared residual scaled by the HC form.
fn omega(kind: Covariance, e: f64, h: f64, n: f64, p: f64) -> f64 {
    match kind {
        Covariance::Classical | Covariance::Hc0 => e * e,
        Covariance::Hc1 => e * e * n / (n - p),
        Covariance::Hc2 => e * e / (1.0 - h),
        Covariance::Hc3 => e * e / ((1.0 - h) * (1.0 - h)),
    }
}

/// What the plan's settings give the robust comparisons.
pub(super) struct Settings {
    pub kind: Covariance,
    pub alpha: f64,
    pub slopes_alpha: f64,
    pub comparisons: Comparisons,
    pub adjust_at: f64,
    /// False beyond `report.max_pairs`: no pair is listed.
    pub list_pairs: bool,
}

/// The robust results (with the many-to-one families' critical values, slopes then
/// adjusted means, under `against-reference`), or `None` for the classical covariance.
pub(super) fn compute(
    s: &Settings,
    levels: &[&str],
    groups: &[&GroupData],
    separate: &SeparateFit,
    common: &CommonSlopeFit,
    classical_homogeneous: bool,
) -> Option<(Robust, [Option<SimultaneousFamily>; 2])> {
    if s.kind == Covariance::Classical {
        return None;
    }
    let k = groups.len();
    let n: f64 = groups.iter().map(|g| g.moments.n as f64).sum();
    let finite = |v: f64| (v.is_finite() && v >= 0.0).then_some(v);

    // Separate lines: each slope's robust variance.
    let p_sep = 2.0 * k as f64;
    let slope_var: Vec<Option<f64>> = groups
        .iter()
        .zip(&separate.lines)
        .map(|(g, line)| {
            let m = &g.moments;
            let mut sum = 0.0;
            for (x, y) in g.points() {
                let dx = x - m.mean_x;
                let e = (y - m.mean_y) - line.slope * dx;
                let h = 1.0 / m.n as f64 + dx * dx / m.sxx;
                sum += dx * dx * omega(s.kind, e, h, n, p_sep);
            }
            finite(sum / (m.sxx * m.sxx))
        })
        .collect();
    let df_sep = separate.df;
    let equal_slopes = wald(
        &separate.lines.iter().map(|l| l.slope).collect::<Vec<_>>(),
        &slope_var,
        df_sep,
        s.slopes_alpha,
    );

    let indices = pair_indices(k, s.comparisons);
    let indices: &[(usize, usize)] = if s.list_pairs { &indices } else { &[] };
    let mut pairwise_slopes = Vec::new();
    for &(i, j) in indices {
        let d = separate.lines[i].slope - separate.lines[j].slope;
        let se = match (slope_var[i], slope_var[j]) {
            (Some(a), Some(b)) => Some((a + b).sqrt()),
            _ => None,
        };
        pairwise_slopes.push(difference(levels[i], levels[j], d, se, df_sep, s.alpha));
    }
    // Against one reference, independent slopes share only its variance.
    let slope_cov = slope_var
        .iter()
        .copied()
        .collect::<Option<Vec<f64>>>()
        .map(|v| covariance(indices, |i, j| (if i == j { v[i] } else { 0.0 }) + v[0]));
    let robust_slopes = adjust(
        &mut pairwise_slopes,
        s.comparisons,
        slope_cov,
        df_sep,
        s.alpha,
    );

    // Parallel lines: per-group sums of the weights.
    let p_com = k as f64 + 1.0;
    let total = common.sxx_within;
    let sums: Vec<[f64; 3]> = groups
        .iter()
        .map(|g| {
            let m = &g.moments;
            let mut acc = [0.0; 3];
            for (x, y) in g.points() {
                let dx = x - m.mean_x;
                let e = (y - m.mean_y) - common.slope * dx;
                let h = 1.0 / m.n as f64 + dx * dx / total;
                let w = omega(s.kind, e, h, n, p_com);
                let c = dx / total;
                acc[0] += w;
                acc[1] += w * c;
                acc[2] += w * c * c;
            }
            acc
        })
        .collect();
    let slope_sum: f64 = sums.iter().map(|a| a[2]).sum();
    let df_com = common.df;
    let adjusted_means = groups
        .iter()
        .zip(levels)
        .zip(&sums)
        .map(|((g, level), [a, b, _])| {
            let m = &g.moments;
            let nf = m.n as f64;
            let lambda = s.adjust_at - m.mean_x;
            let mean = m.mean_y + common.slope * lambda;
            let var = a / (nf * nf) + 2.0 * lambda * b / nf + lambda * lambda * slope_sum;
            let se = finite(var).map(f64::sqrt);
            RobustMean {
                level: level.to_string(),
                mean,
                se,
                ci: interval(mean, se, df_com, s.alpha),
            }
        })
        .collect();
    let mut pairwise_adjusted = Vec::new();
    for &(i, j) in indices {
        let (ma, mb) = (&groups[i].moments, &groups[j].moments);
        let (na, nb) = (ma.n as f64, mb.n as f64);
        let lambda = mb.mean_x - ma.mean_x;
        let d = ma.mean_y - mb.mean_y + common.slope * lambda;
        let var = sums[i][0] / (na * na)
            + sums[j][0] / (nb * nb)
            + 2.0 * lambda * (sums[i][1] / na - sums[j][1] / nb)
            + lambda * lambda * slope_sum;
        let se = finite(var).map(f64::sqrt);
        pairwise_adjusted.push(difference(levels[i], levels[j], d, se, df_com, s.alpha));
    }
    // Against reference 0 with λ_i = x̄_0 − x̄_i, the sum over rows of the two
    // differences' weights times ω: δ_ij A_i/n_i² + A_0/n_0² + λ_j B_i/n_i +
    // λ_i B_j/n_j − (λ_i + λ_j) B_0/n_0 + λ_i λ_j Σ C (the diagonal is the variance
    // above).
    let mean_cov = {
        let n = |g: usize| groups[g].moments.n as f64;
        let lambda = |g: usize| groups[0].moments.mean_x - groups[g].moments.mean_x;
        covariance(indices, |i, j| {
            let own = if i == j {
                sums[i][0] / (n(i) * n(i))
            } else {
                0.0
            };
            own + sums[0][0] / (n(0) * n(0))
                + lambda(j) * sums[i][1] / n(i)
                + lambda(i) * sums[j][1] / n(j)
                - (lambda(i) + lambda(j)) * sums[0][1] / n(0)
                + lambda(i) * lambda(j) * slope_sum
        })
    };
    let robust_adjusted = adjust(
        &mut pairwise_adjusted,
        s.comparisons,
        Some(mean_cov).filter(|c| c.iter().flatten().all(|v| v.is_finite())),
        df_com,
        s.alpha,
    );

    let robust = Robust {
        covariance: s.kind.name().to_string(),
        disagree: equal_slopes.p_value.is_some()
            && equal_slopes.homogeneous != classical_homogeneous,
        classical_homogeneous,
        equal_slopes,
        pairwise_slopes,
        adjusted_means,
        pairwise_adjusted,
    };
    Some((robust, [robust_slopes, robust_adjusted]))
}

/// The Wald test of equal slopes from independent slopes and their variances.
fn wald(slopes: &[f64], var: &[Option<f64>], df2: f64, slopes_alpha: f64) -> RobustWald {
    let df1 = slopes.len() as f64 - 1.0;
    let weights: Option<Vec<f64>> = var
        .iter()
        .map(|v| v.filter(|v| *v > 0.0).map(|v| 1.0 / v))
        .collect();
    let f = weights.and_then(|w| {
        let sw: f64 = w.iter().sum();
        let mean = slopes.iter().zip(&w).map(|(b, w)| b * w).sum::<f64>() / sw;
        let stat: f64 = slopes
            .iter()
            .zip(&w)
            .map(|(b, w)| (b - mean) * (b - mean) * w)
            .sum();
        (df1 > 0.0 && df2 > 0.0 && stat.is_finite()).then(|| stat / df1)
    });
    let p_value = f.map(|f| f_sf(f, df1, df2));
    RobustWald {
        f,
        df1,
        df2,
        p_value,
        // No robust test: fall back to "not shown to differ" only when the classical
        // gate said so; the caller keeps the classical decision then.
        homogeneous: p_value.is_none_or(|p| p >= slopes_alpha),
    }
}

fn difference(a: &str, b: &str, d: f64, se: Option<f64>, df: f64, alpha: f64) -> RobustDifference {
    let t = se.filter(|s| *s > 0.0).map(|s| d / s);
    RobustDifference {
        a: a.to_string(),
        b: b.to_string(),
        difference: d,
        se,
        t,
        df,
        p_value: t.map(|t| t_two_sided(t, df)),
        p_adjusted: None,
        ci: interval(d, se, df, alpha),
        ci_simultaneous: None,
    }
}

/// The plan's adjustment; Tukey–Kramer assumes one pooled variance, so robust
/// differences take Holm in its place. Many-to-one families are simultaneous over
/// the robust correlation `cov` of the differences; their family comes back.
fn adjust(
    pairs: &mut [RobustDifference],
    method: Comparisons,
    cov: Option<Vec<Vec<f64>>>,
    df: f64,
    alpha: f64,
) -> Option<SimultaneousFamily> {
    if method == Comparisons::AgainstReference {
        return Some(fill_many_to_one(pairs, cov, df, alpha));
    }
    let method = match method {
        Comparisons::TukeyKramer => Comparisons::Holm,
        m => m,
    };
    adjust_pairs(
        pairs,
        method,
        |_| None,
        |p| p.p_value,
        |p, v| p.p_adjusted = v,
    );
    None
}
