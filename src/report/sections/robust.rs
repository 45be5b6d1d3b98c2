//! "With a robust covariance": the gate and the comparisons again with a
//! heteroscedasticity-consistent covariance, when the plan asks for one.

use super::{Ctx, cell, ci, int, num, p, pair, peq};
use crate::report::cite::Work;
use crate::report::doc::{Builder, Inline, aligns, t, v};
use crate::results::RobustDifference;

pub(super) fn section(b: &mut Builder, c: &Ctx) {
    let r = c.r;
    let Some(rb) = &r.robust else {
        return;
    };
    let cov = rb.covariance.to_uppercase();
    b.subsection(vec![t(format!("The same questions with {cov} covariance"))]);
    let w = &rb.equal_slopes;
    let mut runs = vec![
        t(format!("Standard errors from the {cov} covariance (")),
        Inline::Cite(Work::White1980),
        t("; "),
        Inline::Cite(Work::MacKinnonWhite1985),
        t(format!(
            "), which does not assume one residual variance for every row. Wald test that all slopes are equal: F = {} on {} and {} df, {}. ",
            num(w.f),
            int(w.df1),
            int(w.df2),
            peq(w.p_value)
        )),
    ];
    let es = &r.equal_slopes;
    runs.push(t(if w.p_value.is_none() {
        format!(
            "The robust test cannot be computed (a slope's robust variance is zero), so the gate keeps the classical F test ({}).",
            peq(es.p_value)
        )
    } else if rb.disagree {
        format!(
            "The classical F test gives {} and would have decided otherwise; the gate follows the {cov} test, as the plan asks.",
            peq(es.p_value)
        )
    } else {
        format!(
            "The classical F test ({}) decides the same way; the gate follows the {cov} test.",
            peq(es.p_value)
        )
    }));
    b.para(runs);
    table(b, c, "Slope differences", &rb.pairwise_slopes);
    if r.decision.common_slope_tables != "omitted" {
        b.para(vec![
            t("Adjusted means at "),
            v(&c.x),
            t(format!(
                " = {}, {cov} standard errors: ",
                num(Some(r.adjust_at))
            )),
        ]);
        if let Some(crate::report::doc::Block::Paragraph(runs)) = b.blocks.last_mut() {
            for (i, m) in rb.adjusted_means.iter().enumerate() {
                if i > 0 {
                    runs.push(t("; "));
                }
                runs.extend([
                    v(&m.level),
                    t(format!(
                        " {} (SE {}, {} interval {})",
                        num(Some(m.mean)),
                        num(m.se),
                        c.conf,
                        ci(m.ci)
                    )),
                ]);
            }
            runs.push(t("."));
        }
        table(b, c, "Adjusted-mean differences", &rb.pairwise_adjusted);
    }
}

fn table(b: &mut Builder, c: &Ctx, what: &str, pairs: &[RobustDifference]) {
    b.para(vec![t(format!(
        "{what}, first − second, {} intervals unadjusted; p-values adjusted: {}.",
        c.conf,
        match c.adjust {
            // The studentized range assumes one pooled variance.
            "Tukey–Kramer" => "Holm (in place of Tukey–Kramer)",
            other => other,
        }
    ))]);
    b.table_aligned(
        [
            "pair",
            "difference",
            "robust SE",
            "interval",
            "t",
            "p",
            "adjusted p",
        ]
        .map(cell)
        .to_vec(),
        aligns("lrrlrrr"),
        pairs
            .iter()
            .map(|d| {
                vec![
                    pair(&d.a, &d.b),
                    cell(num(Some(d.difference))),
                    cell(num(d.se)),
                    cell(ci(d.ci)),
                    cell(num(d.t)),
                    cell(p(d.p_value)),
                    cell(p(d.p_adjusted)),
                ]
            })
            .collect(),
    );
}
