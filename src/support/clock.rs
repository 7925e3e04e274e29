//! Wall-clock times as people read them: seconds since 1970 written as a UTC date and time
//! (the lock file's holder, the time of a review decision). No time zones, no parsing.

/// The current time in seconds since 1970-01-01 UTC (0 if the clock is before 1970).
pub fn now_secs() -> u64 {
    std::time::SystemTime::now().duration_since(std::time::UNIX_EPOCH).map_or(0, |d| d.as_secs())
}

/// Seconds since 1970 as `YYYY-MM-DD HH:MM:SS UTC`, by the days-to-civil algorithm of
/// H. Hinnant, "chrono-Compatible Low-Level Date Algorithms" (2013).
///
/// ```
/// assert_eq!(orthoepy::support::clock::utc(951_782_400), "2000-02-29 00:00:00 UTC");
/// ```
pub fn utc(secs: u64) -> String {
    let days = secs / 86_400;
    let rest = secs % 86_400;
    // Shift the epoch to 0000-03-01 so leap days fall at the end of a year.
    let z = days + 719_468;
    let era = z / 146_097;
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1_460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let day = doy - (153 * mp + 2) / 5 + 1;
    let month = if mp < 10 { mp + 3 } else { mp - 9 };
    let year = yoe + era * 400 + u64::from(month <= 2);
    format!("{year:04}-{month:02}-{day:02} {:02}:{:02}:{:02} UTC", rest / 3_600, rest % 3_600 / 60, rest % 60)
}
