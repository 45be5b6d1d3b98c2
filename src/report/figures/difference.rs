//! Figure: the difference between two groups' lines along the covariate, with
//! its band and the Johnson–Neyman bounds.

#[allow(unused_imports)]
use super::*;

// ---------------------------------------------------------------------------
// Figure 4: where two groups differ.

/// Most pairs drawn, one small panel each.
pub(super) const MAX_PAIRS: usize = 6;

/// D(x) = line_a(x) − line_b(x) with half-width c·se(x), where
/// se(x)² = s²·Σ_{g∈{a,b}} (1/n_g + (x − x̄_g)²/Sxx_g), s² the separate-slopes
/// model's pooled residual variance and Sxx_g = s_g²/se_g² from the group's own fit
/// (Johnson & Neyman 1936; Potthoff 1964); c is the region's critical value.
pub(super) fn difference_at(r: &Results, region: &Region, x: f64) -> Option<(f64, Option<f64>)> {
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

/// The covariate range both groups of the pair cover: from the larger of their
/// smallest values to the smaller of their largest. Outside it the difference rests
/// on one group's line extended beyond its data; `None` when they share no range.
pub(super) fn shared_range(r: &Results, region: &Region) -> Option<(f64, f64)> {
    let a = r.groups.iter().find(|g| g.level == region.a)?;
    let b = r.groups.iter().find(|g| g.level == region.b)?;
    let lo = a.covariate_min.max(b.covariate_min);
    let hi = a.covariate_max.min(b.covariate_max);
    (lo.is_finite() && hi.is_finite() && hi > lo).then_some((lo, hi))
}

/// The difference drawn over the pair's shared range only.
pub(super) fn difference_curve(r: &Results, region: &Region) -> Option<Curve> {
    let (lo, hi) = shared_range(r, region)?;
    difference_at(r, region, lo)?;
    Some(curve(lo, hi, |x| {
        difference_at(r, region, x).unwrap_or((f64::NAN, None))
    }))
}

pub(super) fn difference(ctx: &Context) -> Result<Figure, String> {
    let r = ctx.r;
    let shown: Vec<(&Region, Curve)> = r
        .regions
        .iter()
        .filter_map(|g| difference_curve(r, g).map(|c| (g, c)))
        .take(MAX_PAIRS)
        .collect();
    if shown.is_empty() {
        return Err(
            "no pair of groups shares a covariate range to draw the difference over".into(),
        );
    }
    let n = shown.len();
    let cols = if n == 1 { 1 } else { 2 };
    let rows = n.div_ceil(cols);
    let (width, panel_h) = if cols == 1 {
        (640, 420)
    } else {
        (FULL_WIDTH, 330)
    };
    let inside = |g: &Region, b: f64| shared_range(r, g).is_some_and(|(lo, hi)| b > lo && b < hi);
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
    let any_outside = shown.iter().any(|(g, _)| {
        shared_range(r, g)
            .is_some_and(|(lo, hi)| lo > g.observed_range[0] || hi < g.observed_range[1])
    });
    if any_outside {
        items.push(LegendItem::new(
            "beyond the range both groups cover",
            Swatch::Fill(OUTSIDE, 1.0),
        ));
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
            let title = format!("{} − {}", shown_label(&region.a), shown_label(&region.b));
            let axes = Axes {
                x: xr,
                y: yr,
                x_title: &ctx.x_title,
                y_title: &y_title,
                title: &title,
            };
            let shared = shared_range(r, region).unwrap_or(observed);
            // Shading goes under the grid, so the grid still reads through it: where
            // the groups differ (within the shared range), and grey where the pair's
            // comparison would extend a line beyond one group's data.
            let shade = |frame: &Frame| {
                let mut under = String::new();
                for s in &region.significant {
                    let (a, b) = (s[0].max(shared.0), s[1].min(shared.1));
                    if b > a {
                        rect(&mut under, frame, (a, yr.0), (b, yr.1), SHADE, 1.0);
                    }
                }
                if shared.0 > xr.0 {
                    rect(
                        &mut under,
                        frame,
                        (xr.0, yr.0),
                        (shared.0, yr.1),
                        OUTSIDE,
                        1.0,
                    );
                }
                if shared.1 < xr.1 {
                    rect(
                        &mut under,
                        frame,
                        (shared.1, yr.0),
                        (xr.1, yr.1),
                        OUTSIDE,
                        1.0,
                    );
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
                if bound > shared.0 && bound < shared.1 {
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
        "Difference between two groups' own lines along the covariate, drawn only over the range both groups cover, with its {kind} {level}% band \
         (from the separate-slopes model's pooled residual variance); grey: beyond that range, where the difference would extend a line past one group's data. \
         Shaded: where the groups differ (Johnson–Neyman); dashed lines: the bounds that fall inside the shared range."
    );
    for (region, _) in &shown {
        let shared = shared_range(r, region).unwrap_or((f64::NAN, f64::NAN));
        let stretches: Vec<String> = region
            .significant
            .iter()
            .filter_map(|s| {
                let (a, b) = (s[0].max(shared.0), s[1].min(shared.1));
                (b > a).then(|| format!("{} to {}", number::sig(a, 4), number::sig(b, 4)))
            })
            .collect();
        let _ = write!(
            caption,
            " {} − {}: {}.",
            shown_label(&region.a),
            shown_label(&region.b),
            if stretches.is_empty() {
                "no difference anywhere in the data".to_string()
            } else {
                format!("differ from {}", stretches.join(" and from "))
            }
        );
    }
    let unshared: Vec<String> = r
        .regions
        .iter()
        .filter(|g| shared_range(r, g).is_none())
        .map(|g| format!("{} − {}", shown_label(&g.a), shown_label(&g.b)))
        .collect();
    if !unshared.is_empty() {
        let _ = write!(
            caption,
            " Not drawn, because the two groups share no covariate range: {}.",
            unshared.join(", ")
        );
    }
    if r.regions.len() > shown.len() + unshared.len() {
        let _ = write!(
            caption,
            " The first {} of {} pairs are drawn; results.json lists every pair.",
            shown.len(),
            r.regions.len()
        );
    }
    finish(
        "figures/difference.svg",
        "Where along the covariate do two groups differ?",
        caption,
        svg,
        &layers,
        (width, height),
    )
}
