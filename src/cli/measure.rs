//! `lagfold measure <panel.csv>`: measure the decay of a user's own signal
//! with the very estimators the study uses.

use super::run::{StudyArgs, threads};
use super::{Failure, progress};
use crate::{api, report};
use std::path::{Path, PathBuf};

/// A budget in bytes: a number with an optional `K`, `M`, `G` or `T` suffix (powers of 1024).
fn parse_bytes(s: &str) -> Result<u64, String> {
    let t = s.trim();
    let (num, mult) = match t.char_indices().last() {
        Some((i, c)) if c.is_ascii_alphabetic() => {
            let m = match c.to_ascii_uppercase() {
                'K' => 1u64 << 10,
                'M' => 1 << 20,
                'G' => 1 << 30,
                'T' => 1 << 40,
                _ => return Err(format!("`{s}`: use a number of bytes with K, M, G or T (e.g. 8G)")),
            };
            (&t[..i], m)
        }
        _ => (t, 1),
    };
    match num.parse::<f64>() {
        Ok(v) if v.is_finite() && v >= 1.0 => Ok((v * mult as f64).min(u64::MAX as f64) as u64),
        _ => Err(format!("`{s}`: use a positive number of bytes with K, M, G or T (e.g. 8G)")),
    }
}

/// Options of `measure`.
#[derive(Debug, clap::Args)]
pub struct MeasureArgs {
    /// The panel: a CSV or Apache Parquet file with one row per date and
    /// asset; `-` reads standard input.
    pub panel: PathBuf,
    /// Name of the date column (YYYY-MM-DD, YYYY/MM/DD, YYYYMMDD, ISO 8601 date-times; Parquet dates and timestamps).
    #[arg(long, default_value = "date")]
    pub date_column: String,
    /// Name of the asset column.
    #[arg(long, default_value = "asset")]
    pub asset_column: String,
    /// Name of the forecast column; several, comma-separated, are measured
    /// in one pass and compared (the first in full) [default: forecast].
    #[arg(long, value_delimiter = ',', conflicts_with = "every_signal")]
    pub forecast_column: Option<Vec<String>>,
    /// Measure every numeric column not named in another role as a signal.
    #[arg(long)]
    pub every_signal: bool,
    /// A blend to measure beside the signals: weights on each date's
    /// z-scores of the named columns, comma-separated (fast=0.5,slow=0.5).
    #[arg(long, value_delimiter = ',')]
    pub blend: Vec<String>,
    /// Name of the return column.
    #[arg(long, default_value = "return")]
    pub return_column: String,
    /// A column of group labels (a sector, say): forecasts and returns are
    /// demeaned within each group on each date before any IC.
    #[arg(long)]
    pub group_column: Option<String>,
    /// Numeric columns to neutralise on, comma-separated (size,beta): each
    /// date's forecasts and returns are replaced by their least-squares
    /// residuals on them, with an intercept, before any IC.
    #[arg(long, alias = "neutralise", value_delimiter = ',')]
    pub neutralize: Vec<String>,
    /// Returns are over the period that ends at the row's date (default: the
    /// period that starts at it).
    #[arg(long)]
    pub backward_returns: bool,
    /// Field values that mean "missing", comma-separated, besides an empty
    /// field (default: NA,NaN,N/A,null,-; case is ignored; `--na ''` for
    /// empty fields only).
    #[arg(long, value_delimiter = ',')]
    pub na: Option<Vec<String>>,
    /// Dates where fewer assets have both values are skipped (at least 3).
    #[arg(long, default_value_t = 20, value_parser = clap::value_parser!(u32).range(3..))]
    pub min_assets: u32,
    /// Refuse panels that would need more memory than this (e.g. 8G; default a
    /// quarter of physical memory).
    #[arg(long, value_parser = parse_bytes)]
    pub max_memory: Option<u64>,
    /// Do not run the study on the calibrated scenario.
    #[arg(long)]
    pub no_study: bool,
    /// Periods in the rolling mean of the lag-1 IC charted in the report.
    #[arg(long, default_value_t = 12, value_parser = clap::value_parser!(u32).range(2..=10_000))]
    pub window: u32,
    /// Stationary-bootstrap resamples of the dates.
    #[arg(long, default_value_t = 1000, value_parser = clap::value_parser!(u32).range(10..=100_000))]
    pub bootstrap: u32,
    /// The common knobs (`--horizons`, `--out`, `--quiet`, …).
    #[command(flatten)]
    pub study: StudyArgs,
}

/// `lagfold measure`.
pub fn run(a: &MeasureArgs) -> Result<(), Failure> {
    a.study.costs(api::MAX_COST_LEVELS, "`measure`")?;
    if (a.study.paths.is_some() || a.study.threads.is_some()) && a.no_study {
        return Err(Failure::input(
            "--paths and --threads set the calibrated study, which --no-study skips; drop one or the other",
        ));
    }
    if (a.study.assets.is_some() || a.study.history.is_some()) && a.no_study {
        return Err(Failure::input(
            "--assets and --history change the calibrated study (what if the panel were broader or longer?), \
             which --no-study skips; drop one or the other",
        ));
    }
    let blend = if a.blend.is_empty() { Vec::new() } else { api::parse_blend(&a.blend).map_err(Failure::input)? };
    let read = api::ReadOptions {
        date: a.date_column.clone(),
        asset: a.asset_column.clone(),
        forecasts: a.forecast_column.iter().flatten().map(|c| c.trim().to_string()).collect(),
        ret: a.return_column.clone(),
        backward: a.backward_returns,
        max_bytes: a.max_memory.unwrap_or_else(api::default_max_bytes),
        na: match &a.na {
            Some(list) => list.iter().map(|t| t.trim().to_string()).filter(|t| !t.is_empty()).collect(),
            None => api::DEFAULT_NA.iter().map(|s| s.to_string()).collect(),
        },
        group: a.group_column.clone(),
        exposures: a.neutralize.clone(),
    };
    let options = api::MeasureOptions {
        read,
        every_signal: a.every_signal,
        blend,
        horizons: a.study.horizons,
        min_assets: a.min_assets as usize,
        bootstrap: a.bootstrap as usize,
        window: a.window as usize,
        seed: a.study.seed.unwrap_or(1),
        cost_bps: a.study.cost_bps.clone(),
        study: !a.no_study,
        paths: a.study.paths,
        assets: a.study.assets,
        history: a.study.history,
        target_vol: a.study.target_vol,
        threads: threads(&a.study),
    };
    let source = api::PanelSource::File(a.panel.clone());
    let out_dir =
        a.study.out.clone().unwrap_or_else(|| Path::new("lagfold-out").join(format!("{}-measure", source.stem())));
    let out = report::OutDir::claim(&out_dir).map_err(Failure::input)?;
    let outcome = api::measure(source, &options, &progress::Bars::new(a.study.quiet))?;
    super::deliver(&outcome, out, &out_dir, a.study.no_charts, a.study.quiet)
}
