//! The grouped aggregate query that gives a plan's moments file (`slopewise sql`).
//!
//! The line comparison needs only each group's count, means and centred sums of
//! squares and cross-products, so an engine can compute them where the rows live
//! and send back one row per group. The query uses the SQL:2003 regression
//! aggregates (`regr_count`, `regr_avgx`, `regr_avgy`, `regr_sxx`, `regr_syy`,
//! `regr_sxy`), which PostgreSQL and Spark SQL compute by updating centred sums
//! (never Σx² − (Σx)²/n), over the rows where both the response and the covariate
//! are not null; the covariate's range is taken over those same rows. The plan's
//! transforms and `[[data.keep]]` filters are written into the query; the plan's
//! `data.missing` tokens do not apply (a database column is typed, and null is its
//! missing value).
//!
//! Every column name is a quoted identifier and every filter value a quoted
//! literal, escaped for the dialect, so no label or column name can change the
//! query's meaning.

use crate::plan::{Plan, Transform};

/// The SQL dialect a query is written for.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Dialect {
    /// PostgreSQL (standard-conforming strings, on by default since 9.1).
    Postgres,
    /// Spark SQL (backslash escapes in literals, backquoted identifiers).
    Spark,
    /// The SQL standard, for other engines with the regression aggregates.
    Ansi,
}

impl Dialect {
    /// The dialect's name on the command line.
    pub fn name(self) -> &'static str {
        match self {
            Dialect::Postgres => "postgres",
            Dialect::Spark => "spark",
            Dialect::Ansi => "ansi",
        }
    }

    /// A quoted identifier.
    pub fn ident(self, name: &str) -> String {
        match self {
            Dialect::Spark => format!("`{}`", name.replace('`', "``")),
            Dialect::Postgres | Dialect::Ansi => format!("\"{}\"", name.replace('"', "\"\"")),
        }
    }

    /// A quoted string literal.
    pub fn literal(self, text: &str) -> String {
        match self {
            Dialect::Spark => format!("'{}'", text.replace('\\', "\\\\").replace('\'', "\\'")),
            Dialect::Postgres | Dialect::Ansi => format!("'{}'", text.replace('\'', "''")),
        }
    }

    /// A table name, each dot-separated part quoted (`schema.table`).
    pub fn table(self, name: &str) -> String {
        name.split('.')
            .map(|part| self.ident(part))
            .collect::<Vec<_>>()
            .join(".")
    }

    fn double(self) -> &'static str {
        match self {
            Dialect::Spark => "DOUBLE",
            Dialect::Postgres | Dialect::Ansi => "DOUBLE PRECISION",
        }
    }

    fn text(self) -> &'static str {
        match self {
            Dialect::Postgres => "TEXT",
            Dialect::Spark => "STRING",
            Dialect::Ansi => "VARCHAR(4000)",
        }
    }

    /// `column` as a number, transformed. PostgreSQL refuses the logarithm of zero
    /// or a negative value and the square root of a negative one; Spark would give
    /// null and so drop the row silently, so its query raises an error instead.
    fn value(self, column: &str, transform: Transform) -> String {
        let v = format!("CAST({} AS {})", self.ident(column), self.double());
        let guarded = |domain: &str| match self {
            Dialect::Spark => format!(
                "CASE WHEN {v} IS NULL OR {v} {domain} THEN {v} ELSE raise_error({}) END",
                self.literal(&format!(
                    "{} of {column} needs {}",
                    transform.name(),
                    transform.domain()
                ))
            ),
            Dialect::Postgres | Dialect::Ansi => v.clone(),
        };
        match transform {
            Transform::None => v,
            Transform::Log => format!("LN({})", guarded("> 0")),
            Transform::Log10 => match self {
                Dialect::Ansi => format!("(LN({}) / LN(10))", guarded("> 0")),
                _ => format!("LOG10({})", guarded("> 0")),
            },
            Transform::Sqrt => format!("SQRT({})", guarded(">= 0")),
        }
    }
}

/// The query whose result, saved as CSV (or Parquet), is the plan's moments file.
pub fn moments_query(plan: &Plan, table: &str, dialect: Dialect) -> String {
    let d = dialect;
    let m = &plan.model;
    let y = d.value(&m.response, m.response_transform);
    let x = d.value(&m.covariate, m.covariate_transform);
    let group = format!("CAST({} AS {})", d.ident(&m.group), d.text());
    let mut q = String::new();
    q.push_str(&format!(
        "-- Per-group moments for slopewise (data.moments), {} dialect.\n",
        d.name()
    ));
    q.push_str(&format!(
        "-- Response {}, covariate {}, groups by {}; save the result as CSV with a header.\n",
        m.response_transform.label(&m.response),
        m.covariate_transform.label(&m.covariate),
        m.group
    ));
    q.push_str(&format!("SELECT {group} AS {},\n", d.ident("group")));
    for (name, agg) in [
        ("n", "regr_count"),
        ("mean_x", "regr_avgx"),
        ("mean_y", "regr_avgy"),
        ("sxx", "regr_sxx"),
        ("syy", "regr_syy"),
        ("sxy", "regr_sxy"),
    ] {
        q.push_str(&format!("       {agg}({y}, {x}) AS {},\n", d.ident(name)));
    }
    q.push_str(&format!(
        "       MIN(CASE WHEN {y} IS NOT NULL THEN {x} END) AS {},\n",
        d.ident("min_x")
    ));
    q.push_str(&format!(
        "       MAX(CASE WHEN {y} IS NOT NULL THEN {x} END) AS {}\n",
        d.ident("max_x")
    ));
    q.push_str(&format!("FROM {}\n", d.table(table)));
    let filters: Vec<String> = plan
        .data
        .keep
        .iter()
        .map(|k| {
            format!(
                "TRIM(CAST({} AS {})) IN ({})",
                d.ident(&k.column),
                d.text(),
                k.accepted
                    .iter()
                    .map(|a| d.literal(a.trim()))
                    .collect::<Vec<_>>()
                    .join(", ")
            )
        })
        .collect();
    if !filters.is_empty() {
        q.push_str(&format!("WHERE {}\n", filters.join("\n  AND ")));
    }
    q.push_str(&format!("GROUP BY {group}\nORDER BY 1;\n"));
    q
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn identifiers_and_literals_cannot_break_out() {
        // Common practice, no source: a quote inside a quoted name or literal is
        // doubled (standard SQL), or escaped with a backslash (Spark).
        let hostile = "x\"; DROP TABLE t; --'`\\";
        assert_eq!(
            Dialect::Postgres.ident(hostile),
            "\"x\"\"; DROP TABLE t; --'`\\\""
        );
        assert_eq!(
            Dialect::Postgres.literal(hostile),
            "'x\"; DROP TABLE t; --''`\\'"
        );
        assert_eq!(
            Dialect::Spark.ident(hostile),
            "`x\"; DROP TABLE t; --'``\\`"
        );
        assert_eq!(
            Dialect::Spark.literal(hostile),
            "'x\"; DROP TABLE t; --\\'`\\\\'"
        );
        assert_eq!(Dialect::Ansi.table("lab.trees"), "\"lab\".\"trees\"");
    }
}
