//! `slopewise sql`: prints the query that computes a plan's moments in an engine.

use std::path::Path;

use super::plan_file::load_plan;
use super::say;
use crate::cli::SqlDialect;
use crate::data::sql::{Dialect, moments_query};
use crate::diagnostic::Diagnostic;

/// Prints the plan's moments query for `dialect`, reading rows from `table`.
pub(super) fn sql(plan_path: &Path, dialect: SqlDialect, table: &str) -> Result<(), Diagnostic> {
    let lp = load_plan(plan_path)?;
    if lp.plan.attributes.len() > 1 {
        return Err(Diagnostic::new(format!(
            "the plan {} lists several attributes under [[responses]]; a moments file holds one response's moments",
            lp.file
        ))
        .help("write one plan per attribute and print each one's query"));
    }
    if table.split('.').any(|part| part.trim().is_empty()) {
        return Err(Diagnostic::new(format!(
            "--table {table:?} is not a table name"
        ))
        .help("give the table or view that holds the rows, for example `nursery` or `lab.nursery`"));
    }
    let dialect = match dialect {
        SqlDialect::Postgres => Dialect::Postgres,
        SqlDialect::Spark => Dialect::Spark,
        SqlDialect::Ansi => Dialect::Ansi,
    };
    say(&moments_query(&lp.plan, table, dialect));
    Ok(())
}
