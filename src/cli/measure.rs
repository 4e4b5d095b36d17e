//! `lagfold measure <panel.csv>`: measure the decay of a user's own signal
//! with the very estimators the study uses.

use super::run::{StudyArgs, truth_and_study};
use super::{Failure, print};
use crate::calibrate;
use crate::measure::rules::choose;
use crate::measure::{Measurement, bootstrap, extras, fit, sign};
use crate::reader::{ReadOptions, read_panel};
use crate::report::{self, BestHorizon, BootCounts, Bootstrap, CalibratedStudy, Curve, MeasureResult};
use crate::stats::quantile_sorted;
use crate::study::Setup;
use std::path::{Path, PathBuf};

/// The smallest reference simulation a scenario accepts (`portfolio.reference_paths`).
const MIN_REFERENCE_PATHS: usize = 10;

/// Options of `measure`.
#[derive(Debug, clap::Args)]
pub struct MeasureArgs {
    /// The panel: a CSV with one row per date and asset.
    pub panel: PathBuf,
    /// Name of the date column (ISO 8601 dates).
    #[arg(long, default_value = "date")]
    pub date_column: String,
    /// Name of the asset column.
    #[arg(long, default_value = "asset")]
    pub asset_column: String,
    /// Name of the forecast column.
    #[arg(long, default_value = "forecast")]
    pub forecast_column: String,
    /// Name of the return column.
    #[arg(long, default_value = "return")]
    pub return_column: String,
    /// Returns are over the period that ends at the row's date (default: the
    /// period that starts at it).
    #[arg(long)]
    pub backward_returns: bool,
    /// Dates where fewer assets have both values are skipped.
    #[arg(long, default_value_t = 20)]
    pub min_assets: usize,
    /// Do not run the study on the calibrated scenario.
    #[arg(long)]
    pub no_study: bool,
    /// Stationary-bootstrap resamples of the dates.
    #[arg(long, default_value_t = 1000, value_parser = clap::value_parser!(u32).range(10..=100_000))]
    pub bootstrap: u32,
    /// The common knobs (`--horizons`, `--out`, `--quiet`, …).
    #[command(flatten)]
    pub study: StudyArgs,
}

/// `lagfold measure`.
pub fn run(a: &MeasureArgs) -> Result<(), Failure> {
    let opts = ReadOptions {
        date: a.date_column.clone(),
        asset: a.asset_column.clone(),
        forecast: a.forecast_column.clone(),
        ret: a.return_column.clone(),
        backward: a.backward_returns,
    };
    let l = a.study.horizons.unwrap_or(24);
    if l == 0 {
        return Err(Failure::input("`--horizons` must be at least 1, got 0"));
    }
    let read = read_panel(&a.panel, &opts, l).map_err(Failure::input)?;
    let seed = a.study.seed.unwrap_or(1);
    let (mut result, fit) = measure(&read, &a.panel, l, a.min_assets, a.backward_returns, (a.bootstrap as usize, seed));
    let stem = a.panel.file_stem().map_or("panel".into(), |s| s.to_string_lossy().into_owned());
    let out_dir = a.study.out.clone().unwrap_or_else(|| Path::new("lagfold-out").join(format!("{stem}-measure")));
    let measured = calibrate::Measured {
        panel: &read.panel,
        median_gap_days: read.median_gap_days,
        horizons: l,
        fit: &fit,
        forecast_autocorrelation: result.forecast_autocorrelation,
        ic_volatility: result.ic_volatility,
    };
    let name: String = format!("{stem}-calibrated")
        .chars()
        .map(|c| if c.is_ascii_alphanumeric() || "-_.".contains(c) { c } else { '-' })
        .collect();
    let mut files = vec![];
    let paths = a.study.paths.unwrap_or_else(|| calibrate::default_paths(read.panel.assets, read.panel.dates, l));
    let calibrated = calibrate::calibrated(&measured, &name, paths, seed);
    // The panel is no longer needed: free it before the study's own histories.
    drop(read);
    match calibrated {
        Ok((text, scenario)) => {
            if !a.no_study {
                result.calibrated_study = Some(calibrated_study(scenario, &a.study)?);
            }
            files.push(("calibrated.toml".to_string(), text.into_bytes()));
        }
        Err(e) => result.warnings.push(format!("no calibrated scenario: {e}")),
    }
    files.push(("measure.json".into(), report::measure_json(&result)));
    files.push(("measure_lags.csv".into(), report::measure_csv(&result)));
    let charts = super::charts(a.study.no_charts, || report::measure_charts(&result))?;
    files.extend(charts.files);
    let settings = serde_json::json!({
        "panel": a.panel.display().to_string(),
        "columns": {"date": a.date_column, "asset": a.asset_column, "forecast": a.forecast_column, "return": a.return_column},
        "return_timing": result.return_timing,
        "horizons": l,
        "min_assets": a.min_assets,
        "bootstrap_resamples": a.bootstrap,
        "bootstrap_mean_block_length": result.bootstrap.mean_block_length,
        "seed": seed,
    });
    files.push((
        "report.html".into(),
        report::html::render(&report::html::measure_page(&result, settings, charts.inline)),
    ));
    report::write_atomically(&out_dir, &files).map_err(Failure::other)?;
    if !a.study.quiet {
        let mut text = report::measure_terminal(&result);
        text.push_str(&super::outputs_line(&out_dir, &files));
        print(&text)?;
    }
    Ok(())
}

/// The study on the calibrated scenario: how often a history like the user's
/// picks the right horizon. Only the horizon rules are reported, so the
/// reference simulation behind the net-IR truth is cut to its minimum here (it
/// would otherwise cost `reference_paths` full-size histories); the written
/// `calibrated.toml` keeps the default for `lagfold run`.
fn calibrated_study(mut scenario: crate::scenario::Scenario, a: &StudyArgs) -> Result<CalibratedStudy, Failure> {
    scenario.portfolio.reference_paths = MIN_REFERENCE_PATHS;
    let setup = Setup::new(scenario).map_err(|e| Failure::input(format!("calibrated.toml: {e}")))?;
    let (_, r) = truth_and_study(&setup, a, &[]);
    let rules = [&r.rules.peak, &r.rules.formula, &r.rules.fitted];
    Ok(CalibratedStudy {
        scenario_file: "calibrated.toml".into(),
        paths: r.paths,
        true_best_horizon: setup.truth.best_horizon,
        near_hit_rate: rules.map(|x| x.near_hit_rate),
        near_hit_rate_se: rules.map(|x| x.near_hit_rate_se),
        regret_rel_mean: rules.map(|x| x.regret_rel_mean),
    })
}

/// Every figure of a read panel; `boot` is `(resamples, seed)` of the
/// stationary bootstrap.
pub fn measure(
    read: &crate::reader::ReadPanel,
    file: &Path,
    l: usize,
    min_assets: usize,
    backward: bool,
    boot: (usize, u64),
) -> (MeasureResult, fit::Fit) {
    let p = &read.panel;
    let mut m = Measurement::new(l, true).with_min_assets(min_assets);
    m.update(p);
    let (lag_mean, lag_se) = m.lagged.means_and_se(false);
    let (hor_mean, hor_se) = m.horizon.means_and_se(true);
    let (rank_mean, rank_se) = m.rank_lagged.means_and_se(false);
    let choices = choose(&lag_mean, &lag_se, &hor_mean);
    let best = fit::best_fit(&lag_mean, &lag_se);
    let used = m.lagged.series(1).len();
    let (agree, total) = sign::sign_agreement(p, 1);
    let m_dates = p.dates - 1;
    let block = (l as f64).max((m_dates as f64).cbrt()).min(m_dates as f64 / 2.0).max(1.0);
    let resampled = bootstrap::choices(&m.lagged, &m.horizon, &lag_se, m_dates, block, boot.0, boot.1);
    let tally = |i: usize| {
        let mut c = vec![0u64; l];
        resampled.iter().for_each(|ch| c[ch.horizon[i] - 1] += 1);
        c
    };
    let range = |i: usize| {
        let mut v: Vec<f64> = resampled.iter().map(|ch| ch.horizon[i] as f64).collect();
        v.sort_by(f64::total_cmp);
        [quantile_sorted(&v, 0.05), quantile_sorted(&v, 0.95)]
    };
    let counts = BootCounts { peak: tally(0), formula: tally(1), fitted: tally(2) };
    let share = |c: &[u64], n: usize| c[n - 1] as f64 / boot.0 as f64;
    let shares = [
        share(&counts.peak, choices.horizon[0]),
        share(&counts.formula, choices.horizon[1]),
        share(&counts.fitted, choices.horizon[2]),
    ];
    let bootstrap = Bootstrap {
        replicates: boot.0,
        mean_block_length: block,
        share_at_estimate: shares,
        share_at_estimate_se: shares.map(|p| (p * (1.0 - p) / boot.0 as f64).sqrt()),
        range_90: [range(0), range(1), range(2)],
        choice_counts: counts,
    };
    let result = MeasureResult {
        file: file.display().to_string(),
        rows: read.rows,
        dates: p.dates,
        assets: p.assets,
        dates_used: used,
        dates_skipped: p.dates - used,
        return_timing: if backward {
            "over the period ending at each row's date".into()
        } else {
            "over the period starting at each row's date".into()
        },
        success_ratio: (1.0 + lag_mean[0]) / 2.0,
        sign_hit_rate: agree as f64 / total.max(1) as f64,
        forecast_autocorrelation: extras::forecast_autocorrelation(p),
        ic_volatility: extras::ic_volatility(p),
        fitted_family: best.family.name().into(),
        fitted_shape: best.shape1,
        fitted_curve: best.curve.clone(),
        best_horizon: BestHorizon { peak: choices.horizon[0], formula: choices.horizon[1], fitted: choices.horizon[2] },
        lagged_ic: Curve::new(lag_mean, lag_se),
        rank_ic: Curve::new(rank_mean, rank_se),
        horizon_ic: Curve::new(hor_mean, hor_se),
        se_method: "Newey-West (Bartlett) with max(2n, Andrews AR(1) plug-in) lags; lagged ICs use n = 1".into(),
        bootstrap,
        calibrated_study: None,
        warnings: read.warnings.clone(),
    };
    (result, best)
}
