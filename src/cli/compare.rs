//! `measure` with several forecast columns: each signal measured with the
//! same estimators and bootstrap resamples as the first, and a stated blend
//! of their per-date z-scores.

use super::measure::{Core, Settings, core};
use crate::measure::blend;
use crate::reader::ReadPanel;
use crate::report::{BestHorizon, BlendWeight, MeasureResult, PerDateTable, SignalComparison, SignalSummary};

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
        best_horizon: BestHorizon { peak: c.chosen[0], formula: c.chosen[1], fitted: c.chosen[2] },
        range_90: c.bootstrap.range_90,
        fitted_family: c.best.as_ref().map_or("none".into(), |f| f.family.name().to_string()),
        lag1_by_date: PerDateTable::by_date(&c.m.lagged, dates).into_iter().map(|r| r[0]).collect(),
    }
}

/// Measures `forecasts` in place of the panel's own (and puts them back).
fn measure_with(read: &mut ReadPanel, forecasts: &mut Vec<f64>, s: &Settings) -> Option<Core> {
    let p = &mut read.panel;
    let own_flag = p.has_missing;
    std::mem::swap(&mut p.forecasts, forecasts);
    p.refresh_missing();
    let c = core(p, s, false);
    std::mem::swap(&mut p.forecasts, forecasts);
    p.has_missing = own_flag;
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
        best_horizon: first.best_horizon.clone(),
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
