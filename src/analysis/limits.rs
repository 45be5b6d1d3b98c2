//! When the mean response reaches a limit: crossing points of one-sided confidence
//! bounds, and the lot-pooling choice of the line they are read from.
//!
//! Lot pooling follows ICH Q1E (2003): test equal slopes, then equal intercepts, each
//! at `pooling_alpha` (0.25 by default, the level the guideline recommends), and read
//! the estimate from separate lines, parallel lines, or one pooled line.
//!
//! For a line with mean m(x) = m₀ + b u, u = x − x_c, and standard error of the mean
//! s √(1/n + u²/S), the one-sided bound at confidence c is m(x) ∓ t_c s √(1/n + u²/S)
//! (Draper & Smith 1998, §3.1). The crossing comes from the bound, never from the
//! sign of the slope. Take a lower limit L (an upper limit is the same problem for
//! −y and −L). g(u) = m₀ − L + b u − t_c s √(1/n + u²/S) is concave, so the covariate
//! values where the bound is on the safe side form one interval; the crossing is its
//! right end, where the bound goes past the limit for good. For large u,
//! g(u) ≈ (b − t_c s/√S) u: unless the slope is significantly away from the limit at
//! the bound's own level, the bound's curvature makes it reach any limit eventually,
//! whatever the sign of the estimate. The roots of g are among those of the quadratic
//! (m₀ − L + b u)² = t_c² s² (1/n + u²/S) with m₀ − L + b u ≥ 0; the largest is
//! polished by Newton steps on the bound itself and checked before it is reported.
//! A line whose bound is already past the limit at its first observation is reported
//! as such, not given a crossing before its data begin.

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
    #[cfg(test)]
    fn bound(&self, x: f64, t: f64, sign: f64) -> f64 {
        let u = x - self.centre;
        self.mean0 + self.slope * u + sign * t * self.s * (self.inv_n + u * u / self.sxx).sqrt()
    }

    /// Where the bound meets `limit` for good, after the first observation.
    fn crossing(&self, limit: f64, lower: bool, confidence: f64) -> Outcome {
        // An upper limit on y is a lower limit on −y: flip the mean and the limit.
        let sign = if lower { 1.0 } else { -1.0 };
        let (mean0, slope, limit_l) = (sign * self.mean0, sign * self.slope, sign * limit);
        let t = t_quantile(confidence, self.df);
        let ts = t * self.s;
        // g(u) = mean0 − L + slope·u − ts √(1/n + u²/S): the bound's distance above L.
        let g = |u: f64| mean0 - limit_l + slope * u - ts * (self.inv_n + u * u / self.sxx).sqrt();
        let dg = |u: f64| slope - ts * (u / self.sxx) / (self.inv_n + u * u / self.sxx).sqrt();
        let scale = limit.abs().max(self.mean0.abs()).max(1.0);
        let start = self.observed[0] - self.centre;
        if g(start) < -1e-12 * scale {
            return Outcome::BeyondAtStart;
        }
        // Slope of g far out: positive means the bound moves away for good.
        if slope - ts / self.sxx.sqrt() > 0.0 {
            return Outcome::Never;
        }
        let d0 = mean0 - limit_l;
        let v = ts * ts;
        let (a, b, c) = (
            slope * slope - v / self.sxx,
            2.0 * slope * d0,
            d0 * d0 - v * self.inv_n,
        );
        let mut roots = Vec::new();
        if a.abs() <= f64::EPSILON * (slope * slope).max(v / self.sxx) {
            if b != 0.0 {
                roots.push(-c / b);
            }
        } else {
            let mut disc = b * b - 4.0 * a * c;
            // A double root (an exact fit, s = 0) may come out a rounding below zero.
            if disc < 0.0 && -disc <= 1e-12 * b * b {
                disc = 0.0;
            }
            if disc >= 0.0 {
                let q = -0.5 * (b + if b >= 0.0 { 1.0 } else { -1.0 } * disc.sqrt());
                if q != 0.0 {
                    roots.push(q / a);
                    roots.push(c / q);
                }
            }
        }
        // Keep roots on the bound's side of the limit (squaring adds roots where the
        // mean is past the limit), then polish on g itself.
        let mut best: Option<f64> = None;
        for u0 in roots {
            if !u0.is_finite() || d0 + slope * u0 < -1e-12 * scale {
                continue;
            }
            let mut u = u0;
            for _ in 0..4 {
                let (f, d) = (g(u), dg(u));
                if d == 0.0 || !f.is_finite() {
                    break;
                }
                u -= f / d;
            }
            if g(u).abs() <= 1e-9 * scale && u >= start - 1e-12 * scale {
                best = Some(best.map_or(u, |b: f64| b.max(u)));
            }
        }
        match best {
            Some(u) => Outcome::Crossing(self.centre + u),
            None => Outcome::Never,
        }
    }
}

/// Where a line's bound meets a limit.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Outcome {
    /// The covariate value where the bound goes past the limit for good.
    Crossing(f64),
    /// The bound stays on the safe side after the first observation.
    Never,
    /// The bound is past the limit already at the first observation.
    BeyondAtStart,
}

impl Outcome {
    fn crossing(self) -> Option<f64> {
        match self {
            Outcome::Crossing(x) => Some(x),
            _ => None,
        }
    }

    fn reason(self) -> Option<&'static str> {
        match self {
            Outcome::Crossing(_) => None,
            Outcome::Never => Some("never-within"),
            Outcome::BeyondAtStart => Some("beyond-at-start"),
        }
    }
}

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
) -> Option<(Pooling, Option<String>)> {
    (plan.tests.procedure == Procedure::LotPooling).then(|| {
        let alpha = plan.tests.pooling_alpha;
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
            },
            statement,
        )
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
    let decided = model != "not-decided";
    for (side, limit) in [("lower", spec.lower), ("upper", spec.upper)] {
        let Some(limit) = limit else { continue };
        // The earliest line: one already past the limit at its first observation
        // comes before any solved crossing.
        let mut first: Option<(bool, f64, String)> = None;
        for line in &lines {
            let found = if !decided {
                None
            } else if line.s.is_finite() && line.df > 0.0 {
                Some(line.crossing(limit, side == "lower", spec.confidence))
            } else {
                Some(Outcome::Never)
            };
            let crossing = found.and_then(Outcome::crossing);
            let beyond = crossing.map(|c| (c - line.observed[1]).max(0.0));
            let candidate = match found {
                Some(Outcome::Crossing(c)) => Some((false, c)),
                Some(Outcome::BeyondAtStart) => Some((true, line.observed[0])),
                _ => None,
            };
            if let Some((already, c)) = candidate {
                let earlier = match &first {
                    None => true,
                    Some((fa, fc, _)) => (already && !fa) || (already == *fa && c < *fc),
                };
                if earlier {
                    first = Some((already, c, line.level.clone()));
                }
            }
            if found == Some(Outcome::BeyondAtStart) {
                warnings.push(format!(
                    "For `{}` the {}% bound is already past the {side} limit {} at the first observation ({}): there is no crossing to estimate.",
                    line.level,
                    sig(100.0 * spec.confidence, 3),
                    sig(limit, 4),
                    sig(line.observed[0], 4)
                ));
            }
            if let Some(c) = crossing
                && c > line.observed[1]
            {
                warnings.push(format!(
                        "The {side}-limit crossing for `{}` at {} lies {} beyond the last observed covariate value ({}): it is an extrapolation, and whether it may be used is for the applicable guidance to say.",
                        line.level,
                        sig(c, 4),
                        sig(c - line.observed[1], 3),
                        sig(line.observed[1], 4)
                    ));
            }
            out.push(LimitCrossing {
                level: line.level.clone(),
                limit,
                side: side.to_string(),
                confidence: spec.confidence,
                crossing,
                reason: match found {
                    None => Some("not-decided".to_string()),
                    Some(o) => o.reason().map(str::to_string),
                },
                observed_min: line.observed[0],
                observed_max: line.observed[1],
                extrapolated: crossing.is_some_and(|c| c > line.observed[1]),
                beyond,
                model: model.to_string(),
            });
        }
        if model != "pooled"
            && let Some((already_beyond, crossing, level)) = first
        {
            earliest.push(EarliestCrossing {
                side: side.to_string(),
                level,
                crossing,
                already_beyond,
            });
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

    fn solved(o: Outcome) -> f64 {
        match o {
            Outcome::Crossing(x) => x,
            other => panic!("{other:?}"),
        }
    }

    #[test]
    fn crossing_solves_the_bound_equation() {
        let l = line(-0.2);
        let x = solved(l.crossing(95.0, true, 0.95));
        let t = t_quantile(0.95, 18.0);
        assert!((l.bound(x, t, -1.0) - 95.0).abs() < 1e-10);
        // The mean alone reaches 95 at month 37; the bound earlier.
        assert!(x < 37.0 && x > 24.0, "{x}");
    }

    #[test]
    fn a_rising_mean_reaches_a_lower_limit_unless_it_rises_significantly() {
        // Slope margin of the bound: t(0.95, 18) · 0.5 / √1000 ≈ 0.0274.
        let t = t_quantile(0.95, 18.0);
        let margin = t * 0.5 / 1000f64.sqrt();
        // A slope below the margin: the bound's curvature brings it down to 95.
        let slow = line(0.5 * margin);
        let x = solved(slow.crossing(95.0, true, 0.95));
        assert!((slow.bound(x, t, -1.0) - 95.0).abs() < 1e-9, "{x}");
        assert!(x > 24.0);
        // A slope above it: the bound rises for good and never meets 95.
        assert_eq!(line(0.2).crossing(95.0, true, 0.95), Outcome::Never);
        assert!(matches!(
            line(0.2).crossing(105.0, false, 0.95),
            Outcome::Crossing(_)
        ));
    }

    #[test]
    fn a_line_past_the_limit_at_its_first_observation_is_said_so() {
        // Mean 100 at month 12 falling 0.2 a month: 102.4 at month 0, so an upper
        // limit of 101 is passed before the data begin.
        assert_eq!(
            line(-0.2).crossing(101.0, false, 0.95),
            Outcome::BeyondAtStart
        );
    }
}
