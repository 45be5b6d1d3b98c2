//! When the mean response reaches a limit: crossing points of one-sided confidence
//! bounds, and the lot-pooling choice of the line they are read from.
//!
//! Lot pooling follows ICH Q1E (2003): test equal slopes, then equal intercepts, each
//! at `pooling_alpha` (0.25 by default, the level the guideline recommends), and read
//! the estimate from separate lines, parallel lines, or one pooled line.
//!
//! For a line with mean m(x) = m₀ + b u, u = x − x_c, and standard error of the mean
//! s √(1/n + u²/S), the one-sided bound at confidence c is m(x) ∓ t_c s √(1/n + u²/S)
//! (Draper & Smith 1998, §3.1). It equals the limit L where
//! (m₀ − L + b u)² = t_c² s² (1/n + u²/S), a quadratic in u whose roots on the mean's
//! side of the limit are where the bound meets it. In the direction of travel (a
//! falling mean for a lower limit, a rising one for an upper limit) the crossing is the
//! largest such root: beyond it the bound stays past the limit. The root is polished
//! by Newton steps on the bound itself and checked before it is reported.

use crate::fit::{CommonSlopeFit, OneLineFit, SeparateFit};
use crate::number::sig;
use crate::plan::{LimitSpec, Plan, Procedure};
use crate::results::{EarliestCrossing, LimitCrossing, Pooling};
use crate::stats::dist::t_quantile;

/// A mean line with what its one-sided bound needs.
struct BoundLine {
    level: String,
    mean0: f64,
    slope: f64,
    centre: f64,
    inv_n: f64,
    sxx: f64,
    s: f64,
    df: f64,
    observed: [f64; 2],
}

impl BoundLine {
    fn bound(&self, x: f64, t: f64, sign: f64) -> f64 {
        let u = x - self.centre;
        self.mean0 + self.slope * u + sign * t * self.s * (self.inv_n + u * u / self.sxx).sqrt()
    }

    fn bound_slope(&self, x: f64, t: f64, sign: f64) -> f64 {
        let u = x - self.centre;
        self.slope + sign * t * self.s * (u / self.sxx) / (self.inv_n + u * u / self.sxx).sqrt()
    }

    /// The crossing of `limit` in the direction of travel, or why there is none.
    fn crossing(&self, limit: f64, lower: bool, confidence: f64) -> Result<f64, &'static str> {
        // Lower limit: the bound is the mean minus t·se; upper: plus.
        let sign = if lower { -1.0 } else { 1.0 };
        let toward = if lower {
            self.slope < 0.0
        } else {
            self.slope > 0.0
        };
        if !toward {
            return Err("moves-away");
        }
        let t = t_quantile(confidence, self.df);
        let d0 = self.mean0 - limit;
        let v = t * t * self.s * self.s;
        let (a, b, c) = (
            self.slope * self.slope - v / self.sxx,
            2.0 * self.slope * d0,
            d0 * d0 - v * self.inv_n,
        );
        let mut roots = Vec::new();
        if a.abs() <= f64::EPSILON * (self.slope * self.slope).max(v / self.sxx) {
            if b != 0.0 {
                roots.push(-c / b);
            }
        } else {
            let disc = b * b - 4.0 * a * c;
            if disc >= 0.0 {
                let q = -0.5 * (b + if b >= 0.0 { 1.0 } else { -1.0 } * disc.sqrt());
                if q != 0.0 {
                    roots.push(q / a);
                    roots.push(c / q);
                }
            }
        }
        // Keep roots on the mean's side of the limit (the squared equation adds
        // roots where the mean is past the limit), then polish on the bound.
        let mut best: Option<f64> = None;
        for u in roots {
            let d = d0 + self.slope * u;
            if !u.is_finite() || (lower && d < 0.0) || (!lower && d > 0.0) {
                continue;
            }
            let mut x = self.centre + u;
            for _ in 0..4 {
                let f = self.bound(x, t, sign) - limit;
                let g = self.bound_slope(x, t, sign);
                if g == 0.0 || !f.is_finite() {
                    break;
                }
                x -= f / g;
            }
            let scale = limit.abs().max(self.mean0.abs()).max(1.0);
            if (self.bound(x, t, sign) - limit).abs() <= 1e-9 * scale {
                best = Some(best.map_or(x, |b: f64| b.max(x)));
            }
        }
        best.ok_or("never-within")
    }
}

/// The lot-pooling decision from the two nested F tests already in the results.
pub(super) fn pooling(
    plan: &Plan,
    slopes_p: Option<f64>,
    intercepts_p: Option<f64>,
) -> Option<Pooling> {
    (plan.tests.procedure == Procedure::LotPooling).then(|| {
        let alpha = plan.tests.pooling_alpha;
        let decision = if slopes_p.is_some_and(|p| p < alpha) {
            "separate"
        } else if intercepts_p.is_some_and(|p| p < alpha) {
            "common-slope"
        } else {
            "pooled"
        };
        Pooling {
            slopes_p,
            intercepts_p,
            alpha,
            decision: decision.to_string(),
        }
    })
}

/// Crossings for every line of the selected model.
pub(super) fn crossings(
    spec: &LimitSpec,
    model: &str,
    levels: &[&str],
    separate: &SeparateFit,
    common: &CommonSlopeFit,
    one: &OneLineFit,
    warnings: &mut Vec<String>,
) -> (Vec<LimitCrossing>, Vec<EarliestCrossing>) {
    // Each line: its own moments, with the slope, Sxx, residual variance and df of
    // the model the estimate is read from.
    let line =
        |level: &str, m: &crate::fit::Moments, slope: f64, sxx: f64, s2: Option<f64>, df: f64| {
            BoundLine {
                level: level.to_string(),
                mean0: m.mean_y,
                slope,
                centre: m.mean_x,
                inv_n: 1.0 / m.n as f64,
                sxx,
                s: s2.unwrap_or(f64::NAN).sqrt(),
                df,
                observed: [m.min_x, m.max_x],
            }
        };
    let lines: Vec<BoundLine> = match model {
        "pooled" => {
            let l = &one.line;
            vec![line(
                "pooled",
                &l.moments,
                l.slope,
                l.moments.sxx,
                l.sigma2(),
                l.df,
            )]
        }
        "common-slope" => separate
            .lines
            .iter()
            .zip(levels)
            .map(|(l, level)| {
                line(
                    level,
                    &l.moments,
                    common.slope,
                    common.sxx_within,
                    common.sigma2(),
                    common.df,
                )
            })
            .collect(),
        _ => separate
            .lines
            .iter()
            .zip(levels)
            .map(|(l, level)| line(level, &l.moments, l.slope, l.moments.sxx, l.sigma2(), l.df))
            .collect(),
    };
    let mut out = Vec::new();
    let mut earliest = Vec::new();
    for (side, limit) in [("lower", spec.lower), ("upper", spec.upper)] {
        let Some(limit) = limit else { continue };
        let mut first: Option<(f64, String)> = None;
        for line in &lines {
            let found = if line.s.is_finite() && line.df > 0.0 {
                line.crossing(limit, side == "lower", spec.confidence)
            } else {
                Err("never-within")
            };
            let crossing = found.ok();
            let beyond = crossing.map(|c| (c - line.observed[1]).max(0.0));
            if let Some(c) = crossing {
                if first.as_ref().is_none_or(|(f, _)| c < *f) {
                    first = Some((c, line.level.clone()));
                }
                if c > line.observed[1] {
                    warnings.push(format!(
                        "The {side}-limit crossing for `{}` at {} lies {} beyond the last observed covariate value ({}): it is an extrapolation, and whether it may be used is for the applicable guidance to say.",
                        line.level,
                        sig(c, 4),
                        sig(c - line.observed[1], 3),
                        sig(line.observed[1], 4)
                    ));
                } else if c <= line.observed[0] {
                    warnings.push(format!(
                        "For `{}` the {}% bound is already past the {side} limit {} at the first observation ({}).",
                        line.level,
                        sig(100.0 * spec.confidence, 3),
                        sig(limit, 4),
                        sig(line.observed[0], 4)
                    ));
                }
            }
            out.push(LimitCrossing {
                level: line.level.clone(),
                limit,
                side: side.to_string(),
                confidence: spec.confidence,
                crossing,
                reason: found.err().map(str::to_string),
                observed_min: line.observed[0],
                observed_max: line.observed[1],
                extrapolated: crossing.is_some_and(|c| c > line.observed[1]),
                beyond,
                model: model.to_string(),
            });
        }
        if model != "pooled" {
            if let Some((crossing, level)) = first {
                earliest.push(EarliestCrossing {
                    side: side.to_string(),
                    level,
                    crossing,
                });
            }
        }
    }
    (out, earliest)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn line(slope: f64) -> BoundLine {
        // Invented: assay 100 at month 12 falling by `slope` a month.
        BoundLine {
            level: "lot".into(),
            mean0: 100.0,
            slope,
            centre: 12.0,
            inv_n: 1.0 / 20.0,
            sxx: 1000.0,
            s: 0.5,
            df: 18.0,
            observed: [0.0, 24.0],
        }
    }

    #[test]
    fn crossing_solves_the_bound_equation() {
        let l = line(-0.2);
        let x = l.crossing(95.0, true, 0.95).unwrap();
        let t = t_quantile(0.95, 18.0);
        assert!((l.bound(x, t, -1.0) - 95.0).abs() < 1e-10);
        // The mean alone reaches 95 at month 37; the bound earlier.
        assert!(x < 37.0 && x > 24.0, "{x}");
    }

    #[test]
    fn a_rising_mean_never_reaches_a_lower_limit() {
        assert_eq!(line(0.2).crossing(95.0, true, 0.95), Err("moves-away"));
        assert!(line(0.2).crossing(105.0, false, 0.95).is_ok());
    }
}
