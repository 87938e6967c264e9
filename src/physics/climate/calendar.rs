//! Calendar arithmetic for daily series: day numbers (days since 1970-01-01, proleptic Gregorian),
//! ISO 8601 dates, days of the year, months of the 365-day design year, and the freezing seasons
//! (1 July – 30 June) of a series.
/// Days since 1970-01-01 of a proleptic Gregorian date (Hinnant's days-from-civil algorithm).
pub fn days_from_civil(y: i64, m: u32, d: u32) -> i64 {
    let y = if m <= 2 { y - 1 } else { y };
    let era = y.div_euclid(400);
    let yoe = y - era * 400;
    let mp = (m as i64 + 9) % 12;
    let doy = (153 * mp + 2) / 5 + d as i64 - 1;
    let doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
    era * 146_097 + doe - 719_468
}

/// (year, month, day) of a day number (inverse of [`days_from_civil`]).
pub fn civil_from_days(z: i64) -> (i64, u32, u32) {
    let z = z + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let y = yoe + era * 400;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = (doy - (153 * mp + 2) / 5 + 1) as u32;
    let m = if mp < 10 { mp + 3 } else { mp - 9 } as u32;
    (if m <= 2 { y + 1 } else { y }, m, d)
}

/// Format a day number as an ISO date.
pub fn iso_date(day: i64) -> String {
    let (y, m, d) = civil_from_days(day);
    format!("{y:04}-{m:02}-{d:02}")
}

/// Day of year (1–366) of a day number.
pub fn day_of_year(day: i64) -> u32 {
    let (y, _, _) = civil_from_days(day);
    (day - days_from_civil(y, 1, 1) + 1) as u32
}

/// Day number of an ISO 8601 date or date-time (`2031-01-17`, `2031-01-17T06:00`), or None.
pub fn parse_date(s: &str) -> Option<i64> {
    let s = s.trim();
    let date = s.split(['T', ' ']).next()?;
    let mut it = date.split('-');
    let y: i64 = it.next()?.parse().ok()?;
    let m: u32 = it.next()?.parse().ok()?;
    let d: u32 = it.next()?.parse().ok()?;
    if it.next().is_some() || !(1..=12).contains(&m) || d == 0 {
        return None;
    }
    let dim = [
        31,
        if (y % 4 == 0 && y % 100 != 0) || y % 400 == 0 {
            29
        } else {
            28
        },
        31,
        30,
        31,
        30,
        31,
        31,
        30,
        31,
        30,
        31,
    ];
    if d > dim[m as usize - 1] {
        return None;
    }
    // A time part, if any, must look like HH:MM[:SS].
    if let Some(t) = s.get(date.len() + 1..) {
        let ok = t.split(':').count() >= 2
            && t.split(':')
                .all(|p| p.trim_end_matches('Z').parse::<f64>().is_ok());
        if !ok {
            return None;
        }
    }
    Some(days_from_civil(y, m, d))
}

/// Day of year `doy` (1–365, a 365-day year) as day and month, e.g. 22 → "22 Jan".
pub fn day_month(doy: usize) -> String {
    const NAMES: [&str; 12] = [
        "Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec",
    ];
    const STARTS: [usize; 12] = [0, 31, 59, 90, 120, 151, 181, 212, 243, 273, 304, 334];
    let d = (doy.max(1) - 1) % 365;
    let m = STARTS.iter().rposition(|&s| s <= d).unwrap_or(0);
    format!("{} {}", d - STARTS[m] + 1, NAMES[m])
}

/// Day `doy` (1–365) of a 365-day year as an ISO 8601 date without a year, `--MM-DD` (the
/// recurring-date form of ISO 8601:2000 §5.2.1.3 d, as XML Schema's gMonthDay): the reported year
/// of a sinusoidal climate has no calendar year.
pub fn month_day(doy: usize) -> String {
    let d = (doy.max(1) - 1) % 365;
    let (_, m, day) = civil_from_days(days_from_civil(2001, 1, 1) + d as i64);
    format!("--{m:02}-{day:02}")
}

/// Month (0–11) of calendar day `d` (days since 1 January, 365-day year).
pub fn month_of(d: f64) -> usize {
    const ENDS: [f64; 12] = [
        31., 59., 90., 120., 151., 181., 212., 243., 273., 304., 334., 365.,
    ];
    let d = d.rem_euclid(365.0);
    ENDS.iter().position(|&e| d < e).unwrap_or(11)
}

/// The complete freezing seasons (1 July – 30 June) of a series that starts on day number
/// `first_day` and holds `len` days: (season named by the year it starts, index range of its days
/// in the series).
pub fn seasons(first_day: i64, len: usize) -> Vec<(i64, std::ops::Range<usize>)> {
    year_spans(first_day, len, 7, -1)
}

/// The complete calendar years of a series, as [`seasons`] (1 January – 31 December).
pub fn calendar_years(first_day: i64, len: usize) -> Vec<(i64, std::ops::Range<usize>)> {
    year_spans(first_day, len, 1, 0)
}

/// Complete twelve-month spans starting on the first of `month` in each year from the series'
/// first year plus `year_offset` on, that lie wholly inside the series.
fn year_spans(
    first_day: i64,
    len: usize,
    month: u32,
    year_offset: i64,
) -> Vec<(i64, std::ops::Range<usize>)> {
    if len == 0 {
        return Vec::new();
    }
    let (y0, _, _) = civil_from_days(first_day);
    let (y1, _, _) = civil_from_days(first_day + len as i64 - 1);
    (y0 + year_offset..=y1)
        .filter_map(|y| {
            let a = days_from_civil(y, month, 1) - first_day;
            let b = days_from_civil(y + 1, month, 1) - first_day;
            (a >= 0 && b as usize <= len).then_some((y, a as usize..b as usize))
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// ISO 8601 dates without a year, `--MM-DD`, in a common (365-day) Gregorian year.
    #[test]
    fn month_day_dates() {
        assert_eq!(month_day(1), "--01-01");
        assert_eq!(month_day(59), "--02-28");
        assert_eq!(month_day(60), "--03-01");
        assert_eq!(month_day(203), "--07-22");
        assert_eq!(month_day(365), "--12-31");
    }

    /// Day-of-year labels in a 365-day year (month lengths of the Gregorian calendar, common year).
    #[test]
    fn day_month_labels() {
        assert_eq!(day_month(1), "1 Jan");
        assert_eq!(day_month(31), "31 Jan");
        assert_eq!(day_month(32), "1 Feb");
        assert_eq!(day_month(59), "28 Feb");
        assert_eq!(day_month(60), "1 Mar");
        assert_eq!(day_month(203), "22 Jul");
        assert_eq!(day_month(365), "31 Dec");
    }

    #[test]
    fn calendar_round_trip() {
        assert_eq!(days_from_civil(1970, 1, 1), 0);
        assert_eq!(days_from_civil(2000, 3, 1), 11_017);
        for z in [-1000, 0, 59, 60, 11_016, 20_000, 40_000] {
            let (y, m, d) = civil_from_days(z);
            assert_eq!(days_from_civil(y, m, d), z);
        }
        assert_eq!(day_of_year(days_from_civil(2032, 12, 31)), 366);
        assert_eq!(parse_date("2031-02-29"), None);
        assert!(parse_date("2032-02-29T06:00").is_some());
        assert_eq!(parse_date("31/01/2031"), None);
    }

    #[test]
    fn months() {
        assert_eq!(month_of(0.0), 0);
        assert_eq!(month_of(30.9), 0);
        assert_eq!(month_of(31.0), 1);
        assert_eq!(month_of(364.5), 11);
        assert_eq!(month_of(365.2), 0);
    }

    #[test]
    fn seasons_run_july_to_june() {
        // 2031-01-01 to 2033-12-31: complete seasons 2031/32 and 2032/33 (366 days: leap 2032).
        let first = days_from_civil(2031, 1, 1);
        let len = (days_from_civil(2034, 1, 1) - first) as usize;
        let s = seasons(first, len);
        assert_eq!(s.iter().map(|x| x.0).collect::<Vec<_>>(), vec![2031, 2032]);
        assert_eq!(s[0].1.len(), 366);
        assert_eq!(s[1].1.len(), 365);
        assert_eq!(calendar_years(first, len).len(), 3);
    }
}
