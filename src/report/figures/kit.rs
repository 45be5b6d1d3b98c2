//! The figures' shared kit: palette, marker shapes and dashes, the bundled font
//! and text sizes, axes and panels, strokes, bands, markers, the legend, and the
//! splicing of data layers into the SVG plotters draws. Every figure draws through
//! it, so all share one look.

#[allow(unused_imports)]
use super::*;

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
pub(super) const DASHES: [&str; 6] = ["", "8 4", "2 3", "10 3 2 3", "4 4", "14 4 4 4"];

/// Every figure draws at most this many points per panel; past it, each group's
/// drawn rows are thinned further by a common step, so no figure passes 1 MB.
pub(super) const POINT_BUDGET: usize = 10_000;

/// The family name the font is registered under, and that the SVG asks for.
pub(crate) const FONT_NAME: &str = "DejaVu Sans";
/// The bundled font (licence in `assets/fonts/`).
pub const FONT_BYTES: &[u8] = crate::report::fonts::REGULAR.bytes;
/// plotters' SVG backend writes a font size of `size / 1.24` pixels.
pub(super) const PLOTTERS_SIZE: f64 = 1.24;
/// ab_glyph scales a font so ascent − descent equals the size; for DejaVu Sans that
/// is 2384/2048 em (from the font's hhea table), so measured widths are this much
/// wider than the text as the SVG sets it.
pub(super) const WIDTH_FIX: f64 = (2384.0 / 2048.0) / PLOTTERS_SIZE;

/// Text sizes in pixels.
pub(super) const TICK_PX: f64 = 14.0;
pub(super) const AXIS_PX: f64 = 15.0;
pub(super) const TITLE_PX: f64 = 16.0;
pub(super) const LEGEND_PX: f64 = 15.0;

/// Ink colours of the frame.
pub(super) const INK: RGBColor = RGBColor(0x26, 0x26, 0x26);
pub(super) const INK_SOFT: RGBColor = RGBColor(0x55, 0x55, 0x55);
pub(super) const AXIS: RGBColor = RGBColor(0x8C, 0x8C, 0x8C);
pub(super) const GRID: RGBColor = RGBColor(0xE8, 0xE8, 0xE8);
/// Reference lines (zero, identity) and bounds.
pub(super) const REFERENCE: &str = "#7A7A7A";
/// Shading of the covariate stretches where two groups differ.
pub(super) const SHADE: &str = "#FAEFDA";
/// Where a pair's comparison leaves the range both groups cover: a neutral grey.
pub(super) const OUTSIDE: &str = "#EDEDED";

/// Tick labels asked of plotters per axis.
pub(super) const X_TICKS: usize = 7;
pub(super) const Y_TICKS: usize = 7;

/// Registers the bundled font with plotters once per process.
pub(crate) fn ensure_font() -> Result<(), String> {
    static REGISTERED: OnceLock<bool> = OnceLock::new();
    let ok =
        *REGISTERED.get_or_init(|| register_font(FONT_NAME, FontStyle::Normal, FONT_BYTES).is_ok());
    if ok {
        Ok(())
    } else {
        Err("the bundled font could not be read".into())
    }
}

// ---------------------------------------------------------------------------
// Frame: plotters draws axes, grid and text; we keep the pixel mapping.

/// The difference band: the first palette colour at 20% on white, opaque.
pub(super) const DIFF_BAND: &str = "#D2DBEA";
/// Opacity of confidence bands.
pub(super) const BAND_OPACITY: f64 = 0.16;
/// The text ink as an SVG colour, for lines we write ourselves.
pub(super) const INK_HEX: &str = "#262626";

pub(super) type Area<'b> = DrawingArea<SVGBackend<'b>, Shift>;

/// Data range of a panel and its texts.
pub(super) struct Axes<'t> {
    pub(super) x: (f64, f64),
    pub(super) y: (f64, f64),
    pub(super) x_title: &'t str,
    pub(super) y_title: &'t str,
    pub(super) title: &'t str,
}

/// Maps data coordinates to pixels exactly as the panel's plotters chart does at its
/// corners, but in floating point, so lines are smooth.
#[derive(Debug, Clone, Copy)]
pub(super) struct Frame {
    pub(super) x: (f64, f64),
    pub(super) y: (f64, f64),
    pub(super) px: (f64, f64),
    pub(super) py: (f64, f64),
}

impl Frame {
    pub(super) fn at(&self, x: f64, y: f64) -> (f64, f64) {
        (
            self.px.0 + (x - self.x.0) / (self.x.1 - self.x.0) * (self.px.1 - self.px.0),
            self.py.0 + (y - self.y.0) / (self.y.1 - self.y.0) * (self.py.1 - self.py.0),
        )
    }
}

pub(super) fn font(px: f64) -> FontDesc<'static> {
    FontDesc::new(
        FontFamily::Name(FONT_NAME),
        px * PLOTTERS_SIZE,
        FontStyle::Normal,
    )
}

pub(super) fn text_style(px: f64, color: &'static RGBColor) -> TextStyle<'static> {
    TextStyle::from(font(px)).color(color)
}

/// Width of `text` as the SVG sets it, in pixels.
pub(super) fn text_width(px: f64, text: &str) -> f64 {
    font(px)
        .box_size(text)
        .map(|(w, _)| w as f64 * WIDTH_FIX)
        .unwrap_or(px * 0.6 * text.chars().count() as f64)
}

pub(super) fn err<E: std::fmt::Debug>(e: E) -> String {
    format!("{e:?}")
}

/// A tick label: `decimals` places, a true minus sign, no `-0`.
pub(super) fn tick(v: f64, decimals: usize) -> String {
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
pub(super) fn decimals(ticks: &[f64]) -> usize {
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
pub(super) fn panel(
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
pub(super) fn fit_text(text: &str, px: f64, room: f64) -> String {
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
pub(super) fn fit_title(title: &str, px: f64, room: f64) -> String {
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
pub(super) fn placeholder(id: usize) -> String {
    format!("\u{E000}slopewise-layer-{id}\u{E001}")
}

/// Draws the placeholder for the next layer and keeps the layer's SVG.
pub(super) fn place(area: &Area, layers: &mut Vec<String>, layer: String) -> Result<(), String> {
    let id = layers.len();
    layers.push(layer);
    area.draw_text(&placeholder(id), &text_style(8.0, &INK), (0, 0))
        .map_err(err)
}

/// Runs `body` on a white canvas and returns plotters' SVG text.
pub(super) fn draw(
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
pub(super) fn finish(
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
pub(super) fn tidy(svg: &str) -> String {
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
pub(super) fn num(v: f64) -> String {
    let s = format!("{v:.1}");
    let s = s.strip_suffix(".0").unwrap_or(&s).to_string();
    if s == "-0" { "0".into() } else { s }
}

/// A line's look.
#[derive(Debug, Clone)]
pub(super) struct Stroke {
    pub(super) color: &'static str,
    pub(super) width: f64,
    pub(super) dash: &'static str,
}

impl Stroke {
    pub(super) fn new(color: &'static str, width: f64, dash: &'static str) -> Stroke {
        Stroke { color, width, dash }
    }

    pub(super) fn attrs(&self) -> String {
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

pub(super) fn group_stroke(i: usize, width: f64) -> Stroke {
    Stroke::new(PALETTE[i % PALETTE.len()], width, DASHES[i % DASHES.len()])
}

pub(super) fn polyline(out: &mut String, frame: &Frame, pts: &[(f64, f64)], stroke: &Stroke) {
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
pub(super) fn band(out: &mut String, frame: &Frame, c: &Curve, color: &str, opacity: f64) {
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

pub(super) fn num_opacity(v: f64) -> String {
    let s = format!("{v:.2}");
    s.trim_end_matches('0').trim_end_matches('.').to_string()
}

pub(super) fn rect(
    out: &mut String,
    frame: &Frame,
    a: (f64, f64),
    b: (f64, f64),
    color: &str,
    opacity: f64,
) {
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
pub(super) fn marker_path(d: &mut String, shape: usize, x: f64, y: f64, k: f64) {
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
pub(super) struct Density {
    pub(super) opacity: f64,
    pub(super) size: f64,
}

impl Density {
    pub(super) fn for_points(total: usize) -> Density {
        let n = total.max(1) as f64;
        Density {
            opacity: (0.85 - 0.25 * (n / 300.0).log10()).clamp(0.35, 0.85),
            size: if n > 4000.0 { 0.8 } else { 1.0 },
        }
    }
}

/// One path holding every marker of group `i`; points on a pixel already drawn are
/// left out (they would draw the same ink).
pub(super) fn markers(
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
pub(super) fn haloed(out: &mut String, frame: &Frame, pts: &[(f64, f64)], stroke: &Stroke) {
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
pub(super) enum Swatch {
    /// A group: its line dash and marker.
    Group(usize),
    /// A line sample.
    Line(Stroke),
    /// A filled block.
    Fill(&'static str, f64),
}

#[derive(Debug, Clone)]
pub(super) struct LegendItem {
    pub(super) label: String,
    pub(super) swatch: Swatch,
}

impl LegendItem {
    pub(super) fn new(label: &str, swatch: Swatch) -> LegendItem {
        LegendItem {
            label: label.to_string(),
            swatch,
        }
    }
}

/// A group label as every figure shows it: whitespace and control characters made
/// visible (as in the reports), so two labels that differ only there stay apart.
pub(super) fn shown_label(label: &str) -> String {
    crate::report::doc::visible(label)
}

pub(super) fn group_legend(r: &Results) -> Vec<LegendItem> {
    r.groups
        .iter()
        .enumerate()
        .map(|(i, g)| LegendItem::new(&shown_label(&g.level), Swatch::Group(i)))
        .collect()
}

/// Swatch width, gap to the label, gap between entries, row height.
pub(super) const SWATCH_W: f64 = 36.0;
pub(super) const SWATCH_GAP: f64 = 8.0;
pub(super) const ITEM_GAP: f64 = 26.0;
pub(super) const ROW_H: f64 = 26.0;

/// Entries in one centred row when they fit; otherwise in a grid of equal,
/// left-aligned columns (read along the rows), centred as a block.
pub(super) struct Legend {
    /// Per entry: row and x offset within the row.
    pub(super) places: Vec<(usize, f64)>,
    /// Width of each row.
    pub(super) row_widths: Vec<f64>,
}

impl Legend {
    pub(super) fn layout(items: &[LegendItem], width: f64) -> Legend {
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

    pub(super) fn height(&self) -> f64 {
        if self.places.is_empty() {
            0.0
        } else {
            self.row_widths.len() as f64 * ROW_H + 16.0
        }
    }

    pub(super) fn draw(
        &self,
        area: &Area,
        out: &mut String,
        items: &[LegendItem],
    ) -> Result<(), String> {
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

pub(super) fn line_at(out: &mut String, a: (f64, f64), b: (f64, f64), stroke: &Stroke) {
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
