//! The report's figures as SVG text: fitted lines with their bands, residuals, a
//! normal quantile plot and, when slopes differ, where along the covariate two groups
//! differ.
//!
//! plotters draws the frame (grid, axes, tick labels, titles, legend text) into an
//! SVG string; the data layers (points, bands, lines, shading) are written here as
//! compact SVG paths and spliced into that string where plotters left a placeholder.
//! That keeps the stacking order (grid under the data, data under nothing) while a
//! figure with 12,000 points stays a few hundred kilobytes, and it gives real dash
//! patterns, which plotters' SVG backend cannot write.
//!
//! Text is measured with DejaVu Sans compiled into the binary (plotters' `ab_glyph`
//! font support), so the layout is the same on every machine. Rendering is pure and
//! deterministic: no ids, no clocks, every number printed with a fixed rule, so the
//! same results give the same bytes.
//!
//! Reading aids, common practice, no source: each group is told apart by colour,
//! marker shape and line dash at once, so the figures survive grey print and colour
//! vision deficiency. The palette is our own; its colours were chosen (by a greedy
//! search, then rounded by hand) to stay apart in CAM02-UCS under simulated
//! deuteranopia, protanopia and tritanopia (Machado, Oliveira & Fernandes 2009), with
//! the first four also apart in lightness.

use std::collections::BTreeSet;
use std::fmt::Write as _;
use std::sync::OnceLock;

use plotters::coord::Shift;
use plotters::coord::ranged1d::Ranged;
use plotters::coord::types::RangedCoordf64;
use plotters::prelude::*;

use plotters::style::text_anchor::{HPos, Pos, VPos};
use plotters::style::{FontDesc, FontFamily, FontStyle, register_font};

use super::sections::label;
use crate::number;
use crate::results::FigurePoints;
use crate::results::{GroupLineResult, Region, Results};
use crate::stats::dist::t_quantile;

mod curves;
mod difference;
mod kit;
mod limits;
mod lines;
mod normal_quantiles;
mod residuals;
mod trend;

use curves::*;
use difference::*;
#[allow(unused_imports)]
use kit::*;
pub use kit::{FONT_BYTES, FULL_WIDTH, MARKERS, PALETTE, escape};
pub(crate) use kit::{FONT_NAME, ensure_font};
use limits::*;
use lines::*;
use normal_quantiles::*;
use residuals::*;
pub use trend::trend_svg;

/// One figure: where it goes in the run folder, what the report says about it, and
/// the SVG itself.
#[derive(Debug, Clone, PartialEq)]
pub struct Figure {
    /// Path inside the run folder, e.g. `figures/lines.svg`.
    pub file: String,
    /// Short title.
    pub title: String,
    /// Caption: what is drawn, at what level, and how many points of how many rows.
    pub caption: String,
    /// The SVG document.
    pub svg: String,
    /// Natural width in pixels; [`FULL_WIDTH`] is meant to fill the text width, so
    /// a page that scales each figure to `width / FULL_WIDTH` of it prints every
    /// figure's text at one size.
    pub width: u32,
    /// Natural height in pixels.
    pub height: u32,
}

/// Draws every figure the results call for, in the order the report shows them.
///
/// `figures/lines.svg`, `figures/residuals.svg` and `figures/normal-quantiles.svg`
/// always, the last two only from rows (a moments file has no residuals to draw);
/// `figures/difference.svg` when the gate found the slopes unequal and
/// regions were computed.
pub fn render(r: &Results, p: &FigurePoints) -> Result<Vec<Figure>, String> {
    ensure_font()?;
    let ctx = Context::new(r, p);
    // The figures share nothing but the context: two are drawn on a second core.
    let from_rows = r.checks.not_run.is_empty();
    let (first, second) = std::thread::scope(|scope| {
        let second = scope.spawn(|| {
            Ok::<_, String>(if from_rows {
                vec![residuals(&ctx)?, normal_quantiles(&ctx)?]
            } else {
                Vec::new()
            })
        });
        let mut first = vec![lines(&ctx)];
        if !r.decision.homogeneous && !r.regions.is_empty() {
            first.push(difference(&ctx));
        }
        if !r.limits.is_empty() {
            first.push(limits(&ctx));
        }
        let second = second
            .join()
            .unwrap_or_else(|panic| std::panic::resume_unwind(panic));
        (first, second)
    });
    let mut first = first.into_iter();
    let mut figures = vec![first.next().expect("the lines figure")?];
    figures.extend(second?);
    for figure in first {
        figures.push(figure?);
    }
    Ok(figures)
}

/// What every figure needs: the results, the drawn points per group (aligned with
/// `r.groups`) and the axis titles.
struct Context<'a> {
    r: &'a Results,
    /// Per group in `r.groups` order: drawn rows [x, y, fitted, residual].
    points: Vec<Vec<[f64; 4]>>,
    /// Per group: all its rows.
    rows: Vec<u64>,
    x_title: String,
    y_title: String,
    /// The response's unit, when it is plotted as measured.
    y_unit: Option<String>,
    /// Response label with its transform, e.g. `log(dry_mass_g)`.
    y_label: String,
}

impl<'a> Context<'a> {
    fn new(r: &'a Results, p: &FigurePoints) -> Context<'a> {
        let m = &r.model;
        let mut points: Vec<Vec<[f64; 4]>> = Vec::new();
        let mut rows = Vec::new();
        for g in &r.groups {
            let found = p.groups.iter().find(|q| q.level == g.level);
            let pts = found
                .map(|q| {
                    q.points
                        .iter()
                        .copied()
                        .filter(|v| v.iter().all(|c| c.is_finite()))
                        .collect()
                })
                .unwrap_or_default();
            points.push(pts);
            rows.push(found.map_or(g.n, |q| q.n));
        }
        let total: usize = points.iter().map(Vec::len).sum();
        let extra_step = total.div_ceil(POINT_BUDGET).max(1);
        if extra_step > 1 {
            for pts in &mut points {
                *pts = pts.iter().copied().step_by(extra_step).collect();
            }
        }
        let y_unit = m
            .response_units
            .clone()
            .filter(|_| m.response_transform == "none");
        Context {
            r,
            points,
            rows,
            x_title: axis_title(
                &m.covariate,
                &m.covariate_transform,
                m.covariate_units.as_deref(),
            ),
            y_title: axis_title(
                &m.response,
                &m.response_transform,
                m.response_units.as_deref(),
            ),
            y_unit,
            y_label: label(&m.response, &m.response_transform),
        }
    }

    /// Level of the intervals, in percent, as the report writes it.
    fn level(&self) -> String {
        number::trimmed(100.0 * (1.0 - self.r.model.alpha), 4)
    }

    /// How this many points are drawn in one panel.
    fn look(&self) -> Density {
        Density::for_points(self.points.iter().map(Vec::len).sum())
    }

    /// The caption sentence on how many points are drawn.
    fn points_sentence(&self) -> String {
        let drawn: usize = self.points.iter().map(Vec::len).sum();
        let rows: u64 = self.rows.iter().sum();
        let most = self.points.iter().map(Vec::len).max().unwrap_or(0);
        if self.r.data.source.as_deref() == Some("moments") {
            format!(
                "No points are drawn: the data were per-group moments of {} rows; the lines and bands come from them.",
                thousands(rows)
            )
        } else if drawn as u64 == rows {
            format!("All {} rows are drawn.", thousands(rows))
        } else {
            format!(
                "Points drawn: {} of {} rows ({} per group at most, every k-th row in data order); lines and bands use all rows.",
                thousands(drawn as u64),
                thousands(rows),
                thousands(most as u64)
            )
        }
    }
}

/// An axis title from a column name: the transform shown, and the unit when the
/// plan gives one (`dry_mass_g (g)`; `log(dry_mass_g), dry_mass_g in g`, since the
/// logarithm itself has no unit).
pub fn axis_title(column: &str, transform: &str, unit: Option<&str>) -> String {
    let shown = label(column, transform);
    // A unit that repeats the column's name (`months (months)`) adds nothing.
    match unit
        .map(str::trim)
        .filter(|u| !u.is_empty() && !u.eq_ignore_ascii_case(column))
    {
        None => shown,
        Some(u) if transform == "none" => format!("{shown} ({u})"),
        Some(u) => format!("{shown}, {column} in {u}"),
    }
}

/// `1234567` as `1,234,567`.
fn thousands(n: u64) -> String {
    let digits = n.to_string();
    let mut out = String::new();
    for (i, c) in digits.chars().enumerate() {
        if i > 0 && (digits.len() - i).is_multiple_of(3) {
            out.push(',');
        }
        out.push(c);
    }
    out
}

// ---------------------------------------------------------------------------
// Ranges.

/// The smallest and largest finite values seen.
#[derive(Debug, Clone, Copy)]
struct Extent {
    lo: f64,
    hi: f64,
}

impl Default for Extent {
    fn default() -> Extent {
        Extent {
            lo: f64::INFINITY,
            hi: f64::NEG_INFINITY,
        }
    }
}

impl Extent {
    fn add(&mut self, v: f64) {
        if v.is_finite() {
            self.lo = self.lo.min(v);
            self.hi = self.hi.max(v);
        }
    }

    /// The range with 4% room on each side; a single value gets room of its own.
    fn padded(self) -> (f64, f64) {
        if !(self.lo.is_finite() && self.hi.is_finite()) {
            return (0.0, 1.0);
        }
        let span = self.hi - self.lo;
        let room = if span > 1e-12 * self.hi.abs().max(self.lo.abs()).max(1e-300) {
            0.04 * span
        } else {
            0.5 * self.lo.abs().max(1.0)
        };
        (self.lo - room, self.hi + room)
    }

    /// Padded and symmetric about zero, for residuals.
    fn padded_symmetric(self) -> (f64, f64) {
        let (lo, hi) = self.padded();
        let m = lo.abs().max(hi.abs());
        (-m, m)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::results::Provenance;

    /// Invented rows: group a rises, group b falls, so the slopes differ.
    const CSV: &str = "g,x,y\na,1,2.1\na,2,2.9\na,3,4.2\na,4,4.8\na,5,6.1\na,6,7.0\n\
                       b,1.5,5.0\nb,2.5,4.6\nb,3.5,4.1\nb,4.5,3.2\nb,5.5,2.9\nb,6.5,2.1\n";
    const PLAN: &str = "title = \"bands\"\n[data]\npath = \"d.csv\"\n[model]\nresponse = \"y\"\ncovariate = \"x\"\ngroup = \"g\"\n";

    fn results() -> Results {
        let plan = crate::plan::load("p.toml", PLAN).unwrap();
        let data = crate::data::load(&plan, CSV.as_bytes()).unwrap();
        let provenance = Provenance {
            tool_version: String::new(),
            plan_sha256: String::new(),
            data_sha256: String::new(),
            plan_file: String::new(),
            data_file: String::new(),
            ..Provenance::default()
        };
        crate::analysis::run(&plan, &data, provenance).unwrap()
    }

    fn close(a: f64, b: f64) -> bool {
        (a - b).abs() <= 1e-9 * b.abs().max(1.0)
    }

    #[test]
    fn the_prediction_band_drawn_meets_the_limit_at_each_crossing() {
        // The invented reference data of tests/reference (generate_limits.py, case
        // limits_prediction): separate lines, prediction bounds, lower limit 95.
        let csv = include_str!("../../../tests/reference/data/limits_prediction.csv");
        let plan = "title = \"p\"\n[data]\npath = \"d.csv\"\n[model]\nresponse = \"assay_pct\"\ncovariate = \"months\"\ngroup = \"lot\"\n[limits]\nlower = 95.0\nbound = \"prediction\"\n[tests]\nprocedure = \"lot-pooling\"\n";
        let plan = crate::plan::load("p.toml", plan).unwrap();
        let data = crate::data::load(&plan, csv.as_bytes()).unwrap();
        let r = crate::analysis::run(&plan, &data, Provenance::default()).unwrap();
        assert_eq!(r.limits.len(), 3);
        for c in &r.limits {
            assert_eq!(
                (c.model.as_str(), c.bound.as_str()),
                ("separate", "prediction")
            );
            let g = r.groups.iter().find(|g| g.level == c.level).unwrap();
            let t = crate::stats::dist::t_quantile(c.confidence, g.n as f64 - 2.0);
            let x = c.crossing.unwrap();
            let (fit, half) = limits::limit_line_at(&r, &c.level, "separate", t, x, true).unwrap();
            assert!(
                close(fit - half.unwrap(), 95.0),
                "{}: {}",
                c.level,
                fit - half.unwrap()
            );
            // The mean's band is narrower there, so it is still above the limit.
            let (fit, half) = limits::limit_line_at(&r, &c.level, "separate", t, x, false).unwrap();
            assert!(fit - half.unwrap() > 95.0 + 1e-6);
        }
    }

    // Reference values from statsmodels 0.15.0 (numpy 2.4.6, scipy 1.17.1), design
    // matrices built by hand with numpy; the script, run with /tmp/refvenv/bin/python:
    //
    //   import numpy as np, statsmodels.api as sm; from scipy import stats
    //   xa = np.array([1, 2, 3, 4, 5, 6.]); ya = np.array([2.1, 2.9, 4.2, 4.8, 6.1, 7.0])
    //   xb = np.array([1.5, 2.5, 3.5, 4.5, 5.5, 6.5]); yb = np.array([5.0, 4.6, 4.1, 3.2, 2.9, 2.1])
    //   y = np.r_[ya, yb]
    //   fa = sm.OLS(ya, np.column_stack([np.ones(6), xa])).fit()          # a's own line
    //   fa.get_prediction([[1, x0]]).summary_frame(alpha=0.05)            # mean, mean_ci_upper
    //   X = np.zeros((12, 3)); X[:6, 0] = 1; X[6:, 1] = 1; X[:, 2] = np.r_[xa, xb]
    //   sm.OLS(y, X).fit().get_prediction([[0, 1, x0]]).summary_frame(alpha=0.05)  # common, b
    //   X = np.zeros((12, 4)); X[:6, 0] = 1; X[6:, 1] = 1; X[:6, 2] = xa; X[6:, 3] = xb
    //   fs = sm.OLS(y, X).fit(); c = np.array([1, -1, x0, -x0])
    //   d = c @ fs.params; half = stats.t.ppf(0.975, fs.df_resid) * np.sqrt(c @ fs.cov_params() @ c)
    //
    // Half-widths are mean_ci_upper − mean.

    #[test]
    fn separate_band_matches_statsmodels() {
        let r = results();
        let a = &r.groups[0];
        let t = t_crit(0.05, a.n as f64 - 2.0);
        let (fit, half) = separate_at(a, t, 3.0);
        assert!(close(fit, 4.020952380952383), "{fit}");
        assert!(close(half.unwrap(), 0.19321006764049198), "{half:?}");
        let (fit, half) = separate_at(a, t, 6.0);
        assert!(close(fit, 6.9952380952381), "{fit}");
        assert!(close(half.unwrap(), 0.32872618289314026), "{half:?}");
    }

    #[test]
    fn common_slope_band_matches_statsmodels() {
        let r = results();
        let t = t_crit(0.05, r.common_slope.df);
        let (fit, half) = common_at(&r, &r.groups[1], t, 3.0).unwrap();
        assert!(close(fit, 3.447142857142857), "{fit}");
        assert!(close(half.unwrap(), 1.5614572626091854), "{half:?}");
    }

    #[test]
    fn difference_band_matches_statsmodels() {
        let r = results();
        assert!(!r.decision.homogeneous, "the invented slopes should differ");
        let region = &r.regions[0];
        assert_eq!(region.method, "johnson-neyman");
        // scipy: t.ppf(0.975, 8).
        assert!((region.critical_t - 2.306004135204166).abs() < 1e-9);
        let (d, half) = difference_at(&r, region, 2.0).unwrap();
        assert!(close(d, -1.7919047619047637), "{d}");
        assert!(close(half.unwrap(), 0.30181696649766676), "{half:?}");
        let (d, half) = difference_at(&r, region, 5.0).unwrap();
        assert!(close(d, 2.939523809523806), "{d}");
        assert!(close(half.unwrap(), 0.2616814259279987), "{half:?}");
    }

    #[test]
    fn a_pairs_difference_is_drawn_over_the_range_both_groups_cover() {
        // Invented: group a covers x 0..10, group b 4..14, slopes 1 and 2 (issue 13:
        // the difference curve of a pair spans only the range the two share).
        let mut csv = String::from("g,x,y\n");
        for i in 0..11 {
            let e = [0.2, -0.1, 0.05, -0.2, 0.1][i % 5];
            csv.push_str(&format!("a,{i},{}\n", 1.0 + i as f64 + e));
            csv.push_str(&format!("b,{},{}\n", i + 4, 2.0 * (i + 4) as f64 - e));
        }
        let plan = "title = \"t\"\n[data]\npath = \"d.csv\"\n[model]\nresponse = \"y\"\ncovariate = \"x\"\ngroup = \"g\"\n";
        let plan = crate::plan::load("p.toml", plan).unwrap();
        let data = crate::data::load(&plan, csv.as_bytes()).unwrap();
        let r = crate::analysis::run(&plan, &data, Provenance::default()).unwrap();
        assert!(!r.decision.homogeneous);
        let region = &r.regions[0];
        assert_eq!(region.observed_range, [0.0, 14.0]);
        assert_eq!(shared_range(&r, region), Some((4.0, 10.0)));
        let c = difference_curve(&r, region).unwrap();
        assert_eq!(c.first().unwrap().0, 4.0);
        assert_eq!(c.last().unwrap().0, 10.0);
        let points = crate::analysis::figure_points(&data, &r);
        let figs = render(&r, &points).unwrap();
        let diff = figs
            .iter()
            .find(|f| f.file == "figures/difference.svg")
            .unwrap();
        assert!(
            diff.svg.contains(OUTSIDE),
            "the part outside is shaded grey"
        );
        assert!(
            diff.caption
                .contains("drawn only over the range both groups cover")
        );
    }

    #[test]
    fn the_limits_figure_marks_the_data_end_crossings_and_the_cap() {
        // The invented reference lots of generate_limits.py (case limits_violated_first):
        // one lot is below the lower limit from its first observation. With
        // room-temperature storage the cap and the supported period are drawn too.
        let csv = include_str!("../../../tests/reference/data/limits_violated_first.csv");
        let plan = "title = \"p\"\n[data]\npath = \"d.csv\"\n[model]\nresponse = \"assay_pct\"\ncovariate = \"months\"\ngroup = \"lot\"\n[limits]\nlower = 95.0\n";
        let plan = crate::plan::load("p.toml", plan).unwrap();
        let data = crate::data::load(&plan, csv.as_bytes()).unwrap();
        let r = crate::analysis::run(&plan, &data, Provenance::default()).unwrap();
        let points = crate::analysis::figure_points(&data, &r);
        let figs = render(&r, &points).unwrap();
        let fig = figs
            .iter()
            .find(|f| f.file == "figures/limits.svg")
            .unwrap();
        let last = r
            .limits
            .iter()
            .map(|l| l.observed_max)
            .fold(f64::MIN, f64::max);
        assert!(
            fig.caption
                .contains(&format!("the last observation ({})", number::sig(last, 4))),
            "{}",
            fig.caption
        );
        let already: Vec<&str> = r
            .limits
            .iter()
            .filter(|l| l.reason.as_deref() == Some("beyond-at-start"))
            .map(|l| l.level.as_str())
            .collect();
        assert!(
            !already.is_empty(),
            "the case has a lot past the limit at the start"
        );
        assert!(
            fig.caption
                .contains("Past the limit at the first observation")
        );
        assert!(
            fig.svg.contains("stroke-dasharray=\"1 3\""),
            "the last-observation rule"
        );

        let plan = "title = \"p\"\n[data]\npath = \"d.csv\"\n[model]\nresponse = \"assay_pct\"\ncovariate = \"months\"\ngroup = \"lot\"\n[limits]\nlower = 90.0\nstorage = \"room\"\n";
        let plan = crate::plan::load("p.toml", plan).unwrap();
        let r = crate::analysis::run(&plan, &data, Provenance::default()).unwrap();
        let figs = render(&r, &crate::analysis::figure_points(&data, &r)).unwrap();
        let fig = figs
            .iter()
            .find(|f| f.file == "figures/limits.svg")
            .unwrap();
        let s = r.limits_supported.as_ref().unwrap();
        if let Some(cap) = s.cap {
            assert!(
                fig.caption
                    .contains(&format!("the extrapolation cap ({})", number::sig(cap, 4)))
            );
        }
        if let Some(p) = s.supported {
            assert!(
                fig.caption
                    .contains(&format!("the supported period ({})", number::trimmed(p, 4)))
            );
        }
        assert!(s.cap.is_some() || s.supported.is_some(), "{s:?}");
    }

    #[test]
    fn simultaneous_bands_use_the_working_hotelling_value() {
        // Issue 14 item 5: with report.bands = "simultaneous" the lines figure draws
        // Working–Hotelling bands, whose critical value results.json holds beside the
        // pointwise t (both checked against scipy in src/stats).
        let plan = format!("{PLAN}[report]\nbands = \"simultaneous\"\n");
        let plan = crate::plan::load("p.toml", &plan).unwrap();
        let data = crate::data::load(&plan, CSV.as_bytes()).unwrap();
        let r = crate::analysis::run(&plan, &data, Provenance::default()).unwrap();
        assert_eq!(r.bands.drawn, "simultaneous");
        let g = &r.bands.groups[0];
        let df = r.groups[0].n as f64 - 2.0;
        assert_eq!(
            g.simultaneous,
            Some(crate::stats::bands::working_hotelling(0.05, df))
        );
        assert!(g.simultaneous.unwrap() > g.pointwise.unwrap());
        let figs = render(&r, &crate::analysis::figure_points(&data, &r)).unwrap();
        let lines = figs.iter().find(|f| f.file == "figures/lines.svg").unwrap();
        assert!(
            lines.caption.contains("simultaneous (Working–Hotelling"),
            "{}",
            lines.caption
        );
        let pointwise = results();
        let figs = render(
            &pointwise,
            &crate::analysis::figure_points(&data, &pointwise),
        )
        .unwrap();
        let other = figs.iter().find(|f| f.file == "figures/lines.svg").unwrap();
        assert_ne!(lines.svg, other.svg, "the bands differ");
    }

    #[test]
    fn text_helpers() {
        // Common practice, no source: digit grouping and tick labels.
        assert_eq!(thousands(0), "0");
        assert_eq!(thousands(999), "999");
        assert_eq!(thousands(1_000), "1,000");
        assert_eq!(thousands(1_234_567), "1,234,567");
        assert_eq!(tick(-0.0, 1), "0.0");
        assert_eq!(tick(-2.5, 1), "\u{2212}2.5");
        assert_eq!(decimals(&[0.0, 0.5, 1.0]), 1);
        assert_eq!(decimals(&[0.0, 0.25, 0.5]), 2);
        assert_eq!(decimals(&[10.0, 20.0]), 0);
        assert_eq!(escape("a<b>&\"c\"'"), "a&lt;b&gt;&amp;&quot;c&quot;&apos;");
        assert_eq!(axis_title("h", "none", Some("cm")), "h (cm)");
        assert_eq!(axis_title("h", "log", Some("cm")), "log(h), h in cm");
        assert_eq!(axis_title("h", "sqrt", None), "sqrt(h)");
        assert_eq!(axis_title("months", "none", Some("months")), "months");
        assert_eq!(num(-0.04), "0");
        assert_eq!(num(12.0), "12");
        assert_eq!(num(12.25), "12.2");
    }

    #[test]
    fn long_titles_are_cut_to_fit() {
        ensure_font().unwrap();
        let long = "nursery bed 0 (north slope) − nursery bed 10 (north slope)";
        let room = 300.0;
        let cut = fit_title(long, TITLE_PX, room);
        assert!(text_width(TITLE_PX, &cut) <= room, "{cut}");
        assert!(cut.contains(" − ") && cut.contains('…'), "{cut}");
        assert_eq!(fit_title("a − b", TITLE_PX, room), "a − b");
    }
}
