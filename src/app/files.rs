//! Small file-system helpers shared by the commands.

use std::path::Path;

use crate::diagnostic::Diagnostic;

/// Writes a file whole (through a temporary name) and refuses to overwrite one.
pub(super) fn write_new_file(path: &Path, bytes: &[u8]) -> Result<(), Diagnostic> {
    if path.exists() {
        return Err(
            Diagnostic::new(format!("{} already exists", path.display()))
                .help("choose a new file name, or remove the old file first"),
        );
    }
    let dir = match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d,
        _ => Path::new("."),
    };
    let fail = |e: std::io::Error| Diagnostic::new(format!("cannot write {}: {e}", path.display()));
    let mut tmp = tempfile::Builder::new()
        .prefix(".slopewise-")
        .tempfile_in(dir)
        .map_err(fail)?;
    std::io::Write::write_all(&mut tmp, bytes)
        .and_then(|()| tmp.as_file().sync_all())
        .map_err(fail)?;
    // Refuses, as above, a file that appeared meanwhile; the temporary file is
    // removed when it is dropped on any error.
    tmp.persist_noclobber(path).map_err(|e| fail(e.error))?;
    Ok(())
}

/// Every file under `dir`, by relative path with `/` separators.
pub(super) fn read_tree(
    dir: &Path,
) -> Result<std::collections::BTreeMap<String, Vec<u8>>, Diagnostic> {
    fn walk(
        base: &Path,
        dir: &Path,
        out: &mut std::collections::BTreeMap<String, Vec<u8>>,
    ) -> std::io::Result<()> {
        for entry in std::fs::read_dir(dir)? {
            let path = entry?.path();
            if path.is_dir() {
                walk(base, &path, out)?;
            } else {
                let rel = path.strip_prefix(base).unwrap_or(&path);
                let key = rel
                    .components()
                    .map(|c| c.as_os_str().to_string_lossy())
                    .collect::<Vec<_>>()
                    .join("/");
                out.insert(key, std::fs::read(&path)?);
            }
        }
        Ok(())
    }
    let mut out = std::collections::BTreeMap::new();
    walk(dir, dir, &mut out)
        .map_err(|e| Diagnostic::new(format!("cannot read {}: {e}", dir.display())))?;
    Ok(out)
}

/// `to` relative to the folder `from` (neither needs to exist yet; both are made
/// absolute against the current folder). Falls back to the absolute path.
pub(super) fn relative_to(from: &Path, to: &Path) -> String {
    let absolute = |p: &Path| {
        let p = if p.is_absolute() {
            p.to_path_buf()
        } else {
            std::env::current_dir().unwrap_or_default().join(p)
        };
        // Resolve what exists (symlinks, ..) and keep the rest as written.
        let mut existing = p.clone();
        let mut rest = Vec::new();
        while !existing.exists() {
            match (
                existing.file_name().map(|n| n.to_os_string()),
                existing.parent(),
            ) {
                (Some(name), Some(parent)) => {
                    rest.push(name);
                    existing = parent.to_path_buf();
                }
                _ => break,
            }
        }
        let mut out = existing.canonicalize().unwrap_or(existing);
        for name in rest.into_iter().rev() {
            out.push(name);
        }
        out
    };
    let (from, to) = (absolute(from), absolute(to));
    let f: Vec<_> = from.components().collect();
    let t: Vec<_> = to.components().collect();
    let common = f.iter().zip(&t).take_while(|(a, b)| a == b).count();
    if common == 0 {
        return to.display().to_string();
    }
    let mut parts: Vec<String> = vec!["..".to_string(); f.len() - common];
    parts.extend(
        t[common..]
            .iter()
            .map(|c| c.as_os_str().to_string_lossy().into_owned()),
    );
    parts.join("/")
}
