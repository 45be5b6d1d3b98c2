//! Figure: residuals against fitted values under the selected model.

#[allow(unused_imports)]
use super::*;

// ---------------------------------------------------------------------------
// Figure 2: residuals against fitted values.

pub(super) fn residuals(ctx: &Context) -> Result<Figure, String> {
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
    let title = format!("Is the spread even? Residuals of the {model} model");
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
        "Is the spread even along the fitted values?",
        caption,
        svg,
        &layers,
        (width, height),
    )
}
