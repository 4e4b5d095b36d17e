//! Stage 0 for real data: a user's long CSV (one row per date and asset) read
//! into a [`Panel`]. The whole file is read once, row by row; the panel keeps
//! two `dates × assets` matrices of `f64` (missing values are NaN).
//!
//! Return timing: by default the return on a row is the asset's return over
//! the period that *starts* at that row's date (a forward return), so the
//! forecast at date `t` is judged against returns of later rows' periods only;
//! with `backward`, the return on a row is over the period that *ends* at its
//! date, and is moved one date back before measuring.

use crate::calendar::days_from_civil;
use crate::measure::Panel;
use std::collections::HashMap;
use std::path::{Path, PathBuf};

/// Column names and conventions.
#[derive(Debug, Clone)]
pub struct ReadOptions {
    /// Date column (ISO 8601, `YYYY-MM-DD`).
    pub date: String,
    /// Asset identifier column.
    pub asset: String,
    /// Forecast column.
    pub forecast: String,
    /// Return column.
    pub ret: String,
    /// Returns are over the period ending at the row's date.
    pub backward: bool,
}

impl Default for ReadOptions {
    fn default() -> Self {
        Self {
            date: "date".into(),
            asset: "asset".into(),
            forecast: "forecast".into(),
            ret: "return".into(),
            backward: false,
        }
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
    /// A required column is absent from the header.
    #[error("{path}, line 1: no column `{column}` (the header has: {header}); name it with --{flag}")]
    MissingColumn {
        /// The file.
        path: PathBuf,
        /// The column looked for.
        column: String,
        /// The header as found.
        header: String,
        /// The option that renames it.
        flag: &'static str,
    },
    /// A value that is not a number, or not a finite one.
    #[error("{path}, line {line}: `{column}` must be a finite number or empty, got {value:?}")]
    BadNumber {
        /// The file.
        path: PathBuf,
        /// 1-based line.
        line: u64,
        /// The column.
        column: String,
        /// The text found.
        value: String,
    },
    /// A date that is not `YYYY-MM-DD`.
    #[error("{path}, line {line}: `{column}` must be an ISO 8601 date (YYYY-MM-DD), got {value:?}")]
    BadDate {
        /// The file.
        path: PathBuf,
        /// 1-based line.
        line: u64,
        /// The column.
        column: String,
        /// The text found.
        value: String,
    },
    /// The same asset twice on one date.
    #[error("{path}, line {line}: asset {asset:?} appears twice on {date} (first on line {first})")]
    Duplicate {
        /// The file.
        path: PathBuf,
        /// 1-based line of the second row.
        line: u64,
        /// 1-based line of the first.
        first: u64,
        /// The date.
        date: String,
        /// The asset.
        asset: String,
    },
    /// Too few dates for the longest horizon.
    #[error("{path}: {dates} dates are too few for horizons up to {horizons} (need at least {needed})")]
    TooShort {
        /// The file.
        path: PathBuf,
        /// Dates found.
        dates: usize,
        /// Longest horizon asked for.
        horizons: usize,
        /// Dates needed.
        needed: usize,
    },
}

/// A panel read from a file, with what the reader noticed.
#[derive(Debug, Clone)]
pub struct ReadPanel {
    /// The panel (forward returns), NaN where a value is missing.
    pub panel: Panel,
    /// The dates, ascending.
    pub dates: Vec<String>,
    /// Data rows read.
    pub rows: u64,
    /// Warnings in words (unsorted or irregular dates, and what was assumed).
    pub warnings: Vec<String>,
    /// Median gap between consecutive dates, in days.
    pub median_gap_days: f64,
}

/// Days since 1970-01-01 of a `YYYY-MM-DD` date, if it is one.
fn parse_date(s: &str) -> Option<i64> {
    let b = s.as_bytes();
    if b.len() != 10 || b[4] != b'-' || b[7] != b'-' {
        return None;
    }
    let y: i64 = s[0..4].parse().ok()?;
    let m: u32 = s[5..7].parse().ok()?;
    let d: u32 = s[8..10].parse().ok()?;
    let leap = (y % 4 == 0 && y % 100 != 0) || y % 400 == 0;
    let days_in = [31, if leap { 29 } else { 28 }, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];
    ((1..=12).contains(&m) && d >= 1 && d <= days_in[m as usize - 1]).then(|| days_from_civil(y, m, d))
}

/// Reads `path` into a panel for horizons up to `horizons`.
///
/// # Errors
/// Every [`ReadError`], naming the file and line.
pub fn read_panel(path: &Path, opts: &ReadOptions, horizons: usize) -> Result<ReadPanel, ReadError> {
    let io = |e: &dyn std::fmt::Display| ReadError::Io { path: path.to_path_buf(), message: e.to_string() };
    let mut rdr = csv::ReaderBuilder::new().trim(csv::Trim::All).from_path(path).map_err(|e| io(&e))?;
    let header = rdr.headers().map_err(|e| io(&e))?.clone();
    let col = |name: &str, flag: &'static str| {
        header.iter().position(|h| h == name).ok_or_else(|| ReadError::MissingColumn {
            path: path.to_path_buf(),
            column: name.to_string(),
            header: header.iter().collect::<Vec<_>>().join(", "),
            flag,
        })
    };
    let (cd, ca, cf, cr) = (
        col(&opts.date, "date-column")?,
        col(&opts.asset, "asset-column")?,
        col(&opts.forecast, "forecast-column")?,
        col(&opts.ret, "return-column")?,
    );
    let mut date_ids: HashMap<i64, u32> = HashMap::new();
    let mut asset_ids: HashMap<String, u32> = HashMap::new();
    // (date id, asset id, line, forecast, return): 32 bytes a row.
    let mut cells: Vec<(u32, u32, u32, f64, f64)> = Vec::new();
    let mut unsorted = false;
    let mut last_day = i64::MIN;
    let mut rows = 0u64;
    let mut record = csv::StringRecord::new();
    while rdr.read_record(&mut record).map_err(|e| io(&e))? {
        rows += 1;
        let line = record.position().map_or(rows + 1, |p| p.line());
        let field = |i: usize| record.get(i).unwrap_or("");
        let number = |i: usize, name: &str| -> Result<f64, ReadError> {
            let t = field(i);
            if t.is_empty() {
                return Ok(f64::NAN);
            }
            match t.parse::<f64>() {
                Ok(v) if v.is_finite() => Ok(v),
                _ => Err(ReadError::BadNumber { path: path.to_path_buf(), line, column: name.into(), value: t.into() }),
            }
        };
        let day = parse_date(field(cd)).ok_or_else(|| ReadError::BadDate {
            path: path.to_path_buf(),
            line,
            column: opts.date.clone(),
            value: field(cd).into(),
        })?;
        let (f, r) = (number(cf, &opts.forecast)?, number(cr, &opts.ret)?);
        unsorted |= day < last_day;
        last_day = last_day.max(day);
        let n_dates = date_ids.len() as u32;
        let d = *date_ids.entry(day).or_insert(n_dates);
        let n_assets = asset_ids.len() as u32;
        let a = *asset_ids.entry(field(ca).to_string()).or_insert(n_assets);
        cells.push((d, a, u32::try_from(line).unwrap_or(u32::MAX), f, r));
    }
    // Duplicates: sort by (date, asset, line) in place and compare neighbours.
    cells.sort_unstable_by_key(|c| (c.0, c.1, c.2));
    if let Some(w) = cells.windows(2).find(|w| (w[0].0, w[0].1) == (w[1].0, w[1].1)) {
        let day = date_ids.iter().find(|(_, id)| **id == w[1].0).map_or(0, |(z, _)| *z);
        let (y, m, d) = crate::calendar::civil_from_days(day);
        let asset = asset_ids.iter().find(|(_, id)| **id == w[1].1).map(|(k, _)| k.clone()).unwrap_or_default();
        return Err(ReadError::Duplicate {
            path: path.to_path_buf(),
            line: u64::from(w[1].2),
            first: u64::from(w[0].2),
            date: format!("{y:04}-{m:02}-{d:02}"),
            asset,
        });
    }
    let n_assets_total = asset_ids.len();
    drop(asset_ids);
    let mut days: Vec<(i64, u32)> = date_ids.into_iter().collect();
    days.sort_unstable();
    let needed = horizons + 2;
    if days.len() < needed {
        return Err(ReadError::TooShort { path: path.to_path_buf(), dates: days.len(), horizons, needed });
    }
    let mut warnings = Vec::new();
    if unsorted {
        warnings.push("rows are not sorted by date; they were sorted (dates ascending)".to_string());
    }
    let mut gaps: Vec<i64> = days.windows(2).map(|w| w[1].0 - w[0].0).collect();
    gaps.sort_unstable();
    let median = gaps[gaps.len() / 2];
    if gaps.last().is_some_and(|&g| g > 2 * median.max(1) + 3) {
        warnings.push(format!(
            "dates are irregular (gaps from {} to {} days, median {median}); one period was assumed between consecutive dates",
            gaps[0],
            gaps[gaps.len() - 1]
        ));
    }
    let n = n_assets_total;
    let mut order = vec![0usize; days.len()];
    for (pos, &(_, id)) in days.iter().enumerate() {
        order[id as usize] = pos;
    }
    let t = days.len();
    let mut panel = Panel {
        assets: n,
        dates: t,
        forecasts: vec![f64::NAN; t * n],
        returns: vec![f64::NAN; (t - 1) * n],
        has_missing: false,
    };
    for (d, a, _, f, r) in cells {
        let (row, a) = (order[d as usize], a as usize);
        panel.forecasts[row * n + a] = f;
        // Forward: the row's own period. Backward: its period ends at this date, so it is the previous date's forward return.
        let target = if opts.backward { row.checked_sub(1) } else { (row + 1 < t).then_some(row) };
        if let Some(rr) = target {
            panel.returns[rr * n + a] = r;
        }
    }
    panel.has_missing = panel.forecasts.iter().chain(&panel.returns).any(|x| x.is_nan());
    let dates = days
        .iter()
        .map(|&(z, _)| {
            let (y, m, d) = crate::calendar::civil_from_days(z);
            format!("{y:04}-{m:02}-{d:02}")
        })
        .collect();
    Ok(ReadPanel { panel, dates, rows, warnings, median_gap_days: median as f64 })
}
