//! The command line, as clap definitions. Parsing only; [`crate::app`] acts on it.

use std::path::PathBuf;

use clap::{Parser, Subcommand};

/// Compare regression lines between groups from a declarative plan.
#[derive(Debug, Parser)]
#[command(name = "slopewise", version, about, long_about = None)]
pub struct Cli {
    /// What to do.
    #[command(subcommand)]
    pub command: Command,
}

/// The SQL dialects `slopewise sql` writes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum SqlDialect {
    /// PostgreSQL.
    Postgres,
    /// Spark SQL.
    Spark,
    /// Standard SQL (the SQL:2003 regression aggregates).
    Ansi,
}

/// The subcommands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Run one or more plans and write their reports.
    Run {
        /// Plan files (TOML).
        #[arg(required = true, value_name = "PLAN.toml")]
        plans: Vec<PathBuf>,
        /// Output folder (with several plans: the parent of one folder per plan,
        /// named after the plan file's stem). Overrides each plan's report.out.
        #[arg(long, value_name = "DIR")]
        out: Option<PathBuf>,
    },
    /// Validate a plan and its data and say what a run would do; writes nothing.
    Check {
        /// Plan file (TOML).
        #[arg(value_name = "PLAN.toml")]
        plan: PathBuf,
    },
    /// Rerun a run folder's recorded plan on its data and compare every output byte
    /// for byte.
    Verify {
        /// A folder written by `slopewise run`.
        #[arg(value_name = "RUN_FOLDER")]
        folder: PathBuf,
        /// The data file, when it is no longer where the manifest says.
        #[arg(long, value_name = "CSV")]
        data: Option<PathBuf>,
        /// A public key (.pub from `keygen`) whose approvals are accepted; repeat for
        /// several. With any given, unsigned approvals and other keys do not hold.
        #[arg(long = "trusted-key", value_name = "FILE.pub")]
        trusted_keys: Vec<PathBuf>,
    },
    /// Run the reference datasets built into slopewise (NIST StRD, statsmodels
    /// references) against their certified values and write a dated record.
    Selftest {
        /// Folder for the record (selftest-<date>.json and .md).
        #[arg(long, value_name = "DIR", default_value = ".")]
        out: PathBuf,
    },
    /// Make an Ed25519 key pair for signing approvals.
    Keygen {
        /// The private key file (the public one gets `.pub` added). Never overwritten.
        #[arg(long, value_name = "FILE", default_value = "approval-key")]
        out: PathBuf,
    },
    /// Approve a run folder: a dated record of who, in what role, and the hashes of
    /// every file and the data, signed when a key is given. The report is untouched.
    Approve {
        /// A folder written by `slopewise run`.
        #[arg(value_name = "RUN_FOLDER")]
        folder: PathBuf,
        /// Who approves.
        #[arg(long, value_name = "NAME")]
        by: String,
        /// In what role, e.g. "QA reviewer".
        #[arg(long, value_name = "ROLE")]
        role: String,
        /// The private key file from `slopewise keygen`, to sign the record.
        #[arg(long, value_name = "FILE")]
        key: Option<PathBuf>,
        /// What the approval means, when the standard statement does not fit.
        #[arg(long, value_name = "TEXT")]
        meaning: Option<String>,
        /// The data file, when it is no longer where the manifest says.
        #[arg(long, value_name = "CSV")]
        data: Option<PathBuf>,
    },
    /// Compare runs: two runs side by side, or a trend over several in order.
    Diff {
        /// results.json files or run folders, oldest first.
        #[arg(required = true, num_args = 2.., value_name = "RUN")]
        runs: Vec<PathBuf>,
        /// Also write the comparison as Markdown to this file.
        #[arg(long, value_name = "FILE")]
        markdown: Option<PathBuf>,
        /// Also write the figure of each group's slope over the runs (SVG) to this file.
        #[arg(long, value_name = "FILE")]
        figure: Option<PathBuf>,
        /// Compare runs whose response, covariate, group column, transforms or units
        /// differ (refused otherwise); no change between them is then tested.
        #[arg(long)]
        allow_mismatch: bool,
        /// Level for the tests of change.
        #[arg(long, default_value_t = 0.05)]
        alpha: f64,
        /// Exit non-zero when a decision flipped or a change is significant.
        #[arg(long)]
        fail_on_change: bool,
    },
    /// Draft a commented plan from a CSV's header and first rows.
    Init {
        /// The data file.
        #[arg(value_name = "DATA.csv")]
        data: PathBuf,
        /// Write the plan here (refuses to overwrite) instead of printing it.
        #[arg(long, value_name = "PLAN.toml")]
        out: Option<PathBuf>,
    },
    /// Print the SQL query that computes the plan's per-group moments inside a
    /// database or cluster; save its result as CSV and name it in `data.moments`.
    Sql {
        /// Plan file (TOML).
        #[arg(value_name = "PLAN.toml")]
        plan: PathBuf,
        /// The engine's dialect.
        #[arg(long, value_enum)]
        dialect: SqlDialect,
        /// The table (or view) that holds the rows, `schema.table` allowed.
        #[arg(long, value_name = "NAME")]
        table: String,
    },
    /// Print a JSON Schema of the plan file, for editors that complete TOML keys.
    Schema,
    /// Print a shell completion script.
    Completions {
        /// Shell to complete for.
        #[arg(value_enum)]
        shell: clap_complete::Shell,
    },
    /// Print the manual page (roff).
    Man,
}
