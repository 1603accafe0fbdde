//! Wall-clock timestamps for records, as RFC 3339 UTC text (`2026-12-01T09:30:00.123Z`).

use std::time::SystemTime;

/// Now, as RFC 3339 UTC with milliseconds.
pub fn now_rfc3339() -> String {
    rfc3339_millis(SystemTime::now())
}

fn rfc3339_millis(t: SystemTime) -> String {
    humantime::format_rfc3339_millis(t).to_string()
}

/// Today's date in UTC, `YYYY-MM-DD` (for provenance lines).
pub fn today() -> String {
    let mut s = humantime::format_rfc3339_seconds(SystemTime::now()).to_string();
    s.truncate(10);
    s
}

#[cfg(test)]
mod tests {
    use super::rfc3339_millis;
    use std::time::{Duration, UNIX_EPOCH};

    fn format_unix_millis(ms: u64) -> String {
        rfc3339_millis(UNIX_EPOCH + Duration::from_millis(ms))
    }

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
