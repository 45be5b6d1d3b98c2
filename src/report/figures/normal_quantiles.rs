//! Figure: standardized residuals against normal quantiles.

#[allow(unused_imports)]
use super::*;

// ---------------------------------------------------------------------------
// Figure 3: normal quantile plot.

pub(super) fn normal_quantiles(ctx: &Context) -> Result<Figure, String> {
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
    let title = "Do the residuals follow a normal curve?";
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
        "Do the residuals follow a normal curve?",
        caption,
        svg,
        &layers,
        (width, height),
    )
}
