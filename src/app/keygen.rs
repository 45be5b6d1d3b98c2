//! `slopewise keygen`: a new Ed25519 key pair for signing approvals.

use std::io::Write;
use std::path::{Path, PathBuf};

use ed25519_dalek::SigningKey;

use super::files::write_new_file;
use super::say;
use crate::audit::keys;
use crate::diagnostic::Diagnostic;

/// The public key's file: the private key's path with `.pub` added.
pub(super) fn public_path(private: &Path) -> PathBuf {
    let mut name = private.as_os_str().to_os_string();
    name.push(".pub");
    PathBuf::from(name)
}

/// Writes the private key to `out` (readable by its owner only) and the public key
/// beside it; refuses to overwrite either.
pub(super) fn keygen(out: &Path) -> Result<(), Diagnostic> {
    let public = public_path(out);
    for path in [out, public.as_path()] {
        if path.exists() {
            return Err(Diagnostic::new(format!("{} already exists", path.display()))
                .help("keygen never overwrites a key: an approval signed with the old one could no longer be tied to it")
                .help("choose another name with --out"));
        }
    }
    let mut seed = [0u8; 32];
    getrandom::fill(&mut seed).map_err(|e| {
        Diagnostic::new(format!(
            "cannot read random bytes from the operating system: {e}"
        ))
    })?;
    let key = SigningKey::from_bytes(&seed);
    write_private(out, keys::private_key_text(&key).as_bytes())?;
    if let Err(e) = write_new_file(
        &public,
        keys::public_key_text(&key.verifying_key()).as_bytes(),
    ) {
        // Both files or neither.
        let _ = std::fs::remove_file(out);
        return Err(e);
    }
    say(&format!(
        "wrote the private key {} (keep it secret) and the public key {}\n\
         sign with: slopewise approve RUN --by NAME --role ROLE --key {}\n",
        out.display(),
        public.display(),
        out.display()
    ));
    Ok(())
}

/// Creates the file new, mode 0600 on Unix, so the secret is never readable by
/// others, not even for a moment.
fn write_private(path: &Path, bytes: &[u8]) -> Result<(), Diagnostic> {
    let mut options = std::fs::OpenOptions::new();
    options.write(true).create_new(true);
    #[cfg(unix)]
    {
        use std::os::unix::fs::OpenOptionsExt;
        options.mode(0o600);
    }
    let result = options
        .open(path)
        .and_then(|mut f| f.write_all(bytes).and_then(|()| f.sync_all()));
    result.map_err(|e| {
        if e.kind() != std::io::ErrorKind::AlreadyExists {
            let _ = std::fs::remove_file(path);
        }
        Diagnostic::new(format!(
            "cannot write the private key {}: {e}",
            path.display()
        ))
    })
}
