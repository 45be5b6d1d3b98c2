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
}
