//! What `measure` reports on a panel: the figures every exporter (JSON, CSV,
//! terminal, charts, HTML) and the Python module read.

use super::books::OwnBooks;
use super::compare::SignalComparison;
use crate::measure::PerDate;
use crate::rule::PerRule;
use serde::Serialize;

/// A finite value, or `None`: no NaN or infinity reaches an output.
pub fn finite(x: f64) -> Option<f64> {
    x.is_finite().then_some(x)
}

/// Means per lag (or horizon) with standard errors, 95 % intervals and
/// t-statistics; `None` wherever a figure is not measurable.
#[derive(Debug, Clone, Default, Serialize)]
pub struct Curve {
    /// Mean over dates, index 0 = lag or horizon 1.
    pub mean: Vec<Option<f64>>,
    /// Standard error of the mean (EWC, see `se_method`).
    pub se: Vec<Option<f64>>,
    /// Degrees of freedom of the Student-t critical value.
    pub df: Vec<Option<usize>>,
    /// Lower end of the 95 % interval.
    pub ci_low: Vec<Option<f64>>,
    /// Upper end of the 95 % interval.
    pub ci_high: Vec<Option<f64>>,
    /// `mean / se` (compare with Student's t on `df` degrees of freedom).
    pub t: Vec<Option<f64>>,
    /// Dates behind each mean.
    pub dates: Vec<usize>,
    /// Spread of the mean across histories simulated from `calibrated.toml`
    /// (a parametric bootstrap; empty without the calibrated study).
    pub se_simulated: Vec<Option<f64>>,
}

impl Curve {
    /// From per-date values (`overlap`: horizon ICs, whose overlap sets the
    /// degrees of freedom).
    pub fn from_per_date(p: &PerDate, overlap: bool) -> Self {
        let mut c = Curve::default();
        for (k, iv) in (1..=p.len()).zip(p.intervals(overlap)) {
            let s = p.series(k);
            c.mean.push(if s.is_empty() { None } else { finite(s.iter().sum::<f64>() / s.len() as f64) });
            c.se.push(iv.and_then(|i| finite(i.se)));
            c.df.push(iv.map(|i| i.df));
            c.ci_low.push(iv.and_then(|i| finite(i.low())));
            c.ci_high.push(iv.and_then(|i| finite(i.high())));
            c.t.push(iv.and_then(|i| (i.se > 0.0).then(|| finite(i.mean / i.se)).flatten()));
            c.dates.push(s.len());
        }
        c
    }

    /// Half the 95 % interval at index `i`.
    pub fn half_width(&self, i: usize) -> Option<f64> {
        Some((self.ci_high[i]? - self.ci_low[i]?) / 2.0)
    }

    /// The means with NaN where missing (for the rules, which check finiteness).
    pub fn means_or_nan(&self) -> Vec<f64> {
        self.mean.iter().map(|m| m.unwrap_or(f64::NAN)).collect()
    }
}

/// The chosen horizon per rule (1-based); `None` when the rule's curve is
/// not measurable.
pub type BestHorizon = PerRule<Option<usize>>;

/// The stationary bootstrap of the chosen horizon.
#[derive(Debug, Clone, Serialize)]
pub struct Bootstrap {
    /// Resamples.
    pub replicates: usize,
    /// Mean block length in dates.
    pub mean_block_length: f64,
    /// Per rule, how often each horizon was chosen (index 0 = horizon 1).
    pub choice_counts: PerRule<Vec<u64>>,
    /// Per rule, the share of resamples that chose the full-sample estimate.
    pub share_at_estimate: PerRule<Option<f64>>,
    /// Monte Carlo errors of those shares, `sqrt(p(1 − p)/replicates)`.
    pub share_at_estimate_se: PerRule<Option<f64>>,
    /// Per rule, the 5 % and 95 % quantiles of the chosen horizon (whole
    /// horizons: the inverse of the empirical distribution).
    pub range_90: PerRule<Option<[usize; 2]>>,
}

/// The success ratio: the share of assets whose forecast and next-period
/// return (both relative to their cross-sectional means) share a sign.
#[derive(Debug, Clone, Serialize)]
pub struct SuccessRatio {
    /// The relation that applies to this forecast, evaluated at the mean lag-1 IC.
    pub implied: Option<f64>,
    /// `sheppard` for continuous forecasts, `binary` for two-valued ones.
    pub relation: String,
    /// `1/2 + arcsin(IC)/π`: sign agreement of two jointly normal scores with
    /// correlation IC (Sheppard, 1899).
    pub sheppard: Option<f64>,
    /// `(1 + IC)/2` (Grinold and Kahn, 2000): only when the forecast takes two values.
    pub binary: Option<f64>,
    /// The observed share.
    pub observed: Option<f64>,
    /// Forecast–return pairs behind `observed`.
    pub pairs: u64,
}

/// The return-timing check: the IC with the return over the period that
/// ends at the forecast's date (lag 0) beside lags 1 and 2.
#[derive(Debug, Clone, Serialize)]
pub struct TimingCheck {
    /// Mean lag-0 IC.
    pub lag0_ic: Option<f64>,
    /// Its standard error.
    pub lag0_se: Option<f64>,
    /// Whether the curve looks shifted by one period (see `warnings`).
    pub looks_shifted: bool,
}

/// How often a history like the user's picks the right horizon, from the
/// study on the calibrated scenario.
#[derive(Debug, Clone, Serialize)]
pub struct CalibratedStudy {
    /// The scenario file written.
    pub scenario_file: String,
    /// Paths simulated.
    pub paths: usize,
    /// Breadth simulated.
    pub assets: usize,
    /// History simulated.
    pub history: usize,
    /// With `--assets` or `--history`: what the study changed, in words.
    pub what_if: Option<String>,
    /// True optimal horizon of the calibrated scenario.
    pub true_best_horizon: usize,
    /// Per rule (peak, formula, fitted): near-hit rate, its error, mean relative regret.
    pub near_hit_rate: PerRule<f64>,
    /// Monte Carlo errors of `near_hit_rate`.
    pub near_hit_rate_se: PerRule<f64>,
    /// 95 % Wilson intervals of `near_hit_rate`.
    pub near_hit_rate_ci: PerRule<[f64; 2]>,
    /// Mean share of the best horizon IC given up.
    pub regret_rel_mean: PerRule<f64>,
    /// With `--cost-bps`: the net-IR rule at each cost (empty without).
    pub net: Vec<CalibratedNet>,
}

/// How often a history like the user's finds the best holding net of one
/// cost, and what a miss costs.
#[derive(Debug, Clone, Serialize)]
pub struct CalibratedNet {
    /// One-way cost, basis points.
    pub cost_bps: f64,
    /// True best holding of the calibrated scenario at this cost.
    pub true_best_holding: usize,
    /// Share of histories whose measured net IR picks exactly it.
    pub hit_rate: f64,
    /// Its Monte Carlo error.
    pub hit_rate_se: f64,
    /// Its 95 % Wilson interval.
    pub hit_rate_ci: [f64; 2],
    /// Share within one period of it.
    pub near_hit_rate: f64,
    /// Its Monte Carlo error.
    pub near_hit_rate_se: f64,
    /// Mean regret in basis points a year (net IR given up × `target_vol`).
    pub regret_bps_year_mean: Option<f64>,
    /// Its standard error: the study's histories and the reference
    /// simulation's truth combined.
    pub regret_bps_year_mean_se: Option<f64>,
    /// The book's annual volatility the basis points are scaled to.
    pub target_vol: f64,
}

/// A date that gave no lag-1 IC, and why.
#[derive(Debug, Clone, Serialize)]
pub struct SkippedDate {
    /// The date (ISO).
    pub date: String,
    /// Why, in words.
    pub reason: String,
}

/// Every date's figures: the rows of `per_date.csv`.
#[derive(Debug, Clone, Default)]
pub struct PerDateTable {
    /// The dates (ISO), missing periods included.
    pub dates: Vec<String>,
    /// Assets with a forecast and a return over the next period.
    pub used_assets: Vec<usize>,
    /// Per date, the IC at each lag (`None` where not measured).
    pub lagged: Vec<Vec<Option<f64>>>,
    /// Per date, the rank IC at each lag.
    pub rank: Vec<Vec<Option<f64>>>,
    /// Per date, the horizon IC at each horizon.
    pub horizon: Vec<Vec<Option<f64>>>,
    /// Per date, why it gave no lag-1 IC.
    pub skipped: Vec<Option<String>>,
}

impl PerDateTable {
    /// Each date's value at every lag of `p`, by date (`t` dates).
    pub fn by_date(p: &PerDate, t: usize) -> Vec<Vec<Option<f64>>> {
        let mut out = vec![vec![None; p.len()]; t];
        for k in 1..=p.len() {
            for (v, d) in p.series(k).iter().zip(p.dates(k)) {
                out[*d as usize][k - 1] = finite(*v);
            }
        }
        out
    }

    /// The rolling mean of the lag-1 IC over the last `window` periods, where
    /// at least half of them have a value: `(date index, mean)`.
    pub fn rolling_lag1(&self, window: usize) -> Vec<(usize, f64)> {
        let ic: Vec<Option<f64>> = self.lagged.iter().map(|r| r.first().copied().flatten()).collect();
        (window.saturating_sub(1)..ic.len())
            .filter_map(|t| {
                let vals: Vec<f64> = ic[t + 1 - window..=t].iter().flatten().copied().collect();
                (2 * vals.len() >= window && !vals.is_empty())
                    .then(|| (t, vals.iter().sum::<f64>() / vals.len() as f64))
            })
            .collect()
    }
}

/// Everything `measure` reports.
#[derive(Debug, Clone, Serialize)]
pub struct MeasureResult {
    /// The file measured.
    pub file: String,
    /// The forecast column measured in full (the first named); the other
    /// signals and the blend are in `comparison`.
    pub signal: String,
    /// Data rows read.
    pub rows: u64,
    /// Dates in the file.
    pub dates: usize,
    /// Assets seen.
    pub assets: usize,
    /// Longest horizon asked for (or the default).
    pub horizons_requested: usize,
    /// Longest horizon measured (at most a quarter of the history).
    pub horizons: usize,
    /// Calendar inferred from the dates: `monthly`, `weekly`, `business-daily` or `irregular (one period per date)`.
    pub frequency: String,
    /// Periods with no row at all, inserted as empty dates (ISO dates).
    pub missing_periods: Vec<String>,
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
    /// Success ratio: implied by the lag-1 IC and observed.
    pub success_ratio: SuccessRatio,
    /// The return-timing check.
    pub timing: TimingCheck,
    /// Mean cross-sectional correlation of the forecast with its previous value.
    pub forecast_autocorrelation: Option<f64>,
    /// Standard deviation of the lag-1 IC beyond sampling noise.
    pub ic_volatility: Option<f64>,
    /// First autocorrelation of the lag-1 IC beyond sampling noise.
    pub ic_persistence: Option<f64>,
    /// Excess kurtosis of the returns standardised within each date.
    pub return_excess_kurtosis: Option<f64>,
    /// Student-t degrees of freedom implied by it (`None`: normal tails).
    pub tails_dof: Option<f64>,
    /// Fitted decay family, chosen by AIC.
    pub fitted_family: String,
    /// Its half-life (exponential), exponent (power), zero lag (linear) or peak lag (hump).
    pub fitted_shape: Option<f64>,
    /// The fitted curve, lag 1 first (empty when no fit could be made).
    pub fitted_curve: Vec<f64>,
    /// The estimated optimal horizon under each rule.
    pub best_horizon: BestHorizon,
    /// The stationary bootstrap of the chosen horizon (Politis and Romano, 1994).
    pub bootstrap: Bootstrap,
    /// Standard errors that disagree with the simulated spread by more than a
    /// quarter: `(curve, lag or horizon)` pairs.
    pub se_disagreements: Vec<(String, usize)>,
    /// The study run on the calibrated scenario (`calibrated.toml`), when run.
    pub calibrated_study: Option<CalibratedStudy>,
    /// What the reader noticed.
    pub warnings: Vec<String>,
    /// Dates that gave no lag-1 IC, with the reason.
    pub skipped_dates: Vec<SkippedDate>,
    /// Columns the forecasts and returns were neutralised on (group first).
    pub neutralised_on: Vec<String>,
    /// Periods in the rolling-IC chart.
    pub rolling_window: usize,
    /// Every signal side by side, and the blend (`None` with one signal and no blend).
    pub comparison: Option<SignalComparison>,
    /// The tranche books on the panel (`None` without `--cost-bps`).
    pub books: Option<OwnBooks>,
    /// Every date's figures (`per_date.csv`; not in `measure.json`).
    #[serde(skip)]
    pub per_date: PerDateTable,
}
