//! The edge: the only code that reads files, writes folders, runs processes and sets
//! the exit status. One file per command; every error becomes a [`Diagnostic`] and
//! is printed once, here.

mod analyse;
mod approve;
mod check;
mod clock;
mod diff;
mod files;
mod init;
mod keygen;
mod plan_file;
mod run;
mod selftest;
mod sql;
mod typst;
mod verify;

use std::io::Write;
use std::process::ExitCode;

use clap::Parser;

use crate::cli::{Cli, Command};
use crate::diagnostic::Diagnostic;

pub use typst::{TYPST_ENV, TYPST_VERSION};

/// Parses the command line and runs it.
pub fn main() -> ExitCode {
    let cli = Cli::parse();
    let outcome = match cli.command {
        Command::Run { plans, out } => return run::run_plans(&plans, out.as_deref()),
        Command::Check { plan } => check::check(&plan),
        Command::Verify {
            folder,
            data,
            trusted_keys,
        } => verify::verify(&folder, data.as_deref(), &trusted_keys),
        Command::Selftest { out } => selftest::selftest(&out),
        Command::Keygen { out } => keygen::keygen(&out),
        Command::Approve {
            folder,
            by,
            role,
            key,
            meaning,
            data,
        } => approve::approve(&approve::Request {
            folder: &folder,
            by: &by,
            role: &role,
            key: key.as_deref(),
            meaning: meaning.as_deref(),
            data: data.as_deref(),
        }),
        Command::Diff {
            runs,
            markdown,
            figure,
            alpha,
            fail_on_change,
            allow_mismatch,
        } => diff::diff(
            &runs,
            markdown.as_deref(),
            figure.as_deref(),
            alpha,
            fail_on_change,
            allow_mismatch,
        ),
        Command::Init { data, out } => init::init(&data, out.as_deref()),
        Command::Sql {
            plan,
            dialect,
            table,
        } => sql::sql(&plan, dialect, &table),
        Command::Schema => {
            say(&crate::schema::plan_schema());
            Ok(())
        }
        Command::Completions { shell } => {
            let mut cmd = <Cli as clap::CommandFactory>::command();
            let mut script = Vec::new();
            clap_complete::generate(shell, &mut cmd, "slopewise", &mut script);
            say(&String::from_utf8_lossy(&script));
            Ok(())
        }
        Command::Man => manual_page()
            .map(|page| say(&page))
            .map_err(|e| Diagnostic::new(format!("cannot write the manual page: {e}"))),
    };
    finish(outcome)
}

/// Writes to stdout, checking the result. A closed pipe (`slopewise schema | head`)
/// ends the process quietly with status 0, as `head` expects; any other write error
/// (`slopewise schema > /dev/full`) is one line on stderr and status 1, never a
/// silent success with nothing written.
pub(super) fn say(text: &str) {
    let mut out = std::io::stdout().lock();
    match out.write_all(text.as_bytes()).and_then(|()| out.flush()) {
        Ok(()) => {}
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => std::process::exit(0),
        Err(e) => {
            let _ = writeln!(
                std::io::stderr(),
                "error: cannot write to standard output: {e}"
            );
            std::process::exit(1);
        }
    }
}

/// Prints an error once and turns the outcome into the exit status.
pub(super) fn finish(outcome: Result<(), Diagnostic>) -> ExitCode {
    match outcome {
        Ok(()) => ExitCode::SUCCESS,
        Err(d) => {
            let _ = std::io::stderr().write_all(d.render().as_bytes());
            ExitCode::FAILURE
        }
    }
}

/// The one manual page: every command described in it, so it names no page that
/// does not exist (clap_mangen's subcommand list points at `slopewise-run(1)` and
/// the like, which slopewise does not install).
fn manual_page() -> std::io::Result<String> {
    let mut cmd = <Cli as clap::CommandFactory>::command();
    cmd.build();
    let man = clap_mangen::Man::new(cmd.clone());
    let mut page = Vec::new();
    man.render_title(&mut page)?;
    man.render_name_section(&mut page)?;
    man.render_synopsis_section(&mut page)?;
    man.render_description_section(&mut page)?;
    man.render_options_section(&mut page)?;
    let mut text = String::from_utf8_lossy(&page).into_owned();
    text.push_str(".SH COMMANDS\n");
    for sub in cmd.get_subcommands().filter(|s| s.get_name() != "help") {
        text.push_str(&format!(".SS \"slopewise {}\"\n", sub.get_name()));
        if let Some(about) = sub.get_long_about().or(sub.get_about()) {
            text.push_str(&roff_text(&about.to_string()));
            text.push('\n');
        }
        let usage = sub.clone().render_usage().to_string();
        text.push_str(&format!(".PP\n{}\n", roff_text(usage.trim())));
        for arg in sub.get_arguments().filter(|a| !a.is_hide_set()) {
            let name = match (arg.get_long(), arg.get_short()) {
                (Some(l), _) => format!("\\fB\\-\\-{}\\fR", l.replace('-', "\\-")),
                (None, Some(c)) => format!("\\fB\\-{c}\\fR"),
                (None, None) => format!("\\fI{}\\fR", arg.get_id()),
            };
            text.push_str(&format!(".TP\n{name}\n"));
            if let Some(help) = arg.get_help() {
                text.push_str(&roff_text(&help.to_string()));
                text.push('\n');
            }
        }
    }
    let mut rest = Vec::new();
    man.render_version_section(&mut rest)?;
    text.push_str(&String::from_utf8_lossy(&rest));
    Ok(text)
}

/// Text for a roff line: backslashes and hyphens escaped, no line starting with a
/// control character.
fn roff_text(s: &str) -> String {
    let escaped = s.replace('\\', "\\e").replace('-', "\\-");
    escaped
        .lines()
        .map(|l| {
            if l.starts_with('.') || l.starts_with('\'') {
                format!("\\&{l}")
            } else {
                l.to_string()
            }
        })
        .collect::<Vec<_>>()
        .join("\n")
}
