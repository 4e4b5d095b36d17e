//! Further figures of a measured panel: forecast autocorrelation, the IC's
//! volatility beyond sampling noise, and the observed sign hit rate.

use super::masked::{max_abs_about, observed_mean, pearson};
use super::sums::pow2_scale;
use super::{Panel, PerDate};

/// Pearson correlation over the pairs where both values are finite, and
/// their number, when there are at least `min_assets` of them (sums in one
/// pass, as on the missing-value path; centred and scaled by powers of two
/// for accuracy and range).
pub(crate) fn corr_finite(x: &[f64], y: &[f64], min_assets: usize) -> Option<(f64, usize)> {
    let (mx, my) = (observed_mean(x), observed_mean(y));
    let (sx, sy) = (pow2_scale(max_abs_about(x, mx)), pow2_scale(max_abs_about(y, my)));
    let mut s = [0.0f64; 6];
    for (a, b) in x.iter().zip(y).filter(|(a, b)| a.is_finite() && b.is_finite()) {
        let (u, v) = ((a - mx) * sx, (b - my) * sy);
        s = [s[0] + 1.0, s[1] + u, s[2] + v, s[3] + u * u, s[4] + v * v, s[5] + u * v];
    }
    let r = pearson(s[0], s[1], s[2], s[3], s[4], s[5]);
    (s[0] >= min_assets.max(3) as f64 && r.is_finite()).then_some((r, s[0] as usize))
}

/// Mean over dates of the cross-sectional correlation of the forecast with
/// its value one date earlier (dates with at least `min_assets` assets with both).
pub fn forecast_autocorrelation(p: &Panel, min_assets: usize) -> Option<f64> {
    let rs: Vec<f64> = (1..p.dates)
        .filter_map(|t| corr_finite(p.forecast_row(t), p.forecast_row(t - 1), min_assets))
        .map(|c| c.0)
        .collect();
    (!rs.is_empty()).then(|| rs.iter().sum::<f64>() / rs.len() as f64)
}

/// Standard deviation of the per-date lag-1 IC beyond sampling noise:
/// `sqrt(max(0, Var(IC_t) − mean(1/(n_t − 1))))`, the sampling variance of a
/// correlation near zero being about `1/(n − 1)` (Fisher, 1915); dates with
/// fewer than `min_assets` pairs are left out.
pub fn ic_volatility(p: &Panel, min_assets: usize) -> Option<f64> {
    let ics: Vec<(f64, usize)> =
        (0..p.dates - 1).filter_map(|t| corr_finite(p.forecast_row(t), p.return_row(t), min_assets)).collect();
    if ics.len() < 2 {
        return None;
    }
    let m = ics.len() as f64;
    let mean = ics.iter().map(|c| c.0).sum::<f64>() / m;
    let var = ics.iter().map(|c| (c.0 - mean).powi(2)).sum::<f64>() / (m - 1.0);
    let noise = ics.iter().map(|c| 1.0 / (c.1 as f64 - 1.0)).sum::<f64>() / m;
    Some((var - noise).max(0.0).sqrt())
}

/// Whether the forecast takes exactly two distinct values over the panel (a
/// binary forecast, for which Grinold and Kahn's success ratio applies).
pub fn two_valued(p: &Panel) -> bool {
    let mut seen: Vec<f64> = Vec::with_capacity(3);
    for x in p.forecasts.iter().filter(|x| x.is_finite()) {
        if !seen.contains(x) {
            seen.push(*x);
            if seen.len() > 2 {
                return false;
            }
        }
    }
    seen.len() == 2
}

/// Per-date lag-0 ICs: the forecast at date `t` against the return over the
/// period that ends at `t` (the period before it). Date index `t` of the
/// result is the forecast at date `t + 1`.
pub fn lag0_ics(p: &Panel, min_assets: usize) -> PerDate {
    let n = p.assets;
    let (mut lag0, mut unused) = (PerDate::default(), PerDate::default());
    lag0.reset(1, p.dates);
    unused.reset(1, p.dates);
    super::masked::lagged_and_horizon(&p.forecasts[n..], &p.returns, n, 1, min_assets.max(3), &mut lag0, &mut unused);
    lag0
}

/// Why no date of `p` gives an IC, and the fix, in words.
pub fn why_unmeasurable(p: &Panel, min_assets: usize) -> String {
    let finite = |v: &[f64]| v.iter().filter(|x| x.is_finite()).count();
    if finite(&p.returns) == 0 {
        return "no returns to measure against: every return field is empty or missing (or every date's return \
                period runs past the last date); check --return-column and --backward-returns"
            .into();
    }
    if finite(&p.forecasts) == 0 {
        return "no forecasts: every forecast field is empty or missing; check --forecast-column".into();
    }
    let pairs =
        |t: usize| p.forecast_row(t).iter().zip(p.return_row(t)).filter(|(f, r)| f.is_finite() && r.is_finite());
    let most = (0..p.dates - 1).map(|t| pairs(t).count()).max().unwrap_or(0);
    if most < min_assets {
        return format!(
            "no date has at least {min_assets} assets with both a forecast and a return over the next period (the \
             most on one date is {most}); lower --min-assets (3 at least) or check that forecasts and returns share \
             their dates and asset names"
        );
    }
    let varies = |pick: fn(&(&f64, &f64)) -> f64| {
        (0..p.dates - 1).any(|t| {
            let v: Vec<f64> = pairs(t).map(|x| pick(&x)).collect();
            v.len() >= min_assets && v.iter().any(|x| *x != v[0])
        })
    };
    if !varies(|x| *x.0) {
        return "the forecast does not vary across assets on any usable date, so it ranks nothing; check \
                --forecast-column"
            .into();
    }
    if !varies(|x| *x.1) {
        return "the returns do not vary across assets on any usable date; check --return-column".into();
    }
    "no date gives a finite IC (values too extreme to correlate); check the panel's units".into()
}
