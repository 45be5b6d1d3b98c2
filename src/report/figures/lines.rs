//! Figure: each group's own line beside the parallel-lines fit, with bands.

#[allow(unused_imports)]
use super::*;

/// Groups whose lines and bands are drawn at most: beyond that the colours repeat
/// and the lines cannot be told apart, and the file grows with every group.
pub(super) const MAX_GROUPS_DRAWN: usize = 24;

pub(super) fn lines(ctx: &Context) -> Result<Figure, String> {
    let r = ctx.r;
    let alpha = r.model.alpha;
    let drawn = r.groups.len().min(MAX_GROUPS_DRAWN);
    let separate: Vec<Curve> = r
        .groups
        .iter()
        .take(drawn)
        .enumerate()
        .map(|(i, g)| {
            separate_curve(
                g,
                band_critical(r, Some(i)).or_else(|| t_crit(alpha, g.n as f64 - 2.0)),
            )
        })
        .collect();
    let t_common = band_critical(r, None).or_else(|| t_crit(alpha, r.common_slope.df));
    let common: Vec<Curve> = r
        .groups
        .iter()
        .take(drawn)
        .map(|g| common_curve(r, g, t_common).unwrap_or_default())
        .collect();

    let mut xs = Extent::default();
    let mut ys = Extent::default();
    for g in r.groups.iter().take(drawn) {
        xs.add(g.covariate_min);
        xs.add(g.covariate_max);
    }
    for pts in ctx.points.iter().take(drawn) {
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

    let mut items = group_legend(r);
    items.truncate(drawn);
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
            for (i, pts) in ctx.points.iter().take(drawn).enumerate() {
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
    let kind = if r.bands.drawn == "simultaneous" {
        "simultaneous (Working–Hotelling, the whole line at once)"
    } else {
        "pointwise"
    };
    let caption = format!(
        "Left: each group's own least-squares line with its {kind} {level}% confidence band, over the group's covariate range. \
         Right: the parallel-lines model, one common slope ({b}) with each line through the group's adjusted mean, \
         and its {kind} {level}% band. {}{}",
        ctx.points_sentence(),
        if drawn < r.groups.len() {
            format!(
                " Only the first {drawn} of {} groups are drawn (their colours would repeat); results.json holds every group's line.",
                r.groups.len()
            )
        } else {
            String::new()
        }
    );
    finish(
        "figures/lines.svg",
        "How does each group's line run?",
        caption,
        svg,
        &layers,
        (width, height),
    )
}
