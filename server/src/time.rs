//! Wall-clock timestamps for records, as RFC 3339 UTC text (`2026-12-01T09:30:00.123Z`).

use std::time::{Duration, SystemTime, UNIX_EPOCH};

/// Now, as RFC 3339 UTC with milliseconds.
pub fn now_rfc3339() -> String {
    humantime::format_rfc3339_millis(SystemTime::now()).to_string()
}

/// Today's date in UTC, `YYYY-MM-DD` (for provenance lines).
pub fn today() -> String {
    let mut s = humantime::format_rfc3339_seconds(SystemTime::now()).to_string();
    s.truncate(10);
    s
}

/// Formats milliseconds since the Unix epoch as RFC 3339 UTC (instants before 1970 are not
/// records this program makes, and come out as the epoch).
pub fn format_unix_millis(ms: i64) -> String {
    let t = UNIX_EPOCH + Duration::from_millis(u64::try_from(ms).unwrap_or(0));
    humantime::format_rfc3339_millis(t).to_string()
}

#[cfg(test)]
mod tests {
    use super::format_unix_millis;

    #[test]
    fn known_instants() {
        // `date -u -d @0`, `date -u -d @951782400` (2000-02-29) and `date -u -d @1798761599`.
        assert_eq!(format_unix_millis(0), "1970-01-01T00:00:00.000Z");
        assert_eq!(
            format_unix_millis(951_782_400_123),
            "2000-02-29T00:00:00.123Z"
        );
        assert_eq!(
            format_unix_millis(1_798_761_599_000),
            "2026-12-31T23:59:59.000Z"
        );
    }

    #[test]
    fn today_is_a_date() {
        let t = super::today();
        assert_eq!(t.len(), 10);
        assert_eq!(&super::now_rfc3339()[..10], t);
    }
}
