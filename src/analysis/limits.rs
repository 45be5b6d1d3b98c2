//! When the mean response reaches a limit: crossing points of one-sided confidence
//! bounds, and the lot-pooling choice of the line they are read from.
//!
//! Which line the crossings are read from under lot pooling is chosen in
//! [`super::pooling`].
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
//!
//! `bound = "prediction"` reads the crossing from the prediction bound of a single
//! future result instead, m(x) ∓ t_c s √(1 + 1/n + u²/S) (Draper & Smith 1998, §3.1):
//! the same problem with 1/n replaced by 1 + 1/n. With both a lower and an upper
//! limit each side uses the one-sided level (1 + c)/2, so the two together hold at c
//! (two-sided criteria as ICH Q1E 2003 asks for them, quoted from memory).
//!
//! The supported period is the earliest crossing, capped by an extrapolation rule and
//! rounded down to `round_to` (see [`supported`]).

use crate::fit::{CommonSlopeFit, OneLineFit, SeparateFit};
use crate::number::{sig, trimmed};
use crate::plan::{BandKind, BoundKind, Extrapolation, LimitSpec, Storage};
use crate::results::{EarliestCrossing, LimitCrossing, SupportedPeriod};
use crate::stats::bands::working_hotelling;
use crate::stats::dist::t_quantile;

/// A mean line with what its one-sided bound needs.
struct BoundLine {
    level: String,
    mean0: f64,
    slope: f64,
    centre: f64,
    inv_n: f64,
    /// 1 for the prediction bound of a single future result (its own variance s²
    /// added to the mean's), 0 for the confidence bound of the mean line.
    obs: f64,
    sxx: f64,
    s: f64,
    df: f64,
    observed: [f64; 2],
}

impl BoundLine {
    #[cfg(test)]
    fn bound(&self, x: f64, t: f64, sign: f64) -> f64 {
        let u = x - self.centre;
        self.mean0
            + self.slope * u
            + sign * t * self.s * (self.inv_n + self.obs + u * u / self.sxx).sqrt()
    }

    /// The multiplier of the bound's standard error: Student's t at the one-sided
    /// `level`, or for the simultaneous band the Working–Hotelling value √(2 F(c; 2,
    /// df)) at the limits' `confidence` c — the two-sided band at c, which holds for
    /// every covariate value at once on both sides together, so each side alone at
    /// least as often (conservative for one limit, exact for two).
    fn critical(&self, band: BandKind, level: f64, confidence: f64) -> f64 {
        match band {
            BandKind::Pointwise => t_quantile(level, self.df),
            BandKind::Simultaneous => working_hotelling(1.0 - confidence, self.df),
        }
    }

    /// Where the bound with multiplier `t` meets `limit` for good, after the first
    /// observation.
    fn crossing(&self, limit: f64, lower: bool, t: f64) -> Outcome {
        // An upper limit on y is a lower limit on −y: flip the mean and the limit.
        let sign = if lower { 1.0 } else { -1.0 };
        let (mean0, slope, limit_l) = (sign * self.mean0, sign * self.slope, sign * limit);
        let ts = t * self.s;
        // g(u) = mean0 − L + slope·u − ts √(1/n + u²/S): the bound's distance above L.
        let g = |u: f64| {
            mean0 - limit_l + slope * u - ts * (self.inv_n + self.obs + u * u / self.sxx).sqrt()
        };
        let dg = |u: f64| {
            slope - ts * (u / self.sxx) / (self.inv_n + self.obs + u * u / self.sxx).sqrt()
        };
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
            d0 * d0 - v * (self.inv_n + self.obs),
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
    let obs = match spec.bound {
        BoundKind::Mean => 0.0,
        BoundKind::Prediction => 1.0,
    };
    let level = spec.one_sided_level();
    let two_sided = spec.lower.is_some() && spec.upper.is_some();
    let bound_name = match spec.bound {
        BoundKind::Mean => "mean",
        BoundKind::Prediction => "prediction",
    };
    let line =
        |level: &str, m: &crate::fit::Moments, slope: f64, sxx: f64, s2: Option<f64>, df: f64| {
            BoundLine {
                level: level.to_string(),
                mean0: m.mean_y,
                slope,
                centre: m.mean_x,
                inv_n: 1.0 / m.n as f64,
                obs,
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
            let critical = line.critical(spec.band, level, spec.confidence);
            let found = if !decided {
                None
            } else if line.s.is_finite() && line.df > 0.0 {
                Some(line.crossing(limit, side == "lower", critical))
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
                    "For `{}` the {}% {bound_name} bound is already past the {side} limit {} at the first observation ({}): there is no crossing to estimate.",
                    line.level,
                    sig(100.0 * level, 4),
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
                // The simultaneous band's coverage is the plan's confidence, for
                // both sides together.
                confidence: match spec.band {
                    BandKind::Pointwise => level,
                    BandKind::Simultaneous => spec.confidence,
                },
                bound: bound_name.to_string(),
                band: match spec.band {
                    BandKind::Pointwise => "pointwise",
                    BandKind::Simultaneous => "simultaneous",
                }
                .into(),
                critical_value: critical.is_finite().then_some(critical),
                two_sided,
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

/// The extrapolation cap for data covering `covered` covariate units, and why.
///
/// The rule values are ICH Q1E (2003), quoted from memory, for a covariate in months
/// and accelerated data without significant change: room temperature up to twice the
/// period covered by long-term data and no more than 12 months beyond it;
/// refrigerated up to 1.5 times and no more than 6 months beyond. Where the
/// accelerated data showed significant change, no extrapolation (the guideline's
/// finer steps through intermediate-condition data are not modelled here). Frozen:
/// the guideline, as remembered, gives no extrapolation rule for frozen storage; our
/// reading, the conservative one, is no extrapolation. Explicit numbers apply as
/// given: at most `factor` times the period and `max_beyond` beyond it.
fn cap(
    rule: Option<Extrapolation>,
    accelerated_change: bool,
    covered: f64,
) -> (Option<f64>, &'static str, String) {
    let Some(rule) = rule else {
        return (None, "none", "the plan gives no extrapolation rule, so the crossing is not capped; whether a period beyond the data may be proposed is for the applicable guideline and a qualified person to judge".to_string());
    };
    let name = match rule {
        Extrapolation::Storage(Storage::Room) => "room",
        Extrapolation::Storage(Storage::Refrigerated) => "refrigerated",
        Extrapolation::Storage(Storage::Frozen) => "frozen",
        Extrapolation::Explicit { .. } => "explicit",
    };
    let c = trimmed(covered, 6);
    if accelerated_change {
        return (
            Some(covered),
            name,
            format!(
                "the accelerated data showed significant change, so no extrapolation beyond the {c} covered by the data (ICH Q1E 2003, quoted from memory)"
            ),
        );
    }
    let (factor, beyond, why) = match rule {
        Extrapolation::Storage(Storage::Room) => (
            2.0,
            12.0,
            "room-temperature storage: up to twice the period covered and no more than 12 beyond it (ICH Q1E 2003, quoted from memory)",
        ),
        Extrapolation::Storage(Storage::Refrigerated) => (
            1.5,
            6.0,
            "refrigerated storage: up to 1.5 times the period covered and no more than 6 beyond it (ICH Q1E 2003, quoted from memory)",
        ),
        Extrapolation::Storage(Storage::Frozen) => (
            1.0,
            0.0,
            "frozen storage: no extrapolation (the guideline, as remembered, gives no rule for frozen storage; no extrapolation is this tool's conservative reading)",
        ),
        Extrapolation::Explicit { factor, max_beyond } => (
            factor,
            max_beyond,
            "the plan's extrapolation_factor and max_beyond",
        ),
    };
    let cap = (factor * covered).min(covered + beyond).max(covered);
    (
        Some(cap),
        name,
        format!(
            "{why}; the data cover {c}, so the cap is {}",
            trimmed(cap, 6)
        ),
    )
}

/// `value` rounded down to a multiple of `step`; a value a rounding error below a
/// multiple counts as that multiple.
fn round_down(value: f64, step: f64) -> f64 {
    let k = (value / step).floor();
    let next = k + 1.0;
    if (next * step - value).abs() <= 1e-9 * value.abs().max(step) {
        next * step
    } else {
        k * step
    }
}

/// The supported period: the earliest crossing over every line and side, capped by
/// the plan's extrapolation rule and rounded down to `round_to`. Shelf lives are
/// proposed in whole steps rounded down (common practice, no source).
pub(super) fn supported(
    spec: &LimitSpec,
    model: &str,
    crossings: &[LimitCrossing],
) -> SupportedPeriod {
    let covered = crossings
        .iter()
        .map(|c| c.observed_max)
        .fold(f64::NEG_INFINITY, f64::max);
    let covered = if covered.is_finite() { covered } else { 0.0 };
    let (cap, rule, cap_reason) = cap(spec.extrapolation, spec.accelerated_change, covered);
    let first = crossings
        .iter()
        .filter_map(|c| c.crossing.map(|x| (x, c)))
        .min_by(|a, b| a.0.total_cmp(&b.0));
    let beyond_at_start = crossings
        .iter()
        .find(|c| c.reason.as_deref() == Some("beyond-at-start"));
    let (raw, limiting, reason) = if model == "not-decided" {
        (None, None, Some("not-decided"))
    } else if let Some(c) = beyond_at_start {
        (None, Some(c), Some("beyond-at-start"))
    } else {
        match first {
            Some((x, c)) => (Some(x), Some(c), None),
            None if cap.is_some() => (None, None, None),
            None => (None, None, Some("never-within")),
        }
    };
    let period = match (reason, raw, cap) {
        (Some(_), _, _) => None,
        (None, Some(x), Some(c)) => Some(x.min(c)),
        (None, Some(x), None) => Some(x),
        (None, None, c) => c,
    };
    SupportedPeriod {
        raw_crossing: raw,
        limiting_level: limiting.map(|c| c.level.clone()),
        limiting_side: limiting.map(|c| c.side.clone()),
        covered,
        cap,
        rule: rule.to_string(),
        cap_reason,
        capped: matches!((raw, cap), (Some(x), Some(c)) if c < x)
            || (raw.is_none() && cap.is_some() && reason.is_none()),
        round_to: spec.round_to,
        supported: period.map(|p| round_down(p, spec.round_to)),
        reason: reason.map(str::to_string),
    }
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
            obs: 0.0,
            sxx: 1000.0,
            s: 0.5,
            df: 18.0,
            observed: [0.0, 24.0],
        }
    }

    /// Student's t at the one-sided 0.95 on the test line's 18 df.
    fn t95() -> f64 {
        t_quantile(0.95, 18.0)
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
        let x = solved(l.crossing(95.0, true, t95()));
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
        let x = solved(slow.crossing(95.0, true, t95()));
        assert!((slow.bound(x, t, -1.0) - 95.0).abs() < 1e-9, "{x}");
        assert!(x > 24.0);
        // A slope above it: the bound rises for good and never meets 95.
        assert_eq!(line(0.2).crossing(95.0, true, t95()), Outcome::Never);
        assert!(matches!(
            line(0.2).crossing(105.0, false, t95()),
            Outcome::Crossing(_)
        ));
    }

    #[test]
    fn a_line_past_the_limit_at_its_first_observation_is_said_so() {
        // Mean 100 at month 12 falling 0.2 a month: 102.4 at month 0, so an upper
        // limit of 101 is passed before the data begin.
        assert_eq!(
            line(-0.2).crossing(101.0, false, t95()),
            Outcome::BeyondAtStart
        );
    }

    // Caps and rounding, worked by hand from the rules of ICH Q1E (2003), which are
    // quoted from memory (see `cap`): room up to 2x the covered period and at most 12
    // beyond; refrigerated up to 1.5x and at most 6 beyond; no extrapolation after
    // significant accelerated change; frozen: no extrapolation (our reading).

    fn spec(rule: Option<Extrapolation>, accelerated_change: bool, round_to: f64) -> LimitSpec {
        LimitSpec {
            lower: Some(95.0),
            upper: None,
            confidence: 0.95,
            bound: BoundKind::Mean,
            band: crate::plan::BandKind::Pointwise,
            extrapolation: rule,
            accelerated_change,
            round_to,
        }
    }

    fn at(level: &str, crossing: Option<f64>, reason: Option<&str>, max: f64) -> LimitCrossing {
        LimitCrossing {
            level: level.into(),
            limit: 95.0,
            side: "lower".into(),
            confidence: 0.95,
            bound: "mean".into(),
            band: "pointwise".into(),
            critical_value: None,
            two_sided: false,
            crossing,
            reason: reason.map(str::to_string),
            observed_min: 0.0,
            observed_max: max,
            extrapolated: crossing.is_some_and(|c| c > max),
            beyond: crossing.map(|c| (c - max).max(0.0)),
            model: "separate".into(),
        }
    }

    const ROOM: Option<Extrapolation> = Some(Extrapolation::Storage(Storage::Room));
    const FRIDGE: Option<Extrapolation> = Some(Extrapolation::Storage(Storage::Refrigerated));

    #[test]
    fn room_crossing_inside_the_cap_is_rounded_down() {
        // ICH Q1E (2003), rule quoted from memory: 12 months covered, cap
        // min(2 x 12, 12 + 12) = 24; the crossing 20.7 is inside it: 20 months.
        let p = supported(
            &spec(ROOM, false, 1.0),
            "separate",
            &[
                at("A", Some(20.7), None, 12.0),
                at("B", Some(31.0), None, 12.0),
            ],
        );
        assert_eq!(p.cap, Some(24.0));
        assert_eq!(p.raw_crossing, Some(20.7));
        assert_eq!(p.limiting_level.as_deref(), Some("A"));
        assert!(!p.capped);
        assert_eq!(p.supported, Some(20.0));
        assert_eq!(p.rule, "room");
    }

    #[test]
    fn room_crossing_beyond_the_cap_is_capped() {
        // ICH Q1E (2003), rule quoted from memory: 24 months covered, cap
        // min(2 x 24, 24 + 12) = 36 (the 12-month limit binds); crossing 40.2.
        let p = supported(
            &spec(ROOM, false, 1.0),
            "pooled",
            &[at("pooled", Some(40.2), None, 24.0)],
        );
        assert_eq!(p.cap, Some(36.0));
        assert!(p.capped);
        assert_eq!(p.supported, Some(36.0));
        // With 6-month steps: 36 is a whole step, still 36.
        let p = supported(
            &spec(ROOM, false, 6.0),
            "pooled",
            &[at("pooled", Some(40.2), None, 24.0)],
        );
        assert_eq!(p.supported, Some(36.0));
    }

    #[test]
    fn refrigerated_caps_at_one_and_a_half_times_or_six_beyond() {
        // ICH Q1E (2003), rule quoted from memory: 18 months covered, cap
        // min(1.5 x 18, 18 + 6) = 24; crossing 30 is capped to 24.
        let p = supported(
            &spec(FRIDGE, false, 1.0),
            "pooled",
            &[at("pooled", Some(30.0), None, 18.0)],
        );
        assert_eq!(
            (p.cap, p.supported, p.capped),
            (Some(24.0), Some(24.0), true)
        );
        // 9 months covered: min(13.5, 15) = 13.5, the factor binds; in 3-month steps
        // the supported period is 12.
        let p = supported(
            &spec(FRIDGE, false, 3.0),
            "pooled",
            &[at("pooled", Some(30.0), None, 9.0)],
        );
        assert_eq!((p.cap, p.supported), (Some(13.5), Some(12.0)));
        // Crossing 23.4 inside the 24 cap, in 3-month steps: 21.
        let p = supported(
            &spec(FRIDGE, false, 3.0),
            "pooled",
            &[at("pooled", Some(23.4), None, 18.0)],
        );
        assert_eq!((p.supported, p.capped), (Some(21.0), false));
    }

    #[test]
    fn no_extrapolation_after_significant_accelerated_change_or_when_frozen() {
        // ICH Q1E (2003), rule quoted from memory: significant change in the
        // accelerated data, no extrapolation: the cap is the 24 months covered.
        let p = supported(
            &spec(ROOM, true, 1.0),
            "pooled",
            &[at("pooled", Some(30.5), None, 24.0)],
        );
        assert_eq!(
            (p.cap, p.supported, p.capped),
            (Some(24.0), Some(24.0), true)
        );
        assert!(
            p.cap_reason.contains("significant change"),
            "{}",
            p.cap_reason
        );
        // Frozen: no rule in the guideline as remembered; our reading is none.
        let frozen = Some(Extrapolation::Storage(Storage::Frozen));
        let p = supported(
            &spec(frozen, false, 1.0),
            "pooled",
            &[at("pooled", Some(30.5), None, 24.0)],
        );
        assert_eq!(
            (p.cap, p.supported, p.rule.as_str()),
            (Some(24.0), Some(24.0), "frozen")
        );
        // Inside the data the crossing still sets the period: 17.2 -> 17.
        let p = supported(
            &spec(frozen, false, 1.0),
            "pooled",
            &[at("pooled", Some(17.2), None, 24.0)],
        );
        assert_eq!((p.supported, p.capped), (Some(17.0), false));
    }

    #[test]
    fn explicit_factor_and_max_beyond() {
        // The plan's own numbers: 24 covered, min(1.5 x 24, 24 + 3) = 27.
        let rule = Some(Extrapolation::Explicit {
            factor: 1.5,
            max_beyond: 3.0,
        });
        let p = supported(
            &spec(rule, false, 1.0),
            "pooled",
            &[at("pooled", Some(40.0), None, 24.0)],
        );
        assert_eq!(
            (p.cap, p.supported, p.rule.as_str()),
            (Some(27.0), Some(27.0), "explicit")
        );
    }

    #[test]
    fn no_crossing_beyond_start_and_no_rule() {
        // Without a rule the crossing is not capped: 40.2 -> 40.
        let p = supported(
            &spec(None, false, 1.0),
            "pooled",
            &[at("pooled", Some(40.2), None, 24.0)],
        );
        assert_eq!(
            (p.cap, p.supported, p.rule.as_str()),
            (None, Some(40.0), "none")
        );
        // A line past the limit from the start: no supported period at all.
        let lines = [
            at("A", Some(30.0), None, 24.0),
            at("B", None, Some("beyond-at-start"), 24.0),
        ];
        let p = supported(&spec(ROOM, false, 1.0), "separate", &lines);
        assert_eq!(
            (
                p.supported,
                p.reason.as_deref(),
                p.limiting_level.as_deref()
            ),
            (None, Some("beyond-at-start"), Some("B"))
        );
        // Never crossing: the cap sets the period (room, 24 covered: 36) ...
        let never = [at("A", None, Some("never-within"), 24.0)];
        let p = supported(&spec(ROOM, false, 1.0), "separate", &never);
        assert_eq!(
            (p.raw_crossing, p.supported, p.capped),
            (None, Some(36.0), true)
        );
        // ... and without a rule there is no number to give.
        let p = supported(&spec(None, false, 1.0), "separate", &never);
        assert_eq!(
            (p.supported, p.reason.as_deref()),
            (None, Some("never-within"))
        );
        let p = supported(
            &spec(ROOM, false, 1.0),
            "not-decided",
            &[at("A", None, Some("not-decided"), 24.0)],
        );
        assert_eq!(
            (p.supported, p.reason.as_deref()),
            (None, Some("not-decided"))
        );
    }

    #[test]
    fn rounding_down_to_steps() {
        // Common practice, no source: whole steps, rounded down.
        assert_eq!(round_down(23.9, 6.0), 18.0);
        assert_eq!(round_down(24.0, 6.0), 24.0);
        assert_eq!(round_down(24.0 - 1e-12, 1.0), 24.0);
        assert_eq!(round_down(0.7, 1.0), 0.0);
        assert_eq!(round_down(13.5, 0.5), 13.5);
    }

    #[test]
    fn the_prediction_bound_adds_one_result_variance() {
        // Draper & Smith (1998) §3.1: the prediction bound's variance is the mean's
        // plus s², so its crossing comes earlier and solves its own equation.
        let mut l = line(-0.2);
        let mean = solved(l.crossing(95.0, true, t95()));
        l.obs = 1.0;
        let pred = solved(l.crossing(95.0, true, t95()));
        let t = t_quantile(0.95, 18.0);
        let u = pred - 12.0;
        let by_hand = 100.0 - 0.2 * u - t * 0.5 * (1.0 + 1.0 / 20.0 + u * u / 1000.0).sqrt();
        assert!((by_hand - 95.0).abs() < 1e-9, "{by_hand}");
        assert!(pred < mean, "{pred} {mean}");
    }

    #[test]
    fn the_simultaneous_band_uses_the_working_hotelling_value_at_the_confidence() {
        // √(2 F(0.95; 2, 18)) (Working & Hotelling 1929), larger than t(0.95, 18), so
        // its crossing comes earlier; with both limits it stays at the confidence.
        let l = line(-0.2);
        let wh = l.critical(BandKind::Simultaneous, 0.95, 0.95);
        assert_eq!(wh, working_hotelling(1.0 - 0.95, 18.0));
        assert_eq!(l.critical(BandKind::Simultaneous, 0.975, 0.95), wh);
        assert_eq!(l.critical(BandKind::Pointwise, 0.95, 0.95), t95());
        let simultaneous = solved(l.crossing(95.0, true, wh));
        let pointwise = solved(l.crossing(95.0, true, t95()));
        assert!((l.bound(simultaneous, wh, -1.0) - 95.0).abs() < 1e-10);
        assert!(simultaneous < pointwise, "{simultaneous} {pointwise}");
    }

    #[test]
    fn both_limits_use_the_two_sided_level() {
        let mut s = spec(None, false, 1.0);
        assert_eq!(s.one_sided_level(), 0.95);
        s.upper = Some(105.0);
        assert_eq!(s.one_sided_level(), 0.975);
    }
}
