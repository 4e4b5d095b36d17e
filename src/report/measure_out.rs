//! Outputs of `lagfold measure`: `measure.json`, `measure_lags.csv` and the terminal summary.

use super::records::document;
use super::summary::CAUTION;
use serde::Serialize;
use std::fmt::Write;

/// Means per lag (or horizon) with standard errors and t-statistics.
#[derive(Debug, Clone, Serialize)]
pub struct Curve {
    /// Mean over dates, index 0 = lag or horizon 1.
    pub mean: Vec<f64>,
    /// Overlap-aware standard error.
    pub se: Vec<Option<f64>>,
    /// `mean / se`.
    pub t: Vec<Option<f64>>,
}

impl Curve {
    /// From means and standard errors.
    pub fn new(mean: Vec<f64>, se: Vec<Option<f64>>) -> Self {
        let t = mean.iter().zip(&se).map(|(m, s)| s.filter(|s| *s > 0.0).map(|s| m / s)).collect();
        Self { mean, se, t }
    }
}

/// The chosen horizon per rule (1-based).
#[derive(Debug, Clone, Serialize)]
pub struct BestHorizon {
    /// Peak of the measured horizon IC.
    pub peak: usize,
    /// Peak of `Σ IC_k/√n` from the measured lagged ICs.
    pub formula: usize,
    /// Optimum of the fitted decay curve.
    pub fitted: usize,
}

/// The stationary bootstrap of the chosen horizon.
#[derive(Debug, Clone, Serialize)]
pub struct Bootstrap {
    /// Resamples.
    pub replicates: usize,
    /// Mean block length in dates.
    pub mean_block_length: f64,
    /// Per rule, how often each horizon was chosen (index 0 = horizon 1).
    pub choice_counts: BootCounts,
    /// Per rule, the share of resamples that chose the full-sample estimate.
    pub share_at_estimate: [f64; 3],
    /// Monte Carlo errors of those shares, `sqrt(p(1 − p)/replicates)`.
    pub share_at_estimate_se: [f64; 3],
    /// Per rule, the 5 % and 95 % quantiles of the chosen horizon.
    pub range_90: [[f64; 2]; 3],
}

/// Choice counts per rule.
#[derive(Debug, Clone, Serialize)]
pub struct BootCounts {
    /// Peak rule.
    pub peak: Vec<u64>,
    /// Formula rule.
    pub formula: Vec<u64>,
    /// Fitted rule.
    pub fitted: Vec<u64>,
}

/// How often a history like the user's picks the right horizon, from the
/// study on the calibrated scenario.
#[derive(Debug, Clone, Serialize)]
pub struct CalibratedStudy {
    /// The scenario file written.
    pub scenario_file: String,
    /// Paths simulated.
    pub paths: usize,
    /// True optimal horizon of the calibrated scenario.
    pub true_best_horizon: usize,
    /// Per rule (peak, formula, fitted): near-hit rate, its error, mean relative regret.
    pub near_hit_rate: [f64; 3],
    /// Monte Carlo errors of `near_hit_rate`.
    pub near_hit_rate_se: [f64; 3],
    /// Mean share of the best horizon IC given up.
    pub regret_rel_mean: [f64; 3],
}

/// Everything `measure` reports.
#[derive(Debug, Clone, Serialize)]
pub struct MeasureResult {
    /// The file measured.
    pub file: String,
    /// Data rows read.
    pub rows: u64,
    /// Dates in the file.
    pub dates: usize,
    /// Assets seen.
    pub assets: usize,
    /// Dates with a lag-1 IC (enough assets with both values).
    pub dates_used: usize,
    /// Dates without (too few assets, or no forward return).
    pub dates_skipped: usize,
    /// Return timing assumed.
    pub return_timing: String,
    /// Lagged Pearson ICs.
    pub lagged_ic: Curve,
    /// Lagged rank (Spearman) ICs.
    pub rank_ic: Curve,
    /// Horizon ICs.
    pub horizon_ic: Curve,
    /// Standard-error method.
    pub se_method: String,
    /// Success ratio implied by the lag-1 IC, `(1 + IC)/2` (Grinold and Kahn).
    pub success_ratio: f64,
    /// Observed share of assets whose demeaned forecast and next return share a sign.
    pub sign_hit_rate: f64,
    /// Mean cross-sectional correlation of the forecast with its previous value.
    pub forecast_autocorrelation: Option<f64>,
    /// Standard deviation of the lag-1 IC beyond sampling noise.
    pub ic_volatility: Option<f64>,
    /// Fitted decay family, chosen by AIC.
    pub fitted_family: String,
    /// Its half-life (exponential), exponent (power), zero lag (linear) or peak lag (hump).
    pub fitted_shape: f64,
    /// The fitted curve, lag 1 first.
    pub fitted_curve: Vec<f64>,
    /// The estimated optimal horizon under each rule.
    pub best_horizon: BestHorizon,
    /// The stationary bootstrap of the chosen horizon (Politis and Romano, 1994).
    pub bootstrap: Bootstrap,
    /// The study run on the calibrated scenario (`calibrated.toml`), when run.
    pub calibrated_study: Option<CalibratedStudy>,
    /// What the reader noticed.
    pub warnings: Vec<String>,
}

/// `measure.json`.
pub fn measure_json(m: &MeasureResult) -> Vec<u8> {
    document::<(), _>(None, m)
}

/// `measure_lags.csv`: one row per lag/horizon.
pub fn measure_csv(m: &MeasureResult) -> Vec<u8> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record([
        "n",
        "ic_mean",
        "ic_se",
        "ic_t",
        "rank_ic_mean",
        "rank_ic_se",
        "horizon_ic_mean",
        "horizon_ic_se",
        "horizon_ic_t",
        "fitted_ic",
    ])
    .expect("in-memory CSV");
    let o = |x: Option<f64>| x.map(|v| format!("{v:.8}")).unwrap_or_default();
    for i in 0..m.lagged_ic.mean.len() {
        w.write_record([
            (i + 1).to_string(),
            format!("{:.8}", m.lagged_ic.mean[i]),
            o(m.lagged_ic.se[i]),
            o(m.lagged_ic.t[i]),
            format!("{:.8}", m.rank_ic.mean[i]),
            o(m.rank_ic.se[i]),
            format!("{:.8}", m.horizon_ic.mean[i]),
            o(m.horizon_ic.se[i]),
            o(m.horizon_ic.t[i]),
            format!("{:.8}", m.fitted_curve[i]),
        ])
        .expect("in-memory CSV");
    }
    w.into_inner().expect("in-memory CSV")
}

/// The terminal summary.
pub fn measure_terminal(m: &MeasureResult) -> String {
    let mut out = String::new();
    let _ = writeln!(out, "lagfold measure · {}", m.file);
    let _ = writeln!(
        out,
        "  {} rows, {} dates ({} used, {} skipped), {} assets; returns taken as {}",
        m.rows, m.dates, m.dates_used, m.dates_skipped, m.assets, m.return_timing
    );
    for w in &m.warnings {
        let _ = writeln!(out, "  warning: {w}");
    }
    let _ = writeln!(
        out,
        "\n  {:>4}  {:>9}  {:>8}  {:>6}  {:>9}  {:>10}  {:>8}  {:>6}  {:>9}",
        "n", "IC", "se", "t", "rank IC", "horizon IC", "se", "t", "fitted IC"
    );
    let f = |x: Option<f64>, p: usize| x.map_or("—".to_string(), |v| format!("{v:.p$}"));
    for i in 0..m.lagged_ic.mean.len() {
        let _ = writeln!(
            out,
            "  {:>4}  {:>9.4}  {:>8}  {:>6}  {:>9.4}  {:>10.4}  {:>8}  {:>6}  {:>9.4}",
            i + 1,
            m.lagged_ic.mean[i],
            f(m.lagged_ic.se[i], 4),
            f(m.lagged_ic.t[i], 1),
            m.rank_ic.mean[i],
            m.horizon_ic.mean[i],
            f(m.horizon_ic.se[i], 4),
            f(m.horizon_ic.t[i], 1),
            m.fitted_curve[i]
        );
    }
    let b = &m.best_horizon;
    let _ = writeln!(
        out,
        "\n  Estimated best horizon: {} (peak of horizon IC), {} (Σ IC/√n), {} (fitted {} curve, shape {:.2}).",
        b.peak, b.formula, b.fitted, m.fitted_family, m.fitted_shape
    );
    let bs = &m.bootstrap;
    let _ = writeln!(
        out,
        "  Stationary bootstrap ({} resamples of dates, mean block {:.0}): the estimate recurs in {:.0}% / {:.0}% / {:.0}% of resamples; 90% ranges {}–{}, {}–{}, {}–{}.",
        bs.replicates,
        bs.mean_block_length,
        100.0 * bs.share_at_estimate[0],
        100.0 * bs.share_at_estimate[1],
        100.0 * bs.share_at_estimate[2],
        bs.range_90[0][0],
        bs.range_90[0][1],
        bs.range_90[1][0],
        bs.range_90[1][1],
        bs.range_90[2][0],
        bs.range_90[2][1]
    );
    if let Some(c) = &m.calibrated_study {
        {
            let _ = writeln!(
                out,
                "  A history like this one ({}; {} simulated, true best horizon {}): the peak rule lands within one period of the truth in {:.0}% ± {:.0} of them and gives up {:.1}% of the best horizon IC on average (formula {:.0}%, fitted {:.0}%).",
                c.scenario_file,
                c.paths,
                c.true_best_horizon,
                100.0 * c.near_hit_rate[0],
                100.0 * c.near_hit_rate_se[0],
                100.0 * c.regret_rel_mean[0],
                100.0 * c.near_hit_rate[1],
                100.0 * c.near_hit_rate[2]
            );
        }
    }
    let _ = writeln!(
        out,
        "  Success ratio implied by the lag-1 IC: {:.3}; observed sign hit rate: {:.3}. Forecast autocorrelation {}, IC volatility beyond sampling noise {}.",
        m.success_ratio,
        m.sign_hit_rate,
        f(m.forecast_autocorrelation, 3),
        f(m.ic_volatility, 4)
    );
    let _ = writeln!(out, "\n{CAUTION}");
    out
}
