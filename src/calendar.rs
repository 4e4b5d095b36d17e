//! Invented calendars for simulated panels: month ends, Fridays or business
//! days, written as ISO 8601 dates. Civil-date arithmetic after Hinnant's
//! `days_from_civil` / `civil_from_days` algorithms (public domain, 2013).

/// Days since 1970-01-01 of a proleptic Gregorian date.
pub fn days_from_civil(y: i64, m: u32, d: u32) -> i64 {
    let y = if m <= 2 { y - 1 } else { y };
    let era = y.div_euclid(400);
    let yoe = y - era * 400;
    let mp = (i64::from(m) + 9) % 12;
    let doy = (153 * mp + 2) / 5 + i64::from(d) - 1;
    let doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
    era * 146_097 + doe - 719_468
}

/// The date of a day count since 1970-01-01.
pub fn civil_from_days(z: i64) -> (i64, u32, u32) {
    let z = z + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = (doy - (153 * mp + 2) / 5 + 1) as u32;
    let m = if mp < 10 { mp + 3 } else { mp - 9 } as u32;
    (yoe + era * 400 + i64::from(m <= 2), m, d)
}

/// Days since 1970-01-01 as an ISO date, `YYYY-MM-DD`.
pub fn iso(days: i64) -> String {
    let (y, m, d) = civil_from_days(days);
    format!("{y:04}-{m:02}-{d:02}")
}

/// `n` dates at the frequency `periods_per_year` starting in January 2001:
/// month ends for 12, Fridays for 52, weekdays for 250–262, otherwise every
/// `365.25 / periods_per_year` days.
pub fn dates(n: usize, periods_per_year: f64) -> Vec<String> {
    let fmt = iso;
    let start = days_from_civil(2001, 1, 1);
    match periods_per_year {
        p if (p - 12.0).abs() < 0.01 => (0..n as i64)
            .map(|i| {
                let (y, m) = (2001 + (i + 1) / 12, ((i + 1) % 12) as u32 + 1);
                fmt(days_from_civil(y, m, 1) - 1)
            })
            .collect(),
        p if (p - 52.0).abs() < 1.0 => (0..n as i64).map(|i| fmt(start + 4 + 7 * i)).collect(), // 2001-01-05 is a Friday
        p if (250.0..=262.0).contains(&p) => {
            // 1970-01-01 was a Thursday: weekday = (z + 3) mod 7 with Monday = 0.
            (start..).filter(|z| (z + 3).rem_euclid(7) < 5).take(n).map(fmt).collect()
        }
        p => (0..n).map(|i| fmt(start + (i as f64 * 365.25 / p).round() as i64)).collect(),
    }
}

/// Periods a year for a median gap between dates: 12, 52 or 252 when the gap
/// is about a month, a week or a (business) day, else `365.25 / gap`.
pub fn periods_per_year(gap_days: f64) -> f64 {
    match gap_days {
        g if (27.0..=32.0).contains(&g) => 12.0,
        g if (6.0..=8.0).contains(&g) => 52.0,
        g if (0.5..=1.5).contains(&g) => 252.0,
        g => (365.25 / g.max(1.0)).round(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn round_trips_and_known_dates() {
        assert_eq!(days_from_civil(1970, 1, 1), 0);
        assert_eq!(days_from_civil(2000, 3, 1), 11_017);
        for z in [-1000, 0, 11_016, 20_000, 40_000] {
            let (y, m, d) = civil_from_days(z);
            assert_eq!(days_from_civil(y, m, d), z);
        }
        assert_eq!(dates(3, 12.0), ["2001-01-31", "2001-02-28", "2001-03-31"]);
        assert_eq!(dates(2, 52.0), ["2001-01-05", "2001-01-12"]);
        assert_eq!(
            dates(6, 252.0),
            ["2001-01-01", "2001-01-02", "2001-01-03", "2001-01-04", "2001-01-05", "2001-01-08"]
        );
    }
}
