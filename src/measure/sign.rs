//! Sign agreement between forecasts and returns: the observed "hit rate".

use super::Panel;

/// Count of `(agreements, pairs)` over all dates and assets at lag `k`
/// (1-based): the forecast at date `t` against the return over
/// `(t+k−1, t+k]`, both relative to their cross-sectional means. Exact zeros
/// count as disagreements.
pub fn sign_agreement(panel: &Panel, k: usize) -> (u64, u64) {
    let n = panel.assets;
    let (mut agree, mut total) = (0u64, 0u64);
    for t in 0..panel.dates.saturating_sub(k) {
        let f = panel.forecast_row(t);
        let r = panel.return_row(t + k - 1);
        let (mf, mr) = (f.iter().sum::<f64>() / n as f64, r.iter().sum::<f64>() / n as f64);
        agree += f.iter().zip(r).filter(|&(a, b)| (a - mf) * (b - mr) > 0.0).count() as u64;
        total += n as u64;
    }
    (agree, total)
}
