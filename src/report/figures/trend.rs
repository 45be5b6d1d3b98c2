//! The season trend figure: each group's slope and interval across runs, in the
//! look of the report's other figures (their palette and bundled font).

use crate::number::{sig, trimmed};
use crate::seasons::Trend;

use super::{FONT_NAME, PALETTE, ensure_font};

// ---------------------------------------------------------------------------------
// Trend figure.

/// The shared palette as RGB, in the same order as the report's figures.
fn colour(i: usize) -> (u8, u8, u8) {
    let hex = PALETTE[i % PALETTE.len()].trim_start_matches('#');
    let byte = |k: usize| u8::from_str_radix(&hex[k..k + 2], 16).unwrap_or(0);
    (byte(0), byte(2), byte(4))
}

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
    let s = crate::report::doc::visible(s);
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
                    trimmed(100.0 * (1.0 - t.alpha), 4)
                ),
                (FONT_NAME, 20).into_font(),
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
            .label_style((FONT_NAME, 13))
            .axis_desc_style((FONT_NAME, 14))
            .draw()
            .map_err(|e| err(e.to_string()))?;

        for (gi, g) in t.groups.iter().enumerate() {
            let (r, gr, b) = colour(gi);
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
                (FONT_NAME, 13).into_font(),
            ))
            .map_err(|e| err(e.to_string()))?;
        }
        key.draw(&Text::new("Group", (6, 34), (FONT_NAME, 14).into_font()))
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
