//! How values are written into the database: times as RFC 3339 UTC text with
//! milliseconds (so text order is time order) and recipe texts' content hashes.

use std::fmt;

use chrono::{DateTime, SecondsFormat, Utc};
use serde::Deserializer;
use serde::de::{self, Visitor};
use sha2::{Digest, Sha256};

use super::error::{Result, StoreError};

/// The current time, truncated to the millisecond the database keeps.
pub fn now() -> DateTime<Utc> {
    let t = Utc::now();
    DateTime::from_timestamp_millis(t.timestamp_millis()).unwrap_or(t)
}

/// A time as stored: `2026-12-01T23:10:00.000Z`.
pub fn time_text(t: &DateTime<Utc>) -> String {
    t.to_rfc3339_opts(SecondsFormat::Millis, true)
}

/// Parses an RFC 3339 time (any offset) into UTC.
pub fn parse_time(text: &str) -> Result<DateTime<Utc>> {
    read_time(text).map_err(StoreError::Invalid)
}

fn read_time(text: &str) -> std::result::Result<DateTime<Utc>, String> {
    DateTime::parse_from_rfc3339(text)
        .map(|t| t.with_timezone(&Utc))
        .map_err(|e| format!("`{text}` is not an RFC 3339 time such as 2026-12-01T23:10:00Z ({e})"))
}

/// A serde visitor for a JSON string that is converted as it is read, borrowed or
/// not, without keeping a copy.
struct Text<F>(&'static str, F);

impl<T, F: FnOnce(&str) -> std::result::Result<T, String>> Visitor<'_> for Text<F> {
    type Value = T;

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str(self.0)
    }

    fn visit_str<E: de::Error>(self, v: &str) -> std::result::Result<T, E> {
        (self.1)(v).map_err(E::custom)
    }
}

/// Reads a JSON string through `read`; `expecting` says what a wrong type should have been.
pub(crate) fn deserialize_text<'de, D: Deserializer<'de>, T>(
    d: D,
    expecting: &'static str,
    read: impl FnOnce(&str) -> std::result::Result<T, String>,
) -> std::result::Result<T, D::Error> {
    d.deserialize_str(Text(expecting, read))
}

/// Reads an RFC 3339 time from JSON (for serde's `deserialize_with`).
pub(crate) fn deserialize_time<'de, D: Deserializer<'de>>(
    d: D,
) -> std::result::Result<DateTime<Utc>, D::Error> {
    deserialize_text(d, "an RFC 3339 time as a string", read_time)
}

/// Reads an optional RFC 3339 time (`null` or absent is none).
pub(crate) fn deserialize_optional_time<'de, D: Deserializer<'de>>(
    d: D,
) -> std::result::Result<Option<DateTime<Utc>>, D::Error> {
    struct Optional;
    impl<'de> Visitor<'de> for Optional {
        type Value = Option<DateTime<Utc>>;
        fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
            f.write_str("an RFC 3339 time as a string, or null")
        }
        fn visit_none<E: de::Error>(self) -> std::result::Result<Self::Value, E> {
            Ok(None)
        }
        fn visit_some<D: Deserializer<'de>>(
            self,
            d: D,
        ) -> std::result::Result<Self::Value, D::Error> {
            deserialize_time(d).map(Some)
        }
    }
    d.deserialize_option(Optional)
}

/// `sha256:` followed by the hex SHA-256 of `text`.
pub fn content_hash(text: &str) -> String {
    let digest = Sha256::digest(text.as_bytes());
    let hex: String = digest.iter().map(|b| format!("{b:02x}")).collect();
    format!("sha256:{hex}")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn times_round_trip_and_sort_as_text() {
        let a = parse_time("2026-12-01T23:10:00.5+01:00").unwrap();
        assert_eq!(time_text(&a), "2026-12-01T22:10:00.500Z");
        let b = parse_time("2026-12-01T22:10:01Z").unwrap();
        assert!(time_text(&a) < time_text(&b));
        assert!(parse_time("yesterday").is_err());
    }

    #[test]
    fn hash_is_sha256() {
        // SHA-256 of the empty string (FIPS 180-2 test vector).
        assert_eq!(
            content_hash(""),
            "sha256:e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855"
        );
    }
}
