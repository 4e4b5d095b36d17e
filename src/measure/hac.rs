//! Standard errors of a mean over dates that respect overlap and persistence.
//!
//! Per-date horizon ICs overlap: at horizon `n` neighbouring dates share
//! `n − 1` periods of returns and, with a persistent forecast, are correlated
//! about `ρ_f(k)·(1 − k/n)` at lag `k` (MODEL.md §3). Newey–West with only
//! `n − 1` lags understates that variance badly, so the lag count here is
//! `max(2n, ⌊4·(m/100)^{2/9}⌋)` for `m` dates (the second term is Newey and
//! West's 1994 rule of thumb, which covers IC regimes on the lagged ICs), with
//! Bartlett weights `1 − j/(ℓ+1)` (Newey and West, 1987), capped at `m − 1`.

/// Lags used for horizon `n` (lag ICs use `n = 1`) over `m` dates.
pub fn hac_lags(m: usize, n: usize) -> usize {
    let rule = (4.0 * (m as f64 / 100.0).powf(2.0 / 9.0)).floor() as usize;
    (2 * n).max(rule).min(m.saturating_sub(1))
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
    fn lag_rule_is_at_least_twice_the_horizon() {
        assert_eq!(hac_lags(120, 12), 24);
        assert_eq!(hac_lags(120, 1), 4);
        assert_eq!(hac_lags(10, 12), 9);
    }
}
