//! How far to trust a measured horizon: the stationary bootstrap of Politis
//! and Romano (1994) over dates. Each resample strings together blocks of
//! consecutive dates with geometric lengths (mean `block`), wrapping around,
//! so the dependence between nearby dates — overlapping horizons, persistent
//! forecasts, IC regimes — survives; every rule then picks its horizon from
//! the resampled means.

use super::PerDate;
use super::rules;
use crate::rng::path_rng;
use crate::rule::PerRule;
use rand::RngExt;

/// The dates of one stationary-bootstrap resample of `m` dates, as counts per date.
pub fn resample_counts(m: usize, block: f64, seed: u64, replicate: u64, counts: &mut Vec<u32>) {
    let mut rng = path_rng(seed, replicate);
    counts.clear();
    counts.resize(m, 0);
    let p_new = 1.0 / block.max(1.0);
    let mut t = rng.random_range(0..m);
    for _ in 0..m {
        counts[t] += 1;
        t = if rng.random::<f64>() < p_new { rng.random_range(0..m) } else { (t + 1) % m };
    }
}

/// Means per lag of `p` weighted by the date counts.
fn weighted_means(p: &PerDate, counts: &[u32]) -> Vec<f64> {
    (1..=p.len())
        .map(|k| {
            let (mut s, mut w) = (0.0, 0.0);
            for (v, &d) in p.series(k).iter().zip(p.dates(k)) {
                let c = f64::from(counts[d as usize]);
                s += c * v;
                w += c;
            }
            if w > 0.0 { s / w } else { f64::NAN }
        })
        .collect()
}

/// The rules' choices on `replicates` resamples of the `m` dates with a
/// forward return (`None` where a resample leaves a rule's curve
/// unmeasurable). `lagged_se` (from the full sample) weights the fits.
pub fn choices(
    lagged: &PerDate,
    horizon: &PerDate,
    lagged_se: &[Option<f64>],
    m: usize,
    block: f64,
    replicates: usize,
    seed: u64,
) -> Vec<PerRule<Option<usize>>> {
    let mut counts = Vec::new();
    (0..replicates as u64)
        .map(|b| {
            resample_counts(m, block, seed, b, &mut counts);
            rules::choose_measured(&weighted_means(lagged, &counts), lagged_se, &weighted_means(horizon, &counts))
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn resamples_have_m_dates_in_runs_of_the_mean_block_length() {
        let mut counts = Vec::new();
        let (m, block) = (2000usize, 10.0);
        resample_counts(m, block, 7, 0, &mut counts);
        assert_eq!(counts.iter().sum::<u32>() as usize, m);
        // Fraction of distinct dates drawn: 1 − e^{−1} ≈ 0.632 for any resample of m
        // from m that is uniform in each draw; blocks make it vary more from
        // resample to resample than i.i.d. draws would, hence the loose 0.06.
        let drawn = counts.iter().filter(|&&c| c > 0).count() as f64 / m as f64;
        assert!((drawn - 0.632).abs() < 0.06, "{drawn}");
        // Runs: a block goes on to the next date with probability 1 − 1/10, so
        // a drawn date's successor is drawn at least 90 % of the time (about
        // 0.9 + 0.1·0.632 = 0.96), where i.i.d. draws give 0.632 (binomial se
        // about 0.006 over 1,264 drawn dates). Catches: i.i.d. resampling, or
        // blocks that never end (then every date is drawn, and the line above fails).
        let pairs = (0..m).filter(|&t| counts[t] > 0 && counts[(t + 1) % m] > 0).count() as f64;
        let next_drawn = pairs / (drawn * m as f64);
        assert!(next_drawn > 0.9, "P(next date drawn | date drawn) = {next_drawn}");
    }
}
