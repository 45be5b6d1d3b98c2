//! Figure: the lines crossings are read from, their one-sided bounds and the limits.

#[allow(unused_imports)]
use super::*;

// ---------------------------------------------------------------------------
// Limits: the lines the crossings are read from, their one-sided bounds, the limits.

/// The mean and the one-sided bound's half-width at x for one limit entry, from
/// the model the crossing used; with `prediction`, the half-width of the bound for a
/// single future result, which adds one result's variance s² to the mean's (Draper &
/// Smith 1998).
pub(super) fn limit_line_at(
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

/// The mean and the half-width of its one-sided confidence bound (same formulas as
/// `separate_at` and `common_at`).
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

pub(super) fn limits(ctx: &Context) -> Result<Figure, String> {
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
    // The last observation, the extrapolation cap and the supported period are
    // marked, so the figure shows how far beyond the data a crossing lies.
    let last = entries
        .iter()
        .map(|c| c.observed_max)
        .fold(f64::NEG_INFINITY, f64::max);
    let supported = r.limits_supported.as_ref();
    let cap = supported.and_then(|s| s.cap).filter(|c| c.is_finite());
    let period = supported
        .and_then(|s| s.supported)
        .filter(|p| p.is_finite());
    let reach = reach.max(cap.unwrap_or(reach)).max(period.unwrap_or(reach));
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
        // The multiplier the crossing was solved with (Student's t, or the
        // Working–Hotelling value for the simultaneous band).
        let t = c
            .critical_value
            .unwrap_or_else(|| t_quantile(c.confidence, df));
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
    items.push(LegendItem::new(
        "last observation",
        Swatch::Line(Stroke::new(INK_HEX, 1.2, "1 3")),
    ));
    let crossed: Vec<(f64, f64, usize, bool)> = r
        .limits
        .iter()
        .filter_map(|c| {
            let color = r
                .groups
                .iter()
                .position(|g| g.level == c.level)
                .unwrap_or(0);
            match (c.crossing, c.reason.as_deref()) {
                (Some(x), _) => Some((x, c.limit, color, false)),
                (None, Some("beyond-at-start")) => Some((c.observed_min, c.limit, color, true)),
                _ => None,
            }
        })
        .collect();
    if crossed.iter().any(|c| !c.3) {
        items.push(LegendItem::new(
            "crossing",
            Swatch::Line(Stroke::new(INK_HEX, 2.4, "")),
        ));
    }
    if crossed.iter().any(|c| c.3) {
        items.push(LegendItem::new(
            "past the limit at the first observation",
            Swatch::Line(Stroke::new(INK_HEX, 2.4, "3 2")),
        ));
    }
    if cap.is_some() {
        items.push(LegendItem::new(
            "extrapolation cap",
            Swatch::Line(Stroke::new(REFERENCE, 1.6, "2 2")),
        ));
    }
    if period.is_some() {
        items.push(LegendItem::new(
            "supported period",
            Swatch::Line(Stroke::new(INK_HEX, 1.8, "")),
        ));
    }
    let width = 640;
    let panel_h = 420;
    let legend = Legend::layout(&items, width as f64 - 40.0);
    let height = panel_h + legend.height() as u32;
    let level = number::trimmed(100.0 * first.confidence, 4);
    let title = if first.band == "simultaneous" {
        format!("Mean lines, {level}% simultaneous bands and limits")
    } else {
        format!("Mean lines, one-sided {level}% bounds and limits")
    };
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
        let vertical = |layer: &mut String, x: f64, stroke: Stroke| {
            polyline(layer, &frame, &[(x, yr.0), (x, yr.1)], &stroke);
        };
        vertical(&mut layer, last, Stroke::new(INK_HEX, 1.2, "1 3"));
        if let Some(c) = cap {
            vertical(&mut layer, c, Stroke::new(REFERENCE, 1.6, "2 2"));
        }
        if let Some(p) = period {
            vertical(&mut layer, p, Stroke::new(INK_HEX, 1.8, ""));
        }
        // Each crossing: a short upright tick through the limit, in the line's colour
        // (dashed when the line was past the limit from its first observation).
        let tick = (yr.1 - yr.0) * 0.04;
        for &(x, y, color, already) in &crossed {
            let colour = if model == "pooled" {
                PALETTE[0]
            } else {
                PALETTE[color % PALETTE.len()]
            };
            polyline(
                &mut layer,
                &frame,
                &[(x, y - tick), (x, y + tick)],
                &Stroke::new(colour, 2.4, if already { "3 2" } else { "" }),
            );
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
    let mut marks = format!(
        " Dotted upright: the last observation ({}).",
        number::sig(last, 4)
    );
    if let Some(c) = cap {
        let _ = write!(
            marks,
            " Fine dashes: the extrapolation cap ({}).",
            number::sig(c, 4)
        );
    }
    if let Some(p) = period {
        let _ = write!(
            marks,
            " Solid upright: the supported period ({}).",
            number::trimmed(p, 4)
        );
    }
    let already: Vec<String> = r
        .limits
        .iter()
        .filter(|c| c.reason.as_deref() == Some("beyond-at-start"))
        .map(|c| format!("{} ({})", c.level, c.side))
        .collect();
    if !already.is_empty() {
        let _ = write!(
            marks,
            " Past the limit at the first observation: {}.",
            already.join(", ")
        );
    }
    let caption = format!(
        "Each line the crossings are read from ({}), its {}, and the limits (dashed); ticks on a limit mark the crossings. Crossings: {}.{marks} {}",
        match model {
            "pooled" => "the pooled line",
            "common-slope" => "parallel lines",
            _ => "each group's own line",
        },
        crate::report::sections::bound_phrase(&first.bound, &first.band, first.confidence),
        if crossings.is_empty() {
            "none".to_string()
        } else {
            crossings.join("; ")
        },
        ctx.points_sentence()
    );
    finish(
        "figures/limits.svg",
        "When does each line reach its limit?",
        caption,
        svg,
        &layers,
        (width, height),
    )
}
