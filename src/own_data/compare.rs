//! `measure` with several forecast columns: each signal measured with the
//! same estimators and bootstrap resamples as the first, and a stated blend
//! of their per-date z-scores.

use super::result::{BestHorizon, Curve, MeasureResult, PerDateTable};
use super::{Core, Settings, core};
use crate::measure::blend;
use crate::reader::ReadPanel;
use crate::rule::PerRule;
use serde::Serialize;

/// Parses `--blend` terms `name=weight`.
///
/// # Errors
/// A message naming the bad term and the form wanted.
pub fn parse_blend(terms: &[String]) -> Result<Vec<BlendWeight>, String> {
    let mut out: Vec<BlendWeight> = Vec::new();
    for term in terms {
        let (name, w) = term
            .split_once('=')
            .ok_or_else(|| format!("--blend `{term}`: write each term as column=weight (e.g. fast=0.5,slow=0.5)"))?;
        let (name, w) = (name.trim(), w.trim());
        let weight = w.parse::<f64>().ok().filter(|w| w.is_finite()).ok_or_else(|| {
            format!("--blend `{term}`: the weight must be a finite number (e.g. 0.5 or -0.25), got {w:?}")
        })?;
        if name.is_empty() {
            return Err(format!("--blend `{term}`: name the forecast column before `=`"));
        }
        if out.iter().any(|b| b.signal == name) {
            return Err(format!("--blend names `{name}` twice; give each column one weight"));
        }
        out.push(BlendWeight { signal: name.to_string(), weight });
    }
    if out.len() < 2 {
        return Err("--blend needs at least two columns (e.g. fast=0.5,slow=0.5)".into());
    }
    if out.iter().all(|b| b.weight == 0.0) {
        return Err("--blend: every weight is zero; give at least one a non-zero weight".into());
    }
    Ok(out)
}

/// A summary from a measured core; `lag1_by_date` has one entry per date.
fn summary(name: &str, kind: &str, c: &Core, dates: usize) -> SignalSummary {
    SignalSummary {
        name: name.to_string(),
        kind: kind.to_string(),
        dates_used: c.used,
        lagged_ic: c.lagged_ic.clone(),
        horizon_ic: c.horizon_ic.clone(),
        best_horizon: c.chosen,
        range_90: c.bootstrap.range_90,
        fitted_family: c.best.as_ref().map_or("none".into(), |f| f.family.name().to_string()),
        lag1_by_date: PerDateTable::by_date(&c.m.lagged, dates).into_iter().map(|r| r[0]).collect(),
    }
}

/// Measures `forecasts` in place of the panel's own (and puts them back).
fn measure_with(read: &mut ReadPanel, forecasts: &mut Vec<f64>, s: &Settings) -> Option<Core> {
    let p = &mut read.panel;
    p.swap_forecasts(forecasts);
    let c = core(p, s, false);
    p.swap_forecasts(forecasts);
    c
}

/// Every other signal of `read` and the blend, beside the first signal's
/// full measurement; `None` with one signal and no blend. Signals with no
/// measurable date are left out with a warning.
///
/// # Errors
/// A blend naming a column that was not read.
pub fn compare(
    read: &mut ReadPanel,
    first: &MeasureResult,
    weights: Vec<BlendWeight>,
    s: &Settings,
    warnings: &mut Vec<String>,
) -> Result<Option<SignalComparison>, String> {
    if read.signals.len() == 1 && weights.is_empty() {
        return Ok(None);
    }
    let dates = read.panel.dates;
    let mut signals = vec![SignalSummary {
        name: first.signal.clone(),
        kind: "signal".into(),
        dates_used: first.dates_used,
        lagged_ic: first.lagged_ic.clone(),
        horizon_ic: first.horizon_ic.clone(),
        best_horizon: first.best_horizon,
        range_90: first.bootstrap.range_90,
        fitted_family: first.fitted_family.clone(),
        lag1_by_date: first.per_date.lagged.iter().map(|r| r[0]).collect(),
    }];
    let unmeasurable =
        |name: &str| format!("signal `{name}`: no date has enough assets with it and a return; left out");
    for j in 1..read.signals.len() {
        let mut f = std::mem::take(&mut read.other_forecasts[j - 1]);
        let c = measure_with(read, &mut f, s);
        read.other_forecasts[j - 1] = f;
        match c {
            Some(c) => signals.push(summary(&read.signals[j], "signal", &c, dates)),
            None => warnings.push(unmeasurable(&read.signals[j])),
        }
    }
    if !weights.is_empty() {
        let mut parts: Vec<&[f64]> = Vec::new();
        for w in &weights {
            match read.signals.iter().position(|n| *n == w.signal) {
                Some(0) => parts.push(&read.panel.forecasts),
                Some(j) => parts.push(&read.other_forecasts[j - 1]),
                None => {
                    return Err(format!(
                        "--blend names `{}`, which is not among the signals read ({}); add it to --forecast-column",
                        w.signal,
                        read.signals.join(", ")
                    ));
                }
            }
        }
        let ws: Vec<f64> = weights.iter().map(|w| w.weight).collect();
        let mut b = blend::blend(&parts, &ws, read.panel.assets);
        match measure_with(read, &mut b, s) {
            Some(c) => signals.push(summary("blend", "blend", &c, dates)),
            None => warnings.push(unmeasurable("blend")),
        }
    }
    Ok(Some(SignalComparison::new(signals, weights)))
}

/// One signal's (or the blend's) curves and choices.
#[derive(Debug, Clone, Serialize)]
pub struct SignalSummary {
    /// The forecast column, or `blend`.
    pub name: String,
    /// `signal` or `blend`.
    pub kind: String,
    /// Dates with a lag-1 IC.
    pub dates_used: usize,
    /// Lagged ICs with EWC errors.
    pub lagged_ic: Curve,
    /// Horizon ICs with EWC errors.
    pub horizon_ic: Curve,
    /// Each rule's horizon.
    pub best_horizon: BestHorizon,
    /// 5 % and 95 % points of each rule's horizon over the stationary
    /// bootstrap (peak, formula, fitted; the same resampled dates for every
    /// signal, so the ranges compare like with like).
    pub range_90: PerRule<Option<[usize; 2]>>,
    /// The decay family fitted to the lagged ICs (`none` when none fits).
    pub fitted_family: String,
    /// Each date's lag-1 IC (for the correlations; not in `measure.json`).
    #[serde(skip)]
    pub lag1_by_date: Vec<Option<f64>>,
}

/// One weight of the blend.
#[derive(Debug, Clone, Serialize)]
pub struct BlendWeight {
    /// The forecast column.
    pub signal: String,
    /// Its weight on the date's z-scores.
    pub weight: f64,
}

/// Every signal measured, side by side.
#[derive(Debug, Clone, Serialize)]
pub struct SignalComparison {
    /// The signals in the order given, then the blend (if any).
    pub signals: Vec<SignalSummary>,
    /// The blend's weights (empty: no blend).
    pub blend_weights: Vec<BlendWeight>,
    /// Pearson correlation between the signals' per-date lag-1 ICs, over the
    /// dates both have (`None` with fewer than three), in the order of `signals`.
    pub ic_correlation: Vec<Vec<Option<f64>>>,
}

/// The Pearson correlation of two per-date series over the dates both have
/// (at least three, and both varying).
pub fn paired_correlation(a: &[Option<f64>], b: &[Option<f64>]) -> Option<f64> {
    let pairs: Vec<(f64, f64)> = a.iter().zip(b).filter_map(|(x, y)| Some(((*x)?, (*y)?))).collect();
    if pairs.len() < 3 {
        return None;
    }
    let n = pairs.len() as f64;
    let (mx, my) = (pairs.iter().map(|p| p.0).sum::<f64>() / n, pairs.iter().map(|p| p.1).sum::<f64>() / n);
    let (mut sxy, mut sxx, mut syy) = (0.0, 0.0, 0.0);
    for (x, y) in &pairs {
        sxy += (x - mx) * (y - my);
        sxx += (x - mx) * (x - mx);
        syy += (y - my) * (y - my);
    }
    super::finite(sxy / (sxx * syy).sqrt())
}

impl SignalComparison {
    /// The comparison of `signals`, with their per-date IC correlations.
    pub fn new(signals: Vec<SignalSummary>, blend_weights: Vec<BlendWeight>) -> Self {
        let ic_correlation = signals
            .iter()
            .map(|a| signals.iter().map(|b| paired_correlation(&a.lag1_by_date, &b.lag1_by_date)).collect())
            .collect();
        Self { signals, blend_weights, ic_correlation }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn correlation_uses_only_dates_both_have() {
        let a = [Some(1.0), Some(2.0), None, Some(3.0), Some(4.0)];
        let b = [Some(2.0), Some(4.0), Some(100.0), Some(6.0), None];
        assert!((paired_correlation(&a, &b).unwrap() - 1.0).abs() < 1e-12);
        let c = [Some(3.0), Some(2.0), Some(0.0), Some(1.0), None];
        assert!((paired_correlation(&a, &c).unwrap() + 1.0).abs() < 1e-12);
        assert_eq!(paired_correlation(&a[..2], &b[..2]), None);
    }
}
