//! Further figures of a measured panel: forecast autocorrelation, the IC's
//! volatility beyond sampling noise, and the observed sign hit rate.

use super::Panel;
use super::masked::{observed_mean, pearson};

/// Pearson correlation over the pairs where both values are finite, and
/// their number (sums in one pass, as on the missing-value path).
fn corr_finite(x: &[f64], y: &[f64]) -> Option<(f64, usize)> {
    let (mx, my) = (observed_mean(x), observed_mean(y)); // centring only helps accuracy
    let mut s = [0.0f64; 6];
    for (a, b) in x.iter().zip(y).filter(|(a, b)| a.is_finite() && b.is_finite()) {
        let (u, v) = (a - mx, b - my);
        s = [s[0] + 1.0, s[1] + u, s[2] + v, s[3] + u * u, s[4] + v * v, s[5] + u * v];
    }
    let r = pearson(s[0], s[1], s[2], s[3], s[4], s[5]);
    (s[0] >= 3.0 && r.is_finite()).then_some((r, s[0] as usize))
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
