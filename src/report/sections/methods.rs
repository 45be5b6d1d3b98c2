//! "How this was computed": the methods paragraph, every method cited by key, and
//! the references list (exactly the works the report cites).

use super::{Ctx, level, num};
use crate::report::cite::Work;
use crate::report::doc::{Block, Builder, Inline, Runs, t, v};

fn cite(w: Work) -> Inline {
    Inline::Cite(w)
}

pub(super) fn section(b: &mut Builder, c: &Ctx) {
    let r = c.r;
    b.section(vec![t("How this was computed")]);
    let from_moments = r.data.source.as_deref() == Some("moments");
    let mut m: Runs = if from_moments {
        vec![t(
            "Each group's line was fitted by ordinary least squares from the group's count, means and centred sums of squares and products, as the data engine computed them and the moments file (data.moments) holds them; each residual sum of squares is Syy − Sxy²/Sxx.",
        )]
    } else {
        vec![
            t(
                "Each group's line was fitted by ordinary least squares, from centred sums of squares and products computed in two passes over each group's rows, means first, then the centred sums (the corrected two-pass algorithm; ",
            ),
            cite(Work::ChanGolubLeVeque1983),
            t(")."),
        ]
    };
    if r.model.response_transform != "none" || r.model.covariate_transform != "none" {
        m.extend([
            t(" The fits use "),
            v(&c.y),
            t(" and "),
            v(&c.x),
            t(", transformed as the plan asks; every estimate, mean and interval is on that scale."),
        ]);
    }
    m.extend([
        t(" Whether the groups share one slope (the homogeneity-of-slopes assumption of the analysis of covariance; "),
        cite(Work::Fisher1932),
        t("; "),
        cite(Work::SnedecorCochran1989),
        t(format!(
            ") was tested with the extra-sum-of-squares F test of parallel lines against separate lines, at level {}; the groups were compared on a common slope when p was at or above that level, which shows only that the data do not detect a slope difference; the pairwise slope-difference intervals state which differences they rule out.",
            level(r.model.slopes_alpha)
        )),
    ]);
    if r.bands.drawn == "simultaneous" {
        m.extend([
            t(" The bands in the figures are simultaneous for each whole line ("),
            cite(Work::WorkingHotelling1929),
            t(": critical value √(2 F(1 − α; 2, df)) in place of Student's t)."),
        ]);
    }
    if let Some(rb) = &r.robust {
        m.extend([
            t(format!(
                " As the plan asks, the gate decided on the Wald test of equal slopes with the {} heteroscedasticity-consistent covariance (",
                rb.covariance.to_uppercase()
            )),
            cite(Work::White1980),
            t("; "),
            cite(Work::MacKinnonWhite1985),
            t("), as an F on k − 1 and n − 2k df; slope and adjusted-mean differences are given with the same covariance beside the classical ones."),
        ]);
    }
    m.extend([
        t(" Pairs of slopes were compared with t tests on the separate-lines model's pooled residual variance, and in unpooled form with Welch–Satterthwaite degrees of freedom ("),
        cite(Work::Welch1947),
        t("; "),
        cite(Work::Satterthwaite1946),
        t("). Given a common slope, the group effect was tested with the F test of parallel lines against one line for all rows, and the groups' adjusted means (least-squares means; "),
        cite(Work::SearleSpeedMilliken1980),
        t(") at "),
        v(&c.x),
        t(format!(
            " = {} were compared pairwise with t tests on the parallel-lines model.",
            num(Some(r.adjust_at))
        )),
    ]);
    match r.model.comparisons.as_str() {
        "holm" => m.extend([
            t(" Pairwise p-values were adjusted with Holm's step-down procedure ("),
            cite(Work::Holm1979),
            t(")."),
        ]),
        "bonferroni" => m.extend([
            t(" Pairwise p-values were adjusted with the Bonferroni correction ("),
            cite(Work::Dunn1961),
            t(")."),
        ]),
        "tukey-kramer" => m.push(t(
            " The adjusted p-values are the Tukey–Kramer p-values described below.",
        )),
        "against-reference" => m.extend([
            t(" Every group was compared with the first level as reference, slopes and adjusted means alike, with p-values and intervals simultaneous over the family of differences: the many-to-one procedure ("),
            cite(Work::Dunnett1955),
            t(") with the differences' own correlation, which the covariate's term makes unequal, from the multivariate t distribution. Its probabilities were computed by separation of variables ("),
            cite(Work::Genz1992),
            t("; "),
            cite(Work::GenzBretz2002),
            t(") on a fixed randomly shifted lattice, so a rerun gives the same digits; the error stated with each family is 3.5 standard errors over the shifts, and a p-value too small for the lattice to resolve is given as its Bonferroni bound."),
        ]),
        _ => m.push(t(" Pairwise p-values are not adjusted for multiplicity.")),
    }
    if r.many_to_one.is_none() {
        m.extend([
            t(" Adjusted means were also compared by Tukey–Kramer p-values from the studentized range distribution ("),
            cite(Work::Tukey1953),
            t("; "),
            cite(Work::Kramer1956),
            t(")."),
        ]);
    }
    b.para(m);

    let mut checks: Runs = if from_moments {
        vec![t(
            "The residual checks (normality, equal spread, influential rows) need the rows and did not run. The covariate was compared across groups with a one-way analysis of variance.",
        )]
    } else {
        residual_checks()
    };
    if !r.decision.homogeneous {
        checks.extend([
            t(" Where slopes differ, the covariate values at which two groups' lines differ significantly were found by the Johnson–Neyman technique ("),
            cite(Work::JohnsonNeyman1936),
        ]);
        if r.regions
            .first()
            .is_some_and(|g| g.method == "johnson-neyman-simultaneous")
        {
            checks.extend([t("; simultaneous form of "), cite(Work::Potthoff1964)]);
        }
        checks.push(t("), and differences were given at "));
        if r.model.compare_at_rule == "quartiles" {
            checks.extend([
                t("the quartiles of the covariate ("),
                cite(Work::HyndmanFan1996),
                t(", definition 7)."),
            ]);
        } else if r.model.compare_at_rule == "mean" {
            checks.push(t("the covariate's mean (the quartiles need the rows)."));
        } else {
            checks.push(t("the covariate values the plan lists."));
        }
    }
    if let Some(first) = r.limits.first() {
        let bound = if first.bound == "prediction" {
            "one-sided prediction bound for a single future result (the mean line's variance plus one residual variance)"
        } else {
            "one-sided confidence bound of the mean line"
        };
        if first.band == "simultaneous" {
            checks.extend([
                t(format!(
                    " Crossing points are where the {}% Working–Hotelling band of the mean line (",
                    crate::number::trimmed(100.0 * first.confidence, 4)
                )),
                cite(Work::WorkingHotelling1929),
                t(format!(
                    "; critical value √(2 F({}; 2, df)) in place of Student's t), which holds for every covariate value and both sides at once, meets the limit, solved exactly from the bound's closed form and checked numerically",
                    crate::number::trimmed(first.confidence, 4)
                )),
            ]);
        } else {
            checks.push(t(format!(
                " Crossing points are where the {bound} meets the limit, at a one-sided level of {}%, solved exactly from the bound's closed form and checked numerically",
                crate::number::trimmed(100.0 * first.confidence, 4)
            )));
        }
        if first.two_sided && first.band != "simultaneous" {
            checks.extend([
                t("; with a lower and an upper limit each side uses the one-sided level (1 + confidence)/2, so that both sides together hold at the plan's confidence ("),
                cite(Work::IchQ1e2003),
                t(")"),
            ]);
        }
        if let Some(s) = r.limits_supported.as_ref().filter(|s| s.cap.is_some()) {
            checks.push(t(format!(
                "; the supported period is the earliest crossing capped by the plan's extrapolation rule ({}) and rounded down to a step of {}",
                s.rule,
                crate::number::trimmed(s.round_to, 4)
            )));
        }
        if let Some(pool) = r.pooling.as_ref().filter(|p| p.rule == "equivalence") {
            checks.extend([
                t("; lines were pooled in the two steps of "),
                cite(Work::IchQ1e2003),
                t(", each decided by equivalence ("),
                cite(Work::Llabres2000),
                t("; "),
                cite(Work::TsongChenChen2003),
                t(format!(
                    "): one slope when every pair of slopes was shown within ±{}, then one line when every pair of parallel lines was shown within ±{}, by two one-sided tests at {} each with classical standard errors",
                    crate::number::sig(pool.slope_margin.unwrap_or(f64::NAN), 4),
                    crate::number::sig(pool.intercept_margin.unwrap_or(f64::NAN), 4),
                    level(pool.equivalence_alpha.unwrap_or(r.model.alpha))
                )),
            ]);
        } else if let Some(pool) = &r.pooling {
            checks.extend([
                t("; lines were pooled by the two-step procedure of "),
                cite(Work::IchQ1e2003),
                t(format!(
                    ": equal slopes, then equal intercepts, each at level {}",
                    level(pool.alpha)
                )),
            ]);
        }
        checks.push(t("."));
    }
    checks.extend([
        t(format!(
            " Intervals are at {}, from Student's t; tail probabilities come from the regularized incomplete beta function (",
            c.conf
        )),
        cite(Work::AbramowitzStegun1964),
        t(", 26.5.27 and 26.6.2)."),
    ]);
    b.para(checks);

    b.subsection(vec![t("References")]);
    b.push(Block::References(Vec::new()));
}

/// The residual checks, as they ran on the rows.
fn residual_checks() -> Runs {
    vec![
        t(
            "Residuals of the separate lines were checked for normality with the Shapiro–Wilk test (",
        ),
        cite(Work::ShapiroWilk1965),
        t(") in Royston's approximation ("),
        cite(Work::Royston1995),
        t(
            "), pooled and within each group of at least 10 rows (with fewer, W is set by the design rather than the data), and for equal spread across groups with the Brown–Forsythe test (",
        ),
        cite(Work::BrownForsythe1974),
        t(
            "). Influential rows were measured on the selected model by leverage, externally studentized residuals and Cook's distance (",
        ),
        cite(Work::Cook1977),
        t("; "),
        cite(Work::BelsleyKuhWelsch1980),
        t("), with the cut-offs 2p/n for leverage ("),
        cite(Work::HoaglinWelsch1978),
        t(") and 4/n for Cook's distance ("),
        cite(Work::BollenJackman1990),
        t("). The covariate was compared across groups with a one-way analysis of variance."),
    ]
}
