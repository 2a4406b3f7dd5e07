//! What every report states besides its results: the cautions of use and
//! where it came from (lamella's version, the time it was made). The library
//! reads neither the clock nor the command line: callers pass the time in.

/// The cautions every report carries, one sentence group each. The README's
/// "Cautions" section holds the same text (a test keeps the two equal).
pub const CAUTIONS: [&str; 4] = [
    "Computed colour is a prediction. Screen colours (swatches, hex codes, charts, renders) are approximations limited by the display and its gamut; colour sign-off needs a measured sample under the same light and geometry.",
    "Optical constants in the built-in library are typical values from the cited literature (a few, marked so, recalled from memory); deposited films vary with process. Measure your own materials (for example by ellipsometry) before relying on a design.",
    "Cosmetic and packaging materials follow local regulation (ingredient lists, food-contact and migration rules); lamella says nothing about whether a material is permitted for a use.",
    "Oxide powders, effect pigments and nanoparticles are handled under their safety data sheets (dust, inhalation); follow licensed practice and your site's safety rules.",
];

/// lamella's version (from the package manifest).
pub const VERSION: &str = env!("CARGO_PKG_VERSION");

/// The UTC time `unix_seconds` after 1970-01-01T00:00:00Z in ISO 8601 form,
/// `YYYY-MM-DDThh:mm:ssZ` (years 0–9999). The civil date follows
/// H. Hinnant's `civil_from_days` ("chrono-Compatible Low-Level Date
/// Algorithms", 2013): days are counted in 400-year eras of 146097 days from
/// 0000-03-01, so that leap days fall at the end of each counted year.
pub fn utc_timestamp(unix_seconds: i64) -> String {
    let days = unix_seconds.div_euclid(86_400);
    let secs = unix_seconds.rem_euclid(86_400);
    let z = days + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z.rem_euclid(146_097);
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let day = doy - (153 * mp + 2) / 5 + 1;
    let month = if mp < 10 { mp + 3 } else { mp - 9 };
    let year = yoe + era * 400 + i64::from(month <= 2);
    format!(
        "{year:04}-{month:02}-{day:02}T{:02}:{:02}:{:02}Z",
        secs / 3600,
        secs % 3600 / 60,
        secs % 60
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Instants checked against GNU coreutils `date -u -d @SECONDS`.
    #[test]
    fn timestamps_match_the_civil_calendar() {
        for (secs, want) in [
            (0, "1970-01-01T00:00:00Z"),
            (-1, "1969-12-31T23:59:59Z"),
            (951_782_400, "2000-02-29T00:00:00Z"),
            (1_709_251_199, "2024-02-29T23:59:59Z"),
            (253_402_300_799, "9999-12-31T23:59:59Z"),
        ] {
            assert_eq!(utc_timestamp(secs), want, "{secs}");
        }
    }

    /// Every day from 1900 to 2100 follows the previous one.
    #[test]
    fn consecutive_days_are_consecutive_dates() {
        let date = |d: i64| utc_timestamp(d * 86_400)[..10].to_string();
        let month_days = |y: i64, m: i64| match m {
            2 if (y % 4 == 0 && y % 100 != 0) || y % 400 == 0 => 29,
            2 => 28,
            4 | 6 | 9 | 11 => 30,
            _ => 31,
        };
        let mut prev = date(-25_567);
        assert_eq!(prev, "1900-01-01");
        for d in -25_566..=47_482 {
            let next = date(d);
            let p: Vec<i64> = prev.split('-').map(|x| x.parse().unwrap()).collect();
            let (y, m, day) = (p[0], p[1], p[2]);
            let want = if day < month_days(y, m) {
                (y, m, day + 1)
            } else if m < 12 {
                (y, m + 1, 1)
            } else {
                (y + 1, 1, 1)
            };
            assert_eq!(next, format!("{:04}-{:02}-{:02}", want.0, want.1, want.2));
            prev = next;
        }
        assert_eq!(prev, "2100-01-01");
    }
}
