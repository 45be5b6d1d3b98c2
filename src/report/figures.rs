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

use super::markdown::label;
use crate::number;
use crate::results::FigurePoints;
use crate::results::{GroupLineResult, Region, Results};
use crate::stats::dist::t_quantile;

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

/// The canvas width that fills a page's text width: every figure is laid out at
/// this scale (text 14–16 px, so about 8–9 pt on a 16 cm text block).
pub const FULL_WIDTH: u32 = 800;

/// Group colours, in level order, cycling after eight (see the module docs).
pub const PALETTE: [&str; 8] = [
    "#1E4B96", "#E8890C", "#1AA3BF", "#A2303F", "#8A5BE0", "#D4461A", "#2E7A74", "#7DB26A",
];

/// Marker shapes, in level order, cycling after eight; outlines, so overlapping
/// points stay visible.
pub const MARKERS: [&str; 8] = [
    "circle",
    "triangle",
    "square",
    "diamond",
    "cross",
    "triangle-down",
    "plus",
    "asterisk",
];

/// Line dashes (SVG `stroke-dasharray`, empty for solid), cycling after six; with
/// eight colours and eight markers every group up to the 24th has its own triple.
const DASHES: [&str; 6] = ["", "8 4", "2 3", "10 3 2 3", "4 4", "14 4 4 4"];

/// Every figure draws at most this many points per panel; past it, each group's
/// drawn rows are thinned further by a common step, so no figure passes 1 MB.
const POINT_BUDGET: usize = 10_000;

/// The family name the font is registered under, and that the SVG asks for.
const FONT_NAME: &str = "DejaVu Sans";
/// The bundled font (licence in `assets/fonts/`).
pub const FONT_BYTES: &[u8] = include_bytes!("../../assets/fonts/DejaVuSans.ttf");
/// plotters' SVG backend writes a font size of `size / 1.24` pixels.
const PLOTTERS_SIZE: f64 = 1.24;
/// ab_glyph scales a font so ascent − descent equals the size; for DejaVu Sans that
/// is 2384/2048 em (from the font's hhea table), so measured widths are this much
/// wider than the text as the SVG sets it.
const WIDTH_FIX: f64 = (2384.0 / 2048.0) / PLOTTERS_SIZE;

/// Text sizes in pixels.
const TICK_PX: f64 = 14.0;
const AXIS_PX: f64 = 15.0;
const TITLE_PX: f64 = 16.0;
const LEGEND_PX: f64 = 15.0;

/// Ink colours of the frame.
const INK: RGBColor = RGBColor(0x26, 0x26, 0x26);
const INK_SOFT: RGBColor = RGBColor(0x55, 0x55, 0x55);
const AXIS: RGBColor = RGBColor(0x8C, 0x8C, 0x8C);
const GRID: RGBColor = RGBColor(0xE8, 0xE8, 0xE8);
/// Reference lines (zero, identity) and bounds.
const REFERENCE: &str = "#7A7A7A";
/// Shading of the covariate stretches where two groups differ.
const SHADE: &str = "#FAEFDA";

/// Tick labels asked of plotters per axis.
const X_TICKS: usize = 7;
const Y_TICKS: usize = 7;

/// Draws every figure the results call for, in the order the report shows them.
///
/// `figures/lines.svg`, `figures/residuals.svg` and `figures/normal-quantiles.svg`
/// always; `figures/difference.svg` when the gate found the slopes unequal and
/// regions were computed.
pub fn render(r: &Results, p: &FigurePoints) -> Result<Vec<Figure>, String> {
    ensure_font()?;
    let ctx = Context::new(r, p);
    // The figures share nothing but the context: two are drawn on a second core.
    let (first, second) = std::thread::scope(|scope| {
        let second = scope.spawn(|| Ok::<_, String>([residuals(&ctx)?, normal_quantiles(&ctx)?]));
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

/// Registers the bundled font with plotters once per process.
fn ensure_font() -> Result<(), String> {
    static REGISTERED: OnceLock<bool> = OnceLock::new();
    let ok =
        *REGISTERED.get_or_init(|| register_font(FONT_NAME, FontStyle::Normal, FONT_BYTES).is_ok());
    if ok {
        Ok(())
    } else {
        Err("the bundled font could not be read".into())
    }
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
        if drawn as u64 == rows {
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
        if i > 0 && (digits.len() - i) % 3 == 0 {
            out.push(',');
        }
        out.push(c);
    }
    out
}

// ---------------------------------------------------------------------------
// Figure 1: the two fits.

/// A group's line and band over its own covariate range: (x, fit, half-width).
type Curve = Vec<(f64, f64, Option<f64>)>;

/// Samples along a line, enough for a smooth band edge.
const CURVE_STEPS: usize = 48;

fn curve(lo: f64, hi: f64, mut f: impl FnMut(f64) -> (f64, Option<f64>)) -> Curve {
    (0..=CURVE_STEPS)
        .map(|i| {
            let x = lo + (hi - lo) * i as f64 / CURVE_STEPS as f64;
            let (y, h) = f(x);
            (x, y, h.filter(|h| h.is_finite()))
        })
        .collect()
}

/// t quantile for a two-sided interval at `1 − alpha`, when the df allow one.
fn t_crit(alpha: f64, df: f64) -> Option<f64> {
    (df > 0.0 && alpha > 0.0 && alpha < 1.0)
        .then(|| t_quantile(1.0 - alpha / 2.0, df))
        .filter(|t| t.is_finite())
}

/// Group g's own line at x with the half-width of its pointwise band:
/// se(x)² = s²/n + (x − x̄)²·se_b², which is s²(1/n + (x − x̄)²/Sxx) with
/// Sxx = s²/se_b² (Draper & Smith 1998, §3.1). `t` is the critical value.
fn separate_at(g: &GroupLineResult, t: Option<f64>, x: f64) -> (f64, Option<f64>) {
    let fit = g.intercept + g.slope * x;
    let half = match (t, g.residual_sd, g.slope_se) {
        (Some(t), Some(s), Some(se)) => {
            let d = x - g.covariate_mean;
            Some(t * (s * s / g.n as f64 + d * d * se * se).sqrt())
        }
        _ => None,
    };
    (fit, half)
}

fn separate_curve(g: &GroupLineResult, alpha: f64) -> Curve {
    let t = t_crit(alpha, g.n as f64 - 2.0);
    curve(g.covariate_min, g.covariate_max, |x| separate_at(g, t, x))
}

/// Group g's line at x under the common slope b, through its adjusted mean, with
/// its band's half-width: se(x)² = s_c²/n_g + (x − x̄_g)²·se_b², the group mean and
/// the slope being uncorrelated in that model (Snedecor & Cochran 1989, §18.3).
fn common_at(
    r: &Results,
    g: &GroupLineResult,
    t: Option<f64>,
    x: f64,
) -> Option<(f64, Option<f64>)> {
    let m = r.adjusted_means.iter().find(|m| m.level == g.level)?;
    let c = &r.common_slope;
    let fit = m.mean + c.slope * (x - r.adjust_at);
    let half = match (t, c.residual_sd, c.se) {
        (Some(t), Some(s), Some(se)) => {
            let d = x - g.covariate_mean;
            Some(t * (s * s / g.n as f64 + d * d * se * se).sqrt())
        }
        _ => None,
    };
    Some((fit, half))
}

fn common_curve(r: &Results, g: &GroupLineResult, t: Option<f64>) -> Option<Curve> {
    common_at(r, g, t, g.covariate_mean)?;
    Some(curve(g.covariate_min, g.covariate_max, |x| {
        common_at(r, g, t, x).unwrap_or((f64::NAN, None))
    }))
}

fn lines(ctx: &Context) -> Result<Figure, String> {
    let r = ctx.r;
    let alpha = r.model.alpha;
    let separate: Vec<Curve> = r.groups.iter().map(|g| separate_curve(g, alpha)).collect();
    let t_common = t_crit(alpha, r.common_slope.df);
    let common: Vec<Curve> = r
        .groups
        .iter()
        .map(|g| common_curve(r, g, t_common).unwrap_or_default())
        .collect();

    let mut xs = Extent::default();
    let mut ys = Extent::default();
    for g in &r.groups {
        xs.add(g.covariate_min);
        xs.add(g.covariate_max);
    }
    for pts in &ctx.points {
        for p in pts {
            xs.add(p[0]);
            ys.add(p[1]);
        }
    }
    for c in separate.iter().chain(&common) {
        for &(_, y, h) in c {
            ys.add(y);
            if let Some(h) = h {
                ys.add(y - h);
                ys.add(y + h);
            }
        }
    }
    let (xr, yr) = (xs.padded(), ys.padded());

    let items = group_legend(r);
    let width = FULL_WIDTH;
    let panel_h = 420;
    let legend = Legend::layout(&items, width as f64 - 40.0);
    let height = panel_h + legend.height() as u32;

    let b = number::sig(r.common_slope.slope, 4).replace('-', "\u{2212}");
    let titles = [
        "Separate lines: each group's own fit".to_string(),
        format!("Parallel lines: common slope {b}"),
    ];
    let look = ctx.look();
    let mut layers = Vec::new();
    let svg = draw(width, height, &mut layers, |root, layers| {
        let (top, bottom) = root.split_vertically(panel_h);
        let halves = top.split_evenly((1, 2));
        for (k, area) in halves.iter().enumerate() {
            let axes = Axes {
                x: xr,
                y: yr,
                x_title: &ctx.x_title,
                y_title: &ctx.y_title,
                title: &titles[k],
            };
            let frame = panel(area, &axes, layers, &|_| String::new())?;
            let curves = if k == 0 { &separate } else { &common };
            let mut layer = String::new();
            for (i, pts) in ctx.points.iter().enumerate() {
                markers(
                    &mut layer,
                    &frame,
                    i,
                    look,
                    pts.iter().map(|p| (p[0], p[1])),
                );
            }
            for (i, c) in curves.iter().enumerate() {
                band(
                    &mut layer,
                    &frame,
                    c,
                    PALETTE[i % PALETTE.len()],
                    BAND_OPACITY,
                );
            }
            for (i, c) in curves.iter().enumerate() {
                let line: Vec<(f64, f64)> = c.iter().map(|&(x, y, _)| (x, y)).collect();
                haloed(&mut layer, &frame, &line, &group_stroke(i, 2.2));
            }
            place(area, layers, layer)?;
        }
        let mut overlay = String::new();
        legend.draw(&bottom, &mut overlay, &items)?;
        place(&bottom, layers, overlay)
    })?;

    let level = ctx.level();
    let caption = format!(
        "Left: each group's own least-squares line with its pointwise {level}% confidence band, over the group's covariate range. \
         Right: the parallel-lines model, one common slope ({b}) with each line through the group's adjusted mean, \
         and its pointwise {level}% band. {}",
        ctx.points_sentence()
    );
    finish(
        "figures/lines.svg",
        "Fitted lines by group",
        caption,
        svg,
        &layers,
        (width, height),
    )
}

// ---------------------------------------------------------------------------
// Limits: the lines the crossings are read from, their one-sided bounds, the limits.

/// The mean and the one-sided bound's half-width at x for one limit entry, from
/// the model the crossing used (same formulas as `separate_at` and `common_at`).
fn limit_line_at(
    r: &Results,
    level: &str,
    model: &str,
    t: f64,
    x: f64,
    prediction: bool,
) -> Option<(f64, Option<f64>)> {
    let (fit, half) = limit_mean_at(r, level, model, t, x)?;
    if !prediction {
        return Some((fit, half));
    }
    // The prediction bound for one future result adds s² to the mean's variance.
    let s = match model {
        "pooled" => r.one_line.residual_sd,
        "common-slope" => r.common_slope.residual_sd,
        _ => r.groups.iter().find(|g| g.level == level)?.residual_sd,
    };
    Some((
        fit,
        half.zip(s).map(|(h, s)| (h * h + t * t * s * s).sqrt()),
    ))
}

fn limit_mean_at(
    r: &Results,
    level: &str,
    model: &str,
    t: f64,
    x: f64,
) -> Option<(f64, Option<f64>)> {
    match model {
        "pooled" => {
            let l = &r.one_line;
            let fit = l.intercept + l.slope * x;
            let half = match (l.residual_sd, l.slope_se) {
                (Some(s), Some(se)) => {
                    let d = x - r.covariate_mean;
                    Some(t * (s * s / l.n as f64 + d * d * se * se).sqrt())
                }
                _ => None,
            };
            Some((fit, half))
        }
        "common-slope" => {
            let g = r.groups.iter().find(|g| g.level == level)?;
            common_at(r, g, Some(t), x)
        }
        _ => {
            let g = r.groups.iter().find(|g| g.level == level)?;
            Some(separate_at(g, Some(t), x))
        }
    }
}

fn limits(ctx: &Context) -> Result<Figure, String> {
    let r = ctx.r;
    let first = &r.limits[0];
    let model = first.model.as_str();
    // One line per level (the first side's entries name every line).
    let entries: Vec<_> = r.limits.iter().filter(|c| c.side == first.side).collect();
    let lo = entries
        .iter()
        .map(|c| c.observed_min)
        .fold(f64::INFINITY, f64::min);
    let reach = entries
        .iter()
        .map(|c| {
            c.crossing
                .filter(|x| x.is_finite())
                .unwrap_or(c.observed_max)
                .max(c.observed_max)
        })
        .fold(f64::NEG_INFINITY, f64::max);
    let hi = reach + 0.05 * (reach - lo).max(1e-9);
    let mut xs = Extent::default();
    let mut ys = Extent::default();
    xs.add(lo);
    xs.add(hi);
    let mut curves: Vec<(usize, Curve, f64)> = Vec::new();
    for (k, c) in entries.iter().enumerate() {
        let df = match model {
            "pooled" => r.one_line.n as f64 - 2.0,
            "common-slope" => r.common_slope.df,
            _ => r
                .groups
                .iter()
                .find(|g| g.level == c.level)
                .map_or(0.0, |g| g.n as f64 - 2.0),
        };
        if !(df > 0.0) {
            continue;
        }
        let t = t_quantile(c.confidence, df);
        let color = if model == "pooled" {
            0
        } else {
            r.groups
                .iter()
                .position(|g| g.level == c.level)
                .unwrap_or(k)
        };
        let curve = curve(lo, hi, |x| {
            limit_line_at(r, &c.level, model, t, x, c.bound == "prediction")
                .unwrap_or((f64::NAN, None))
        });
        for &(_, y, h) in &curve {
            ys.add(y);
            if let Some(h) = h {
                ys.add(y - h);
                ys.add(y + h);
            }
        }
        curves.push((color, curve, t));
    }
    for c in &r.limits {
        ys.add(c.limit);
    }
    for pts in &ctx.points {
        for p in pts {
            ys.add(p[1]);
        }
    }
    let (xr, yr) = (xs.padded(), ys.padded());
    let mut items = if model == "pooled" {
        vec![LegendItem::new(
            "pooled line",
            Swatch::Line(Stroke::new(PALETTE[0], 2.2, "")),
        )]
    } else {
        group_legend(r)
    };
    items.push(LegendItem::new(
        "one-sided bound",
        Swatch::Line(Stroke::new(INK_HEX, 1.2, "2 3")),
    ));
    items.push(LegendItem::new(
        "limit",
        Swatch::Line(Stroke::new(REFERENCE, 1.6, "8 4")),
    ));
    let width = 640;
    let panel_h = 420;
    let legend = Legend::layout(&items, width as f64 - 40.0);
    let height = panel_h + legend.height() as u32;
    let level = number::trimmed(100.0 * first.confidence, 4);
    let title = format!("Mean lines, one-sided {level}% bounds and limits");
    let look = ctx.look();
    let mut layers = Vec::new();
    let svg = draw(width, height, &mut layers, |root, layers| {
        let (top, bottom) = root.split_vertically(panel_h);
        let axes = Axes {
            x: xr,
            y: yr,
            x_title: &ctx.x_title,
            y_title: &ctx.y_title,
            title: &title,
        };
        let frame = panel(&top, &axes, layers, &|_| String::new())?;
        let mut layer = String::new();
        for (i, pts) in ctx.points.iter().enumerate() {
            markers(
                &mut layer,
                &frame,
                i,
                look,
                pts.iter().map(|p| (p[0], p[1])),
            );
        }
        for c in &r.limits {
            polyline(
                &mut layer,
                &frame,
                &[(xr.0, c.limit), (xr.1, c.limit)],
                &Stroke::new(REFERENCE, 1.6, "8 4"),
            );
        }
        for (color, curve, _) in &curves {
            let mean: Vec<(f64, f64)> = curve.iter().map(|&(x, y, _)| (x, y)).collect();
            haloed(&mut layer, &frame, &mean, &group_stroke(*color, 2.2));
            for sign in [-1.0, 1.0] {
                let bound: Vec<(f64, f64)> = curve
                    .iter()
                    .filter_map(|&(x, y, h)| h.map(|h| (x, y + sign * h)))
                    .collect();
                // Only the side each limit is compared with.
                let side = if sign < 0.0 { "lower" } else { "upper" };
                if r.limits.iter().any(|c| c.side == side) {
                    polyline(
                        &mut layer,
                        &frame,
                        &bound,
                        &Stroke::new(PALETTE[*color % PALETTE.len()], 1.2, "2 3"),
                    );
                }
            }
        }
        place(&top, layers, layer)?;
        let mut overlay = String::new();
        legend.draw(&bottom, &mut overlay, &items)?;
        place(&bottom, layers, overlay)
    })?;
    let crossings: Vec<String> = r
        .limits
        .iter()
        .filter_map(|c| {
            c.crossing
                .map(|x| format!("{} {}: {}", c.level, c.side, number::sig(x, 4)))
        })
        .collect();
    let caption = format!(
        "Each line the crossings are read from ({}), its one-sided {level}% {}, and the limits (dashed). Crossings: {}. {}",
        match model {
            "pooled" => "the pooled line",
            "common-slope" => "parallel lines",
            _ => "each group's own line",
        },
        if first.bound == "prediction" {
            "prediction bound for a single future result"
        } else {
            "confidence bound of the mean"
        },
        if crossings.is_empty() {
            "none".to_string()
        } else {
            crossings.join("; ")
        },
        ctx.points_sentence()
    );
    finish(
        "figures/limits.svg",
        "Limits and crossing points",
        caption,
        svg,
        &layers,
        (width, height),
    )
}

// ---------------------------------------------------------------------------
// Figure 2: residuals against fitted values.

fn residuals(ctx: &Context) -> Result<Figure, String> {
    let r = ctx.r;
    let mut xs = Extent::default();
    let mut ys = Extent::default();
    ys.add(0.0);
    for pts in &ctx.points {
        for p in pts {
            xs.add(p[2]);
            ys.add(p[3]);
        }
    }
    let (xr, yr) = (xs.padded(), ys.padded_symmetric());
    let items = group_legend(r);
    let width = 640;
    let panel_h = 420;
    let legend = Legend::layout(&items, width as f64 - 40.0);
    let height = panel_h + legend.height() as u32;
    let model = if r.decision.homogeneous {
        "common-slope"
    } else {
        "separate-slopes"
    };
    let x_title = format!("fitted {}", ctx.y_title);
    let y_title = match &ctx.y_unit {
        Some(u) => format!("residual ({u})"),
        None => "residual".to_string(),
    };
    let title = format!("Residuals of the {model} model");
    let look = ctx.look();
    let mut layers = Vec::new();
    let svg = draw(width, height, &mut layers, |root, layers| {
        let (top, bottom) = root.split_vertically(panel_h);
        let axes = Axes {
            x: xr,
            y: yr,
            x_title: &x_title,
            y_title: &y_title,
            title: &title,
        };
        let frame = panel(&top, &axes, layers, &|_| String::new())?;
        let mut layer = String::new();
        polyline(
            &mut layer,
            &frame,
            &[(xr.0, 0.0), (xr.1, 0.0)],
            &Stroke::new(REFERENCE, 1.4, ""),
        );
        for (i, pts) in ctx.points.iter().enumerate() {
            markers(
                &mut layer,
                &frame,
                i,
                look,
                pts.iter().map(|p| (p[2], p[3])),
            );
        }
        place(&top, layers, layer)?;
        let mut overlay = String::new();
        legend.draw(&bottom, &mut overlay, &items)?;
        place(&bottom, layers, overlay)
    })?;
    let caption = format!(
        "Residuals against fitted values under the {model} model, the one the equal-slopes gate selected; \
         the line marks zero. A curve or a funnel shape would point to a bent relation or unequal spread. {}",
        ctx.points_sentence()
    );
    finish(
        "figures/residuals.svg",
        "Residuals against fitted values",
        caption,
        svg,
        &layers,
        (width, height),
    )
}

// ---------------------------------------------------------------------------
// Figure 3: normal quantile plot.

fn normal_quantiles(ctx: &Context) -> Result<Figure, String> {
    let r = ctx.r;
    let normality = &r.checks.normality;
    let qq: Vec<[f64; 2]> = normality
        .qq
        .iter()
        .copied()
        .filter(|q| q[0].is_finite() && q[1].is_finite())
        .collect();
    let mut all = Extent::default();
    all.add(-2.0);
    all.add(2.0);
    for q in &qq {
        all.add(q[0]);
        all.add(q[1]);
    }
    let range = all.padded();
    let width = 520;
    let height = 520;
    let title = "Standardized residuals against normal quantiles";
    let mut layers = Vec::new();
    let svg = draw(width, height, &mut layers, |root, layers| {
        let axes = Axes {
            x: range,
            y: range,
            x_title: "normal quantile",
            y_title: "standardized residual",
            title,
        };
        let frame = panel(root, &axes, layers, &|_| String::new())?;
        let mut layer = String::new();
        polyline(
            &mut layer,
            &frame,
            &[(range.0, range.0), (range.1, range.1)],
            &Stroke::new(REFERENCE, 1.4, ""),
        );
        markers(
            &mut layer,
            &frame,
            0,
            Density::for_points(qq.len()),
            qq.iter().map(|q| (q[0], q[1])),
        );
        place(root, layers, layer)
    })?;
    let mut caption = format!(
        "Residuals of the separate-slopes model, each divided by the residual standard deviation, against the normal quantiles of their ranks; \
         points near the line agree with normally distributed errors. {} of {} residuals are shown, evenly spaced in rank.",
        thousands(qq.len() as u64),
        thousands(normality.residuals)
    );
    if let (Some(w), Some(p)) = (normality.statistic, normality.p_value) {
        let _ = write!(
            caption,
            " Shapiro–Wilk W = {}, {}.",
            number::sig(w, 4),
            number::p_equation(p)
        );
    }
    finish(
        "figures/normal-quantiles.svg",
        "Normal quantile plot of residuals",
        caption,
        svg,
        &layers,
        (width, height),
    )
}

// ---------------------------------------------------------------------------
// Figure 4: where two groups differ.

/// Most pairs drawn, one small panel each.
const MAX_PAIRS: usize = 6;

/// D(x) = line_a(x) − line_b(x) with half-width c·se(x), where
/// se(x)² = s²·Σ_{g∈{a,b}} (1/n_g + (x − x̄_g)²/Sxx_g), s² the separate-slopes
/// model's pooled residual variance and Sxx_g = s_g²/se_g² from the group's own fit
/// (Johnson & Neyman 1936; Potthoff 1964); c is the region's critical value.
fn difference_at(r: &Results, region: &Region, x: f64) -> Option<(f64, Option<f64>)> {
    let a = r.groups.iter().find(|g| g.level == region.a)?;
    let b = r.groups.iter().find(|g| g.level == region.b)?;
    let sxx = |g: &GroupLineResult| match (g.residual_sd, g.slope_se) {
        (Some(sg), Some(se)) if sg > 0.0 && se > 0.0 => Some(sg * sg / (se * se)),
        _ => None,
    };
    let d = (a.intercept + a.slope * x) - (b.intercept + b.slope * x);
    let c = region.critical_t;
    let half = match (r.separate_slopes.residual_sd, sxx(a), sxx(b)) {
        (Some(s), Some(sa), Some(sb)) if c.is_finite() => {
            let (da, db) = (x - a.covariate_mean, x - b.covariate_mean);
            let v = s * s * (1.0 / a.n as f64 + da * da / sa + 1.0 / b.n as f64 + db * db / sb);
            Some(c * v.sqrt())
        }
        _ => None,
    };
    Some((d, half))
}

fn difference_curve(r: &Results, region: &Region) -> Option<Curve> {
    let [lo, hi] = region.observed_range;
    if !(lo.is_finite() && hi.is_finite() && hi > lo) {
        return None;
    }
    difference_at(r, region, lo)?;
    Some(curve(lo, hi, |x| {
        difference_at(r, region, x).unwrap_or((f64::NAN, None))
    }))
}

fn difference(ctx: &Context) -> Result<Figure, String> {
    let r = ctx.r;
    let shown: Vec<(&Region, Curve)> = r
        .regions
        .iter()
        .filter_map(|g| difference_curve(r, g).map(|c| (g, c)))
        .take(MAX_PAIRS)
        .collect();
    if shown.is_empty() {
        return Err("no pair of groups has a covariate range to draw the difference over".into());
    }
    let n = shown.len();
    let cols = if n == 1 { 1 } else { 2 };
    let rows = n.div_ceil(cols);
    let (width, panel_h) = if cols == 1 {
        (640, 420)
    } else {
        (FULL_WIDTH, 330)
    };
    let inside = |r: &Region, b: f64| b > r.observed_range[0] && b < r.observed_range[1];
    let any_bound = shown
        .iter()
        .any(|(g, _)| g.bounds.iter().any(|b| inside(g, *b)));
    let any_shade = shown.iter().any(|(g, _)| !g.significant.is_empty());
    let mut items = vec![LegendItem::new(
        "difference of the lines",
        Swatch::Line(Stroke::new(PALETTE[0], 2.2, "")),
    )];
    if shown.iter().any(|(_, c)| c.iter().any(|p| p.2.is_some())) {
        items.push(LegendItem::new(
            &format!(
                "band (critical t = {})",
                number::sig(shown[0].0.critical_t, 3)
            ),
            Swatch::Fill(DIFF_BAND, 1.0),
        ));
    }
    if any_shade {
        items.push(LegendItem::new("groups differ", Swatch::Fill(SHADE, 1.0)));
    }
    if any_bound {
        items.push(LegendItem::new(
            "Johnson–Neyman bound",
            Swatch::Line(Stroke::new(INK_HEX, 1.4, "5 4")),
        ));
    }
    let legend = Legend::layout(&items, width as f64 - 40.0);
    let height = (rows * panel_h) as u32 + legend.height() as u32;
    let y_title = match &ctx.y_unit {
        Some(u) => format!("difference in {} ({u})", ctx.y_label),
        None => format!("difference in {}", ctx.y_label),
    };
    let mut layers = Vec::new();
    let svg = draw(width, height, &mut layers, |root, layers| {
        let (top, bottom) = root.split_vertically((rows * panel_h) as u32);
        let cells = top.split_evenly((rows, cols));
        for ((region, c), cell) in shown.iter().zip(&cells) {
            let mut ys = Extent::default();
            ys.add(0.0);
            for &(_, y, h) in c {
                ys.add(y);
                if let Some(h) = h {
                    ys.add(y - h);
                    ys.add(y + h);
                }
            }
            let observed = (region.observed_range[0], region.observed_range[1]);
            let mut xs = Extent::default();
            xs.add(observed.0);
            xs.add(observed.1);
            let xr = xs.padded();
            let yr = ys.padded();
            let title = format!("{} − {}", region.a, region.b);
            let axes = Axes {
                x: xr,
                y: yr,
                x_title: &ctx.x_title,
                y_title: &y_title,
                title: &title,
            };
            // Shading goes under the grid, so the grid still reads through it.
            let shade = |frame: &Frame| {
                let mut under = String::new();
                for s in &region.significant {
                    let (a, b) = (s[0].max(observed.0), s[1].min(observed.1));
                    if b > a {
                        rect(&mut under, frame, (a, yr.0), (b, yr.1), SHADE, 1.0);
                    }
                }
                under
            };
            let frame = panel(cell, &axes, layers, &shade)?;
            // An opaque band, so it reads the same over the shading as off it; the
            // zero line and the bounds go over it.
            let mut layer = String::new();
            band(&mut layer, &frame, c, DIFF_BAND, 1.0);
            polyline(
                &mut layer,
                &frame,
                &[(xr.0, 0.0), (xr.1, 0.0)],
                &Stroke::new(REFERENCE, 1.4, ""),
            );
            for &bound in &region.bounds {
                if bound > observed.0 && bound < observed.1 {
                    polyline(
                        &mut layer,
                        &frame,
                        &[(bound, yr.0), (bound, yr.1)],
                        &Stroke::new(INK_HEX, 1.4, "5 4"),
                    );
                }
            }
            let line: Vec<(f64, f64)> = c.iter().map(|&(x, y, _)| (x, y)).collect();
            polyline(&mut layer, &frame, &line, &Stroke::new(PALETTE[0], 2.2, ""));
            place(cell, layers, layer)?;
        }
        let mut overlay = String::new();
        legend.draw(&bottom, &mut overlay, &items)?;
        place(&bottom, layers, overlay)
    })?;

    let level = ctx.level();
    let simultaneous = shown
        .iter()
        .any(|(g, _)| g.method == "johnson-neyman-simultaneous");
    let kind = if simultaneous {
        "simultaneous over the covariate range"
    } else {
        "pointwise"
    };
    let mut caption = format!(
        "Difference between two groups' own lines along the covariate, drawn over the observed range with its {kind} {level}% band \
         (from the separate-slopes model's pooled residual variance). Shaded: where the groups differ (Johnson–Neyman); \
         dashed lines: the bounds that fall inside the data."
    );
    for (region, _) in &shown {
        let stretches: Vec<String> = region
            .significant
            .iter()
            .map(|s| format!("{} to {}", number::sig(s[0], 4), number::sig(s[1], 4)))
            .collect();
        let _ = write!(
            caption,
            " {} − {}: {}.",
            region.a,
            region.b,
            if stretches.is_empty() {
                "no difference anywhere in the data".to_string()
            } else {
                format!("differ from {}", stretches.join(" and from "))
            }
        );
    }
    if r.regions.len() > shown.len() {
        let _ = write!(
            caption,
            " The first {} of {} pairs are drawn; results.json lists every pair.",
            shown.len(),
            r.regions.len()
        );
    }
    finish(
        "figures/difference.svg",
        "Where the groups differ along the covariate",
        caption,
        svg,
        &layers,
        (width, height),
    )
}

// ---------------------------------------------------------------------------
// Frame: plotters draws axes, grid and text; we keep the pixel mapping.

/// The difference band: the first palette colour at 20% on white, opaque.
const DIFF_BAND: &str = "#D2DBEA";
/// Opacity of confidence bands.
const BAND_OPACITY: f64 = 0.16;
/// The text ink as an SVG colour, for lines we write ourselves.
const INK_HEX: &str = "#262626";

type Area<'b> = DrawingArea<SVGBackend<'b>, Shift>;

/// Data range of a panel and its texts.
struct Axes<'t> {
    x: (f64, f64),
    y: (f64, f64),
    x_title: &'t str,
    y_title: &'t str,
    title: &'t str,
}

/// Maps data coordinates to pixels exactly as the panel's plotters chart does at its
/// corners, but in floating point, so lines are smooth.
#[derive(Debug, Clone, Copy)]
struct Frame {
    x: (f64, f64),
    y: (f64, f64),
    px: (f64, f64),
    py: (f64, f64),
}

impl Frame {
    fn at(&self, x: f64, y: f64) -> (f64, f64) {
        (
            self.px.0 + (x - self.x.0) / (self.x.1 - self.x.0) * (self.px.1 - self.px.0),
            self.py.0 + (y - self.y.0) / (self.y.1 - self.y.0) * (self.py.1 - self.py.0),
        )
    }
}

fn font(px: f64) -> FontDesc<'static> {
    FontDesc::new(
        FontFamily::Name(FONT_NAME),
        px * PLOTTERS_SIZE,
        FontStyle::Normal,
    )
}

fn text_style(px: f64, color: &'static RGBColor) -> TextStyle<'static> {
    TextStyle::from(font(px)).color(color)
}

/// Width of `text` as the SVG sets it, in pixels.
fn text_width(px: f64, text: &str) -> f64 {
    font(px)
        .box_size(text)
        .map(|(w, _)| w as f64 * WIDTH_FIX)
        .unwrap_or(px * 0.6 * text.chars().count() as f64)
}

fn err<E: std::fmt::Debug>(e: E) -> String {
    format!("{e:?}")
}

/// A tick label: `decimals` places, a true minus sign, no `-0`.
fn tick(v: f64, decimals: usize) -> String {
    let big = v.abs() >= 1e6;
    let s = if big {
        number::sig(v, 3)
    } else {
        format!("{v:.decimals$}")
    };
    let s = if s
        .trim_start_matches('-')
        .chars()
        .all(|c| c == '0' || c == '.')
    {
        s.trim_start_matches('-').to_string()
    } else {
        s
    };
    s.replace('-', "\u{2212}")
}

/// The fewest decimals that print every tick value distinctly and exactly enough.
fn decimals(ticks: &[f64]) -> usize {
    let step = ticks
        .windows(2)
        .map(|w| (w[1] - w[0]).abs())
        .fold(f64::INFINITY, f64::min);
    if !step.is_finite() || step <= 0.0 {
        return 2;
    }
    (0..=8)
        .find(|&d| {
            let scale = 10f64.powi(d as i32);
            ticks
                .iter()
                .all(|v| ((v * scale).round() / scale - v).abs() <= step * 1e-6)
        })
        .unwrap_or(8)
}

/// Draws one panel's frame with plotters and returns its pixel mapping. `under`
/// writes what goes beneath the grid (shading), given the mapping.
fn panel(
    area: &Area,
    axes: &Axes,
    layers: &mut Vec<String>,
    under: &dyn Fn(&Frame) -> String,
) -> Result<Frame, String> {
    let xk = RangedCoordf64::from(axes.x.0..axes.x.1).key_points(X_TICKS);
    let yk = RangedCoordf64::from(axes.y.0..axes.y.1).key_points(Y_TICKS);
    let (xd, yd) = (decimals(&xk), decimals(&yk));
    // plotters sizes label areas with its own (wider) measure; allow for it.
    let widest = yk
        .iter()
        .map(|v| text_width(TICK_PX, &tick(*v, yd)) / WIDTH_FIX)
        .fold(0.0, f64::max);
    let y_area = (widest + 4.0 + 10.0 + AXIS_PX * 1.6).ceil() as u32 + 6;
    let mut chart = ChartBuilder::on(area)
        .margin_top((TITLE_PX * 2.2).round() as u32)
        .margin_left(8)
        .margin_right(22)
        .margin_bottom(4)
        .x_label_area_size((TICK_PX * 1.3 + AXIS_PX * 1.5).ceil() as u32 + 8)
        .y_label_area_size(y_area)
        .build_cartesian_2d(axes.x.0..axes.x.1, axes.y.0..axes.y.1)
        .map_err(err)?;
    let (x0, y0) = chart.backend_coord(&(axes.x.0, axes.y.0));
    let (x1, y1) = chart.backend_coord(&(axes.x.1, axes.y.1));
    let frame = Frame {
        x: axes.x,
        y: axes.y,
        px: (x0 as f64, x1 as f64),
        py: (y0 as f64, y1 as f64),
    };
    let beneath = under(&frame);
    if !beneath.is_empty() {
        place(area, layers, beneath)?;
    }
    let fx = move |v: &f64| tick(*v, xd);
    let fy = move |v: &f64| tick(*v, yd);
    chart
        .configure_mesh()
        .light_line_style(TRANSPARENT)
        .bold_line_style(GRID.stroke_width(1))
        .axis_style(AXIS.stroke_width(1))
        .x_labels(X_TICKS)
        .y_labels(Y_TICKS)
        .x_label_formatter(&fx)
        .y_label_formatter(&fy)
        .label_style(text_style(TICK_PX, &INK_SOFT))
        .axis_desc_style(text_style(AXIS_PX, &INK))
        .x_desc(axes.x_title)
        .y_desc(axes.y_title)
        .set_all_tick_mark_size(4)
        .draw()
        .map_err(err)?;
    // The title centred over the plotting area (not the whole panel), so it sits
    // over the data whatever the width of the tick labels.
    let (ax, _) = area.get_pixel_range();
    let centre = ((x0 + x1) as f64 / 2.0).round() as i32;
    let room = 2 * (centre - ax.start).min(ax.end - centre) - 24;
    let title = fit_title(axes.title, TITLE_PX, room as f64);
    let style = text_style(TITLE_PX, &INK).pos(Pos::new(HPos::Center, VPos::Center));
    area.draw_text(
        &title,
        &style,
        (centre - ax.start, (TITLE_PX * 1.1).round() as i32),
    )
    .map_err(err)?;
    Ok(frame)
}

/// `text` cut to at most `room` pixels wide, ending in "…" when cut.
fn fit_text(text: &str, px: f64, room: f64) -> String {
    if text_width(px, text) <= room {
        return text.to_string();
    }
    let chars: Vec<char> = text.chars().collect();
    let mut keep = chars.len();
    while keep > 1 {
        keep -= 1;
        let cut: String = chars[..keep]
            .iter()
            .collect::<String>()
            .trim_end()
            .to_string()
            + "…";
        if text_width(px, &cut) <= room {
            return cut;
        }
    }
    "…".to_string()
}

/// A panel title cut to fit; "a − b" keeps a part of each side.
fn fit_title(title: &str, px: f64, room: f64) -> String {
    if text_width(px, title) <= room {
        return title.to_string();
    }
    match title.split_once(" − ") {
        Some((a, b)) => {
            let half = (room - text_width(px, " − ")) / 2.0;
            let (wa, wb) = (text_width(px, a), text_width(px, b));
            // The shorter side keeps all it can; the longer gets the rest.
            let (ra, rb) = if wa < wb {
                let ra = wa.min(half);
                (ra, room - text_width(px, " − ") - ra)
            } else {
                let rb = wb.min(half);
                (room - text_width(px, " − ") - rb, rb)
            };
            format!("{} − {}", fit_text(a, px, ra), fit_text(b, px, rb))
        }
        None => fit_text(title, px, room),
    }
}

// ---------------------------------------------------------------------------
// Layers: our own compact SVG, spliced in where plotters drew a placeholder.

/// Placeholder text; private-use characters and a name no label will carry.
fn placeholder(id: usize) -> String {
    format!("\u{E000}slopewise-layer-{id}\u{E001}")
}

/// Draws the placeholder for the next layer and keeps the layer's SVG.
fn place(area: &Area, layers: &mut Vec<String>, layer: String) -> Result<(), String> {
    let id = layers.len();
    layers.push(layer);
    area.draw_text(&placeholder(id), &text_style(8.0, &INK), (0, 0))
        .map_err(err)
}

/// Runs `body` on a white canvas and returns plotters' SVG text.
fn draw(
    width: u32,
    height: u32,
    layers: &mut Vec<String>,
    body: impl FnOnce(&Area, &mut Vec<String>) -> Result<(), String>,
) -> Result<String, String> {
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (width, height)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        body(&root, layers)?;
        root.present().map_err(err)?;
    }
    Ok(svg)
}

/// Splices the layers in, adds the title and caption as `<title>` and `<desc>`,
/// tidies plotters' attributes, and names the figure.
fn finish(
    file: &str,
    title: &str,
    caption: String,
    mut svg: String,
    layers: &[String],
    (width, height): (u32, u32),
) -> Result<Figure, String> {
    for (id, layer) in layers.iter().enumerate() {
        let mark = placeholder(id);
        let at = svg
            .find(&mark)
            .ok_or_else(|| format!("layer {id} of {file} lost its place"))?;
        let start = svg[..at]
            .rfind("<text")
            .ok_or_else(|| format!("layer {id} of {file} lost its place"))?;
        let end = at
            + svg[at..]
                .find("</text>\n")
                .ok_or_else(|| format!("layer {id} of {file} lost its place"))?
            + "</text>\n".len();
        svg.replace_range(start..end, layer);
    }
    let open_end = svg
        .find(">\n")
        .ok_or_else(|| format!("{file}: no SVG element"))?
        + 2;
    let head = format!(
        "<title>{}</title>\n<desc>{}</desc>\n",
        escape(title),
        escape(&caption)
    );
    svg.insert_str(open_end, &head);
    let svg = tidy(&svg);
    Ok(Figure {
        file: file.to_string(),
        title: title.to_string(),
        caption,
        svg,
        width,
        height,
    })
}

/// Rounds plotters' font sizes (it writes `size / 1.24` in full) and names a
/// generic fallback family for viewers without DejaVu Sans.
fn tidy(svg: &str) -> String {
    let family = format!("font-family=\"{FONT_NAME}\"");
    let svg = svg.replace(&family, &format!("font-family=\"{FONT_NAME}, sans-serif\""));
    let key = "font-size=\"";
    let mut out = String::with_capacity(svg.len());
    let mut rest = svg.as_str();
    while let Some(i) = rest.find(key) {
        let (before, after) = rest.split_at(i + key.len());
        out.push_str(before);
        let close = after.find('"').unwrap_or(0);
        match after[..close].parse::<f64>() {
            Ok(v) => out.push_str(&num(v)),
            Err(_) => out.push_str(&after[..close]),
        }
        rest = &after[close..];
    }
    out.push_str(rest);
    out
}

/// Escapes text for SVG content and attribute values.
pub fn escape(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        match c {
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '&' => out.push_str("&amp;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&apos;"),
            c if (c as u32) < 0x20 && c != '\t' && c != '\n' => out.push(' '),
            c => out.push(c),
        }
    }
    out
}

/// A coordinate: one decimal, no trailing `.0`, no `-0`.
fn num(v: f64) -> String {
    let s = format!("{v:.1}");
    let s = s.strip_suffix(".0").unwrap_or(&s).to_string();
    if s == "-0" { "0".into() } else { s }
}

/// A line's look.
#[derive(Debug, Clone)]
struct Stroke {
    color: &'static str,
    width: f64,
    dash: &'static str,
}

impl Stroke {
    fn new(color: &'static str, width: f64, dash: &'static str) -> Stroke {
        Stroke { color, width, dash }
    }

    fn attrs(&self) -> String {
        let mut s = format!(
            "fill=\"none\" stroke=\"{}\" stroke-width=\"{}\"",
            self.color,
            num(self.width)
        );
        if !self.dash.is_empty() {
            let _ = write!(s, " stroke-dasharray=\"{}\"", self.dash);
        }
        s
    }
}

fn group_stroke(i: usize, width: f64) -> Stroke {
    Stroke::new(PALETTE[i % PALETTE.len()], width, DASHES[i % DASHES.len()])
}

fn polyline(out: &mut String, frame: &Frame, pts: &[(f64, f64)], stroke: &Stroke) {
    if pts.len() < 2 {
        return;
    }
    let mut d = String::new();
    for (k, &(x, y)) in pts.iter().enumerate() {
        let (a, b) = frame.at(x, y);
        let _ = write!(d, "{}{} {}", if k == 0 { 'M' } else { 'L' }, num(a), num(b));
    }
    let _ = writeln!(out, "<path d=\"{d}\" {}/>", stroke.attrs());
}

/// The band of a curve as one filled polygon; points without a half-width are
/// skipped (no band when the fit gives no standard error).
fn band(out: &mut String, frame: &Frame, c: &Curve, color: &str, opacity: f64) {
    let edge: Vec<(f64, f64, f64)> = c
        .iter()
        .filter_map(|&(x, y, h)| h.map(|h| (x, y - h, y + h)))
        .collect();
    if edge.len() < 2 {
        return;
    }
    let mut d = String::new();
    for (k, &(x, _, hi)) in edge.iter().enumerate() {
        let (a, b) = frame.at(x, hi);
        let _ = write!(d, "{}{} {}", if k == 0 { 'M' } else { 'L' }, num(a), num(b));
    }
    for &(x, lo, _) in edge.iter().rev() {
        let (a, b) = frame.at(x, lo);
        let _ = write!(d, "L{} {}", num(a), num(b));
    }
    let _ = writeln!(
        out,
        "<path d=\"{d}Z\" fill=\"{color}\" fill-opacity=\"{}\" stroke=\"none\"/>",
        num_opacity(opacity)
    );
}

fn num_opacity(v: f64) -> String {
    let s = format!("{v:.2}");
    s.trim_end_matches('0').trim_end_matches('.').to_string()
}

fn rect(out: &mut String, frame: &Frame, a: (f64, f64), b: (f64, f64), color: &str, opacity: f64) {
    let (x0, y0) = frame.at(a.0, a.1);
    let (x1, y1) = frame.at(b.0, b.1);
    let (left, top) = (x0.min(x1), y0.min(y1));
    let _ = writeln!(
        out,
        "<rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\" fill=\"{color}\" fill-opacity=\"{}\"/>",
        num(left),
        num(top),
        num((x1 - x0).abs()),
        num((y1 - y0).abs()),
        num_opacity(opacity)
    );
}

/// The outline of marker `shape` centred at whole pixel (x, y), `k` times the
/// normal size, as path data.
fn marker_path(d: &mut String, shape: usize, x: f64, y: f64, k: f64) {
    let (x, y) = (x.round(), y.round());
    let n = |v: f64| num(v * k);
    let _ = match shape % MARKERS.len() {
        0 => {
            let r = n(4.0);
            write!(
                d,
                "M{} {}a{r} {r} 0 1 0 {} 0a{r} {r} 0 1 0 {} 0",
                num(x - 4.0 * k),
                num(y),
                n(8.0),
                n(-8.0)
            )
        }
        1 => write!(
            d,
            "M{} {}l{} {}h{}z",
            num(x),
            num(y - 5.0 * k),
            n(4.5),
            n(8.0),
            n(-9.0)
        ),
        2 => write!(
            d,
            "M{} {}h{}v{}h{}z",
            num(x - 3.5 * k),
            num(y - 3.5 * k),
            n(7.0),
            n(7.0),
            n(-7.0)
        ),
        3 => write!(
            d,
            "M{} {}l{} {} {} {} {} {}z",
            num(x),
            num(y - 5.0 * k),
            n(5.0),
            n(5.0),
            n(-5.0),
            n(5.0),
            n(-5.0),
            n(-5.0)
        ),
        4 => write!(
            d,
            "M{} {}l{} {}m0 {}l{} {}",
            num(x - 3.5 * k),
            num(y - 3.5 * k),
            n(7.0),
            n(7.0),
            n(-7.0),
            n(-7.0),
            n(7.0)
        ),
        5 => write!(
            d,
            "M{} {}l{} {}h{}z",
            num(x),
            num(y + 5.0 * k),
            n(4.5),
            n(-8.0),
            n(-9.0)
        ),
        6 => write!(
            d,
            "M{} {}h{}m{} {}v{}",
            num(x - 4.5 * k),
            num(y),
            n(9.0),
            n(-4.5),
            n(-4.5),
            n(9.0)
        ),
        _ => write!(
            d,
            "M{} {}v{}m{} {}l{} {}m0 {}l{} {}",
            num(x),
            num(y - 4.5 * k),
            n(9.0),
            n(-4.0),
            n(-7.0),
            n(8.0),
            n(5.0),
            n(-5.0),
            n(-8.0),
            n(5.0)
        ),
    };
}

/// How points are drawn in a panel holding `total` of them: fainter and smaller
/// as they crowd, so dense clouds show their density and the lines stay visible.
#[derive(Debug, Clone, Copy)]
struct Density {
    opacity: f64,
    size: f64,
}

impl Density {
    fn for_points(total: usize) -> Density {
        let n = total.max(1) as f64;
        Density {
            opacity: (0.85 - 0.25 * (n / 300.0).log10()).clamp(0.35, 0.85),
            size: if n > 4000.0 { 0.8 } else { 1.0 },
        }
    }
}

/// One path holding every marker of group `i`; points on a pixel already drawn are
/// left out (they would draw the same ink).
fn markers(
    out: &mut String,
    frame: &Frame,
    i: usize,
    look: Density,
    pts: impl Iterator<Item = (f64, f64)>,
) {
    let mut seen = BTreeSet::new();
    let mut d = String::new();
    for (x, y) in pts {
        let (a, b) = frame.at(x, y);
        if seen.insert((a.round() as i64, b.round() as i64)) {
            marker_path(&mut d, i, a, b, look.size);
        }
    }
    if d.is_empty() {
        return;
    }
    let _ = writeln!(
        out,
        "<path d=\"{d}\" fill=\"none\" stroke=\"{}\" stroke-width=\"1.3\" stroke-opacity=\"{}\"/>",
        PALETTE[i % PALETTE.len()],
        num_opacity(look.opacity)
    );
}

/// A group's line over a white halo, so it stays visible over a dense cloud.
fn haloed(out: &mut String, frame: &Frame, pts: &[(f64, f64)], stroke: &Stroke) {
    let halo = Stroke::new("#FFFFFF", stroke.width + 3.0, "");
    let mut under = String::new();
    polyline(&mut under, frame, pts, &halo);
    out.push_str(&under.replace("/>", " stroke-opacity=\"0.85\"/>"));
    polyline(out, frame, pts, stroke);
}

// ---------------------------------------------------------------------------
// Legend.

/// What a legend entry shows beside its label.
#[derive(Debug, Clone)]
enum Swatch {
    /// A group: its line dash and marker.
    Group(usize),
    /// A line sample.
    Line(Stroke),
    /// A filled block.
    Fill(&'static str, f64),
}

#[derive(Debug, Clone)]
struct LegendItem {
    label: String,
    swatch: Swatch,
}

impl LegendItem {
    fn new(label: &str, swatch: Swatch) -> LegendItem {
        LegendItem {
            label: label.to_string(),
            swatch,
        }
    }
}

fn group_legend(r: &Results) -> Vec<LegendItem> {
    r.groups
        .iter()
        .enumerate()
        .map(|(i, g)| LegendItem::new(&g.level, Swatch::Group(i)))
        .collect()
}

/// Swatch width, gap to the label, gap between entries, row height.
const SWATCH_W: f64 = 36.0;
const SWATCH_GAP: f64 = 8.0;
const ITEM_GAP: f64 = 26.0;
const ROW_H: f64 = 26.0;

/// Entries in one centred row when they fit; otherwise in a grid of equal,
/// left-aligned columns (read along the rows), centred as a block.
struct Legend {
    /// Per entry: row and x offset within the row.
    places: Vec<(usize, f64)>,
    /// Width of each row.
    row_widths: Vec<f64>,
}

impl Legend {
    fn layout(items: &[LegendItem], width: f64) -> Legend {
        let widths: Vec<f64> = items
            .iter()
            .map(|item| SWATCH_W + SWATCH_GAP + text_width(LEGEND_PX, &item.label))
            .collect();
        let one_row = widths.iter().sum::<f64>() + ITEM_GAP * widths.len().saturating_sub(1) as f64;
        if one_row <= width || widths.len() <= 1 {
            let mut x = 0.0;
            let places = widths
                .iter()
                .map(|w| {
                    let at = x;
                    x += w + ITEM_GAP;
                    (0, at)
                })
                .collect();
            return Legend {
                places,
                row_widths: vec![one_row],
            };
        }
        let column = widths.iter().copied().fold(0.0, f64::max);
        let cols =
            (((width + ITEM_GAP) / (column + ITEM_GAP)).floor() as usize).clamp(1, widths.len());
        let rows = widths.len().div_ceil(cols);
        // As many columns as needed for that many rows, so the grid stays even.
        let cols = widths.len().div_ceil(rows);
        let block = cols as f64 * column + (cols - 1) as f64 * ITEM_GAP;
        let places = (0..widths.len())
            .map(|k| (k / cols, (k % cols) as f64 * (column + ITEM_GAP)))
            .collect();
        Legend {
            places,
            row_widths: vec![block; rows],
        }
    }

    fn height(&self) -> f64 {
        if self.places.is_empty() {
            0.0
        } else {
            self.row_widths.len() as f64 * ROW_H + 16.0
        }
    }

    fn draw(&self, area: &Area, out: &mut String, items: &[LegendItem]) -> Result<(), String> {
        let (xs, ys) = area.get_pixel_range();
        let width = (xs.end - xs.start) as f64;
        for (item, &(row, offset)) in items.iter().zip(&self.places) {
            let left = xs.start as f64 + (width - self.row_widths[row]) / 2.0 + offset;
            let cy = ys.start as f64 + 6.0 + ROW_H * (row as f64 + 0.5);
            match &item.swatch {
                Swatch::Group(i) => {
                    let stroke = group_stroke(*i, 2.2);
                    line_at(out, (left, cy), (left + SWATCH_W, cy), &stroke);
                    let mut d = String::new();
                    marker_path(&mut d, *i, left + SWATCH_W / 2.0, cy, 1.0);
                    let _ = writeln!(
                        out,
                        "<path d=\"{d}\" fill=\"#FFFFFF\" stroke=\"{}\" stroke-width=\"1.5\"/>",
                        stroke.color
                    );
                }
                Swatch::Line(stroke) => line_at(out, (left, cy), (left + SWATCH_W, cy), stroke),
                Swatch::Fill(color, opacity) => {
                    let _ = writeln!(
                        out,
                        "<rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"12\" fill=\"{color}\" fill-opacity=\"{}\"/>",
                        num(left),
                        num(cy - 6.0),
                        num(SWATCH_W),
                        num_opacity(*opacity)
                    );
                }
            }
            let style = text_style(LEGEND_PX, &INK).pos(Pos::new(HPos::Left, VPos::Center));
            area.draw_text(
                &item.label,
                &style,
                (
                    (left + SWATCH_W + SWATCH_GAP).round() as i32 - xs.start,
                    cy.round() as i32 - ys.start,
                ),
            )
            .map_err(err)?;
        }
        Ok(())
    }
}

fn line_at(out: &mut String, a: (f64, f64), b: (f64, f64), stroke: &Stroke) {
    let _ = writeln!(
        out,
        "<path d=\"M{} {}L{} {}\" {}/>",
        num(a.0),
        num(a.1),
        num(b.0),
        num(b.1),
        stroke.attrs()
    );
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
        let csv = include_str!("../../tests/reference/data/limits_prediction.csv");
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
            let t = t_quantile(c.confidence, g.n as f64 - 2.0);
            let x = c.crossing.unwrap();
            let (fit, half) = limit_line_at(&r, &c.level, "separate", t, x, true).unwrap();
            assert!(
                close(fit - half.unwrap(), 95.0),
                "{}: {}",
                c.level,
                fit - half.unwrap()
            );
            // The mean's band is narrower there, so it is still above the limit.
            let (fit, half) = limit_line_at(&r, &c.level, "separate", t, x, false).unwrap();
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
