//! Stage 4d: decay stress. Choose the horizon (and the holding length) that
//! is best under the assumed curve, then measure what that choice gives up
//! when another curve is true (MODEL.md §6). Everything here is truth: no
//! estimation noise, only the question of a wrong assumption.

use crate::decay::DecayCurve;
use crate::error::ScenarioError;
use crate::portfolio::BookSums;
use crate::portfolio::truth::{net_ir_at, pool, reference_books};
use crate::scenario::Scenario;
use crate::simulate::Setup;
use crate::stats::argmax1;
use serde::Serialize;
use std::ops::Range;

/// How many times faster or slower the default alternatives decay.
const SPEED: f64 = 2.0;
/// Size of the default reversal relative to the IC at lag 1.
const REVERSAL: f64 = 0.25;

/// The default alternatives to an assumed curve whose best horizon is `best`:
/// the same curve decaying twice as fast and half as fast (lag `k` read at
/// `1 + 2(k−1)` and `1 + (k−1)/2`), a hump with the same lag-1 level that
/// peaks near a third of the best horizon, and the assumed curve with a
/// reversal of a quarter of its lag-1 IC, starting at half the best horizon
/// and fading with that half-life.
pub fn default_alternatives(assumed: &DecayCurve, k_max: usize, best: usize) -> Vec<(String, DecayCurve)> {
    let table = |f: &dyn Fn(usize) -> f64| {
        let v: Vec<f64> = (1..=k_max).map(f).map(|x| x.clamp(-0.99, 0.99)).collect();
        DecayCurve::table(v).expect("values clamped inside (-1, 1)")
    };
    let ic1 = assumed.ic(1);
    let p = (best as f64 / 2.0).max(2.0);
    let hump_lag = (best as f64 / 3.0).max(2.0);
    vec![
        ("faster".into(), table(&|k| assumed.ic_at(1.0 + SPEED * (k - 1) as f64))),
        ("slower".into(), table(&|k| assumed.ic_at(1.0 + (k - 1) as f64 / SPEED))),
        ("hump".into(), DecayCurve::hump(ic1.clamp(-0.99, 0.99), hump_lag, 2.0).expect("valid hump")),
        (
            "reversal".into(),
            table(&|k| {
                let x = k as f64;
                assumed.ic(k) - if x >= p { REVERSAL * ic1 * (-(x - p) / p).exp2() } else { 0.0 }
            }),
        ),
    ]
}

/// One curve's truth.
#[derive(Debug, Clone, Serialize)]
pub struct CurveTruth {
    /// Name (`assumed` for the scenario's own curve).
    pub name: String,
    /// The curve itself, lags `1..=L`.
    pub lagged_ic: Vec<f64>,
    /// True horizon IC (the study's per-date form).
    pub horizon_ic: Vec<f64>,
    /// Its best horizon (1-based).
    pub best_horizon: usize,
    /// Integration error of the horizon IC.
    pub horizon_ic_integration_se: f64,
    /// True net IR of the linear book per holding length.
    pub net_ir: Vec<f64>,
    /// Its best holding length (1-based).
    pub best_holding: usize,
    /// Monte Carlo error of the net IR (reference simulation).
    pub net_ir_se: Vec<f64>,
}

/// Regret of choices made under each curve (rows) when each curve is true (columns).
#[derive(Debug, Clone, Serialize)]
pub struct RegretMatrix {
    /// What is being chosen: `horizon` or `holding`.
    pub what: String,
    /// The choice made under each curve (1-based), row order.
    pub chosen: Vec<usize>,
    /// `regret[i][j] = V_j(best_j) − V_j(chosen_i)`: zero on the diagonal, never negative.
    pub regret: Vec<Vec<f64>>,
    /// The same as a share of `|V_j(best_j)|`.
    pub regret_rel: Vec<Vec<f64>>,
    /// The choice that minimises the worst relative regret over all curves.
    pub minimax: usize,
    /// That worst relative regret.
    pub minimax_worst_rel: f64,
}

/// The whole stress test.
#[derive(Debug, Clone, Serialize)]
pub struct StressResult {
    /// The curves, the assumed one first.
    pub curves: Vec<CurveTruth>,
    /// Horizons judged by the true horizon IC.
    pub horizon: RegretMatrix,
    /// Holding lengths judged by the true net IR.
    pub holding: RegretMatrix,
    /// One-way cost of the net IR, basis points.
    pub cost_bps: f64,
}

/// Builds the regret matrix from each curve's true values per choice.
pub fn regret_matrix(what: &str, values: &[&[f64]]) -> RegretMatrix {
    let best: Vec<usize> = values.iter().map(|v| argmax1(v)).collect();
    let top = |j: usize| values[j][best[j] - 1];
    let regret: Vec<Vec<f64>> =
        best.iter().map(|&c| (0..values.len()).map(|j| top(j) - values[j][c - 1]).collect()).collect();
    let rel = |j: usize, r: f64| r / top(j).abs();
    let regret_rel = regret.iter().map(|row| row.iter().enumerate().map(|(j, &r)| rel(j, r)).collect()).collect();
    let worst = |n: usize| (0..values.len()).map(|j| rel(j, top(j) - values[j][n - 1])).fold(f64::MIN, f64::max);
    let len = values[0].len();
    let minimax = (1..=len).min_by(|&a, &b| worst(a).total_cmp(&worst(b))).unwrap_or(1);
    let minimax_worst_rel = worst(minimax);
    RegretMatrix { what: what.into(), chosen: best.clone(), regret, regret_rel, minimax, minimax_worst_rel }
}

/// Every curve of a stress test of `scenario` with its set-up: the assumed
/// one first, the default alternatives unless replaced, then the scenario's.
///
/// # Errors
/// A curve that is infeasible or never positive, with its name.
pub fn curves(scenario: &Scenario) -> Result<Vec<(String, Setup)>, (String, ScenarioError)> {
    let assumed = Setup::new(scenario.clone()).map_err(|e| ("assumed".to_string(), e))?;
    let mut curves = vec![];
    if !scenario.replace_default_alternatives {
        curves.extend(default_alternatives(&scenario.decay, scenario.truncation, assumed.truth.best_horizon));
    }
    curves.extend(scenario.alternatives.iter().cloned());
    let mut out = vec![("assumed".to_string(), assumed)];
    for (name, decay) in curves {
        let setup = Setup::new(scenario.with_decay(decay)).map_err(|e| (name.clone(), e))?;
        out.push((name, setup));
    }
    Ok(out)
}

/// The linear book of reference histories `paths` of one curve, in path
/// order (the stress test judges holdings by the linear book alone).
pub fn curve_books(
    setup: &Setup,
    paths: Range<usize>,
    threads: usize,
    progress: &(dyn Fn(usize) + Sync),
) -> Vec<Vec<BookSums>> {
    reference_books(setup, paths, false, threads, progress).into_iter().map(|b| b.linear).collect()
}

/// One curve's truth from the linear book of every reference history
/// (path order): net IR at the scenario's cost from the pooled sums, its
/// error from the spread of per-history IRs (as the portfolio truth's).
pub fn curve_truth(name: &str, setup: &Setup, per_path: &[Vec<BookSums>]) -> CurveTruth {
    let s = &setup.scenario;
    let pooled = pool(s.horizons, per_path);
    let (net_ir, net_ir_se) = net_ir_at(&pooled, per_path, s.portfolio.cost_bps * 1e-4, s.periods_per_year);
    CurveTruth {
        name: name.into(),
        lagged_ic: setup.truth.lagged_ic.clone(),
        best_horizon: setup.truth.best_horizon,
        horizon_ic: setup.truth.horizon_ic.clone(),
        horizon_ic_integration_se: setup.truth.horizon_ic_integration_se,
        best_holding: argmax1(&net_ir),
        net_ir,
        net_ir_se,
    }
}

/// The regret matrices of `curves` (the assumed one first).
fn finish(scenario: &Scenario, curves: Vec<CurveTruth>) -> StressResult {
    let h: Vec<&[f64]> = curves.iter().map(|c| c.horizon_ic.as_slice()).collect();
    let n: Vec<&[f64]> = curves.iter().map(|c| c.net_ir.as_slice()).collect();
    StressResult {
        horizon: regret_matrix("horizon", &h),
        holding: regret_matrix("holding", &n),
        cost_bps: scenario.portfolio.cost_bps,
        curves,
    }
}

/// The linear books of reference histories `paths` of every curve
/// (`[curve][path − paths.start]`); `progress` counts curves done.
pub fn books(
    curves: &[(String, Setup)],
    paths: Range<usize>,
    threads: usize,
    progress: &(dyn Fn(usize) + Sync),
) -> Vec<Vec<Vec<BookSums>>> {
    let mut out = Vec::with_capacity(curves.len());
    for (i, (_, setup)) in curves.iter().enumerate() {
        out.push(curve_books(setup, paths.clone(), threads, &|_| {}));
        progress(i + 1);
    }
    out
}

/// The stress test from every curve's books over all reference histories.
pub fn from_books(scenario: &Scenario, curves: &[(String, Setup)], books: &[Vec<Vec<BookSums>>]) -> StressResult {
    let truths = curves.iter().zip(books).map(|((name, setup), b)| curve_truth(name, setup, b)).collect();
    finish(scenario, truths)
}

/// Runs the stress test: every curve's truth, the portfolio truth by a
/// reference simulation per curve (`progress` counts curves done).
///
/// # Errors
/// A curve that is infeasible or never positive, with its name.
pub fn run(
    scenario: &Scenario,
    threads: usize,
    progress: &(dyn Fn(usize) + Sync),
) -> Result<StressResult, (String, ScenarioError)> {
    let curves = curves(scenario)?;
    let books = books(&curves, 0..scenario.portfolio.reference_paths, threads, progress);
    Ok(from_books(scenario, &curves, &books))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn regret_is_zero_on_the_diagonal_and_never_negative() {
        let a = [0.1, 0.3, 0.2];
        let b = [0.3, 0.2, 0.1];
        let m = regret_matrix("horizon", &[&a, &b]);
        assert_eq!(m.chosen, [2, 1]);
        assert_eq!(m.regret, [[0.0, 0.3 - 0.2], [0.3 - 0.1, 0.0]]);
        assert!(m.regret.iter().flatten().all(|&r| r >= 0.0));
        // Worst relative regret: n=1 → max(0.2/0.3, 0) = 0.667; n=2 → max(0, 0.1/0.3) = 0.333.
        assert_eq!(m.minimax, 2);
    }
}
