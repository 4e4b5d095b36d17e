//! Standard errors of a mean over dates that respect overlap and persistence.
//!
//! Per-date horizon ICs overlap: at horizon `n` neighbouring dates share
//! `n − 1` periods of returns and, with a persistent forecast, are correlated
//! about `ρ_f(k)·(1 − k/n)` at lag `k` (MODEL.md §3); IC regimes (a persistent
//! common shock) make even lag-1 ICs autocorrelated. Newey–West with only
//! `n − 1` lags understates that variance badly, so the estimator here is
//! Newey–West (Bartlett weights `1 − j/(ℓ+1)`; Newey and West, 1987) with
//!
//! `ℓ = min(m − 1, max(2n, ⌊1.1447·(α·m)^{1/3}⌋))`, `α = (2ρ̂/(1 − ρ̂²))²`,
//!
//! the second term being Andrews' (1991) AR(1) plug-in bandwidth with `ρ̂`
//! the series' first-order autocorrelation (clamped to ±0.97).

/// The method in words, as reports and `summary.json` state it.
pub const METHOD: &str = "Newey-West (Bartlett) with min(m - 1, max(2n, floor(1.1447 (alpha m)^(1/3)))) lags for \
horizon n over m dates, the second term Andrews' (1991) AR(1) plug-in bandwidth; lagged ICs use n = 1";

/// Largest first-order autocorrelation used in the bandwidth.
const RHO_CAP: f64 = 0.97;

/// Lags for horizon `n` (lagged ICs use `n = 1`) over the series `x`.
pub fn hac_lags(x: &[f64], n: usize) -> usize {
    let m = x.len();
    if m < 3 {
        return m.saturating_sub(1);
    }
    let mean = x.iter().sum::<f64>() / m as f64;
    let (mut c0, mut c1) = (0.0, 0.0);
    for (i, v) in x.iter().enumerate() {
        c0 += (v - mean) * (v - mean);
        if i > 0 {
            c1 += (v - mean) * (x[i - 1] - mean);
        }
    }
    let rho = if c0 > 0.0 { (c1 / c0).clamp(-RHO_CAP, RHO_CAP) } else { 0.0 };
    let alpha = (2.0 * rho / (1.0 - rho * rho)).powi(2);
    let andrews = (1.1447 * (alpha * m as f64).cbrt()).floor() as usize;
    (2 * n).max(andrews).min(m - 1)
}

/// Mean of `x` and its Newey–West (Bartlett) standard error with `lags` lags.
/// The standard error is `None` with fewer than two observations.
pub fn mean_and_se(x: &[f64], lags: usize) -> (f64, Option<f64>) {
    let m = x.len();
    if m == 0 {
        return (f64::NAN, None);
    }
    let mean = x.iter().sum::<f64>() / m as f64;
    if m < 2 {
        return (mean, None);
    }
    let autocov = |j: usize| x.iter().zip(&x[j..]).map(|(a, b)| (a - mean) * (b - mean)).sum::<f64>() / m as f64;
    let lags = lags.min(m - 1);
    let mut lrv = autocov(0);
    for j in 1..=lags {
        lrv += 2.0 * (1.0 - j as f64 / (lags as f64 + 1.0)) * autocov(j);
    }
    (mean, Some((lrv.max(0.0) / m as f64).sqrt()))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn zero_lags_is_the_plain_standard_error_with_divisor_m() {
        let x = [1.0, 2.0, 4.0, 7.0];
        let (mean, se) = mean_and_se(&x, 0);
        let var = x.iter().map(|v| (v - 3.5f64).powi(2)).sum::<f64>() / 4.0;
        assert_eq!(mean, 3.5);
        assert!((se.unwrap() - (var / 4.0).sqrt()).abs() < 1e-15);
        assert_eq!(mean_and_se(&[1.0], 3).1, None);
    }

    #[test]
    fn lag_rule_is_at_least_twice_the_horizon_and_grows_with_persistence() {
        let alternating: Vec<f64> = (0..120).map(|i| if i % 2 == 0 { 1.0 } else { -1.0 }).collect();
        let trending: Vec<f64> = (0..120).map(|i| (i as f64 / 20.0).sin()).collect();
        assert_eq!(hac_lags(&alternating[..10], 12), 9);
        // ρ̂ = 0.97 (capped): α = (1.94/0.0591)² ≈ 1078, 1.1447·(1078·120)^{1/3} ≈ 57.9
        assert_eq!(hac_lags(&trending, 1), 57);
        let noise: Vec<f64> = (0..120).map(|i| ((i * 7919) % 13) as f64).collect();
        assert_eq!(hac_lags(&noise, 12), 24);
    }
}
