//! slopewise: compare regression lines between groups from a declarative plan.
//!
//! The pipeline, in the order a run goes through it:
//!
//! 1. [`plan`]: the TOML plan as typed, validated settings, with the source spans that
//!    let every later error point at the key it concerns. Reads no data.
//! 2. [`data`]: one streaming pass over the CSV (each half of a large file on its own
//!    core): missing tokens, row filters, transforms, group labels; per-group columns,
//!    two-pass moments over the complete columns and drop counts.
//! 3. [`fit`]: least squares from per-group centred moments: one line per group, the
//!    parallel-lines (common slope) model and one line for all rows.
//! 4. [`stats`]: distributions, p-value adjustment and other numerical building blocks.
//! 5. [`analysis`]: the procedure: equal-slopes gate, then the comparison that fits the
//!    decision, with warnings. Pure: plan + dataset in, [`results::Results`] out.
//! 6. [`results`]: the serde types of `results.json` (the public contract).
//! 7. [`report`]: Results to one document model, written as Markdown, the PDF's Typst
//!    data and plain text; figures; JSON bytes.
//! 8. [`output`]: run folders that appear whole or not at all; [`audit`]: their
//!    manifests, the comparison `verify` makes, signed approvals and the self-test
//!    against published reference values.
//! 9. [`app`] and [`cli`]: the edge. The only code that touches files, the
//!    environment and the process; [`diagnostic`] renders every error once, there.

// Errors are built once per run and rendered at the top; their size does not matter.
#![allow(clippy::result_large_err)]
// `!(x > 0.0)` is deliberate: it counts NaN as "not positive", which `x <= 0.0` would not.
#![allow(clippy::neg_cmp_op_on_partial_ord)]

pub mod analysis;
pub mod app;
pub mod audit;
pub mod cli;
pub mod data;
pub mod diagnostic;
pub mod digest;
pub mod draft;
pub mod fit;
pub mod number;
pub mod output;
pub mod plan;
pub mod report;
pub mod results;
pub mod schema;
pub mod seasons;
pub mod stats;

/// The tool version recorded in every report's provenance.
pub const TOOL_VERSION: &str = env!("CARGO_PKG_VERSION");

/// The commit slopewise was built from (`git rev-parse HEAD` in build.rs; "unknown"
/// when built outside a git checkout).
pub const BUILD_COMMIT: &str = env!("SLOPEWISE_BUILD_COMMIT");

/// The compiler that built slopewise (`rustc -V` in build.rs).
pub const RUSTC_VERSION: &str = env!("SLOPEWISE_RUSTC_VERSION");
