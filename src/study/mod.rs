//! Stage 4: the Monte Carlo study (MODEL.md §4). Many independent histories of
//! one scenario; each path's stream comes from `(seed, path index)` alone, and
//! outcomes are folded in path order, so the result is byte-identical whatever
//! the thread count.

pub mod coverage;
mod outcomes;
mod ranking;
mod records;
mod tally;
mod worker;

use crate::simulate::Setup;
pub use outcomes::PathOutcome;
pub use ranking::{PairedDifference, RuleRanking};
pub use records::{RuleStats, RulesOut, Target, net_ir_rule, rule_stats};
pub use tally::{ChoiceTally, CurveTally, NetTally, StudyTally};
pub use worker::{Worker, simulate_all};

use crate::measure::fit::Family;
use crate::portfolio::PortfolioTruth;
use crate::rule::PerRule;
use crate::stats::BAND_LEVELS;
use crate::stats::{argmax1, near_set};
use serde::Serialize;
use std::collections::BTreeMap;

/// Mean and quantile bands of a measured curve across paths.
#[derive(Debug, Clone, Serialize)]
pub struct CurveStats {
    /// Mean over paths (index 0 = lag or horizon 1).
    pub mean: Vec<f64>,
    /// Monte Carlo standard error of that mean.
    pub mean_se: Vec<Option<f64>>,
    /// Bands at 5, 25, 50, 75 and 95 %, one vector per level.
    pub quantiles: Vec<Vec<f64>>,
}

/// The whole study.
#[derive(Debug, Clone, Serialize)]
pub struct StudyResult {
    /// Paths simulated.
    pub paths: usize,
    /// Master seed.
    pub seed: u64,
    /// Standard-error method of the per-path estimators.
    pub se_method: String,
    /// Results per rule.
    pub rules: RulesOut,
    /// The horizon rules compared path by path.
    pub ranking: RuleRanking,
    /// How often the fitted rule chose each family.
    pub fitted_families: BTreeMap<String, u64>,
    /// Measured mean lagged IC across paths.
    pub lagged_ic: CurveStats,
    /// Measured mean horizon IC across paths.
    pub horizon_ic: CurveStats,
    /// Measured mean rank lagged IC (when `rank_ic`).
    pub rank_lagged_ic: Option<CurveStats>,
    /// One-way cost of the net figures, basis points.
    pub cost_bps: f64,
    /// Each history's measured annualised net IR of the linear book per holding length.
    pub net_ir: CurveStats,
    /// The net optimum at each cost of `--cost-bps` (empty without it).
    pub cost_sweep: Vec<SweepRow>,
}

/// The horizon rules' record alone: what a study without the portfolio layer
/// (no books per path, no reference simulation) reports.
#[derive(Debug, Clone, Serialize)]
pub struct HorizonStudy {
    /// Paths simulated.
    pub paths: usize,
    /// Master seed.
    pub seed: u64,
    /// Standard-error method of the per-path estimators.
    pub se_method: String,
    /// Each horizon rule's record.
    pub rules: PerRule<RuleStats>,
    /// The horizon rules compared path by path.
    pub ranking: RuleRanking,
    /// How often the fitted rule chose each family.
    pub fitted_families: BTreeMap<String, u64>,
    /// Measured mean lagged IC across paths.
    pub lagged_ic: CurveStats,
    /// Measured mean horizon IC across paths.
    pub horizon_ic: CurveStats,
    /// Measured mean rank lagged IC (when `rank_ic`).
    pub rank_lagged_ic: Option<CurveStats>,
}

/// The study of the horizon rules alone, without the portfolio layer: the
/// same paths and choices as [`run`] (each path's stream depends only on the
/// seed and its index), at the cost of simulating and measuring them.
pub fn run_horizons(setup: &Setup, threads: usize, progress: &(dyn Fn(usize) + Sync)) -> HorizonStudy {
    let paths = 0..setup.scenario.paths;
    horizons(setup, &simulate_all(setup, None, paths, threads, progress))
}

/// The one-way costs (basis points) whose net-IR rule a study follows: the
/// scenario's (the portfolio truth's), then each of `sweep`.
pub fn study_costs(setup: &Setup, sweep: &[f64]) -> Vec<f64> {
    std::iter::once(setup.scenario.portfolio.cost_bps).chain(sweep.iter().copied()).collect()
}

/// Runs every path on `threads` threads, reporting paths done to `progress`.
/// `sweep` lists one-way costs (basis points) at which the net optimum is
/// also reported (truth from the reference sums, measured from each path's).
pub fn run(
    setup: &Setup,
    portfolio: &PortfolioTruth,
    sweep: &[f64],
    threads: usize,
    progress: &(dyn Fn(usize) + Sync),
) -> StudyResult {
    let costs = study_costs(setup, sweep);
    let tally = simulate_all(setup, Some(&costs), 0..setup.scenario.paths, threads, progress);
    finish(setup, portfolio, &tally)
}

/// The study's results from its tally: the net-IR rule at the portfolio's
/// cost, then one sweep row per further cost the tally followed.
pub fn finish(setup: &Setup, portfolio: &PortfolioTruth, tally: &StudyTally) -> StudyResult {
    let mut result = aggregate(setup, portfolio, tally);
    result.cost_sweep = tally.net[1..].iter().map(|net| sweep_row(setup, portfolio, net)).collect();
    result
}

/// Most histories in the study at twice the history (its figures need less
/// precision than the main study's: they are compared, not reported alone).
pub const MORE_HISTORY_PATHS: usize = 1000;

/// What twice the history would buy: every rule's record on histories twice
/// as long (same seed, so each path's first dates are the main study's path,
/// at most [`MORE_HISTORY_PATHS`] of them).
#[derive(Debug, Clone, Serialize)]
pub struct MoreHistory {
    /// Dates per history (twice the scenario's).
    pub history: usize,
    /// Histories simulated.
    pub paths: usize,
    /// Each rule's record at that history.
    pub rules: RulesOut,
}

/// The set-up of the study at twice the history, or `None` past the limits.
pub fn more_history_setup(setup: &Setup) -> Option<Setup> {
    let s = &setup.scenario;
    let twice = crate::scenario::Overrides {
        history: Some(2 * s.history),
        paths: Some(s.paths.min(MORE_HISTORY_PATHS)),
        ..Default::default()
    };
    // A history past the scenario's size limits is refused by the validation.
    Setup::new(s.revised(&twice).ok()?).ok()
}

/// The record at twice the history from its tally (`longer` from [`more_history_setup`]).
pub fn more_history_of(longer: &Setup, portfolio: &PortfolioTruth, tally: &StudyTally) -> MoreHistory {
    let result = aggregate(longer, portfolio, tally);
    MoreHistory { history: longer.scenario.history, paths: result.paths, rules: result.rules }
}

/// The true and the measured net optimum at one cost.
#[derive(Debug, Clone, Serialize)]
pub struct SweepRow {
    /// One-way cost, basis points.
    pub cost_bps: f64,
    /// True best holding length (1-based).
    pub true_best_holding: usize,
    /// True annualised net IR there.
    pub true_net_ir: f64,
    /// Its Monte Carlo standard error.
    pub true_net_ir_se: f64,
    /// Holding lengths within the tolerance of the best.
    pub true_near_best: Vec<usize>,
    /// The net-IR rule at this cost.
    pub measured: RuleStats,
    /// True annualised net IR per holding length at this cost (index 0 = holding 1).
    pub true_net_ir_curve: Vec<f64>,
    /// Each history's measured annualised net IR per holding length at this cost.
    pub measured_net_ir: CurveStats,
}

fn sweep_row(setup: &Setup, portfolio: &PortfolioTruth, net: &NetTally) -> SweepRow {
    let (c, ppy) = (net.cost_bps * 1e-4, setup.scenario.periods_per_year);
    let (ir, se) = crate::portfolio::truth::net_ir_at(&portfolio.linear_sums, &portfolio.linear_paths, c, ppy);
    let best = argmax1(&ir);
    SweepRow {
        cost_bps: net.cost_bps,
        true_best_holding: best,
        true_net_ir: ir[best - 1],
        true_net_ir_se: se[best - 1],
        true_near_best: near_set(&ir, setup.scenario.near_best_tolerance),
        measured: net_ir_rule(setup, &ir, &portfolio.linear_paths, net),
        measured_net_ir: curve_stats(&net.curve),
        true_net_ir_curve: ir,
    }
}

/// Mean, standard error and quantile bands of a curve across paths.
fn curve_stats(t: &CurveTally) -> CurveStats {
    CurveStats {
        mean: t.sums.iter().map(|s| s.mean()).collect(),
        mean_se: t.sums.iter().map(|s| s.se()).collect(),
        quantiles: BAND_LEVELS.iter().map(|&q| t.bands.iter().map(|b| b.quantile(q)).collect()).collect(),
    }
}

/// The horizon rules' record from a study's tally.
fn horizons(setup: &Setup, tally: &StudyTally) -> HorizonStudy {
    let t = &setup.truth;
    let target = Target { truth: &t.horizon_ic, best: t.best_horizon, near: &t.near_best };
    let fitted_families = Family::ALL.iter().zip(&tally.families).map(|(f, &n)| (f.name().to_string(), n)).collect();
    HorizonStudy {
        paths: tally.paths as usize,
        seed: setup.scenario.seed,
        se_method: crate::measure::hac::METHOD.into(),
        ranking: ranking::rank(&tally.pairs),
        rules: PerRule::from_fn(|r| rule_stats(r.describe(), &target, &tally.rules[r])),
        fitted_families,
        lagged_ic: curve_stats(&tally.lagged),
        horizon_ic: curve_stats(&tally.horizon),
        rank_lagged_ic: tally.rank_lagged.as_ref().map(curve_stats),
    }
}

impl StudyResult {
    /// The horizon rules' part of the study.
    pub fn horizons(&self) -> HorizonStudy {
        HorizonStudy {
            paths: self.paths,
            seed: self.seed,
            se_method: self.se_method.clone(),
            rules: self.rules.horizon.clone(),
            ranking: self.ranking.clone(),
            fitted_families: self.fitted_families.clone(),
            lagged_ic: self.lagged_ic.clone(),
            horizon_ic: self.horizon_ic.clone(),
            rank_lagged_ic: self.rank_lagged_ic.clone(),
        }
    }
}

/// The study's results from its tally (whose first net-IR record is at the
/// portfolio's cost), without the cost sweep.
pub fn aggregate(setup: &Setup, portfolio: &PortfolioTruth, tally: &StudyTally) -> StudyResult {
    let h = horizons(setup, tally);
    let net = &tally.net[0];
    StudyResult {
        paths: h.paths,
        seed: h.seed,
        se_method: h.se_method,
        ranking: h.ranking,
        rules: RulesOut {
            horizon: h.rules,
            net_ir: net_ir_rule(setup, &portfolio.linear.net_ir, &portfolio.linear_paths, net),
        },
        cost_bps: portfolio.cost_bps,
        net_ir: curve_stats(&net.curve),
        cost_sweep: Vec::new(),
        fitted_families: h.fitted_families,
        lagged_ic: h.lagged_ic,
        horizon_ic: h.horizon_ic,
        rank_lagged_ic: h.rank_lagged_ic,
    }
}
