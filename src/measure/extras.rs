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
    let ics = lag1_ics(p, min_assets);
    if ics.len() < 2 {
        return None;
    }
    let m = ics.len() as f64;
    let mean = ics.iter().map(|c| c.1).sum::<f64>() / m;
    let var = ics.iter().map(|c| (c.1 - mean).powi(2)).sum::<f64>() / (m - 1.0);
    let noise = ics.iter().map(|c| 1.0 / (c.2 as f64 - 1.0)).sum::<f64>() / m;
    Some((var - noise).max(0.0).sqrt())
}

/// Per-date lag-1 ICs as `(date, IC, pairs)` (dates with at least `min_assets` pairs).
fn lag1_ics(p: &Panel, min_assets: usize) -> Vec<(usize, f64, usize)> {
    (0..p.dates - 1)
        .filter_map(|t| corr_finite(p.forecast_row(t), p.return_row(t), min_assets).map(|(r, n)| (t, r, n)))
        .collect()
}

/// Persistence of the IC beyond sampling noise: the first autocorrelation of
/// the per-date lag-1 IC over consecutive dates, corrected for its
/// small-sample bias `−(1 + 3ρ)/m` (Kendall, 1954), divided by the share of
/// the IC's variance that is not sampling noise (the noise, about `1/(n − 1)`
/// a date, is independent from date to date); `None` when that share is
/// below a tenth (no persistence can be told from noise). Clamped to `[0, 0.95]`.
pub fn ic_persistence(p: &Panel, min_assets: usize) -> Option<f64> {
    let ics = lag1_ics(p, min_assets);
    let m = ics.len() as f64;
    if ics.len() < 8 {
        return None;
    }
    let mean = ics.iter().map(|c| c.1).sum::<f64>() / m;
    let var = ics.iter().map(|c| (c.1 - mean).powi(2)).sum::<f64>() / m;
    let noise = ics.iter().map(|c| 1.0 / (c.2 as f64 - 1.0)).sum::<f64>() / m;
    let share = (var - noise) / var;
    if share.is_nan() || share < 0.1 {
        return None;
    }
    // Autocovariance over pairs of consecutive dates only.
    let pairs: Vec<(f64, f64)> =
        ics.windows(2).filter(|w| w[1].0 == w[0].0 + 1).map(|w| (w[0].1 - mean, w[1].1 - mean)).collect();
    if pairs.len() < 4 {
        return None;
    }
    let rho = pairs.iter().map(|(a, b)| a * b).sum::<f64>() / pairs.len() as f64 / var;
    let rho = rho + (1.0 + 3.0 * rho) / m;
    Some((rho / share).clamp(0.0, 0.95))
}

/// The model's `ic_vol` (sd of the common shock) from the measured sd of the
/// per-date IC beyond noise, `sd`, its persistence `psi` and the `m` dates
/// behind it: the per-date IC is about `φ − φ³/2` in the shock, whose sd is
/// `σ(1 − 1.5σ²)`, and a persistent series' sample variance falls short of
/// its variance by the factor `1 − (1 + ψ)/((1 − ψ)m)` (derived; common
/// practice for AR(1) series, no source).
pub fn ic_vol_parameter(sd: f64, psi: f64, m: usize) -> f64 {
    let shortfall = (1.0 - (1.0 + psi) / ((1.0 - psi) * m.max(1) as f64)).max(0.5);
    sd * (1.0 + 1.5 * sd * sd) / shortfall.sqrt()
}

/// Excess kurtosis of the returns standardised within each date: per date
/// the sample excess kurtosis `g₂ = m₄/m₂² − 3` made unbiased under
/// normality, `G₂ = ((n + 1)·g₂ + 6)·(n − 1)/((n − 2)(n − 3))` (Joanes and
/// Gill, 1998), averaged over dates with at least `min_assets` returns,
/// weighted by their returns.
pub fn return_excess_kurtosis(p: &Panel, min_assets: usize) -> Option<f64> {
    let (mut s4, mut count) = (0.0, 0usize);
    for t in 0..p.dates - 1 {
        let r: Vec<f64> = p.return_row(t).iter().copied().filter(|x| x.is_finite()).collect();
        if r.len() < min_assets.max(4) {
            continue;
        }
        let n = r.len() as f64;
        let mean = r.iter().sum::<f64>() / n;
        let scale = pow2_scale(r.iter().fold(0.0, |a, x| (x - mean).abs().max(a)));
        let var = r.iter().map(|x| ((x - mean) * scale).powi(2)).sum::<f64>() / n;
        if var > 0.0 {
            let g2 = r.iter().map(|x| ((x - mean) * scale).powi(4)).sum::<f64>() / n / (var * var) - 3.0;
            s4 += n * ((n + 1.0) * g2 + 6.0) * (n - 1.0) / ((n - 2.0) * (n - 3.0));
            count += r.len();
        }
    }
    (count > 0).then(|| s4 / count as f64)
}

/// Student-t degrees of freedom of the idiosyncratic noise from the returns'
/// excess kurtosis `κ`: the noise carries `1 − ic_vol²` of a return's
/// variance and the rest is normal, so its own kurtosis is
/// `κ/(1 − ic_vol²)²`, and `ν = 4 + 6/κ_e` (the t law's excess kurtosis is
/// `6/(ν − 4)`), with a floor of [`MIN_DOF`] (below it the kurtosis is
/// infinite or too unstable to read); `None` (normal tails) when `κ_e` is
/// below 0.05 (`ν` above 124).
pub fn tail_dof(excess_kurtosis: f64, ic_vol: f64) -> Option<f64> {
    let k = excess_kurtosis / (1.0 - ic_vol * ic_vol).max(0.5).powi(2);
    (k >= 0.05).then(|| (4.0 + 6.0 / k).max(MIN_DOF))
}

/// The fewest degrees of freedom a calibrated scenario gets.
pub const MIN_DOF: f64 = 5.0;

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
