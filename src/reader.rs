//! Stage 0 for real data: a user's long CSV (one row per date and asset) read
//! into a [`Panel`]. The whole file is read once, row by row; the panel keeps
//! two `dates × assets` matrices of `f64` (missing values are NaN).
//!
//! Return timing: by default the return on a row is the asset's return over
//! the period that *starts* at that row's date (a forward return), so the
//! forecast at date `t` is judged against returns of later rows' periods only;
//! with `backward`, the return on a row is over the period that *ends* at its
//! date, and is moved one date back before measuring.

use crate::calendar::{days_from_civil, iso};
use crate::measure::Panel;
use crate::measure::neutralise::Covariates;
pub use crate::rows::Column;
use std::collections::HashMap;
use std::path::{Path, PathBuf};

/// Column names and conventions.
#[derive(Debug, Clone)]
pub struct ReadOptions {
    /// Date column (ISO 8601, `YYYY-MM-DD`).
    pub date: String,
    /// Asset identifier column.
    pub asset: String,
    /// Forecast columns, the first the primary signal; empty: every numeric
    /// column not named in another role.
    pub forecasts: Vec<String>,
    /// Return column.
    pub ret: String,
    /// Returns are over the period ending at the row's date.
    pub backward: bool,
    /// Refuse panels whose matrices would need more bytes than this.
    pub max_bytes: u64,
    /// Field values that mean "missing" besides the empty field (compared
    /// without regard to case).
    pub na: Vec<String>,
    /// A column of group labels (a sector, say) to neutralise on.
    pub group: Option<String>,
    /// Numeric columns (size, beta, …) to neutralise on.
    pub exposures: Vec<String>,
}

/// The default missing-value tokens: what statistical packages, data frames
/// and databases write for a missing number.
pub const DEFAULT_NA: [&str; 5] = ["NA", "NaN", "N/A", "null", "-"];

/// Bytes per date × asset cell that measuring a panel may hold at once: the
/// two matrices read (forecasts and returns), and on a complete panel the
/// estimators' standardised copies of both and the rank-transformed pair.
pub const BYTES_PER_CELL: u64 = 6 * 8;

/// A quarter of physical memory (from `/proc/meminfo`; 4 GiB when unknown):
/// the default budget of a panel.
pub fn default_max_bytes() -> u64 {
    let total = std::fs::read_to_string("/proc/meminfo").ok().and_then(|t| {
        t.lines().find(|l| l.starts_with("MemTotal:")).and_then(|l| l.split_whitespace().nth(1)?.parse::<u64>().ok())
    });
    total.map_or(4 << 30, |kib| kib * 1024 / 4)
}

/// Bytes in words: `1.5 GiB`, `320 MiB`.
pub fn bytes_words(b: u64) -> String {
    let b = b as f64;
    if b >= (1u64 << 30) as f64 {
        format!("{:.1} GiB", b / (1u64 << 30) as f64)
    } else {
        format!("{:.0} MiB", b / (1u64 << 20) as f64)
    }
}

impl Default for ReadOptions {
    fn default() -> Self {
        Self {
            date: "date".into(),
            asset: "asset".into(),
            forecasts: vec!["forecast".into()],
            ret: "return".into(),
            backward: false,
            max_bytes: default_max_bytes(),
            na: DEFAULT_NA.iter().map(|s| s.to_string()).collect(),
            group: None,
            exposures: Vec::new(),
        }
    }
}

/// Where a row is: a line of a CSV file (the header is line 1), or a row of
/// an Apache Parquet file (the first is row 1).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Loc {
    /// The 1-based line or row (saturating at `u32::MAX`, far beyond any
    /// file within the memory budget).
    pub n: u32,
    /// A Parquet row rather than a CSV line.
    pub parquet: bool,
}

impl std::fmt::Display for Loc {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{} {}", if self.parquet { "row" } else { "line" }, self.n)
    }
}

/// What went wrong reading a panel, with the file and line.
#[derive(Debug, thiserror::Error)]
pub enum ReadError {
    /// The file could not be opened or read.
    #[error("cannot read {path}: {message}")]
    Io {
        /// The file.
        path: PathBuf,
        /// What the OS or the CSV parser said.
        message: String,
    },
    /// Required columns are absent from the header (all of them named at once).
    #[error("{path}, {}: {missing} (the header has: {header})", if *parquet { "schema" } else { "line 1" })]
    MissingColumns {
        /// The file.
        path: PathBuf,
        /// Each missing column with the option that renames it, in words.
        missing: String,
        /// The file is Apache Parquet (its schema, not a header line).
        parquet: bool,
        /// The header as found.
        header: String,
    },
    /// Date-times at more than one time of day.
    #[error(
        "{path}, {line}: the date-time {value:?} is at {time}, but {first_line} is at {first}; one row a \
         period needs one time of day (give dates without times, or all at one time)"
    )]
    MixedTimes {
        /// The file.
        path: PathBuf,
        /// Where: a 1-based line, or a Parquet row.
        line: Loc,
        /// The text found.
        value: String,
        /// Its time of day.
        time: String,
        /// The first time of day seen.
        first: String,
        /// Where it was.
        first_line: Loc,
    },
    /// A value that is not a number, or not a finite one.
    #[error("{path}, {line}: `{column}` must be a finite number or a missing-value token ({tokens}), got {value:?}")]
    BadNumber {
        /// The file.
        path: PathBuf,
        /// Where: a 1-based line, or a Parquet row.
        line: Loc,
        /// The column.
        column: String,
        /// The text found.
        value: String,
        /// The missing-value tokens in force, in words.
        tokens: String,
    },
    /// A date in none of the accepted forms.
    #[error(
        "{path}, {line}: `{column}` must be a date as YYYY-MM-DD, YYYY/MM/DD, YYYYMMDD or an ISO 8601 \
         date-time (2001-01-31T16:00:00 or 2001-01-31 16:00:00), got {value:?}"
    )]
    BadDate {
        /// The file.
        path: PathBuf,
        /// Where: a 1-based line, or a Parquet row.
        line: Loc,
        /// The column.
        column: String,
        /// The text found.
        value: String,
    },
    /// The same asset twice on one date.
    #[error("{path}, {line}: asset {asset:?} appears twice on {date} (first on {first})")]
    Duplicate {
        /// The file.
        path: PathBuf,
        /// Where the second row is.
        line: Loc,
        /// Where the first is.
        first: Loc,
        /// The date.
        date: String,
        /// The asset.
        asset: String,
    },
    /// Too few dates to measure anything.
    #[error(
        "{path}: {dates} dates are too few: measuring needs at least {needed} (horizons up to a quarter of the history, and at least 2)"
    )]
    TooShort {
        /// The file.
        path: PathBuf,
        /// Dates found.
        dates: usize,
        /// Dates needed.
        needed: usize,
    },
    /// No numeric column is left to measure as a forecast.
    #[error(
        "{path}: no numeric column is left to measure as a forecast besides the date, asset, return and \
         neutralisation columns{skipped} (the header has: {header}); name one with --forecast-column"
    )]
    NoSignal {
        /// The file.
        path: PathBuf,
        /// The columns passed over as not numeric, in words.
        skipped: String,
        /// The header as found.
        header: String,
    },
    /// Two roles given the same column.
    #[error(
        "{path}: column `{column}` is named as both the {first} and the {second} column; name each role's own column"
    )]
    SameColumn {
        /// The file.
        path: PathBuf,
        /// The column.
        column: String,
        /// One role.
        first: &'static str,
        /// The other.
        second: &'static str,
    },
    /// The panel would not fit the memory budget.
    #[error(
        "{path}: {dates} dates × {assets} assets would need about {need} to measure, over the budget of {budget} \
         (a quarter of this machine's memory unless --max-memory says otherwise); measure a shorter span or fewer assets, \
         or raise --max-memory"
    )]
    TooLarge {
        /// The file.
        path: PathBuf,
        /// Dates (periods) found.
        dates: usize,
        /// Assets found.
        assets: usize,
        /// Bytes needed, in words.
        need: String,
        /// The budget, in words.
        budget: String,
    },
}

/// A panel read from a file, with what the reader noticed.
#[derive(Debug, Clone)]
pub struct ReadPanel {
    /// The panel of the first signal (forward returns), NaN where a value is missing.
    pub panel: Panel,
    /// The names of the forecast columns read, the first in `panel`.
    pub signals: Vec<String>,
    /// The forecasts of the other signals (`signals[1..]`), each `dates × assets`.
    pub other_forecasts: Vec<Vec<f64>>,
    /// The dates, ascending.
    pub dates: Vec<String>,
    /// Data rows read.
    pub rows: u64,
    /// Warnings in words (unsorted or irregular dates, and what was assumed).
    pub warnings: Vec<String>,
    /// Median gap between consecutive dates, in days.
    pub median_gap_days: f64,
    /// The calendar the dates follow.
    pub frequency: Frequency,
    /// Periods with no row at all (ISO dates), inserted as empty dates.
    pub missing_periods: Vec<String>,
    /// Group labels and exposures per date and asset, for neutralisation.
    pub covariates: Covariates,
}

/// The calendar inferred from a panel's dates. Lags count periods of it, so a
/// missing month is an empty date, not a shifted one.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Frequency {
    /// One date a calendar month (any day of it; month ends typically).
    Monthly,
    /// One date a week, on the same weekday.
    Weekly,
    /// Weekdays; a missing weekday is a holiday, not a missing period.
    BusinessDaily,
    /// None of these: each date is one period.
    Rows,
}

impl Frequency {
    /// Name in outputs.
    pub fn name(self) -> &'static str {
        match self {
            Frequency::Monthly => "monthly",
            Frequency::Weekly => "weekly",
            Frequency::BusinessDaily => "business-daily",
            Frequency::Rows => "irregular (one period per date)",
        }
    }
}

/// The smallest history `measure` accepts: horizons up to a quarter of it, at least 2.
pub const MIN_DATES: usize = 8;

/// Month index `12·year + month − 1` of a day count.
fn month_index(z: i64) -> i64 {
    let (y, m, _) = crate::calendar::civil_from_days(z);
    12 * y + i64::from(m) - 1
}

/// Weekday of a day count, Monday = 0 (1970-01-01 was a Thursday).
fn weekday(z: i64) -> i64 {
    (z + 3).rem_euclid(7)
}

/// The calendar of sorted distinct days, and each day's period index (from 0).
fn periods(days: &[i64], median_gap: i64) -> (Frequency, Vec<i64>) {
    let months: Vec<i64> = days.iter().map(|&z| month_index(z)).collect();
    if (27..=32).contains(&median_gap) && months.windows(2).all(|w| w[1] > w[0]) {
        return (Frequency::Monthly, months.iter().map(|m| m - months[0]).collect());
    }
    if median_gap == 7 && days.iter().all(|z| weekday(*z) == weekday(days[0])) {
        return (Frequency::Weekly, days.iter().map(|z| (z - days[0]) / 7).collect());
    }
    if median_gap == 1 && days.iter().all(|z| weekday(*z) < 5) {
        return (Frequency::BusinessDaily, (0..days.len() as i64).collect());
    }
    (Frequency::Rows, (0..days.len() as i64).collect())
}

/// The ISO date of period `i` of a monthly (last day of the month) or weekly calendar starting at `first`.
fn period_date(freq: Frequency, first: i64, i: i64) -> String {
    let z = match freq {
        Frequency::Monthly => {
            let mi = month_index(first) + i + 1; // the first day of the next month, minus one
            crate::calendar::days_from_civil(mi.div_euclid(12), (mi.rem_euclid(12) + 1) as u32, 1) - 1
        }
        _ => first + 7 * i,
    };
    iso(z)
}

/// Days since 1970-01-01 of a calendar date, if it is one.
fn civil(y: i64, m: u32, d: u32) -> Option<i64> {
    let leap = (y % 4 == 0 && y % 100 != 0) || y % 400 == 0;
    let days_in = [31, if leap { 29 } else { 28 }, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];
    ((1..=12).contains(&m) && d >= 1 && d <= days_in[m as usize - 1]).then(|| days_from_civil(y, m, d))
}

/// A date as `YYYY-MM-DD`, `YYYY/MM/DD`, `YYYYMMDD`, or an ISO 8601 date-time
/// (`T` or a space before the time, which may carry seconds, fractions and a
/// zone): the day count since 1970-01-01 and the time text (empty for a date).
pub fn parse_date(s: &str) -> Option<(i64, &str)> {
    let digits = |t: &str| !t.is_empty() && t.bytes().all(|b| b.is_ascii_digit());
    let b = s.as_bytes();
    let (y, m, d, rest) = if b.len() >= 10 && (b[4] == b'-' || b[4] == b'/') && b[7] == b[4] {
        if !(digits(&s[0..4]) && digits(&s[5..7]) && digits(&s[8..10])) {
            return None;
        }
        (&s[0..4], &s[5..7], &s[8..10], &s[10..])
    } else if b.len() == 8 && digits(s) {
        (&s[0..4], &s[4..6], &s[6..8], "")
    } else {
        return None;
    };
    let time = match rest.as_bytes().first() {
        None => "",
        Some(b'T' | b' ') if b[4] == b'-' => {
            let t = &rest[1..];
            let tb = t.as_bytes();
            let ok = tb.len() >= 5 && digits(&t[0..2]) && tb[2] == b':' && digits(&t[3..5]);
            if !ok {
                return None;
            }
            t
        }
        _ => return None,
    };
    Some((civil(y.parse().ok()?, m.parse().ok()?, d.parse().ok()?)?, time))
}

/// Reads `path` into a panel.
///
/// # Errors
/// Every [`ReadError`], naming the file and line.
pub fn read_panel(path: &Path, opts: &ReadOptions) -> Result<ReadPanel, ReadError> {
    check_roles(path, opts)?;
    let src = crate::rows::Rows::open(path)
        .map_err(|e| ReadError::Io { path: path.to_path_buf(), message: e.to_string() })?;
    // Messages name standard input in words.
    let path = if path == Path::new("-") { Path::new("standard input") } else { path };
    read_rows(path, src, opts)
}

/// Reads a panel held in memory (CSV text or a Parquet file's bytes); `name`
/// names it in messages.
///
/// # Errors
/// Every [`ReadError`], naming `name` and the line.
pub fn read_panel_bytes(name: &Path, bytes: Vec<u8>, opts: &ReadOptions) -> Result<ReadPanel, ReadError> {
    check_roles(name, opts)?;
    let src = crate::rows::Rows::from_bytes(bytes)
        .map_err(|e| ReadError::Io { path: name.to_path_buf(), message: e.to_string() })?;
    read_rows(name, src, opts)
}

/// Reads a panel from named columns held in memory (a data frame's), with
/// the checks of a file; `name` names it in messages and a row's number is
/// its 1-based position.
///
/// # Errors
/// Every [`ReadError`], naming `name` and the row.
pub fn read_panel_columns(
    name: &Path,
    columns: Vec<(String, Column)>,
    opts: &ReadOptions,
) -> Result<ReadPanel, ReadError> {
    check_roles(name, opts)?;
    let src = crate::rows::Rows::from_columns(columns)
        .map_err(|message| ReadError::Io { path: name.to_path_buf(), message })?;
    read_rows(name, src, opts)
}

/// One column may play one role only.
fn check_roles(path: &Path, opts: &ReadOptions) -> Result<(), ReadError> {
    let mut roles = vec![(&opts.date, "date"), (&opts.asset, "asset")];
    roles.extend(opts.forecasts.iter().map(|f| (f, "forecast")));
    roles.push((&opts.ret, "return"));
    roles.extend(opts.group.iter().map(|g| (g, "group")));
    roles.extend(opts.exposures.iter().map(|x| (x, "neutralize")));
    for (i, a) in roles.iter().enumerate() {
        if let Some(b) = roles[i + 1..].iter().find(|b| b.0 == a.0) {
            return Err(ReadError::SameColumn {
                path: path.to_path_buf(),
                column: a.0.clone(),
                first: a.1,
                second: b.1,
            });
        }
    }
    Ok(())
}

/// The checks and the assembly of a panel, from rows of any source.
fn read_rows(path: &Path, mut src: crate::rows::Rows, opts: &ReadOptions) -> Result<ReadPanel, ReadError> {
    let io = |e: &dyn std::fmt::Display| ReadError::Io { path: path.to_path_buf(), message: e.to_string() };
    let header = src.header().to_vec();
    let parquet = src.is_parquet();
    let mut wanted = vec![(&opts.date, "date-column"), (&opts.asset, "asset-column"), (&opts.ret, "return-column")];
    wanted.extend(opts.group.iter().map(|g| (g, "group-column")));
    wanted.extend(opts.exposures.iter().map(|x| (x, "neutralize")));
    wanted.extend(opts.forecasts.iter().map(|f| (f, "forecast-column")));
    let found: Vec<Option<usize>> =
        wanted.iter().map(|(name, _)| header.iter().position(|h| h == name.as_str())).collect();
    let missing: Vec<String> = wanted
        .iter()
        .zip(&found)
        .filter(|(_, f)| f.is_none())
        .map(|((name, flag), _)| format!("no column `{name}` (name it with --{flag})"))
        .collect();
    if !missing.is_empty() {
        return Err(ReadError::MissingColumns {
            path: path.to_path_buf(),
            missing: missing.join("; "),
            parquet,
            header: header.join(", "),
        });
    }
    let [cd, ca, cr] = [0, 1, 2].map(|i| found[i].unwrap_or_default());
    let cg = opts.group.as_ref().map(|_| found[3].unwrap_or_default());
    let after_group = 3 + usize::from(cg.is_some());
    let k = opts.exposures.len();
    let cx: Vec<usize> = found[after_group..after_group + k].iter().map(|c| c.unwrap_or_default()).collect();
    // Forecast columns: those named, or every column in no other role (kept if every value is a number).
    let every = opts.forecasts.is_empty();
    let (cf, mut signal_names): (Vec<usize>, Vec<String>) = if every {
        let named: Vec<usize> = found.iter().flatten().copied().collect();
        (0..header.len()).filter(|c| !named.contains(c)).map(|c| (c, header[c].to_string())).unzip()
    } else {
        (found[after_group + k..].iter().map(|c| c.unwrap_or_default()).collect(), opts.forecasts.clone())
    };
    let mut numeric = vec![true; cf.len()];
    let mut seen_value = vec![false; cf.len()];
    let nsig = cf.len();
    let mut group_ids: HashMap<String, u32> = HashMap::new();
    let (mut row_groups, mut row_exposures): (Vec<u32>, Vec<f64>) = (Vec::new(), Vec::new());
    // Per date × asset cell: the covariates and the other signals' matrices; per row, every forecast read.
    let per_row_extra = (if cg.is_some() { 4 } else { 0 }) + 8 * (cx.len() + nsig.saturating_sub(1)) as u64;
    let per_cell = BYTES_PER_CELL + per_row_extra;
    let per_row = 24 + per_row_extra + 8;
    let mut row_forecasts: Vec<f64> = Vec::new();
    let tokens = if opts.na.is_empty() {
        "an empty field".to_string()
    } else {
        format!("empty, {}", opts.na.iter().map(|t| format!("`{t}`")).collect::<Vec<_>>().join(", "))
    };
    let is_na = |t: &str| t.is_empty() || opts.na.iter().any(|n| n.eq_ignore_ascii_case(t));
    let mut first_time: Option<(String, Loc)> = None;
    let mut date_ids: HashMap<i64, u32> = HashMap::new();
    let mut asset_ids: HashMap<String, u32> = HashMap::new();
    // (date id, asset id, line, row, return): 24 bytes a row.
    let mut cells: Vec<(u32, u32, u32, u32, f64)> = Vec::new();
    let mut unsorted = false;
    let mut last_day = i64::MIN;
    let mut rows = 0u64;
    let mut record = csv::StringRecord::new();
    while let Some(n) = src.next(&mut record).map_err(|e| io(&e))? {
        rows += 1;
        let line = Loc { n: u32::try_from(n).unwrap_or(u32::MAX), parquet };
        let field = |i: usize| record.get(i).unwrap_or("");
        let number = |i: usize, name: &str| -> Result<f64, ReadError> {
            let t = field(i);
            if is_na(t) {
                return Ok(f64::NAN);
            }
            match t.parse::<f64>() {
                Ok(v) if v.is_finite() => Ok(v),
                _ => Err(ReadError::BadNumber {
                    path: path.to_path_buf(),
                    line,
                    column: name.into(),
                    value: t.into(),
                    tokens: tokens.clone(),
                }),
            }
        };
        let (day, time) = parse_date(field(cd)).ok_or_else(|| ReadError::BadDate {
            path: path.to_path_buf(),
            line,
            column: opts.date.clone(),
            value: field(cd).into(),
        })?;
        match &first_time {
            None => first_time = Some((time.to_string(), line)),
            Some((first, first_line)) if first != time => {
                return Err(ReadError::MixedTimes {
                    path: path.to_path_buf(),
                    line,
                    value: field(cd).into(),
                    time: if time.is_empty() { "no time".into() } else { time.into() },
                    first: if first.is_empty() { "no time".into() } else { first.clone() },
                    first_line: *first_line,
                });
            }
            Some(_) => {}
        }
        for (j, &c) in cf.iter().enumerate() {
            let v = if !numeric[j] {
                f64::NAN
            } else if every {
                // A column that holds anything but numbers is not a signal: pass it over.
                let t = field(c);
                match t.parse::<f64>() {
                    Ok(v) if v.is_finite() => v,
                    _ if is_na(t) => f64::NAN,
                    _ => {
                        numeric[j] = false;
                        f64::NAN
                    }
                }
            } else {
                number(c, &signal_names[j])?
            };
            seen_value[j] |= !v.is_nan();
            row_forecasts.push(v);
        }
        let r = number(cr, &opts.ret)?;
        unsorted |= day < last_day;
        last_day = last_day.max(day);
        let n_dates = date_ids.len() as u32;
        let d = *date_ids.entry(day).or_insert(n_dates);
        let n_assets = asset_ids.len() as u32;
        let a = *asset_ids.entry(field(ca).to_string()).or_insert(n_assets);
        cells.push((d, a, line.n, (rows - 1) as u32, r));
        if let Some(c) = cg {
            let label = field(c);
            let n_groups = group_ids.len() as u32;
            row_groups.push(if is_na(label) {
                u32::MAX
            } else {
                *group_ids.entry(label.to_string()).or_insert(n_groups)
            });
        }
        for (&c, name) in cx.iter().zip(&opts.exposures) {
            row_exposures.push(number(c, name)?);
        }
        let (t, n) = (date_ids.len() as u64, asset_ids.len() as u64);
        if rows.is_multiple_of(4096) && (t * n * per_cell).max(rows * per_row) > opts.max_bytes {
            return Err(too_large(path, t as usize, n as usize, opts.max_bytes, per_cell));
        }
    }
    // Duplicates: sort by (date, asset, line) in place and compare neighbours.
    cells.sort_unstable_by_key(|c| (c.0, c.1, c.2));
    if let Some(w) = cells.windows(2).find(|w| (w[0].0, w[0].1) == (w[1].0, w[1].1)) {
        let day = date_ids.iter().find(|(_, id)| **id == w[1].0).map_or(0, |(z, _)| *z);
        let asset = asset_ids.iter().find(|(_, id)| **id == w[1].1).map(|(k, _)| k.clone()).unwrap_or_default();
        return Err(ReadError::Duplicate {
            path: path.to_path_buf(),
            line: Loc { n: w[1].2, parquet },
            first: Loc { n: w[0].2, parquet },
            date: iso(day),
            asset,
        });
    }
    let n_assets_total = asset_ids.len();
    drop(asset_ids);
    let mut days: Vec<(i64, u32)> = date_ids.into_iter().collect();
    days.sort_unstable();
    if days.len() < MIN_DATES {
        return Err(ReadError::TooShort { path: path.to_path_buf(), dates: days.len(), needed: MIN_DATES });
    }
    let mut warnings = Vec::new();
    // The signals kept: every named one; in `every` mode the columns of numbers with at least one value.
    let keep: Vec<usize> = (0..nsig).filter(|&j| !every || (numeric[j] && seen_value[j])).collect();
    if every {
        let passed: Vec<String> =
            (0..nsig).filter(|j| !keep.contains(j)).map(|j| format!("`{}`", signal_names[j])).collect();
        if keep.is_empty() {
            return Err(ReadError::NoSignal {
                path: path.to_path_buf(),
                skipped: if passed.is_empty() {
                    String::new()
                } else {
                    format!(" ({} hold text or no values)", passed.join(", "))
                },
                header: header.join(", "),
            });
        }
        if !passed.is_empty() {
            warnings.push(format!(
                "not measured as signals (text or no values): {}; measured: {}",
                passed.join(", "),
                keep.iter().map(|&j| format!("`{}`", signal_names[j])).collect::<Vec<_>>().join(", ")
            ));
        }
    }
    signal_names = keep.iter().map(|&j| signal_names[j].clone()).collect();
    if unsorted {
        warnings.push("rows are not sorted by date; they were sorted (dates ascending)".to_string());
    }
    let mut gaps: Vec<i64> = days.windows(2).map(|w| w[1].0 - w[0].0).collect();
    gaps.sort_unstable();
    let median = gaps[gaps.len() / 2];
    let day_list: Vec<i64> = days.iter().map(|d| d.0).collect();
    let (frequency, index) = periods(&day_list, median);
    let t = (index[index.len() - 1] + 1) as usize;
    let mut missing_periods = Vec::new();
    match frequency {
        Frequency::Monthly | Frequency::Weekly => {
            let mut have = index.iter().peekable();
            for i in 0..t as i64 {
                if have.peek() == Some(&&i) {
                    have.next();
                } else {
                    missing_periods.push(period_date(frequency, day_list[0], i));
                }
            }
            if !missing_periods.is_empty() {
                warnings.push(format!(
                    "{} {} period(s) have no rows ({}); each is kept as an empty date, so lags across it still count periods",
                    missing_periods.len(),
                    frequency.name(),
                    missing_periods.join(", ")
                ));
            }
        }
        Frequency::BusinessDaily => {
            let long: Vec<String> = day_list
                .windows(2)
                .filter(|w| w[1] - w[0] > 7)
                .map(|w| format!("{} to {}", iso(w[0]), iso(w[1])))
                .collect();
            if !long.is_empty() {
                warnings.push(format!(
                    "business-daily dates with gaps longer than a week ({}); lags count trading dates, so each gap is one period",
                    long.join(", ")
                ));
            }
        }
        Frequency::Rows => {
            if gaps.last().is_some_and(|&g| g > 2 * median.max(1) + 3) {
                warnings.push(format!(
                    "dates follow no monthly, weekly or business-daily calendar (gaps from {} to {} days, median \
                     {median}); one period was assumed between consecutive dates",
                    gaps[0],
                    gaps[gaps.len() - 1]
                ));
            }
        }
    }
    let n = n_assets_total;
    if (t as u64) * (n as u64) * per_cell > opts.max_bytes {
        return Err(too_large(path, t, n, opts.max_bytes, per_cell));
    }
    let mut order = vec![0usize; days.len()];
    for (pos, &(_, id)) in days.iter().enumerate() {
        order[id as usize] = index[pos] as usize;
    }
    let mut panel = Panel {
        assets: n,
        dates: t,
        forecasts: vec![f64::NAN; t * n],
        returns: vec![f64::NAN; (t - 1) * n],
        has_missing: false,
    };
    let mut covariates =
        Covariates { groups: cg.map(|_| vec![u32::MAX; t * n]), exposures: vec![vec![f64::NAN; t * n]; k] };
    let mut other_forecasts = vec![vec![f64::NAN; t * n]; keep.len() - 1];
    for (d, a, _, src, r) in cells {
        let (row, a) = (order[d as usize], a as usize);
        let values = &row_forecasts[src as usize * nsig..(src as usize + 1) * nsig];
        panel.forecasts[row * n + a] = values[keep[0]];
        for (x, &j) in other_forecasts.iter_mut().zip(&keep[1..]) {
            x[row * n + a] = values[j];
        }
        if let Some(g) = covariates.groups.as_mut() {
            g[row * n + a] = row_groups[src as usize];
        }
        for (j, x) in covariates.exposures.iter_mut().enumerate() {
            x[row * n + a] = row_exposures[src as usize * k + j];
        }
        // Forward: the row's own period. Backward: its period ends at this date, so it is the previous date's forward return.
        let target = if opts.backward { row.checked_sub(1) } else { (row + 1 < t).then_some(row) };
        if let Some(rr) = target {
            panel.returns[rr * n + a] = r;
        }
    }
    panel.refresh_missing();
    let mut dates: Vec<String> = (0..t as i64).map(|i| period_date(frequency, day_list[0], i)).collect();
    for (pos, &(z, _)) in days.iter().enumerate() {
        dates[index[pos] as usize] = iso(z);
    }
    Ok(ReadPanel {
        panel,
        signals: signal_names,
        other_forecasts,
        dates,
        rows,
        warnings,
        median_gap_days: median as f64,
        frequency,
        missing_periods,
        covariates,
    })
}

fn too_large(path: &Path, dates: usize, assets: usize, budget: u64, per_cell: u64) -> ReadError {
    ReadError::TooLarge {
        path: path.to_path_buf(),
        dates,
        assets,
        need: bytes_words(dates as u64 * assets as u64 * per_cell),
        budget: bytes_words(budget),
    }
}
