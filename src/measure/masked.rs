//! The estimators on a panel with missing values (NaN): each pair of dates
//! uses the assets that have both values — a lag-`k` IC the assets with a
//! forecast at `t` and a return over `(t+k−1, t+k]`, a horizon-`n` IC those
//! with a forecast and all `n` returns. Direct loops, `O(T·L·N)`: the dense
//! path's matrix products cannot skip a different set of assets per pair.
//! Pearson's correlation is unchanged by shifting either variable by a
//! constant or scaling it, so each row is centred on its observed mean first,
//! for accuracy, and multiplied by a power of two (exact) so that no sum of
//! squares overflows or underflows: forecasts and lagged returns by their own
//! row's, the returns summed over a horizon by one common power.

use super::PerDate;
use super::sums::pow2_scale;

/// Pearson correlation from the sums of `n` pairs (`None` without variance).
pub(crate) fn pearson(n: f64, sx: f64, sy: f64, sxx: f64, syy: f64, sxy: f64) -> f64 {
    let cov = sxy - sx * sy / n;
    let (vx, vy) = (sxx - sx * sx / n, syy - sy * sy / n);
    cov / (vx * vy).sqrt()
}

/// Largest finite magnitude of a row after subtracting `centre`.
pub(crate) fn max_abs_about(row: &[f64], centre: f64) -> f64 {
    row.iter().filter(|x| x.is_finite()).fold(0.0, |m, x| (x - centre).abs().max(m))
}

/// Mean of the finite values of a row (0 when none).
pub(crate) fn observed_mean(row: &[f64]) -> f64 {
    let (s, c) = row.iter().filter(|x| x.is_finite()).fold((0.0, 0usize), |(s, c), x| (s + x, c + 1));
    if c == 0 { 0.0 } else { s / c as f64 }
}

/// Fills `lagged` and `horizon` (already reset for `l` lags) from forecasts
/// (`dates × n`) and forward returns (`(dates − 1) × n`); pairs with fewer
/// than `min_assets` assets give no IC.
pub fn lagged_and_horizon(
    forecasts: &[f64],
    returns: &[f64],
    n: usize,
    l: usize,
    min_assets: usize,
    lagged: &mut PerDate,
    horizon: &mut PerDate,
) {
    let rows = returns.len() / n;
    let r_mean: Vec<f64> = returns.chunks_exact(n).map(observed_mean).collect();
    let r_own: Vec<f64> = returns.chunks_exact(n).zip(&r_mean).map(|(r, m)| pow2_scale(max_abs_about(r, *m))).collect();
    let common = pow2_scale(returns.chunks_exact(n).zip(&r_mean).fold(0.0, |a, (r, m)| max_abs_about(r, *m).max(a)));
    let mut cum = vec![0.0; n];
    let mut alive = vec![false; n];
    for t in 0..rows {
        let f = &forecasts[t * n..(t + 1) * n];
        let f_mean = observed_mean(f);
        let f_scale = pow2_scale(max_abs_about(f, f_mean));
        for (i, a) in alive.iter_mut().enumerate() {
            *a = f[i].is_finite();
            cum[i] = 0.0;
        }
        for k in 1..=l.min(rows - t) {
            let s = t + k - 1;
            let r = &returns[s * n..(s + 1) * n];
            let mut lag = [0.0f64; 6];
            let mut hor = [0.0f64; 6];
            for i in 0..n {
                let x = (f[i] - f_mean) * f_scale;
                let d = r[i] - r_mean[s];
                if f[i].is_finite() && r[i].is_finite() {
                    let y = d * r_own[s];
                    lag = [lag[0] + 1.0, lag[1] + x, lag[2] + y, lag[3] + x * x, lag[4] + y * y, lag[5] + x * y];
                }
                if alive[i] {
                    if r[i].is_finite() {
                        cum[i] += d * common;
                        let c = cum[i];
                        hor = [hor[0] + 1.0, hor[1] + x, hor[2] + c, hor[3] + x * x, hor[4] + c * c, hor[5] + x * c];
                    } else {
                        alive[i] = false;
                    }
                }
            }
            for (sums, out) in [(lag, &mut *lagged), (hor, &mut *horizon)] {
                if sums[0] >= min_assets as f64 {
                    out.push(k, t, pearson(sums[0], sums[1], sums[2], sums[3], sums[4], sums[5]));
                }
            }
        }
    }
}

/// Rank (Spearman) lagged ICs on each pair's common assets: both sides are
/// ranked afresh on the assets that have both values (average ranks for ties).
pub fn rank_lagged(forecasts: &[f64], returns: &[f64], n: usize, l: usize, min_assets: usize, out: &mut PerDate) {
    let rows = returns.len() / n;
    let (mut x, mut y, mut order) = (Vec::with_capacity(n), Vec::with_capacity(n), Vec::new());
    for t in 0..rows {
        let f = &forecasts[t * n..(t + 1) * n];
        for k in 1..=l.min(rows - t) {
            let r = &returns[(t + k - 1) * n..(t + k) * n];
            x.clear();
            y.clear();
            for (a, b) in f.iter().zip(r) {
                if a.is_finite() && b.is_finite() {
                    x.push(*a);
                    y.push(*b);
                }
            }
            if x.len() < min_assets {
                continue;
            }
            super::rank::rank_in_place(&mut x, &mut order);
            super::rank::rank_in_place(&mut y, &mut order);
            let m = x.len() as f64;
            let (sx, sy) = (x.iter().sum::<f64>(), y.iter().sum::<f64>());
            let (sxx, syy) = (x.iter().map(|v| v * v).sum::<f64>(), y.iter().map(|v| v * v).sum::<f64>());
            let sxy = x.iter().zip(&y).map(|(a, b)| a * b).sum::<f64>();
            out.push(k, t, pearson(m, sx, sy, sxx, syy, sxy));
        }
    }
}
