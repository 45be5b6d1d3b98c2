//! SHA-256 of the inputs, for provenance and pinned data.

use sha2::{Digest, Sha256};
use std::io::Read;

/// Lower-case hex SHA-256 of `bytes`.
pub fn sha256_hex(bytes: &[u8]) -> String {
    hex(&Sha256::digest(bytes))
}

fn hex(bytes: &[u8]) -> String {
    bytes.iter().map(|b| format!("{b:02x}")).collect()
}

/// A reader that hashes every byte that passes through it, so the data file is
/// hashed in the same pass that parses it.
pub struct HashingReader<R> {
    inner: R,
    hasher: Sha256,
}

impl<R: Read> HashingReader<R> {
    /// Wraps `inner`.
    pub fn new(inner: R) -> Self {
        HashingReader {
            inner,
            hasher: Sha256::new(),
        }
    }

    /// Reads whatever is left, then returns the hex digest of everything read.
    pub fn finish(mut self) -> std::io::Result<String> {
        let mut buf = vec![0u8; 1 << 16];
        loop {
            let n = self.inner.read(&mut buf)?;
            if n == 0 {
                break;
            }
            self.hasher.update(&buf[..n]);
        }
        Ok(hex(&self.hasher.finalize()))
    }
}

impl<R: Read> Read for HashingReader<R> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        let n = self.inner.read(buf)?;
        self.hasher.update(&buf[..n]);
        Ok(n)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn known_digest() {
        // SHA-256 of "abc", FIPS 180-2 appendix B.1.
        assert_eq!(
            sha256_hex(b"abc"),
            "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
        );
        let mut r = HashingReader::new(&b"abc"[..]);
        let mut first = [0u8; 1];
        r.read_exact(&mut first).unwrap();
        assert_eq!(r.finish().unwrap(), sha256_hex(b"abc"));
    }
}
