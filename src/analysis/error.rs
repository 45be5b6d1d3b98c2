//! The analysis stage's error.

use crate::diagnostic::Diagnostic;

/// Why the procedure cannot run on these data.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum AnalysisError {
    /// Fewer than two groups can carry a line.
    #[error("{}", too_few(.usable, .excluded))]
    TooFewGroups {
        /// Groups that can carry a line.
        usable: Vec<String>,
        /// Groups left out, with why.
        excluded: Vec<(String, String)>,
    },
    /// Many-to-one comparisons name the first level as the reference, and it cannot
    /// carry a line.
    #[error(
        "comparisons = \"against-reference\" compares every group with the first level, `{reference}`, but it {why}, so there is no reference line"
    )]
    ReferenceExcluded {
        /// The first level.
        reference: String,
        /// Why it was left out.
        why: String,
    },
    /// Values so large or so small that sums of squares leave floating point.
    #[error(
        "the values of `{column}` work at a scale of {magnitude:e}, beyond what sums of squares hold without overflow or underflow (values up to 1e150 and spreads from 1e-150 are supported)"
    )]
    Magnitude {
        /// The column (response or covariate).
        column: String,
        /// The largest absolute value, or the smallest spread.
        magnitude: f64,
    },
    /// A number came out NaN or infinite: a defect, caught before anything is written.
    #[error(
        "slopewise computed a non-finite number for `{path}`, which it must never report; no report was written"
    )]
    NonFinite {
        /// Where in the results (as in results.json).
        path: String,
    },
}

fn too_few(usable: &[String], excluded: &[(String, String)]) -> String {
    let mut s = match usable.len() {
        0 => "no group has enough usable rows to fit a line".to_string(),
        _ => format!(
            "only one group (`{}`) has enough usable rows to fit a line; comparing lines needs at least two",
            usable[0]
        ),
    };
    const LISTED: usize = 5;
    for (level, why) in excluded.iter().take(LISTED) {
        s.push_str(&format!("; `{level}` {why}"));
    }
    if excluded.len() > LISTED {
        s.push_str(&format!(
            "; and {} more groups like them",
            excluded.len() - LISTED
        ));
    }
    s
}

impl AnalysisError {
    /// The error with advice.
    pub fn diagnostic(&self) -> Diagnostic {
        match self {
            AnalysisError::TooFewGroups { .. } => Diagnostic::new(self.to_string()).help(
                "each group needs at least 3 usable rows with at least two different covariate values; check model.group, data.keep and data.missing",
            ),
            AnalysisError::ReferenceExcluded { .. } => Diagnostic::new(self.to_string()).help(
                "put a group with at least 3 usable rows and two covariate values first in model.levels, or choose another tests.comparisons",
            ),
            AnalysisError::Magnitude { magnitude, .. } if *magnitude < 1.0 => {
                Diagnostic::new(self.to_string()).help(
                    "express the column in smaller units (for example multiply by 1e200), or use a log transform",
                )
            }
            AnalysisError::Magnitude { .. } => Diagnostic::new(self.to_string())
                .help("express the column in other units (for example divide by 1e200), or use a log transform"),
            AnalysisError::NonFinite { .. } => Diagnostic::new(self.to_string())
                .help("this is a defect in slopewise: please report it with the plan and the data file"),
        }
    }
}
