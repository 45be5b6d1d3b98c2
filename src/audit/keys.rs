//! Ed25519 key files for signed approvals (Bernstein et al. 2012, "High-speed
//! high-security signatures"; RFC 8032), in a small text format of our own: comment
//! lines starting with `#`, then one line naming the kind and the key in hex.
//!
//! The private file holds the 32-byte secret seed; the public file the 32-byte
//! verifying key. The key bytes come from the edge (`slopewise keygen`); this module
//! only writes and reads the text.

use ed25519_dalek::{SigningKey, VerifyingKey};

const PRIVATE_TAG: &str = "ed25519-private-key";
const PUBLIC_TAG: &str = "ed25519-public-key";

/// Why a key file could not be used.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum KeyError {
    /// A public key was given where the private one is needed.
    #[error("it holds a public key; signing needs the private key file")]
    PublicGivenForPrivate,
    /// A private key was given where the public one is expected.
    #[error("it holds a private key; give the public key file (the one ending in .pub)")]
    PrivateGivenForPublic,
    /// No key line.
    #[error("it holds no `{0}` line; it is not a key file written by `slopewise keygen`")]
    NoKey(&'static str),
    /// The hex is not 32 bytes.
    #[error("its key is not 64 hexadecimal digits")]
    BadHex,
    /// The bytes are not a valid public key.
    #[error("its bytes are not a valid Ed25519 public key")]
    NotAPoint,
}

/// The private key file's text.
pub fn private_key_text(key: &SigningKey) -> String {
    format!(
        "# slopewise approval signing key (Ed25519, private). Keep it secret: whoever\n\
         # holds this file can sign approvals in your name. Never share or commit it.\n\
         {PRIVATE_TAG} {}\n",
        to_hex(&key.to_bytes())
    )
}

/// The public key file's text.
pub fn public_key_text(key: &VerifyingKey) -> String {
    format!(
        "# slopewise approval key (Ed25519, public). Give it to whoever checks your\n\
         # approvals: `slopewise verify RUN --trusted-key THIS_FILE`.\n\
         {PUBLIC_TAG} {}\n",
        to_hex(key.as_bytes())
    )
}

/// Reads a private key file's text.
pub fn parse_private(text: &str) -> Result<SigningKey, KeyError> {
    match key_line(text) {
        Some((PRIVATE_TAG, hex)) => Ok(SigningKey::from_bytes(&from_hex32(hex)?)),
        Some((PUBLIC_TAG, _)) => Err(KeyError::PublicGivenForPrivate),
        _ => Err(KeyError::NoKey(PRIVATE_TAG)),
    }
}

/// Reads a public key file's text.
pub fn parse_public(text: &str) -> Result<VerifyingKey, KeyError> {
    match key_line(text) {
        Some((PUBLIC_TAG, hex)) => public_from_hex(hex),
        Some((PRIVATE_TAG, _)) => Err(KeyError::PrivateGivenForPublic),
        _ => Err(KeyError::NoKey(PUBLIC_TAG)),
    }
}

/// A public key from its 64 hex digits, as approval records hold it.
pub fn public_from_hex(hex: &str) -> Result<VerifyingKey, KeyError> {
    VerifyingKey::from_bytes(&from_hex32(hex)?).map_err(|_| KeyError::NotAPoint)
}

fn key_line(text: &str) -> Option<(&str, &str)> {
    text.lines()
        .map(str::trim)
        .filter(|l| !l.is_empty() && !l.starts_with('#'))
        .find_map(|l| {
            let (tag, rest) = l.split_once(' ')?;
            [PRIVATE_TAG, PUBLIC_TAG]
                .contains(&tag)
                .then(|| (tag, rest.trim()))
        })
}

/// Lower-case hex of `bytes`.
pub fn to_hex(bytes: &[u8]) -> String {
    bytes.iter().map(|b| format!("{b:02x}")).collect()
}

/// Bytes from hex digits (either case); `None` when the text is not hex.
pub fn from_hex(hex: &str) -> Option<Vec<u8>> {
    if !hex.len().is_multiple_of(2) || !hex.bytes().all(|b| b.is_ascii_hexdigit()) {
        return None;
    }
    (0..hex.len())
        .step_by(2)
        .map(|i| u8::from_str_radix(&hex[i..i + 2], 16).ok())
        .collect()
}

fn from_hex32(hex: &str) -> Result<[u8; 32], KeyError> {
    from_hex(hex)
        .and_then(|v| <[u8; 32]>::try_from(v).ok())
        .ok_or(KeyError::BadHex)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn key_files_read_back_and_refuse_the_wrong_kind() {
        let key = SigningKey::from_bytes(&[7u8; 32]);
        let private = private_key_text(&key);
        let public = public_key_text(&key.verifying_key());
        assert_eq!(parse_private(&private).unwrap().to_bytes(), key.to_bytes());
        assert_eq!(parse_public(&public).unwrap(), key.verifying_key());
        assert_eq!(
            parse_private(&public).unwrap_err(),
            KeyError::PublicGivenForPrivate
        );
        assert_eq!(
            parse_public(&private).unwrap_err(),
            KeyError::PrivateGivenForPublic
        );
        assert_eq!(
            parse_private("hello\n").unwrap_err(),
            KeyError::NoKey(PRIVATE_TAG)
        );
        assert_eq!(
            parse_private(&format!("{PRIVATE_TAG} abcd\n")).unwrap_err(),
            KeyError::BadHex
        );
        assert_eq!(from_hex("0aFf"), Some(vec![10, 255]));
        assert_eq!(from_hex("0g"), None);
    }
}
