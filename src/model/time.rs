//! Times as gelu writes and reads them: RFC 3339 UTC text with milliseconds (so
//! text order is time order, in the log and in exports), and the dates people type
//! for a range (`2026-12-01`). The one reader and writer of times; no clock here
//! (see [`crate::clock`]).

use std::fmt;

use chrono::{DateTime, NaiveDate, NaiveTime, SecondsFormat, Utc};
use serde::Deserializer;
use serde::de::{self, Visitor};

/// `t` truncated to the millisecond that records keep.
pub fn to_millis(t: DateTime<Utc>) -> DateTime<Utc> {
    DateTime::from_timestamp_millis(t.timestamp_millis()).unwrap_or(t)
}

/// A time as stored: `2026-12-01T23:10:00.000Z`.
pub fn time_text(t: &DateTime<Utc>) -> String {
    t.to_rfc3339_opts(SecondsFormat::Millis, true)
}

/// A time as the text forms show it: `2026-12-01 23:10 UTC`.
pub fn minute_text(t: &DateTime<Utc>) -> String {
    t.format("%Y-%m-%d %H:%M UTC").to_string()
}

/// Writes a time as stored, for serde's `serialize_with`.
pub fn serialize_time<S: serde::Serializer>(
    t: &DateTime<Utc>,
    s: S,
) -> std::result::Result<S::Ok, S::Error> {
    s.serialize_str(&time_text(t))
}

/// Parses an RFC 3339 time (any offset) into UTC.
pub fn parse_time(text: &str) -> Result<DateTime<Utc>, String> {
    DateTime::parse_from_rfc3339(text)
        .map(|t| t.with_timezone(&Utc))
        .map_err(|e| format!("`{text}` is not an RFC 3339 time such as 2026-12-01T23:10:00Z ({e})"))
}

/// Which end of a day a bare date stands for in a range.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DayEnd {
    /// The day's first instant (for "since").
    Start,
    /// The next day's first instant (for "until": the whole day is included).
    End,
}

/// Reads a range bound as people type it: a date `YYYY-MM-DD` (UTC), or an RFC
/// 3339 time. A bare date stands for the start of the day, or with
/// [`DayEnd::End`] the start of the next, so `--until 2026-12-01` includes that day.
pub fn parse_date_bound(text: &str, end: DayEnd) -> Result<DateTime<Utc>, String> {
    let t = text.trim();
    if let Ok(day) = NaiveDate::parse_from_str(t, "%Y-%m-%d") {
        let day = match end {
            DayEnd::Start => day,
            DayEnd::End => day.succ_opt().unwrap_or(day),
        };
        return Ok(day.and_time(NaiveTime::MIN).and_utc());
    }
    parse_time(t).map_err(|_| format!("`{t}` is not a date; use YYYY-MM-DD or an RFC 3339 time"))
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
pub fn deserialize_text<'de, D: Deserializer<'de>, T>(
    d: D,
    expecting: &'static str,
    read: impl FnOnce(&str) -> std::result::Result<T, String>,
) -> std::result::Result<T, D::Error> {
    d.deserialize_str(Text(expecting, read))
}

/// Reads an RFC 3339 time from JSON (for serde's `deserialize_with`).
pub fn deserialize_time<'de, D: Deserializer<'de>>(
    d: D,
) -> std::result::Result<DateTime<Utc>, D::Error> {
    deserialize_text(d, "an RFC 3339 time as a string", parse_time)
}

/// Reads an optional RFC 3339 time (`null` or absent is none).
pub fn deserialize_optional_time<'de, D: Deserializer<'de>>(
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
    fn date_bounds_cover_whole_days() {
        let since = parse_date_bound("2026-12-01", DayEnd::Start).unwrap();
        let until = parse_date_bound("2026-12-01", DayEnd::End).unwrap();
        assert_eq!(time_text(&since), "2026-12-01T00:00:00.000Z");
        assert_eq!(time_text(&until), "2026-12-02T00:00:00.000Z");
        let exact = parse_date_bound("2026-12-01T10:00:00+01:00", DayEnd::End).unwrap();
        assert_eq!(time_text(&exact), "2026-12-01T09:00:00.000Z");
        assert!(parse_date_bound("yesterday", DayEnd::Start).is_err());
        assert!(parse_date_bound("2026-13-01", DayEnd::Start).is_err());
    }
}
