//! Sign agreement between forecasts and returns: the observed "hit rate".

use super::Panel;

/// Count of `(agreements, pairs)` over all dates and assets at lag `k`
/// (1-based): the forecast at date `t` against the return over
/// `(t+k−1, t+k]`, both relative to their cross-sectional means over the
/// assets that have both values, on dates with at least `min_assets` of them.
/// Exact zeros count as disagreements.
pub fn sign_agreement(panel: &Panel, k: usize, min_assets: usize) -> (u64, u64) {
    let (mut agree, mut total) = (0u64, 0u64);
    for t in 0..panel.dates.saturating_sub(k) {
        let pairs: Vec<(f64, f64)> = panel
            .forecast_row(t)
            .iter()
            .zip(panel.return_row(t + k - 1))
            .filter(|(a, b)| a.is_finite() && b.is_finite())
            .map(|(a, b)| (*a, *b))
            .collect();
        if pairs.len() < min_assets.max(3) {
            continue;
        }
        let n = pairs.len() as f64;
        let (mf, mr) = pairs.iter().fold((0.0, 0.0), |(a, b), (x, y)| (a + x / n, b + y / n)); // no overflow: each term divided first
        agree += pairs.iter().filter(|(a, b)| (a - mf) * (b - mr) > 0.0).count() as u64;
        total += pairs.len() as u64;
    }
    (agree, total)
}
