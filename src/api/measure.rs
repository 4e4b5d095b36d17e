//! A user's own panel measured, and the study on the scenario calibrated to
//! it: how often a history like theirs picks the right horizon.

use super::{Error, Files, Overrides, Progress, at_cost, charts, check_costs, finite, stage};
use crate::calibrate;
use crate::own_data::{self, BlendWeight, CalibratedNet, CalibratedStudy, MeasureResult, Settings};
use crate::reader::{Column, ReadOptions, ReadPanel};
use crate::report;
use crate::simulate::Setup;
use std::path::{Path, PathBuf};

/// Where the panel comes from.
#[derive(Debug, Clone)]
pub enum PanelSource {
    /// A CSV or Apache Parquet file; `-` is standard input.
    File(PathBuf),
    /// Named columns held in memory (a data frame's); the name is for messages.
    Columns(String, Vec<(String, Column)>),
}

impl PanelSource {
    /// The name in messages and outputs.
    pub fn name(&self) -> String {
        match self {
            PanelSource::File(p) => p.display().to_string(),
            PanelSource::Columns(name, _) => name.clone(),
        }
    }

    /// The stem that names outputs and the calibrated scenario (`stdin` for
    /// `-`; a name of columns in memory counts as a file name).
    pub fn stem(&self) -> String {
        let path = match self {
            PanelSource::File(p) if p.as_os_str() == "-" => return "stdin".into(),
            PanelSource::File(p) => p.as_path(),
            PanelSource::Columns(name, _) => Path::new(name),
        };
        path.file_stem().map_or("panel".into(), |s| s.to_string_lossy().into_owned())
    }
}

/// How to measure a panel.
#[derive(Debug, Clone)]
pub struct MeasureOptions {
    /// Column names and conventions; `forecasts` empty with `every_signal`
    /// false measures `forecast` (or the blend's columns).
    pub read: ReadOptions,
    /// Measure every numeric column not named in another role.
    pub every_signal: bool,
    /// A blend of the signals' per-date z-scores to measure beside them.
    pub blend: Vec<BlendWeight>,
    /// Longest horizon (`None`: 24, cut to a quarter of the history).
    pub horizons: Option<usize>,
    /// Fewest assets with both values for a date to count (at least 3).
    pub min_assets: usize,
    /// Stationary-bootstrap resamples of the dates.
    pub bootstrap: usize,
    /// Periods in the rolling mean of the lag-1 IC.
    pub window: usize,
    /// Seed of the bootstrap and of the calibrated study.
    pub seed: u64,
    /// One-way costs in basis points of the books on the panel.
    pub cost_bps: Vec<f64>,
    /// Run the study on the calibrated scenario.
    pub study: bool,
    /// Histories of that study (`None`: sized to the panel).
    pub paths: Option<usize>,
    /// What if the panel were this broad.
    pub assets: Option<usize>,
    /// What if the panel were this long.
    pub history: Option<usize>,
    /// The book's annual volatility every bps figure is scaled to.
    pub target_vol: Option<f64>,
    /// Worker threads of the calibrated study (0: every core).
    pub threads: usize,
}

impl Default for MeasureOptions {
    fn default() -> Self {
        Self {
            read: ReadOptions::default(),
            every_signal: false,
            blend: Vec::new(),
            horizons: None,
            min_assets: 20,
            bootstrap: 1000,
            window: 12,
            seed: 1,
            cost_bps: Vec::new(),
            study: true,
            paths: None,
            assets: None,
            history: None,
            target_vol: None,
            threads: 0,
        }
    }
}

/// Everything `measure` reports.
#[derive(Debug, Clone)]
pub struct MeasureOutcome {
    /// The figures.
    pub result: MeasureResult,
    /// The calibrated scenario's TOML, when a decay curve could be fitted.
    pub calibrated_toml: Option<String>,
    /// The settings, as the report's parameters list them.
    pub settings: serde_json::Value,
}

/// Measures the panel of `source` (columns in memory are moved into the
/// panel, not copied).
///
/// # Errors
/// A file, column or row the reader refuses, a panel with no measurable
/// date, an option out of range; each names the file, line or field.
pub fn measure(source: PanelSource, o: &MeasureOptions, progress: &dyn Progress) -> Result<MeasureOutcome, Error> {
    let (source_name, stem) = (source.name(), source.stem());
    check_costs(&o.cost_bps, super::study::MAX_COST_LEVELS, "`measure`")?;
    if o.horizons == Some(0) {
        return Err(Error::input("`--horizons` must be at least 1, got 0"));
    }
    if o.min_assets < 3 {
        return Err(Error::Input(format!("`--min-assets` must be at least 3, got {}", o.min_assets)));
    }
    let mut read_opts = o.read.clone();
    if o.every_signal {
        read_opts.forecasts.clear();
    } else {
        if read_opts.forecasts.is_empty() && o.blend.is_empty() {
            read_opts.forecasts.push("forecast".into());
        }
        for w in &o.blend {
            if !read_opts.forecasts.contains(&w.signal) {
                read_opts.forecasts.push(w.signal.clone());
            }
        }
    }
    let mut read = match source {
        PanelSource::File(p) => crate::reader::read_panel(&p, &read_opts),
        PanelSource::Columns(name, cols) => crate::reader::read_panel_columns(Path::new(&name), cols, &read_opts),
    }
    .map_err(Error::input)?;
    neutralise(&mut read);
    let neutralised_on: Vec<String> = o.read.group.iter().chain(&o.read.exposures).cloned().collect();
    let cap = read.panel.dates / 4;
    let requested = o.horizons.unwrap_or(own_data::DEFAULT_HORIZONS);
    let l = requested.min(cap);
    if o.horizons.is_some() && requested > cap {
        read.warnings.push(format!(
            "horizons cut from {requested} to {cap}: the history has {} periods, and a horizon-n mean needs about 4n \
             of them for its 95% interval to hold (checked up to a quarter of the history)",
            read.panel.dates
        ));
    }
    let settings = Settings {
        horizons: l,
        horizons_requested: requested,
        min_assets: o.min_assets,
        backward: o.read.backward,
        bootstrap: (o.bootstrap, o.seed),
        window: o.window,
    };
    let file = PathBuf::from(&source_name);
    let (mut result, fit) = own_data::measure(&read, &file, &settings).map_err(Error::Input)?;
    result.neutralised_on = neutralised_on;
    let mut warnings = Vec::new();
    result.comparison =
        own_data::compare(&mut read, &result, o.blend.clone(), &settings, &mut warnings).map_err(Error::Input)?;
    result.warnings.extend(warnings);
    if !o.cost_bps.is_empty() {
        result.books = Some(own_data::own_books(&read, &settings, &o.cost_bps, &mut result.warnings));
    }
    let name: String = format!("{stem}-calibrated")
        .chars()
        .map(|c| if c.is_ascii_alphanumeric() || "-_.".contains(c) { c } else { '-' })
        .collect();
    let paths = o.paths.unwrap_or_else(|| calibrate::default_paths(read.panel.assets, read.panel.dates, l));
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
            o.seed,
        ),
        None => Err("no decay curve could be fitted: some lagged ICs have no dates or no standard error".into()),
    };
    // The panel is no longer needed: free it before the study's own histories.
    drop(read);
    let mut calibrated_toml = None;
    match calibrated {
        Ok((text, scenario)) => {
            if o.study {
                let what_if = Overrides { assets: o.assets, history: o.history, ..Default::default() };
                let moved = what_if.assets.is_some() || what_if.history.is_some();
                let scenario = if moved {
                    crate::scenario::load(&text, "calibrated.toml", &name, &what_if).map_err(Error::input)?
                } else {
                    scenario
                };
                let (mut study, sims) = calibrated_study(&scenario, o, progress)?;
                if moved {
                    study.what_if =
                        Some(format!("{} assets × {} dates instead of the panel's", study.assets, study.history));
                } else {
                    // The simulated spread is comparable only for a history like the panel's.
                    compare_errors(&mut result, &sims);
                }
                result.calibrated_study = Some(study);
            }
            calibrated_toml = Some(text);
        }
        Err(e) => result.warnings.push(format!("no calibrated scenario (calibrated.toml not written): {e}")),
    }
    let settings = settings_json(&source_name, o, &result, l);
    Ok(MeasureOutcome { result, calibrated_toml, settings })
}

/// Neutralises forecasts and returns on the panel's group and exposures, then frees them.
fn neutralise(read: &mut ReadPanel) {
    let covariates = std::mem::take(&mut read.covariates);
    crate::measure::neutralise::neutralise(&mut read.panel, &covariates);
    for f in &mut read.other_forecasts {
        crate::measure::neutralise::neutralise_forecasts(f, read.panel.assets, &covariates);
    }
}

/// The settings as the report lists them.
fn settings_json(panel: &str, o: &MeasureOptions, r: &MeasureResult, l: usize) -> serde_json::Value {
    let signals = r.comparison.as_ref().map_or(vec![r.signal.clone()], |c| {
        c.signals.iter().filter(|s| s.kind == "signal").map(|s| s.name.clone()).collect()
    });
    let blend: Vec<String> = o.blend.iter().map(|w| format!("{}={}", w.signal, w.weight)).collect();
    serde_json::json!({
        "panel": panel,
        "columns": {"date": o.read.date, "asset": o.read.asset, "forecast": signals, "return": o.read.ret},
        "blend": blend,
        "group_column": o.read.group,
        "neutralize": o.read.exposures,
        "return_timing": r.return_timing,
        "horizons": l,
        "min_assets": o.min_assets,
        "bootstrap_resamples": o.bootstrap,
        "cost_bps": o.cost_bps,
        "bootstrap_mean_block_length": r.bootstrap.mean_block_length,
        "seed": o.seed,
    })
}

/// The study on the calibrated scenario: how often a history like the user's
/// picks the right horizon, and the spread of each mean across its histories.
/// Without costs only the horizon rules are reported, so the study runs
/// without the portfolio layer (no reference simulation, no books); with
/// costs the net-IR truth needs the full reference simulation.
fn calibrated_study(
    scenario: &crate::scenario::Scenario,
    o: &MeasureOptions,
    progress: &dyn Progress,
) -> Result<(CalibratedStudy, SimulatedSpread), Error> {
    let changes = Overrides { target_vol: o.target_vol, ..Default::default() };
    let revised = scenario.revised(&changes).map_err(|e| Error::Input(format!("calibrated.toml: {e}")))?;
    let scenario = at_cost(&revised, o.cost_bps.first().copied(), "calibrated.toml")?;
    let target_vol = scenario.portfolio.target_vol;
    let setup = Setup::new(scenario).map_err(|e| Error::Input(format!("calibrated.toml: {e}")))?;
    let threads = super::threads_or_all(o.threads);
    let s = &setup.scenario;
    let (horizons, net) = if o.cost_bps.is_empty() {
        super::note_long(progress, s.paths, s, threads);
        (stage(progress, "study", s.paths, |p| crate::study::run_horizons(&setup, threads, p)), Vec::new())
    } else {
        super::note_long(progress, s.paths + s.portfolio.reference_paths, s, threads);
        let portfolio = stage(progress, "reference", s.portfolio.reference_paths, |p| {
            crate::portfolio::PortfolioTruth::compute(&setup, threads, p)
        });
        let r = stage(progress, "study", s.paths, |p| crate::study::run(&setup, &portfolio, &o.cost_bps, threads, p));
        let net = r.cost_sweep.iter().map(|row| calibrated_net(row, target_vol)).collect();
        (r.horizons(), net)
    };
    let rules = &horizons.rules;
    let sqrt_paths = (horizons.paths as f64).sqrt();
    let spread = |c: &crate::study::CurveStats| c.mean_se.iter().map(|s| s.map(|s| s * sqrt_paths)).collect();
    Ok((
        CalibratedStudy {
            scenario_file: "calibrated.toml".into(),
            assets: s.assets,
            history: s.history,
            what_if: None,
            paths: horizons.paths,
            true_best_horizon: setup.truth.best_horizon,
            near_hit_rate: rules.map(|x| x.near_hit_rate),
            near_hit_rate_se: rules.map(|x| x.near_hit_rate_se),
            near_hit_rate_ci: rules.map(|x| x.near_hit_rate_ci),
            regret_rel_mean: rules.map(|x| x.regret_rel_mean),
            net,
        },
        [spread(&horizons.lagged_ic), spread(&horizons.horizon_ic)],
    ))
}

/// The net-IR rule's record at one cost of the calibrated study.
fn calibrated_net(row: &crate::study::SweepRow, target_vol: f64) -> CalibratedNet {
    CalibratedNet {
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
    }
}

/// The spread of the mean lagged and horizon ICs across the calibrated study's histories.
type SimulatedSpread = [Vec<Option<f64>>; 2];

/// Sets each curve's simulated spread and lists where it and the measured
/// standard error differ by more than a quarter.
fn compare_errors(result: &mut MeasureResult, sims: &SimulatedSpread) {
    for (name, curve, sim) in
        [("lagged IC", &mut result.lagged_ic, &sims[0]), ("horizon IC", &mut result.horizon_ic, &sims[1])]
    {
        curve.se_simulated = sim.iter().map(|s| s.and_then(own_data::finite)).collect();
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

impl super::Outcome for MeasureOutcome {
    /// `measure.json`, the CSV tables, `calibrated.toml`, the charts (when
    /// `draw_charts`) and `report.html`.
    ///
    /// # Errors
    /// A result that is not finite, or a chart that cannot be drawn.
    fn files(&self, draw_charts: bool, made: &report::Made) -> Result<Files, Error> {
        let r = &self.result;
        finite(r)?;
        let mut files = Vec::new();
        if let Some(text) = &self.calibrated_toml {
            files.push(("calibrated.toml".to_string(), text.clone().into_bytes()));
        }
        files.push(("measure.json".into(), report::measure_json(r)));
        files.push(("measure_lags.csv".into(), report::measure_csv(r)));
        files.push(("per_date.csv".into(), report::per_date_csv(r)));
        if let Some(c) = &r.comparison {
            files.push(("signals.csv".into(), report::signals_csv(c)));
        }
        if let Some(b) = &r.books {
            files.push(("holdings.csv".into(), report::holdings_csv(b)));
        }
        let charts = charts(draw_charts, || report::measure_charts(r))?;
        files.extend(charts.files);
        let page = report::html::measure_page(r, self.settings.clone(), charts.inline);
        files.push(("report.html".into(), report::html::render(&page, made)));
        Ok(files)
    }

    /// The terminal summary.
    fn terminal(&self) -> String {
        report::measure_terminal(&self.result)
    }
}
