//! Where a report came from: the date, the version and the command line that
//! made it, printed under every report's title.

/// The provenance line's parts.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Made {
    /// UTC date, `YYYY-MM-DD`.
    pub date: String,
    /// Program version.
    pub version: &'static str,
    /// The command line, without the options that cannot change a result
    /// (`--out`, `--threads`, `--quiet`), so reruns elsewhere give the same page.
    pub command: String,
}

/// Options left out of the recorded command line, with whether they take a value.
const NOT_RECORDED: [(&str, bool); 4] = [("--out", true), ("--threads", true), ("--quiet", false), ("-q", false)];

impl Made {
    /// The provenance of this process: its arguments and today's date, or the
    /// date of `SOURCE_DATE_EPOCH` when set (the reproducible-builds.org
    /// convention, so tests and rebuilt reports can fix it).
    pub fn now() -> Self {
        let args: Vec<String> = std::env::args().skip(1).collect();
        Self::now_by(command_line(&args))
    }

    /// Made today (`SOURCE_DATE_EPOCH` when set) by `command`, as the page
    /// should say it (a Python call, say).
    pub fn now_by(command: String) -> Self {
        let secs =
            std::env::var("SOURCE_DATE_EPOCH").ok().and_then(|s| s.trim().parse::<u64>().ok()).unwrap_or_else(|| {
                std::time::SystemTime::now().duration_since(std::time::UNIX_EPOCH).map_or(0, |d| d.as_secs())
            });
        Self { date: utc_date(secs), version: env!("CARGO_PKG_VERSION"), command }
    }
}

/// `lagfold` and its arguments as a shell would take them, without the
/// options in `NOT_RECORDED`.
pub fn command_line(args: &[String]) -> String {
    let mut kept = vec!["lagfold".to_string()];
    let mut i = 0;
    while i < args.len() {
        let a = &args[i];
        let dropped = NOT_RECORDED.iter().find(|(name, _)| a == name || a.starts_with(&format!("{name}=")));
        match dropped {
            Some((name, takes_value)) => i += if *takes_value && a == name { 2 } else { 1 },
            None => {
                kept.push(quoted(a));
                i += 1;
            }
        }
    }
    kept.join(" ")
}

/// An argument quoted for a POSIX shell when it holds anything but plain characters.
fn quoted(a: &str) -> String {
    let plain = !a.is_empty() && a.chars().all(|c| c.is_ascii_alphanumeric() || "-_.,/=:+@%".contains(c));
    if plain { a.to_string() } else { format!("'{}'", a.replace('\'', r"'\''")) }
}

/// The UTC calendar date of a Unix time (days to civil date: Hinnant 2013,
/// "chrono-Compatible Low-Level Date Algorithms").
pub fn utc_date(secs: u64) -> String {
    let z = (secs / 86_400) as i64 + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let day = doy - (153 * mp + 2) / 5 + 1;
    let month = if mp < 10 { mp + 3 } else { mp - 9 };
    let year = yoe + era * 400 + i64::from(month <= 2);
    format!("{year:04}-{month:02}-{day:02}")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn dates_match_the_calendar() {
        // Values from `date -u -d @SECS +%F` (GNU coreutils).
        assert_eq!(utc_date(0), "1970-01-01");
        assert_eq!(utc_date(951_782_400), "2000-02-29");
        assert_eq!(utc_date(1_796_255_999), "2026-12-02");
        assert_eq!(utc_date(1_796_256_000), "2026-12-03");
        assert_eq!(utc_date(4_107_542_400), "2100-03-01");
    }

    #[test]
    fn the_command_keeps_what_changes_results() {
        let args: Vec<String> = ["demo", "--paths", "200", "--out", "/tmp/r", "--threads=2", "-q", "--seed", "4"]
            .iter()
            .map(|s| s.to_string())
            .collect();
        assert_eq!(command_line(&args), "lagfold demo --paths 200 --seed 4");
        let args = vec!["run".to_string(), "my signal.toml".to_string()];
        assert_eq!(command_line(&args), "lagfold run 'my signal.toml'");
    }
}
