//! The external `typst` program that turns the report's Typst source into a PDF.

use std::path::Path;

use crate::diagnostic::Diagnostic;

/// The typst-cli version the PDF template is tested against.
pub const TYPST_VERSION: &str = "0.15.1";

/// Environment variable naming the typst binary, when it is not `typst` on PATH.
pub const TYPST_ENV: &str = "SLOPEWISE_TYPST";

/// The first line of `typst --version` (e.g. "typst 0.15.1 (…)"), for provenance;
/// `None` when no typst runs (the PDF step then says why). Under the same time
/// limit as the compile, so a typst that hangs cannot hang the run here either.
pub(super) fn version() -> Option<String> {
    let typst = std::env::var_os(TYPST_ENV).unwrap_or_else(|| "typst".into());
    let out = run_with_limit(
        std::process::Command::new(typst).arg("--version"),
        std::time::Duration::from_secs(time_limit()),
    )
    .ok()
    .filter(|o| o.status.success())?;
    let text = String::from_utf8_lossy(&out.stdout);
    let line = text.lines().next()?.trim();
    (!line.is_empty()).then(|| line.to_string())
}

/// SHA-256 of every font handed to typst (the figures use the regular face too),
/// by the file name it gets.
pub(super) fn font_hashes() -> std::collections::BTreeMap<String, String> {
    crate::report::fonts::ALL
        .iter()
        .map(|f| (f.file.to_string(), crate::report::fonts::sha256(*f)))
        .collect()
}

/// SHA-256 of the Typst template the PDF is compiled from, by its file name.
pub(super) fn template_hashes() -> std::collections::BTreeMap<String, String> {
    [(
        "report.typ".to_string(),
        crate::digest::sha256_hex(crate::report::pdf::TEMPLATE.as_bytes()),
    )]
    .into()
}

/// Environment variable giving typst's time limit in seconds (default 300).
pub const TYPST_TIMEOUT_ENV: &str = "SLOPEWISE_TYPST_TIMEOUT";

const DEFAULT_TIMEOUT_SECS: u64 = 300;

/// Compiles `report.typ` in the staging folder into `report.pdf` with the external
/// `typst`: project root fixed to the folder, system fonts ignored, and a fixed
/// creation date (SOURCE_DATE_EPOCH if set, else 0), so reruns give the same bytes.
pub(super) fn compile_pdf(staging: &Path) -> Result<(), Diagnostic> {
    let typst = std::env::var_os(TYPST_ENV).unwrap_or_else(|| "typst".into());
    let fonts = staging.join(".fonts");
    let cleanup = || {
        let _ = std::fs::remove_dir_all(staging.join(".fonts"));
        let _ = std::fs::remove_file(staging.join("report.pdf.partial"));
    };
    // The fonts the PDF and the figures use (regular, bold, oblique), handed to
    // typst so no system font is needed and bold is truly bold.
    std::fs::create_dir_all(&fonts)
        .and_then(|()| {
            crate::report::fonts::ALL
                .iter()
                .try_for_each(|f| std::fs::write(fonts.join(f.file), f.bytes))
        })
        .map_err(|e| Diagnostic::new(format!("cannot prepare the PDF fonts: {e}")))?;
    let epoch = std::env::var("SOURCE_DATE_EPOCH")
        .ok()
        .filter(|v| v.parse::<u64>().is_ok())
        .unwrap_or_else(|| "0".into());
    let limit = time_limit();
    let output = run_with_limit(
        std::process::Command::new(&typst)
            .current_dir(staging)
            .args([
                "compile",
                "--root",
                ".",
                "--ignore-system-fonts",
                "--font-path",
                ".fonts",
            ])
            .args(["--creation-timestamp", &epoch, "report.typ", "report.pdf"]),
        std::time::Duration::from_secs(limit),
    );
    cleanup();
    let shown = Path::new(&typst).display().to_string();
    match output {
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => Err(Diagnostic::new(format!(
            "the PDF was not written: the `typst` program was not found ({shown}); report.md and results.json were written"
        ))
        .help(format!("install it with `cargo install typst-cli --version {TYPST_VERSION} --locked`"))
        .help(format!("or set {TYPST_ENV} to the path of a typst binary"))),
        Err(e) if e.kind() == std::io::ErrorKind::TimedOut => {
            let _ = std::fs::remove_file(staging.join("report.pdf"));
            Err(Diagnostic::new(format!(
                "the PDF was not written: {shown} did not finish within {limit} s and was stopped; the other outputs were written"
            ))
            .help(format!("set {TYPST_TIMEOUT_ENV} to allow longer, or check `{shown} --version`")))
        }
        Err(e) => Err(Diagnostic::new(format!("the PDF was not written: cannot run {shown}: {e}"))),
        Ok(out) if !out.status.success() => Err(Diagnostic::new(format!(
            "the PDF was not written: typst failed ({}); the other outputs were written. typst said:\n{}",
            out.status,
            String::from_utf8_lossy(&out.stderr).trim_end()
        ))
        .help(format!("slopewise is tested with typst {TYPST_VERSION}; check `{shown} --version`"))),
        Ok(_) => match check_pdf(&staging.join("report.pdf")) {
            Ok(()) => Ok(()),
            Err(what) => {
                let _ = std::fs::remove_file(staging.join("report.pdf"));
                Err(Diagnostic::new(format!(
                    "the PDF was not written: {shown} reported success, but {what}; the other outputs were written"
                ))
                .help(format!("slopewise is tested with typst {TYPST_VERSION}; check `{shown} --version`")))
            }
        },
    }
}

/// typst's time limit in seconds: `SLOPEWISE_TYPST_TIMEOUT`, else the default.
fn time_limit() -> u64 {
    std::env::var(TYPST_TIMEOUT_ENV)
        .ok()
        .and_then(|v| v.parse::<u64>().ok())
        .unwrap_or(DEFAULT_TIMEOUT_SECS)
}

/// The child's status, stdout and stderr, or `TimedOut` after killing it at
/// `limit`. Its output goes to unnamed temporary files, so a chatty child cannot
/// fill a pipe and stall while we wait.
fn run_with_limit(
    cmd: &mut std::process::Command,
    limit: std::time::Duration,
) -> std::io::Result<std::process::Output> {
    use std::io::{Read, Seek};
    use wait_timeout::ChildExt;
    let mut err = tempfile::tempfile()?;
    let mut out = tempfile::tempfile()?;
    let mut child = cmd
        .stdin(std::process::Stdio::null())
        .stdout(out.try_clone()?)
        .stderr(err.try_clone()?)
        .spawn()?;
    let Some(status) = child.wait_timeout(limit)? else {
        let _ = child.kill();
        let _ = child.wait();
        return Err(std::io::Error::new(
            std::io::ErrorKind::TimedOut,
            "typst timed out",
        ));
    };
    let (mut stdout, mut stderr) = (Vec::new(), Vec::new());
    out.rewind()?;
    out.read_to_end(&mut stdout)?;
    err.rewind()?;
    err.read_to_end(&mut stderr)?;
    Ok(std::process::Output {
        status,
        stdout,
        stderr,
    })
}

/// A complete PDF starts with `%PDF-` and ends with `%%EOF` (ISO 32000-1, 7.5.2
/// and 7.5.5), give or take trailing line ends.
fn check_pdf(path: &Path) -> Result<(), String> {
    let bytes = std::fs::read(path).map_err(|_| "no report.pdf appeared".to_string())?;
    if !bytes.starts_with(b"%PDF-") {
        return Err("report.pdf does not start as a PDF does".into());
    }
    let tail = &bytes[bytes.len().saturating_sub(1024)..];
    let trimmed = tail
        .iter()
        .rposition(|b| !b.is_ascii_whitespace())
        .map_or(&tail[..0], |end| &tail[..=end]);
    if !trimmed.ends_with(b"%%EOF") {
        return Err("report.pdf is cut short (it lacks the closing %%EOF)".into());
    }
    Ok(())
}
