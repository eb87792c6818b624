//! Local days and wall-clock times in the scenario's time zone: one definition of
//! "local midnight", "local noon" and "05:00 local" for every part of the tool, right on
//! clock-change days.

use chrono::{DateTime, Duration, NaiveDate, NaiveTime, TimeZone, Utc};
use chrono_tz::Tz;

/// The instant the wall clock in `tz` shows `hour`:00 on `day` (`hour` 24 is the next
/// day's midnight). Where the clock skips that time (spring forward), the first instant
/// after the gap; where it shows it twice (fall back), the first of the two.
#[must_use]
pub fn local_time(tz: Tz, day: NaiveDate, hour: u32) -> DateTime<Utc> {
    let (day, hour) = if hour >= 24 {
        (day.succ_opt().unwrap_or(day), hour - 24)
    } else {
        (day, hour)
    };
    let naive = day.and_time(NaiveTime::from_hms_opt(hour.min(23), 0, 0).unwrap_or_default());
    // A gap is never longer than a few hours: step forward by quarter hours until the
    // wall clock exists again.
    (0..=16)
        .map(|k| naive + Duration::minutes(15 * k))
        .find_map(|n| tz.from_local_datetime(&n).earliest())
        .map_or_else(|| naive.and_utc(), |t| t.with_timezone(&Utc))
}

/// Local midnight starting `day`, as UTC.
#[must_use]
pub fn local_midnight(tz: Tz, day: NaiveDate) -> DateTime<Utc> {
    local_time(tz, day, 0)
}

/// Local noon of `day`, as UTC: the moment the day's values are read at (event phase,
/// days since an event).
#[must_use]
pub fn local_noon(tz: Tz, day: NaiveDate) -> DateTime<Utc> {
    local_time(tz, day, 12)
}

/// The local date of an instant.
#[must_use]
pub fn local_day(tz: Tz, t: DateTime<Utc>) -> NaiveDate {
    t.with_timezone(&tz).date_naive()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn utc(s: &str) -> DateTime<Utc> {
        DateTime::parse_from_rfc3339(s).expect("valid").to_utc()
    }

    /// Clock changes of 2027 (IANA tz database rules: US second Sunday of March and
    /// first Sunday of November at 02:00; EU last Sunday of March at 01:00 UTC).
    #[test]
    fn wall_clock_hours_on_clock_change_days() {
        let la: Tz = "America/Los_Angeles".parse().expect("zone");
        let lisbon: Tz = "Europe/Lisbon".parse().expect("zone");
        let d = |s: &str| s.parse::<NaiveDate>().expect("date");
        // 14 March 2027: PST until 02:00, PDT after; 05:00 PDT is 12:00 UTC.
        assert_eq!(
            local_time(la, d("2027-03-14"), 5),
            utc("2027-03-14T12:00:00Z")
        );
        assert_eq!(
            local_time(la, d("2027-03-14"), 21),
            utc("2027-03-15T04:00:00Z")
        );
        assert_eq!(
            local_time(la, d("2027-03-14"), 2),
            utc("2027-03-14T10:00:00Z")
        );
        // 7 November 2027: PDT until 02:00, PST after; 05:00 PST is 13:00 UTC.
        assert_eq!(
            local_time(la, d("2027-11-07"), 5),
            utc("2027-11-07T13:00:00Z")
        );
        assert_eq!(
            local_midnight(la, d("2027-11-07")),
            utc("2027-11-07T07:00:00Z")
        );
        assert_eq!(local_noon(la, d("2027-11-07")), utc("2027-11-07T20:00:00Z"));
        // 28 March 2027 in Lisbon: WET until 01:00, WEST after.
        assert_eq!(
            local_time(lisbon, d("2027-03-28"), 5),
            utc("2027-03-28T04:00:00Z")
        );
        assert_eq!(
            local_time(lisbon, d("2027-03-28"), 24),
            utc("2027-03-28T23:00:00Z")
        );
    }
}
