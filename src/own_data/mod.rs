//! The user's own panel, measured: every figure `measure` reports, from a
//! panel read by [`crate::reader`], with the very estimators the study
//! applies to simulated panels. Nothing here knows of simulation; the
//! calibrated study is added by [`crate::api`].

pub mod books;
pub mod compare;
pub mod result;

pub use books::{OWN_BOOKS_METHOD, OwnBooks, OwnNet};
pub use compare::{BlendWeight, SignalComparison, SignalSummary, compare, paired_correlation, parse_blend};
pub use result::{
    BestHorizon, Bootstrap, CalibratedNet, CalibratedStudy, Curve, MeasureResult, PerDateTable, SkippedDate,
    SuccessRatio, TimingCheck, finite,
};

use crate::measure::rules::choose_measured;
use crate::measure::{Measurement, Panel, bootstrap, extras, fit, sign};
use crate::reader::ReadPanel;
use crate::rule::{PerRule, Rule};
use std::path::Path;

/// Longest horizon measured when none is given (cut to a quarter of the history).
pub const DEFAULT_HORIZONS: usize = 24;

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
fn tally(resampled: &[PerRule<Option<usize>>], r: Rule, l: usize) -> Vec<u64> {
    let mut c = vec![0u64; l];
    resampled.iter().filter_map(|ch| ch[r]).for_each(|h| c[h - 1] += 1);
    c
}

/// The 5 % and 95 % points of the chosen horizons (inverse empirical distribution).
fn range_90(resampled: &[PerRule<Option<usize>>], r: Rule) -> Option<[usize; 2]> {
    let mut v: Vec<usize> = resampled.iter().filter_map(|ch| ch[r]).collect();
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
    pub chosen: PerRule<Option<usize>>,
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
    let counts = PerRule::from_fn(|r| tally(&resampled, r, l));
    let shares = PerRule::from_fn(|r| chosen[r].map(|h| counts[r][h - 1] as f64 / reps as f64));
    let bootstrap = Bootstrap {
        replicates: reps,
        mean_block_length: block,
        share_at_estimate: shares,
        share_at_estimate_se: shares.map(|p| p.map(|p| (p * (1.0 - p) / reps as f64).sqrt())),
        range_90: PerRule::from_fn(|r| range_90(&resampled, r)),
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
        best_horizon: chosen,
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
/// The tranche books on the first signal's panel at every cost, with a
/// warning when the returns look like percentages (costs assume decimal
/// returns: 0.01 is one per cent).
pub fn own_books(
    read: &ReadPanel,
    s: &Settings,
    costs_bps: &[f64],
    warnings: &mut Vec<String>,
) -> crate::own_data::OwnBooks {
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
    OwnBooks::new(&books, costs_bps, crate::calendar::periods_per_year(read.median_gap_days))
}
