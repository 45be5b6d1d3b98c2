//! The evidence beyond the classical tests: robust covariance, equivalence of
//! slopes, the bands around each line and the plan for next season.

use serde::{Deserialize, Serialize};

/// The gate and the comparisons with a heteroscedasticity-consistent covariance
/// (White 1980; MacKinnon & White 1985).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Robust {
    /// "hc0", "hc1", "hc2" or "hc3".
    pub covariance: String,
    /// The Wald test that all slopes are equal, as an F on (k − 1, n − 2k) df.
    pub equal_slopes: RobustWald,
    /// What the classical F test alone would have decided (`equal_slopes.homogeneous`
    /// follows the robust test).
    pub classical_homogeneous: bool,
    /// True when the robust and the classical tests decide differently.
    pub disagree: bool,
    /// Every pair of slopes; df n − 2k.
    pub pairwise_slopes: Vec<RobustDifference>,
    /// Adjusted means at `adjust_at` on the parallel-lines model; df n − k − 1.
    pub adjusted_means: Vec<RobustMean>,
    /// Every pair of adjusted means.
    pub pairwise_adjusted: Vec<RobustDifference>,
}

/// A Wald test with a robust covariance.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct RobustWald {
    /// F = W/(k − 1); null when a slope's robust variance is zero or undefined.
    pub f: Option<f64>,
    /// k − 1.
    pub df1: f64,
    /// n − 2k.
    pub df2: f64,
    /// Upper-tail p-value.
    pub p_value: Option<f64>,
    /// Slopes taken as the same: p at or above slopes_alpha.
    pub homogeneous: bool,
}

/// A difference a − b with a robust standard error.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct RobustDifference {
    /// First level.
    pub a: String,
    /// Second level.
    pub b: String,
    /// a − b.
    pub difference: f64,
    /// Robust standard error.
    pub se: Option<f64>,
    /// t statistic.
    pub t: Option<f64>,
    /// Residual df of the model.
    pub df: f64,
    /// Two-sided p-value.
    pub p_value: Option<f64>,
    /// Adjusted for the number of pairs (the plan's adjustment; Tukey–Kramer falls
    /// back to Holm, the studentized range assuming one pooled variance).
    pub p_adjusted: Option<f64>,
    /// Interval at 1 − alpha, unadjusted.
    pub ci: Option<[f64; 2]>,
    /// Under many-to-one comparisons: the interval simultaneous over the family,
    /// d ± c·se with c from `many_to_one`.
    #[serde(default)]
    pub ci_simultaneous: Option<[f64; 2]>,
}

/// Many-to-one comparisons: every group against the reference (the first level),
/// simultaneous over each family (Dunnett 1955), the multivariate t taken on a
/// deterministic lattice (Genz 1992; Genz & Bretz 2002).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ManyToOne {
    /// The reference level every other is compared with.
    pub reference: String,
    /// Simultaneous coverage of each family's intervals, 1 − alpha.
    pub level: f64,
    /// The slope differences (`pairwise_slopes`).
    pub slopes: SimultaneousFamily,
    /// The adjusted-mean differences (`pairwise_adjusted`).
    pub adjusted: SimultaneousFamily,
    /// The same families with the robust covariance, when the plan names one.
    pub robust_slopes: Option<SimultaneousFamily>,
    /// See `robust_slopes`.
    pub robust_adjusted: Option<SimultaneousFamily>,
}

/// One family of many-to-one differences.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SimultaneousFamily {
    /// c with P(|T_i| ≤ c for every i) = 1 − alpha; null when a standard error is
    /// unknown.
    pub critical_value: Option<f64>,
    /// Degrees of freedom of the multivariate t.
    pub df: f64,
    /// The largest stated error of the family's probabilities (3.5 standard errors
    /// over the lattice's shifts); 0 for a single pair, where they are exact.
    pub error: Option<f64>,
    /// "multivariate-t", or "bonferroni" beyond 10 groups, where the integral's
    /// dimension makes it too slow and the Bonferroni bound (conservative) is used.
    #[serde(default)]
    pub method: String,
}

/// An adjusted mean with a robust standard error.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct RobustMean {
    /// Group label.
    pub level: String,
    /// Adjusted mean (as `adjusted_means[].mean`).
    pub mean: f64,
    /// Robust standard error.
    pub se: Option<f64>,
    /// Interval at 1 − alpha.
    pub ci: Option<[f64; 2]>,
}

/// Equivalence of slopes within a margin (Schuirmann 1987; Dixon & Pechmann 2005).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Equivalence {
    /// The plan's slope_margin, response units per covariate unit.
    pub margin: f64,
    /// Level of each one-sided test.
    pub alpha: f64,
    /// "classical" or the HC form of the standard errors.
    pub covariance: String,
    /// The plan's gate rule: "difference" or "equivalence".
    pub gate: String,
    /// "shown-equivalent" (every pair), "shown-different" (some pair differs by more
    /// than the margin) or "not-settled".
    pub reading: String,
    /// Every pair of slopes.
    pub pairs: Vec<EquivalencePair>,
}

/// The two one-sided tests of one pair, a − b.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct EquivalencePair {
    /// First level.
    pub a: String,
    /// Second level.
    pub b: String,
    /// Slope of a minus slope of b.
    pub difference: f64,
    /// Its standard error.
    pub se: Option<f64>,
    /// Degrees of freedom.
    pub df: f64,
    /// The (1 − 2 alpha) interval.
    pub ci: Option<[f64; 2]>,
    /// p of the test that the difference is at or below −margin.
    pub p_lower: Option<f64>,
    /// p of the test that it is at or above +margin.
    pub p_upper: Option<f64>,
    /// The larger of the two: below alpha means shown equivalent.
    pub p_tost: Option<f64>,
    /// "shown-equivalent", "shown-different" or "not-settled".
    pub reading: String,
}

/// Planning the next season from this one's spread (noncentral F power).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct NextSeason {
    /// Level of the equal-slopes test planned for.
    pub alpha: f64,
    /// "slope-margin" (the plan's tests.slope_margin) or "detectable-difference" (no
    /// margin: the smallest slope difference this season detects with power 0.8).
    pub basis: String,
    /// The slope difference planned for.
    pub difference: f64,
    /// The pair hardest to tell apart (the least covariate spread per row).
    pub pair: [String; 2],
    /// This season's residual variance (separate lines).
    pub residual_variance: f64,
    /// The pair's covariate variance per row, Sxx/n.
    pub covariate_variance: [f64; 2],
    /// Rows per group this season (the smaller of the pair).
    pub rows_now: u64,
    /// Power this season had for `difference` (for a margin; with the detectable
    /// difference it is 0.8 by construction).
    pub power_now: Option<f64>,
    /// Rows per group for power 0.8.
    pub rows_for_80: Option<u64>,
    /// Rows per group for power 0.9.
    pub rows_for_90: Option<u64>,
}

/// Critical values of the bands around each line.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct Bands {
    /// "pointwise" or "simultaneous": what the figures draw.
    pub drawn: String,
    /// Each group's own line (df n − 2), in level order.
    pub groups: Vec<BandCritical>,
    /// The parallel-lines model's lines (df n − k − 1).
    pub common: BandCritical,
}

/// The two critical values of one line's band.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct BandCritical {
    /// Group label (empty for the parallel-lines model).
    pub level: String,
    /// Student's t(1 − alpha/2; df).
    pub pointwise: Option<f64>,
    /// Working–Hotelling √(2 F(1 − alpha; 2, df)).
    pub simultaneous: Option<f64>,
}
