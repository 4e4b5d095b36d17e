//! The staggered-tranche books of the study (MODEL.md §5) on a user's own
//! panel, which may miss values anywhere.
//!
//! At date `s` a tranche opens with weights `w_s = f̃_s / Σ|f̃_s|`: the
//! forecast demeaned over the assets that have one, at unit gross exposure,
//! zero for assets without a forecast; a date with fewer than `min_assets`
//! forecasts, or none that differ, opens an empty tranche. Returns are
//! demeaned across each date's assets (a dollar-neutral book earns no
//! market return), and a missing return counts as the date's mean. The book
//! for holding length `h` over period `t` (the return row `t`) earns
//! `(1/h)·Σ_{j<h} ⟨w_{t−j}, r_t⟩` and trades `(1/h)·Σ_i |w_{t,i} − w_{t−h,i}|`
//! (the oldest tranche swapped for the new one), over the same periods
//! `t = L … T−2` for every `h`, as in the study.

use super::sums::BookSums;
use crate::measure::Panel;

/// One date's tranche weights (zero where the forecast is missing), in `out`.
fn tranche(f: &[f64], min_assets: usize, out: &mut [f32]) {
    let (n, sum) = f.iter().filter(|x| x.is_finite()).fold((0usize, 0.0), |(n, s), x| (n + 1, s + x));
    out.iter_mut().for_each(|w| *w = 0.0);
    if n < min_assets.max(2) {
        return;
    }
    let mean = sum / n as f64;
    let gross: f64 = f.iter().filter(|x| x.is_finite()).map(|x| (x - mean).abs()).sum();
    if !(gross > 0.0 && gross.is_finite()) {
        return;
    }
    for (w, x) in out.iter_mut().zip(f) {
        if x.is_finite() {
            *w = ((x - mean) / gross) as f32;
        }
    }
}

/// One period's returns demeaned across the assets that have one; missing = 0.
fn demeaned_returns(r: &[f64], out: &mut [f64]) {
    let (n, sum) = r.iter().filter(|x| x.is_finite()).fold((0usize, 0.0), |(n, s), x| (n + 1, s + x));
    let mean = if n > 0 { sum / n as f64 } else { 0.0 };
    for (o, x) in out.iter_mut().zip(r) {
        *o = if x.is_finite() { x - mean } else { 0.0 };
    }
}

/// The linear book's sums for holding lengths `1..=l` (`[h − 1]`), in the
/// panel's own return units (per period).
pub fn own_books(p: &Panel, l: usize, min_assets: usize) -> Vec<BookSums> {
    let n = p.assets;
    let rows = p.dates.saturating_sub(1);
    let mut w = vec![0.0f32; rows * n];
    for (t, out) in w.chunks_mut(n).enumerate() {
        tranche(p.forecast_row(t), min_assets, out);
    }
    let mut books = vec![BookSums::default(); l];
    let mut r = vec![0.0; n];
    for t in l..rows {
        demeaned_returns(p.return_row(t), &mut r);
        let w_t = &w[t * n..(t + 1) * n];
        let mut g = 0.0;
        for h in 1..=l {
            let s = t + 1 - h; // the tranche opened h − 1 periods ago
            g += w[s * n..(s + 1) * n].iter().zip(&r).map(|(a, b)| f64::from(*a) * b).sum::<f64>();
            let back = &w[(t - h) * n..(t - h + 1) * n];
            let traded: f64 = w_t.iter().zip(back).map(|(a, b)| f64::from((a - b).abs())).sum();
            books[h - 1].push(g / h as f64, traded / h as f64);
        }
    }
    books
}

/// Standard error of an annualised information ratio measured from `n`
/// periods with per-period ratio `sr`: `√((1 + sr²/2)/n)·√ppy`, for
/// independent, normal period returns (Lo, 2002).
pub fn ir_se(sr: f64, n: u64, ppy: f64) -> f64 {
    ((1.0 + sr * sr / 2.0) / n as f64).sqrt() * ppy.sqrt()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn one_period_book_is_the_dot_of_weights_and_returns() {
        // Three assets, five dates; asset 2 misses a forecast on date 1 and a return on date 2.
        let nan = f64::NAN;
        let p = Panel {
            assets: 3,
            dates: 5,
            forecasts: vec![1.0, 2.0, 6.0, 3.0, 1.0, nan, 0.0, 1.0, 2.0, 5.0, 4.0, 0.0, 1.0, 1.0, 1.0],
            returns: vec![0.01, 0.02, 0.0, -0.01, 0.03, 0.01, 0.02, 0.0, nan, 0.01, 0.01, 0.04],
            has_missing: true,
        };
        let books = own_books(&p, 1, 2);
        // Periods t = 1, 2, 3 (L = 1 … T − 2).
        assert_eq!(books[0].n, 3);
        // w_0 from (1, 2, 6): (−2, −1, 3)/6. t = 1: w_1 = (1, −1, 0)/2 (asset 2 missing), r_1 demeaned
        // = (−0.02, 0.02, 0) → −0.02. t = 2: w_2 = (−1, 0, 1)/2, r_2 = (0.02, 0, missing), mean 0.01
        // → (0.01, −0.01, 0) → −0.005. t = 3: w_3 from (5, 4, 0) = (2, 1, −3)/6, r_3 − 0.02 = (−0.01, −0.01, 0.02).
        let w0 = [-2.0 / 6.0, -1.0 / 6.0, 3.0 / 6.0];
        let w1 = [0.5, -0.5, 0.0];
        let w2 = [-0.5, 0.0, 0.5];
        let w3 = [2.0 / 6.0, 1.0 / 6.0, -3.0 / 6.0];
        let g3 = w3[0] * -0.01 + w3[1] * -0.01 + w3[2] * 0.02;
        let l1 = |a: &[f64; 3], b: &[f64; 3]| a.iter().zip(b).map(|(x, y)| (x - y).abs()).sum::<f64>();
        let g = -0.02 + -0.005 + g3;
        let tau = l1(&w1, &w0) + l1(&w2, &w1) + l1(&w3, &w2);
        assert!((books[0].g - g).abs() < 1e-7, "{} vs {g}", books[0].g);
        assert!((books[0].t - tau).abs() < 1e-6, "{} vs {tau}", books[0].t);
    }
}
