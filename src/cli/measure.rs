//! `lagfold measure <panel.csv>`: measure the decay of a user's own signal
//! with the very estimators the study uses.

use super::run::{StudyArgs, truth_and_study};
use super::{Failure, print};
use crate::calibrate;
use crate::measure::rules::choose_measured;
use crate::measure::{Measurement, Panel, bootstrap, extras, fit, sign};
use crate::reader::{ReadOptions, read_panel};
use crate::report::{
    self, BestHorizon, BootCounts, Bootstrap, CalibratedNet, CalibratedStudy, Curve, MeasureResult, PerDateTable,
    SkippedDate, SuccessRatio, TimingCheck, finite,
};
use crate::study::Setup;
use std::path::{Path, PathBuf};

/// The smallest reference simulation a scenario accepts (`portfolio.reference_paths`).
const MIN_REFERENCE_PATHS: usize = 10;

/// Longest horizon measured when `--horizons` is not given (cut to a quarter of the history).
const DEFAULT_HORIZONS: usize = 24;

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
    a.study.costs(super::run::MAX_COST_LEVELS, "`measure`")?;
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
    let blend =
        if a.blend.is_empty() { Vec::new() } else { super::compare::parse_blend(&a.blend).map_err(Failure::input)? };
    // The columns measured: those named; else the blend's; else `forecast`. Blended columns are read too.
    let mut forecasts: Vec<String> = match (&a.forecast_column, a.every_signal) {
        (_, true) => Vec::new(),
        (Some(list), false) => list.iter().map(|c| c.trim().to_string()).collect(),
        (None, false) if !blend.is_empty() => Vec::new(),
        (None, false) => vec!["forecast".into()],
    };
    if !a.every_signal {
        for w in &blend {
            if !forecasts.contains(&w.signal) {
                forecasts.push(w.signal.clone());
            }
        }
    }
    let opts = ReadOptions {
        date: a.date_column.clone(),
        asset: a.asset_column.clone(),
        forecasts,
        ret: a.return_column.clone(),
        backward: a.backward_returns,
        max_bytes: a.max_memory.unwrap_or_else(crate::reader::default_max_bytes),
        na: match &a.na {
            Some(list) => list.iter().map(|t| t.trim().to_string()).filter(|t| !t.is_empty()).collect(),
            None => crate::reader::DEFAULT_NA.iter().map(|s| s.to_string()).collect(),
        },
        group: a.group_column.clone(),
        exposures: a.neutralize.clone(),
    };
    if a.study.horizons == Some(0) {
        return Err(Failure::input("`--horizons` must be at least 1, got 0"));
    }
    let stem = if a.panel.as_os_str() == "-" {
        "stdin".to_string()
    } else {
        a.panel.file_stem().map_or("panel".into(), |s| s.to_string_lossy().into_owned())
    };
    let out_dir = a.study.out.clone().unwrap_or_else(|| Path::new("lagfold-out").join(format!("{stem}-measure")));
    let out = report::OutDir::claim(&out_dir).map_err(Failure::input)?;
    let mut read = read_panel(&a.panel, &opts).map_err(Failure::input)?;
    let covariates = std::mem::take(&mut read.covariates);
    crate::measure::neutralise::neutralise(&mut read.panel, &covariates);
    for f in &mut read.other_forecasts {
        crate::measure::neutralise::neutralise_forecasts(f, read.panel.assets, &covariates);
    }
    drop(covariates);
    let neutralised_on: Vec<String> = a.group_column.iter().chain(&a.neutralize).cloned().collect();
    let cap = read.panel.dates / 4;
    let requested = a.study.horizons.unwrap_or(DEFAULT_HORIZONS);
    let l = requested.min(cap);
    if a.study.horizons.is_some() && requested > cap {
        read.warnings.push(format!(
            "horizons cut from {requested} to {cap}: the history has {} periods, and a horizon-n mean needs about 4n \
             of them for its 95% interval to hold (checked up to a quarter of the history)",
            read.panel.dates
        ));
    }
    let seed = a.study.seed.unwrap_or(1);
    let settings = Settings {
        horizons: l,
        horizons_requested: requested,
        min_assets: a.min_assets as usize,
        backward: a.backward_returns,
        bootstrap: (a.bootstrap as usize, seed),
        window: a.window as usize,
    };
    let (mut result, fit) = measure(&read, &a.panel, &settings).map_err(Failure::input)?;
    result.neutralised_on = neutralised_on;
    let mut warnings = Vec::new();
    result.comparison =
        super::compare::compare(&mut read, &result, blend, &settings, &mut warnings).map_err(Failure::input)?;
    result.warnings.extend(warnings);
    if !a.study.cost_bps.is_empty() {
        result.books = Some(own_books(&read, &settings, &a.study.cost_bps, &mut result.warnings));
    }
    let name: String = format!("{stem}-calibrated")
        .chars()
        .map(|c| if c.is_ascii_alphanumeric() || "-_.".contains(c) { c } else { '-' })
        .collect();
    let mut files = vec![];
    let paths = a.study.paths.unwrap_or_else(|| calibrate::default_paths(read.panel.assets, read.panel.dates, l));
    let calibrated = match &fit {
        Some(fit) => calibrate::calibrated(
            &calibrate::Measured {
                panel: &read.panel,
                median_gap_days: read.median_gap_days,
                horizons: l,
                fit,
                forecast_autocorrelation: result.forecast_autocorrelation,
                ic_volatility: result.ic_volatility,
                ic_persistence: result.ic_persistence,
                tails: result.return_excess_kurtosis.map(|k| (k, result.tails_dof)),
            },
            &name,
            paths,
            seed,
        ),
        None => Err("no decay curve could be fitted: some lagged ICs have no dates or no standard error".into()),
    };
    // The panel is no longer needed: free it before the study's own histories.
    drop(read);
    match calibrated {
        Ok((text, scenario)) => {
            if !a.no_study {
                let what_if = crate::scenario::Overrides {
                    assets: a.study.assets,
                    history: a.study.history,
                    ..Default::default()
                };
                let scenario = if what_if.assets.is_some() || what_if.history.is_some() {
                    crate::scenario::load(&text, "calibrated.toml", &name, &what_if).map_err(Failure::input)?
                } else {
                    scenario
                };
                let (mut study, sims) = calibrated_study(scenario, &a.study, &a.study.cost_bps)?;
                if what_if.assets.is_some() || what_if.history.is_some() {
                    study.what_if =
                        Some(format!("{} assets × {} dates instead of the panel's", study.assets, study.history));
                } else {
                    // The simulated spread is comparable only for a history like the panel's.
                    compare_errors(&mut result, &sims);
                }
                result.calibrated_study = Some(study);
            }
            files.push(("calibrated.toml".to_string(), text.into_bytes()));
        }
        Err(e) => result.warnings.push(format!("no calibrated scenario (calibrated.toml not written): {e}")),
    }
    super::finite(&result)?;
    files.push(("measure.json".into(), report::measure_json(&result)));
    files.push(("measure_lags.csv".into(), report::measure_csv(&result)));
    files.push(("per_date.csv".into(), report::per_date_csv(&result)));
    if let Some(c) = &result.comparison {
        files.push(("signals.csv".into(), report::signals_csv(c)));
    }
    if let Some(b) = &result.books {
        files.push(("holdings.csv".into(), report::holdings_csv(b)));
    }
    let charts = super::charts(a.study.no_charts, || report::measure_charts(&result))?;
    files.extend(charts.files);
    let settings = serde_json::json!({
        "panel": a.panel.display().to_string(),
        "columns": {"date": a.date_column, "asset": a.asset_column, "forecast": result.comparison.as_ref().map_or(vec![result.signal.clone()], |c| c.signals.iter().filter(|s| s.kind == "signal").map(|s| s.name.clone()).collect()), "return": a.return_column},
        "blend": a.blend,
        "group_column": a.group_column,
        "neutralize": a.neutralize,
        "return_timing": result.return_timing,
        "horizons": l,
        "min_assets": a.min_assets,
        "bootstrap_resamples": a.bootstrap,
        "cost_bps": a.study.cost_bps,
        "bootstrap_mean_block_length": result.bootstrap.mean_block_length,
        "seed": seed,
    });
    files.push((
        "report.html".into(),
        report::html::render(&report::html::measure_page(&result, settings, charts.inline), &report::Made::now()),
    ));
    out.commit(&files).map_err(Failure::other)?;
    if !a.study.quiet {
        let mut text = report::measure_terminal(&result);
        text.push_str(&super::outputs_line(&out_dir, &files));
        print(&text)?;
    }
    Ok(())
}

/// The tranche books on the first signal's panel at every cost, with a
/// warning when the returns look like percentages (costs assume decimal
/// returns: 0.01 is one per cent).
fn own_books(
    read: &crate::reader::ReadPanel,
    s: &Settings,
    costs_bps: &[f64],
    warnings: &mut Vec<String>,
) -> crate::report::OwnBooks {
    let mut abs: Vec<f64> = read.panel.returns.iter().filter(|r| r.is_finite()).map(|r| r.abs()).collect();
    if !abs.is_empty() {
        let mid = abs.len() / 2;
        let median = *abs.select_nth_unstable_by(mid, f64::total_cmp).1;
        if median > 0.2 {
            warnings.push(format!(
                "the median absolute return is {median:.3}: if returns are in per cent, divide them by 100, since \
                 --cost-bps assumes decimal returns (0.01 = 1%)"
            ));
        }
    }
    let books = crate::portfolio::own::own_books(&read.panel, s.horizons, s.min_assets);
    crate::report::OwnBooks::new(&books, costs_bps, calibrate::periods_per_year(read.median_gap_days))
}

/// The study on the calibrated scenario: how often a history like the user's
/// picks the right horizon, and the spread of each mean across its histories.
/// Only the horizon rules are reported, so the reference simulation behind
/// the net-IR truth is cut to its minimum here (it would otherwise cost
/// `reference_paths` full-size histories); the written `calibrated.toml`
/// keeps the default for `lagfold run`.
fn calibrated_study(
    mut scenario: crate::scenario::Scenario,
    a: &StudyArgs,
    costs_bps: &[f64],
) -> Result<(CalibratedStudy, SimulatedSpread), Failure> {
    match costs_bps.first() {
        // The net-IR truth needs the full reference simulation.
        Some(&c) => scenario.portfolio.cost_bps = c,
        None => scenario.portfolio.reference_paths = MIN_REFERENCE_PATHS,
    }
    if let Some(v) = a.target_vol {
        scenario.portfolio.target_vol =
            crate::scenario::check_target_vol("--target-vol", v).map_err(|e| Failure::input(format!("option {e}")))?;
    }
    let target_vol = scenario.portfolio.target_vol;
    let setup = Setup::new(scenario).map_err(|e| Failure::input(format!("calibrated.toml: {e}")))?;
    let (_, r) = truth_and_study(&setup, a, costs_bps);
    let net = r
        .cost_sweep
        .iter()
        .map(|row| CalibratedNet {
            cost_bps: row.cost_bps,
            true_best_holding: row.true_best_holding,
            hit_rate: row.measured.hit_rate,
            hit_rate_se: row.measured.hit_rate_se,
            hit_rate_ci: row.measured.hit_rate_ci,
            near_hit_rate: row.measured.near_hit_rate,
            near_hit_rate_se: row.measured.near_hit_rate_se,
            regret_bps_year_mean: row.measured.regret_bps_year_mean,
            regret_bps_year_mean_se: row.measured.regret_bps_year_total_se(),
            target_vol,
        })
        .collect();
    let rules = [&r.rules.peak, &r.rules.formula, &r.rules.fitted];
    let sqrt_paths = (r.paths as f64).sqrt();
    let spread = |c: &crate::study::CurveStats| c.mean_se.iter().map(|s| s.map(|s| s * sqrt_paths)).collect();
    Ok((
        CalibratedStudy {
            scenario_file: "calibrated.toml".into(),
            assets: setup.scenario.assets,
            history: setup.scenario.history,
            what_if: None,
            paths: r.paths,
            true_best_horizon: setup.truth.best_horizon,
            near_hit_rate: rules.map(|x| x.near_hit_rate),
            near_hit_rate_se: rules.map(|x| x.near_hit_rate_se),
            near_hit_rate_ci: rules.map(|x| x.near_hit_rate_ci),
            regret_rel_mean: rules.map(|x| x.regret_rel_mean),
            net,
        },
        [spread(&r.lagged_ic), spread(&r.horizon_ic)],
    ))
}

/// The spread of the mean lagged and horizon ICs across the calibrated study's histories.
type SimulatedSpread = [Vec<Option<f64>>; 2];

/// Sets each curve's simulated spread and lists where it and the measured
/// standard error differ by more than a quarter.
fn compare_errors(result: &mut MeasureResult, sims: &SimulatedSpread) {
    for (name, curve, sim) in
        [("lagged IC", &mut result.lagged_ic, &sims[0]), ("horizon IC", &mut result.horizon_ic, &sims[1])]
    {
        curve.se_simulated = sim.iter().map(|s| s.and_then(crate::report::finite)).collect();
        for (i, (se, sim)) in curve.se.iter().zip(&curve.se_simulated).enumerate() {
            if let (Some(se), Some(sim)) = (se, sim)
                && *sim > 0.0
                && (se / sim - 1.0).abs() > 0.25
            {
                result.se_disagreements.push((name.to_string(), i + 1));
            }
        }
    }
}

/// What `measure` was asked for.
#[derive(Debug, Clone)]
pub struct Settings {
    /// Longest horizon measured.
    pub horizons: usize,
    /// Longest horizon asked for.
    pub horizons_requested: usize,
    /// Fewest assets with both values for a date to count.
    pub min_assets: usize,
    /// Returns over the period ending at each row's date.
    pub backward: bool,
    /// `(resamples, seed)` of the stationary bootstrap.
    pub bootstrap: (usize, u64),
    /// Periods in the rolling-IC chart.
    pub window: usize,
}

/// Counts of each rule's choices over the bootstrap resamples.
fn tally(resampled: &[[Option<usize>; 3]], i: usize, l: usize) -> Vec<u64> {
    let mut c = vec![0u64; l];
    resampled.iter().filter_map(|ch| ch[i]).for_each(|h| c[h - 1] += 1);
    c
}

/// The 5 % and 95 % points of the chosen horizons (inverse empirical distribution).
fn range_90(resampled: &[[Option<usize>; 3]], i: usize) -> Option<[usize; 2]> {
    let mut v: Vec<usize> = resampled.iter().filter_map(|ch| ch[i]).collect();
    v.sort_unstable();
    let q = |p: f64| v[((p * v.len() as f64).ceil() as usize).clamp(1, v.len()) - 1];
    (!v.is_empty()).then(|| [q(0.05), q(0.95)])
}

/// One signal's curves, rule choices and bootstrap: what the full
/// measurement and the comparison of several signals share.
pub(crate) struct Core {
    /// The per-date figures.
    pub m: Measurement,
    /// Dates with a lag-1 IC.
    pub used: usize,
    /// Lagged ICs with EWC errors.
    pub lagged_ic: Curve,
    /// Horizon ICs with EWC errors.
    pub horizon_ic: Curve,
    /// Each rule's horizon (peak, formula, fitted).
    pub chosen: [Option<usize>; 3],
    /// The fitted decay curve, if one fits.
    pub best: Option<fit::Fit>,
    /// The stationary bootstrap of the choices.
    pub bootstrap: Bootstrap,
}

/// Measures one signal's panel; `None` when no date gives a lag-1 IC.
pub(crate) fn core(p: &Panel, s: &Settings, with_rank: bool) -> Option<Core> {
    let l = s.horizons;
    let mut m = Measurement::new(l, with_rank).with_min_assets(s.min_assets);
    m.update(p);
    let used = m.lagged.series(1).len();
    if used == 0 {
        return None;
    }
    let lagged_ic = Curve::from_per_date(&m.lagged, false);
    let horizon_ic = Curve::from_per_date(&m.horizon, true);
    // The rules and the fit use the study's Newey–West errors as weights, as on simulated panels.
    let (lag_mean, lag_se) = m.lagged.means_and_se(false);
    let hor_mean = horizon_ic.means_or_nan();
    let chosen = choose_measured(&lag_mean, &lag_se, &hor_mean);
    let all_finite = lag_mean.iter().all(|x| x.is_finite()) && lag_se.iter().all(|x| x.is_some_and(f64::is_finite));
    let best = all_finite.then(|| fit::best_fit(&lag_mean, &lag_se)).filter(|f| {
        f.curve.iter().all(|x| x.is_finite()) && f.amplitude.is_finite() && f.shape1.is_finite() && f.shape2.is_finite()
    });
    let m_dates = p.dates - 1;
    let block = (l as f64).max((m_dates as f64).cbrt()).min(m_dates as f64 / 2.0).max(1.0);
    let (reps, seed) = s.bootstrap;
    let resampled = bootstrap::choices(&m.lagged, &m.horizon, &lag_se, m_dates, block, reps, seed);
    let counts =
        BootCounts { peak: tally(&resampled, 0, l), formula: tally(&resampled, 1, l), fitted: tally(&resampled, 2, l) };
    let per_rule = [&counts.peak, &counts.formula, &counts.fitted];
    let shares: [Option<f64>; 3] = std::array::from_fn(|i| chosen[i].map(|h| per_rule[i][h - 1] as f64 / reps as f64));
    let bootstrap = Bootstrap {
        replicates: reps,
        mean_block_length: block,
        share_at_estimate: shares,
        share_at_estimate_se: shares.map(|p| p.map(|p| (p * (1.0 - p) / reps as f64).sqrt())),
        range_90: std::array::from_fn(|i| range_90(&resampled, i)),
        choice_counts: counts,
    };
    Some(Core { m, used, lagged_ic, horizon_ic, chosen, best, bootstrap })
}

/// Every figure of a read panel, and the fitted decay curve (`None` when the
/// lagged ICs cannot be fitted).
///
/// # Errors
/// A message naming the file, why nothing can be measured and the fix, when
/// no date is usable.
pub fn measure(
    read: &crate::reader::ReadPanel,
    file: &Path,
    s: &Settings,
) -> Result<(MeasureResult, Option<fit::Fit>), String> {
    let (p, l, min) = (&read.panel, s.horizons, s.min_assets);
    let Some(Core { m, used, lagged_ic, horizon_ic, chosen, best, bootstrap }) = core(p, s, true) else {
        return Err(format!("{}: {}", file.display(), extras::why_unmeasurable(p, min)));
    };
    let rank_ic = Curve::from_per_date(&m.rank_lagged, false);
    let (agree, total) = sign::sign_agreement(p, 1, min);
    let ic1 = lagged_ic.mean[0];
    let binary = extras::two_valued(p);
    let sheppard = ic1.map(|ic| 0.5 + ic.clamp(-1.0, 1.0).asin() / std::f64::consts::PI);
    let grinold_kahn = ic1.filter(|_| binary).map(|ic| (1.0 + ic) / 2.0);
    let success_ratio = SuccessRatio {
        implied: if binary { grinold_kahn } else { sheppard },
        relation: if binary { "binary" } else { "sheppard" }.into(),
        sheppard,
        binary: grinold_kahn,
        observed: (total > 0).then(|| agree as f64 / total as f64),
        pairs: total,
    };
    let mut warnings = read.warnings.clone();
    let timing = timing_check(p, &m, min, s.backward, &mut warnings);
    let per_date = per_date_table(read, &m, min);
    let kurtosis = extras::return_excess_kurtosis(p, min).and_then(finite);
    let ic_volatility = extras::ic_volatility(p, min).and_then(finite);
    let ic_persistence = extras::ic_persistence(p, min).and_then(finite);
    let skipped_dates = per_date
        .dates
        .iter()
        .zip(&per_date.skipped)
        .filter_map(|(d, r)| Some(SkippedDate { date: d.clone(), reason: r.clone()? }))
        .collect();
    let (fitted_family, fitted_shape, fitted_curve) = match &best {
        Some(f) => (f.family.name().to_string(), finite(f.shape1), f.curve.clone()),
        None => ("none".to_string(), None, Vec::new()),
    };
    let result = MeasureResult {
        file: file.display().to_string(),
        signal: read.signals[0].clone(),
        rows: read.rows,
        dates: p.dates,
        assets: p.assets,
        horizons_requested: s.horizons_requested,
        horizons: l,
        frequency: read.frequency.name().into(),
        missing_periods: read.missing_periods.clone(),
        dates_used: used,
        dates_skipped: p.dates - used,
        return_timing: if s.backward {
            "over the period ending at each row's date".into()
        } else {
            "over the period starting at each row's date".into()
        },
        success_ratio,
        timing,
        forecast_autocorrelation: extras::forecast_autocorrelation(p, min).and_then(finite),
        ic_volatility,
        ic_persistence,
        return_excess_kurtosis: kurtosis,
        tails_dof: kurtosis.and_then(|k| {
            let model_vol =
                extras::ic_vol_parameter(ic_volatility.unwrap_or(0.0), ic_persistence.unwrap_or(0.0), p.dates - 1);
            extras::tail_dof(k, model_vol)
        }),
        fitted_family,
        fitted_shape,
        fitted_curve,
        best_horizon: BestHorizon { peak: chosen[0], formula: chosen[1], fitted: chosen[2] },
        lagged_ic,
        rank_ic,
        horizon_ic,
        se_method: SE_METHOD.into(),
        bootstrap,
        se_disagreements: Vec::new(),
        calibrated_study: None,
        warnings,
        skipped_dates,
        neutralised_on: Vec::new(),
        rolling_window: s.window,
        comparison: None,
        books: None,
        per_date,
    };
    Ok((result, best))
}

/// Every date's figures and why a date gave no lag-1 IC.
fn per_date_table(read: &crate::reader::ReadPanel, m: &Measurement, min: usize) -> PerDateTable {
    let p = &read.panel;
    let t = p.dates;
    let used: Vec<usize> = (0..t)
        .map(|d| {
            if d + 1 >= t {
                return 0;
            }
            p.forecast_row(d).iter().zip(p.return_row(d)).filter(|(f, r)| f.is_finite() && r.is_finite()).count()
        })
        .collect();
    let lagged = PerDateTable::by_date(&m.lagged, t);
    let skipped = (0..t)
        .map(|d| {
            if lagged[d][0].is_some() {
                None
            } else if d + 1 == t {
                Some("last date: no return after it".to_string())
            } else if read.missing_periods.contains(&read.dates[d]) {
                Some("missing period: no rows".to_string())
            } else if used[d] < min {
                Some(format!(
                    "{} assets with a forecast and a next-period return, fewer than --min-assets {min}",
                    used[d]
                ))
            } else {
                Some("no cross-sectional variance in the forecast or the return".to_string())
            }
        })
        .collect();
    PerDateTable {
        dates: read.dates.clone(),
        used_assets: used,
        lagged,
        rank: PerDateTable::by_date(&m.rank_lagged, t),
        horizon: PerDateTable::by_date(&m.horizon, t),
        skipped,
    }
}

/// How the reported standard errors and intervals are made.
pub const SE_METHOD: &str = "equal-weighted cosine (EWC) long-run variance with Student-t critical values \
    (Müller 2004; Lazarus, Lewis, Stock and Watson 2018); degrees of freedom min(0.4·m^(2/3), m/(4n), an AR(1) \
    bound), at least 2";

/// The return-timing check: the lag-0 IC (the return over the period ending
/// at the forecast's date) beside lags 1 and 2, and a warning when the curve
/// looks shifted by one period. Forward returns: the lag-1 IC is below the
/// lag-2 IC by more than its 95 % interval and the curve falls after lag 2 (a
/// backward return read as forward moves every lag up by one). Backward
/// returns: the lag-0 IC is positive and above the lag-1 IC by more than its
/// 95 % interval (a forward return read as backward moves every lag down).
fn timing_check(p: &Panel, m: &Measurement, min: usize, backward: bool, warnings: &mut Vec<String>) -> TimingCheck {
    let lag0 = extras::lag0_ics(p, min);
    let lag0_iv = lag0.intervals(false)[0];
    let mean = |k: usize| {
        let s = m.lagged.series(k);
        (!s.is_empty()).then(|| s.iter().sum::<f64>() / s.len() as f64)
    };
    // Per-date differences a(t) − b(t + shift) over dates present in both.
    let diff = |a: (&[f64], &[u32]), b: (&[f64], &[u32]), shift: u32| -> Option<crate::measure::ewc::Interval> {
        let bmap: std::collections::HashMap<u32, f64> = b.1.iter().zip(b.0).map(|(d, v)| (*d, *v)).collect();
        let d: Vec<f64> = a.1.iter().zip(a.0).filter_map(|(t, v)| bmap.get(&(t + shift)).map(|w| v - w)).collect();
        crate::measure::ewc::interval(&d, 1)
    };
    let mut looks_shifted = false;
    if !backward && m.horizons() >= 2 {
        let (m1, m2) = (mean(1), mean(2));
        let falls = m.horizons() < 3 || mean(3).zip(m2).is_some_and(|(m3, m2)| m2 >= m3);
        let gap = diff((m.lagged.series(1), m.lagged.dates(1)), (m.lagged.series(2), m.lagged.dates(2)), 0);
        if let (Some(g), Some(m1), Some(m2)) = (gap, m1, m2)
            && g.high() < 0.0
            && falls
        {
            looks_shifted = true;
            warnings.push(format!(
                "the lag-1 IC ({m1:.4}) is below the lag-2 IC ({m2:.4}) by more than its 95% interval and the \
                     curve falls after lag 2: if each row's return is over the period ending at its date, pass \
                     --backward-returns (a signal whose IC truly peaks at lag 2 looks the same)"
            ));
        }
    }
    if backward {
        // lag-0 date index t is the forecast at date t + 1.
        let gap = diff((lag0.series(1), lag0.dates(1)), (m.lagged.series(1), m.lagged.dates(1)), 1);
        if let (Some(g), Some(l0), Some(m1)) = (gap, lag0_iv, mean(1))
            && g.low() > 0.0
            && l0.mean > 0.0
        {
            looks_shifted = true;
            warnings.push(format!(
                "the return on each row's own period (lag 0, IC {:.4}) predicts better than the next period's \
                     (lag 1, IC {m1:.4}) by more than its 95% interval: if each row's return is over the period \
                     starting at its date, drop --backward-returns (a signal built from the latest period's return \
                     can also show this)",
                l0.mean
            ));
        }
    }
    TimingCheck {
        lag0_ic: lag0_iv.and_then(|i| finite(i.mean)),
        lag0_se: lag0_iv.and_then(|i| finite(i.se)),
        looks_shifted,
    }
}
