//! How often the measured 95 % intervals ([`crate::measure::ewc`]) cover the
//! truth, over simulated histories of one scenario: the check behind the
//! errors `measure` reports (`tests/se_coverage.rs`,
//! `examples/se_coverage.rs`).

use crate::generate::Workspace;
use crate::measure::{Measurement, PerDate, hac};
use crate::rng::path_rng;
use crate::simulate::Setup;
use rayon::prelude::*;

/// Coverage rates per lag or horizon (index 0 = 1).
#[derive(Debug, Clone, Default)]
pub struct Coverage {
    /// Histories simulated.
    pub paths: usize,
    /// Lagged ICs.
    pub lagged: Vec<f64>,
    /// Horizon ICs.
    pub horizon: Vec<f64>,
    /// Rank ICs (empty unless their truth was given).
    pub rank: Vec<f64>,
    /// Horizon ICs with Newey–West errors and a normal critical value, for comparison.
    pub horizon_newey_west: Vec<f64>,
}

impl Coverage {
    /// Binomial standard error of a rate near 0.95 over these paths.
    pub fn rate_se(&self) -> f64 {
        (0.95 * 0.05 / self.paths as f64).sqrt()
    }
}

/// Counts of covering intervals of one measured path.
fn covered(p: &PerDate, truth: &[f64], overlap: bool) -> Vec<u32> {
    p.intervals(overlap).iter().zip(truth).map(|(i, t)| u32::from(i.is_some_and(|i| i.covers(*t)))).collect()
}

/// Simulates `paths` histories of `setup` (streams from `(seed, path)`) and
/// counts how often each interval covers the truth: the scenario's lagged and
/// horizon ICs, and `rank_truth` for rank ICs when given.
pub fn interval_coverage(setup: &Setup, paths: usize, seed: u64, rank_truth: Option<&[f64]>) -> Coverage {
    let l = setup.scenario.horizons;
    let truth = &setup.truth;
    let zero = || vec![0u32; 4 * l];
    let counts = (0..paths as u64)
        .into_par_iter()
        .map_init(
            || (Workspace::default(), Measurement::new(l, rank_truth.is_some())),
            |(ws, m), p| {
                setup.generator.simulate(&mut path_rng(seed, p), ws);
                m.update(&ws.panel);
                let mut c = covered(&m.lagged, &truth.lagged_ic, false);
                c.extend(covered(&m.horizon, &truth.horizon_ic, true));
                c.extend(match rank_truth {
                    Some(r) => covered(&m.rank_lagged, r, false),
                    None => vec![0; l],
                });
                c.extend((1..=l).map(|n| {
                    let x = m.horizon.series(n);
                    let (mean, se) = hac::mean_and_se(x, hac::hac_lags(x, n));
                    u32::from(se.is_some_and(|se| (mean - truth.horizon_ic[n - 1]).abs() <= 1.96 * se))
                }));
                c
            },
        )
        .reduce(zero, |a, b| a.iter().zip(&b).map(|(x, y)| x + y).collect());
    let rate = |i: usize| counts[i * l..(i + 1) * l].iter().map(|&c| f64::from(c) / paths as f64).collect::<Vec<_>>();
    Coverage {
        paths,
        lagged: rate(0),
        horizon: rate(1),
        rank: if rank_truth.is_some() { rate(2) } else { Vec::new() },
        horizon_newey_west: rate(3),
    }
}
