//! `slopewise init`: a commented draft plan from a data file's header.

use std::fs::File;
use std::path::Path;

use super::files::{relative_to, write_new_file};
use super::say;
use crate::diagnostic::Diagnostic;

/// `slopewise init`: a commented draft plan from the data's header.
pub(super) fn init(data: &Path, out: Option<&Path>) -> Result<(), Diagnostic> {
    let shown = data.display().to_string();
    let mut sample = Vec::new();
    File::open(data)
        .and_then(|f| std::io::Read::read_to_end(&mut std::io::Read::take(f, 4 << 20), &mut sample))
        .map_err(|e| Diagnostic::new(format!("cannot read the data file {shown}: {e}")))?;
    let in_plan = match out {
        Some(plan) => relative_to(plan.parent().unwrap_or(Path::new(".")), data),
        None => shown.clone(),
    };
    let text = crate::draft::draft_plan(&shown, &in_plan, &sample)
        .map_err(|e| Diagnostic::new(e.to_string()).in_file(shown.clone()))?;
    match out {
        Some(path) => {
            write_new_file(path, text.as_bytes())?;
            say(&format!(
                "wrote {}; review it, then `slopewise check {}`\n",
                path.display(),
                path.display()
            ));
        }
        None => say(&text),
    }
    Ok(())
}
