//! Further figures of a measured panel: forecast autocorrelation, the IC's
//! volatility beyond sampling noise, and the observed sign hit rate.

use super::Panel;

/// Pearson correlation over the pairs where both values are finite.
fn corr_finite(x: &[f64], y: &[f64]) -> Option<(f64, usize)> {
    let pairs: Vec<(f64, f64)> =
        x.iter().zip(y).filter(|(a, b)| a.is_finite() && b.is_finite()).map(|(a, b)| (*a, *b)).collect();
    let n = pairs.len();
    if n < 3 {
        return None;
    }
    let (mx, my) = pairs.iter().fold((0.0, 0.0), |(a, b), (x, y)| (a + x, b + y));
    let (mx, my) = (mx / n as f64, my / n as f64);
    let (mut sxy, mut sxx, mut syy) = (0.0, 0.0, 0.0);
    for (x, y) in &pairs {
        sxy += (x - mx) * (y - my);
        sxx += (x - mx) * (x - mx);
        syy += (y - my) * (y - my);
    }
    let r = sxy / (sxx * syy).sqrt();
    r.is_finite().then_some((r, n))
}

/// Mean over dates of the cross-sectional correlation of the forecast with
/// its value one date earlier (assets with both).
pub fn forecast_autocorrelation(p: &Panel) -> Option<f64> {
    let rs: Vec<f64> =
        (1..p.dates).filter_map(|t| corr_finite(p.forecast_row(t), p.forecast_row(t - 1))).map(|c| c.0).collect();
    (!rs.is_empty()).then(|| rs.iter().sum::<f64>() / rs.len() as f64)
}

/// Standard deviation of the per-date lag-1 IC beyond sampling noise:
/// `sqrt(max(0, Var(IC_t) − mean(1/(n_t − 1))))`, the sampling variance of a
/// correlation near zero being about `1/(n − 1)` (Fisher, 1915).
pub fn ic_volatility(p: &Panel) -> Option<f64> {
    let ics: Vec<(f64, usize)> =
        (0..p.dates - 1).filter_map(|t| corr_finite(p.forecast_row(t), p.return_row(t))).collect();
    if ics.len() < 2 {
        return None;
    }
    let m = ics.len() as f64;
    let mean = ics.iter().map(|c| c.0).sum::<f64>() / m;
    let var = ics.iter().map(|c| (c.0 - mean).powi(2)).sum::<f64>() / (m - 1.0);
    let noise = ics.iter().map(|c| 1.0 / (c.1 as f64 - 1.0)).sum::<f64>() / m;
    Some((var - noise).max(0.0).sqrt())
}
