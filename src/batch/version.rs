//! A recipe version's identity: the SHA-256 of its exact text, so that the same
//! version is recognised wherever it was saved (and the one SHA-256 writer, which
//! [`super::seal`] uses too).

use sha2::{Digest, Sha256};

/// `sha256:` followed by the hex SHA-256 of `text`.
pub fn content_hash(text: &str) -> String {
    sha256_of(&[text.as_bytes()])
}

/// `sha256:` followed by the hex SHA-256 of `parts`, one after the other.
pub fn sha256_of(parts: &[&[u8]]) -> String {
    let mut hasher = Hasher::default();
    for part in parts {
        hasher.0.update(part);
    }
    hasher.finish()
}

/// A SHA-256 that text is written into (as into a file), so that a long text need
/// not be built in memory first.
#[derive(Default)]
pub struct Hasher(Sha256);

impl Hasher {
    /// `sha256:` followed by the hex SHA-256 of everything written.
    pub fn finish(self) -> String {
        hex("sha256:", &self.0.finalize())
    }
}

impl std::io::Write for Hasher {
    fn write(&mut self, buf: &[u8]) -> std::io::Result<usize> {
        self.0.update(buf);
        Ok(buf.len())
    }

    fn flush(&mut self) -> std::io::Result<()> {
        Ok(())
    }
}

/// `prefix` followed by `bytes` in lower-case hex.
fn hex(prefix: &str, bytes: &[u8]) -> String {
    const DIGITS: &[u8; 16] = b"0123456789abcdef";
    let mut out = String::with_capacity(prefix.len() + 2 * bytes.len());
    out.push_str(prefix);
    for b in bytes {
        out.push(char::from(DIGITS[usize::from(b >> 4)]));
        out.push(char::from(DIGITS[usize::from(b & 15)]));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::content_hash;

    #[test]
    fn hash_is_sha256() {
        // SHA-256 of the empty string and of "abc" (FIPS 180-2 test vectors).
        assert_eq!(
            content_hash(""),
            "sha256:e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855"
        );
        assert_eq!(
            content_hash("abc"),
            "sha256:ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
        );
    }
}
