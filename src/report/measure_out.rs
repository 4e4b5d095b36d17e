//! Outputs of `lagfold measure`: `measure.json`, `measure_lags.csv` and the terminal summary.

use super::records::document;
use super::summary::CAUTION;
use super::text::share_words;
use crate::measure::PerDate;
use serde::Serialize;
use std::fmt::Write;

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
#[derive(Debug, Clone, Serialize)]
pub struct BestHorizon {
    /// Peak of the measured horizon IC.
    pub peak: Option<usize>,
    /// Peak of `Σ IC_k/√n` from the measured lagged ICs.
    pub formula: Option<usize>,
    /// Optimum of the fitted decay curve.
    pub fitted: Option<usize>,
}

impl BestHorizon {
    /// In rule order (peak, formula, fitted).
    pub fn as_array(&self) -> [Option<usize>; 3] {
        [self.peak, self.formula, self.fitted]
    }
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
    pub share_at_estimate: [Option<f64>; 3],
    /// Monte Carlo errors of those shares, `sqrt(p(1 − p)/replicates)`.
    pub share_at_estimate_se: [Option<f64>; 3],
    /// Per rule, the 5 % and 95 % quantiles of the chosen horizon (whole
    /// horizons: the inverse of the empirical distribution).
    pub range_90: [Option<[usize; 2]>; 3],
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
    pub near_hit_rate: [f64; 3],
    /// Monte Carlo errors of `near_hit_rate`.
    pub near_hit_rate_se: [f64; 3],
    /// 95 % Wilson intervals of `near_hit_rate`.
    pub near_hit_rate_ci: [[f64; 2]; 3],
    /// Mean share of the best horizon IC given up.
    pub regret_rel_mean: [f64; 3],
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
    pub comparison: Option<super::compare_out::SignalComparison>,
    /// The tranche books on the panel (`None` without `--cost-bps`).
    pub books: Option<super::own_books_out::OwnBooks>,
    /// Every date's figures (`per_date.csv`; not in `measure.json`).
    #[serde(skip)]
    pub per_date: PerDateTable,
}

/// `measure.json`.
pub fn measure_json(m: &MeasureResult) -> Vec<u8> {
    document::<(), _>(None, m)
}

/// `measure_lags.csv`: one row per lag/horizon; empty fields where a figure
/// is not measurable.
pub fn measure_csv(m: &MeasureResult) -> Vec<u8> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut header = vec!["n".to_string()];
    for c in ["ic", "rank_ic", "horizon_ic"] {
        for f in ["mean", "se", "df", "ci_low", "ci_high", "dates"] {
            header.push(format!("{c}_{f}"));
        }
    }
    header.push("fitted_ic".into());
    w.write_record(&header).expect("in-memory CSV");
    let o = |x: Option<f64>| x.map(|v| format!("{v:.8}")).unwrap_or_default();
    for i in 0..m.lagged_ic.mean.len() {
        let mut row = vec![(i + 1).to_string()];
        for c in [&m.lagged_ic, &m.rank_ic, &m.horizon_ic] {
            row.extend([
                o(c.mean[i]),
                o(c.se[i]),
                c.df[i].map(|d| d.to_string()).unwrap_or_default(),
                o(c.ci_low[i]),
                o(c.ci_high[i]),
                c.dates[i].to_string(),
            ]);
        }
        row.push(o(m.fitted_curve.get(i).copied().and_then(finite)));
        w.write_record(&row).expect("in-memory CSV");
    }
    w.into_inner().expect("in-memory CSV")
}

/// `per_date.csv`: one row per date — the assets used, the IC at every lag,
/// the rank IC at every lag, the horizon IC at every horizon (all of the
/// first signal), the other signals' and the blend's lag-1 ICs, and why a
/// date was skipped; empty fields where a figure is not measured.
pub fn per_date_csv(m: &MeasureResult) -> Vec<u8> {
    let t = &m.per_date;
    let l = m.horizons;
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut header = vec!["date".to_string(), "used_assets".to_string()];
    header.extend((1..=l).map(|k| format!("ic_lag{k}")));
    header.extend((1..=l).map(|k| format!("rank_ic_lag{k}")));
    header.extend((1..=l).map(|n| format!("horizon_ic_{n}")));
    // The other signals' and the blend's lag-1 ICs.
    let others: Vec<&super::compare_out::SignalSummary> =
        m.comparison.iter().flat_map(|c| c.signals.iter().skip(1)).collect();
    header.extend(others.iter().map(|s| format!("ic_lag1_{}", s.name)));
    header.push("skipped".into());
    w.write_record(&header).expect("in-memory CSV");
    let o = |x: &Option<f64>| x.map(|v| format!("{v:.8}")).unwrap_or_default();
    for (i, date) in t.dates.iter().enumerate() {
        let mut row = vec![date.clone(), t.used_assets[i].to_string()];
        for table in [&t.lagged, &t.rank, &t.horizon] {
            row.extend(table[i].iter().map(o));
        }
        row.extend(others.iter().map(|s| o(&s.lag1_by_date[i])));
        row.push(t.skipped[i].clone().unwrap_or_default());
        w.write_record(&row).expect("in-memory CSV");
    }
    w.into_inner().expect("in-memory CSV")
}

/// `text` wrapped at 78 columns, each line indented by two spaces.
pub fn paragraph(text: &str) -> String {
    let lines = crate::chart::wrap_to(text, |l| l.chars().count() <= 76);
    lines.iter().map(|l| format!("  {l}\n")).collect()
}

/// Ascending whole numbers as ranges: `1–3, 5, 7–8`.
pub fn ranges(ns: &[usize]) -> String {
    let mut parts: Vec<String> = Vec::new();
    let mut i = 0;
    while i < ns.len() {
        let mut j = i;
        while j + 1 < ns.len() && ns[j + 1] == ns[j] + 1 {
            j += 1;
        }
        parts.push(if j > i { format!("{}–{}", ns[i], ns[j]) } else { ns[i].to_string() });
        i = j + 1;
    }
    parts.join(", ")
}

/// A rule's choice in words.
fn choice(x: Option<usize>) -> String {
    x.map_or("none (not measurable)".into(), |n| n.to_string())
}

/// The terminal summary (at most 80 columns).
/// The plural period of a calendar name ("monthly" → "months"), "periods" when unknown.
pub fn calendar_units(frequency: &str) -> String {
    match frequency {
        "monthly" => "months",
        "weekly" => "weeks",
        "business-daily" => "business days",
        _ => "periods",
    }
    .into()
}

pub fn measure_terminal(m: &MeasureResult) -> String {
    let mut out = String::new();
    let _ = writeln!(out, "lagfold measure · {}", m.file);
    let missing = if m.missing_periods.is_empty() {
        String::new()
    } else {
        format!(", {} missing period(s) left empty", m.missing_periods.len())
    };
    out.push_str(&paragraph(&format!(
        "{} rows, {} dates ({} used, {} skipped), {} assets; calendar {}{missing}; returns taken as {}; horizons 1–{}.",
        m.rows, m.dates, m.dates_used, m.dates_skipped, m.assets, m.frequency, m.return_timing, m.horizons
    )));
    if let Some(c) = &m.comparison {
        out.push_str(&paragraph(&format!(
            "Signal `{}` is measured in full below; the comparison of {} follows it.",
            m.signal,
            c.signals.iter().map(|s| format!("`{}`", s.name)).collect::<Vec<_>>().join(", ")
        )));
    }
    if !m.neutralised_on.is_empty() {
        out.push_str(&paragraph(&format!(
            "Forecasts and returns neutralised on each date on: {} (least-squares residuals, before any IC).",
            m.neutralised_on.join(", ")
        )));
    }
    if let Some(advice) = super::advice::measure_advice(m, &calendar_units(&m.frequency)) {
        let _ = writeln!(out, "\nRecommendation\n  {advice}\n");
    }
    if let Some(w) = super::advice::measure_edge(m) {
        out.push_str(&paragraph(&format!("warning: {w}")));
    }
    for w in &m.warnings {
        out.push_str(&paragraph(&format!("warning: {w}")));
    }
    let _ = writeln!(
        out,
        "\n  {:>4}  {:>8}  {:>7}  {:>8}  {:>10}  {:>7}  {:>8}",
        "n", "IC", "± 95%", "rank IC", "horizon IC", "± 95%", "fitted"
    );
    let f = |x: Option<f64>| x.map_or("—".to_string(), |v| format!("{v:.4}"));
    for i in 0..m.lagged_ic.mean.len() {
        let _ = writeln!(
            out,
            "  {:>4}  {:>8}  {:>7}  {:>8}  {:>10}  {:>7}  {:>8}",
            i + 1,
            f(m.lagged_ic.mean[i]),
            f(m.lagged_ic.half_width(i)),
            f(m.rank_ic.mean[i]),
            f(m.horizon_ic.mean[i]),
            f(m.horizon_ic.half_width(i)),
            f(m.fitted_curve.get(i).copied().and_then(finite)),
        );
    }
    out.push_str(&paragraph(&format!("± 95%: half the 95% interval ({}).", m.se_method)));
    out.push('\n');
    let b = &m.best_horizon;
    out.push_str(&paragraph(&format!(
        "Estimated best horizon: {} (peak of horizon IC), {} (Σ IC/√n), {} (fitted {} curve).",
        choice(b.peak),
        choice(b.formula),
        choice(b.fitted),
        m.fitted_family
    )));
    let bs = &m.bootstrap;
    let per_rule: Vec<String> = (0..3)
        .filter_map(|i| {
            let share = bs.share_at_estimate[i]?;
            let [lo, hi] = bs.range_90[i]?;
            Some(format!("{} in {:.0}% (90% within {lo}–{hi})", ["peak", "formula", "fitted"][i], 100.0 * share))
        })
        .collect();
    if !per_rule.is_empty() {
        out.push_str(&paragraph(&format!(
            "Stationary bootstrap ({} resamples of dates, mean block {:.0}): the estimate recurs {}.",
            bs.replicates,
            bs.mean_block_length,
            per_rule.join("; ")
        )));
    }
    if let Some(c) = &m.comparison {
        out.push_str(&super::compare_out::comparison_terminal(c));
    }
    if let Some(b) = &m.books {
        out.push_str(&super::own_books_out::own_books_terminal(b));
    }
    if let Some(c) = &m.calibrated_study {
        let like = match &c.what_if {
            Some(w) => format!("A history like this one but with {w} (what-if"),
            None => "A history like this one (".to_string(),
        };
        out.push_str(&paragraph(&format!(
            "{like}{}; {} simulated, true best horizon {}): the peak rule lands within one period \
             of the truth in {} of them and gives up {:.1}% of the best horizon IC on average (formula \
             {:.0}%, fitted {:.0}%).",
            c.scenario_file,
            c.paths,
            c.true_best_horizon,
            share_words(c.near_hit_rate[0], c.paths),
            100.0 * c.regret_rel_mean[0],
            100.0 * c.near_hit_rate[1],
            100.0 * c.near_hit_rate[2]
        )));
    }
    for (n, paths) in m.calibrated_study.iter().flat_map(|c| c.net.iter().map(|n| (n, c.paths))) {
        let miss = match (n.regret_bps_year_mean, n.regret_bps_year_mean_se) {
            (Some(r), Some(se)) => format!("{r:.1} ± {se:.1} bps a year"),
            (Some(r), None) => format!("{r:.1} bps a year"),
            _ => "an unknown amount".into(),
        };
        out.push_str(&paragraph(&format!(
            "Net of {} bps in those histories, the true best holding is {}; picking the holding with the best \
             measured net IR finds it in {} of them (within one period in {:.0}%), and gives up {miss} \
             on average at {} annual volatility.",
            n.cost_bps,
            n.true_best_holding,
            share_words(n.hit_rate, paths),
            100.0 * n.near_hit_rate,
            super::story::vol_pct(n.target_vol),
        )));
    }
    if !m.se_disagreements.is_empty() {
        let at: Vec<String> = ["lagged IC", "horizon IC"]
            .iter()
            .filter_map(|curve| {
                let ns: Vec<usize> = m.se_disagreements.iter().filter(|(c, _)| c == curve).map(|(_, n)| *n).collect();
                (!ns.is_empty()).then(|| format!("{curve} at {} of {} ({})", ns.len(), m.horizons, ranges(&ns)))
            })
            .collect();
        out.push_str(&paragraph(&format!(
            "The standard error measured on your dates and the spread across the simulated histories differ by more \
             than a quarter for the {}. Few degrees of freedom make the measured error itself noisy; a large gap \
             can also mean the calibrated scenario misses a feature of your data.",
            at.join(" and the ")
        )));
    }
    let sr = &m.success_ratio;
    let relation = if sr.relation == "binary" { "(1+IC)/2, two-valued forecast" } else { "1/2 + arcsin(IC)/π" };
    out.push_str(&paragraph(&format!(
        "Success ratio implied by the lag-1 IC ({relation}): {}; observed: {}. Lag-0 IC (return over the period \
         ending at the forecast date): {}. Forecast autocorrelation {}, IC volatility beyond sampling noise {}.",
        sr.implied.map_or("—".into(), |v| format!("{v:.3}")),
        sr.observed.map_or("—".into(), |v| format!("{v:.3}")),
        f(m.timing.lag0_ic),
        m.forecast_autocorrelation.map_or("—".into(), |v| format!("{v:.3}")),
        f(m.ic_volatility),
    )));
    let _ = writeln!(out);
    out.push_str(&paragraph(CAUTION));
    out
}
