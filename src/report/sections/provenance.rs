//! "Before relying on these results" and "Where these numbers came from".

use super::{Ctx, cell, vcell};
use crate::report::doc::{Align, Block, Builder, t};
use crate::report::fonts;

pub(super) fn section(b: &mut Builder, c: &Ctx) {
    b.section(vec![t("Before relying on these results")]);
    b.push(Block::Caution(vec![t(
        "These results support, and do not replace, professional judgement. They rest on the assumptions of least squares: a straight line within each group, independent rows, and residuals of similar spread around each line. For regulated decisions, defer to the applicable guidance and to a qualified statistician.",
    )]));
    let pv = &c.r.provenance;
    b.section(vec![t("Where these numbers came from")]);
    let mut rows = vec![
        vec![cell("slopewise version"), cell(&pv.tool_version)],
        vec![cell("build commit"), cell(&pv.build_commit)],
        vec![cell("compiler"), cell(&pv.rustc_version)],
        vec![cell("plan file"), vcell(&pv.plan_file)],
        vec![cell("plan SHA-256"), cell(&pv.plan_sha256)],
        vec![cell("data file"), vcell(&pv.data_file)],
        vec![cell("data SHA-256"), cell(&pv.data_sha256)],
    ];
    if let Some(typst) = &pv.typst_version {
        rows.push(vec![cell("typst"), cell(typst)]);
    }
    // The fonts shape the figures in every run and the PDF when there is one.
    for f in fonts::ALL {
        rows.push(vec![
            cell(format!("font {} SHA-256", f.file)),
            cell(fonts::sha256(f)),
        ]);
    }
    for (name, hash) in &pv.template_sha256 {
        rows.push(vec![cell(format!("template {name} SHA-256")), cell(hash)]);
    }
    b.table_aligned(
        vec![cell("item"), cell("value")],
        vec![Align::Left, Align::Left],
        rows,
    );
    b.para(vec![t(
        "The same plan and data give this report byte for byte; results.json beside it holds every number at full precision.",
    )]);
}
