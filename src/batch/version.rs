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
    let mut hasher = Sha256::new();
    for part in parts {
        hasher.update(part);
    }
    let hex: String = hasher
        .finalize()
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect();
    format!("sha256:{hex}")
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
