//! Stage 4: the Monte Carlo study (MODEL.md §4). Many independent histories of
//! one scenario; each path's stream comes from `(seed, path index)` alone, and
//! outcomes are folded in path order, so the result is byte-identical whatever
//! the thread count.

use crate::error::ScenarioError;
use crate::generate::{Generator, Workspace};
use crate::measure::Measurement;
use crate::measure::fit::Family;
use crate::measure::rules::{self, Choices, Rule};
use crate::model::Model;
use crate::rng::path_rng;
use crate::scenario::Scenario;
use crate::stats::{BAND_LEVELS, Moments, Proportion, quantile_sorted};
use crate::truth::Truth;
use rayon::prelude::*;
use serde::Serialize;
use std::collections::BTreeMap;

/// Paths simulated between two progress reports.
const CHUNK: usize = 128;

/// A validated scenario with everything derived from it.
#[derive(Debug, Clone)]
pub struct Setup {
    /// The scenario.
    pub scenario: Scenario,
    /// Calibrated model.
    pub model: Model,
    /// The truth.
    pub truth: Truth,
    /// The path generator.
    pub generator: Generator,
}

impl Setup {
    /// Calibrates the model, computes the truth and builds the generator.
    ///
    /// # Errors
    /// Infeasible variance or no positive horizon IC.
    pub fn new(scenario: Scenario) -> Result<Self, ScenarioError> {
        let model = Model::new(&scenario)?;
        let truth = Truth::new(&model, scenario.horizons, scenario.near_best_tolerance)?;
        let generator = Generator::new(&model, scenario.assets, scenario.history, scenario.tails);
        Ok(Self { scenario, model, truth, generator })
    }
}

/// What one simulated history yields.
#[derive(Debug, Clone)]
pub struct PathOutcome {
    /// Mean lagged IC per lag.
    pub lagged: Vec<f64>,
    /// Mean horizon IC per horizon.
    pub horizon: Vec<f64>,
    /// Mean rank lagged IC per lag (when asked).
    pub rank_lagged: Option<Vec<f64>>,
    /// Each rule's choice.
    pub choices: Choices,
}

/// Every path's outcome, stored flat and in path order (one allocation per
/// field, so that millions of small vectors do not fragment the heap).
#[derive(Debug, Clone, Default)]
pub struct Outcomes {
    len: usize,
    lagged: Vec<f64>,
    horizon: Vec<f64>,
    rank_lagged: Vec<f64>,
    choices: Vec<Choices>,
}

impl Outcomes {
    fn with_capacity(paths: usize, l: usize, rank: bool) -> Self {
        Self {
            len: l,
            lagged: Vec::with_capacity(paths * l),
            horizon: Vec::with_capacity(paths * l),
            rank_lagged: Vec::with_capacity(if rank { paths * l } else { 0 }),
            choices: Vec::with_capacity(paths),
        }
    }

    fn push(&mut self, o: PathOutcome) {
        self.lagged.extend_from_slice(&o.lagged);
        self.horizon.extend_from_slice(&o.horizon);
        if let Some(r) = &o.rank_lagged {
            self.rank_lagged.extend_from_slice(r);
        }
        self.choices.push(o.choices);
    }

    /// Number of paths.
    pub fn paths(&self) -> usize {
        self.choices.len()
    }

    /// Mean lagged IC of path `p`.
    pub fn lagged(&self, p: usize) -> &[f64] {
        &self.lagged[p * self.len..(p + 1) * self.len]
    }

    /// Mean horizon IC of path `p`.
    pub fn horizon(&self, p: usize) -> &[f64] {
        &self.horizon[p * self.len..(p + 1) * self.len]
    }

    /// Mean rank lagged IC of path `p` (empty when not measured).
    pub fn rank_lagged(&self, p: usize) -> &[f64] {
        self.rank_lagged.get(p * self.len..(p + 1) * self.len).unwrap_or(&[])
    }

    /// The rules' choices on path `p`.
    pub fn choices(&self, p: usize) -> &Choices {
        &self.choices[p]
    }
}

/// Per-worker buffers.
#[derive(Debug, Clone)]
pub struct Worker {
    ws: Workspace,
    meas: Measurement,
}

impl Worker {
    /// Buffers for one scenario.
    pub fn new(s: &Scenario) -> Self {
        Self { ws: Workspace::default(), meas: Measurement::new(s.horizons, s.rank_ic) }
    }

    /// Simulates and measures path `path`.
    pub fn run_path(&mut self, setup: &Setup, path: u64) -> PathOutcome {
        let mut rng = path_rng(setup.scenario.seed, path);
        setup.generator.simulate(&mut rng, &mut self.ws);
        self.meas.update(&self.ws.panel);
        let (lagged, lagged_se) = self.meas.lagged.means_and_se(false);
        let horizon = self.meas.horizon.means();
        let choices = rules::choose(&lagged, &lagged_se, &horizon);
        let rank_lagged = setup.scenario.rank_ic.then(|| self.meas.rank_lagged.means());
        PathOutcome { lagged, horizon, rank_lagged, choices }
    }
}

/// Study results for one rule.
#[derive(Debug, Clone, Serialize)]
pub struct RuleStats {
    /// What the rule does.
    pub description: String,
    /// `P(n̂ = n*)`.
    pub hit_rate: f64,
    /// Its Monte Carlo standard error.
    pub hit_rate_se: f64,
    /// `P(|n̂ − n*| ≤ 1)`.
    pub near_hit_rate: f64,
    /// Its Monte Carlo standard error.
    pub near_hit_rate_se: f64,
    /// `P(n̂ in the near-best set)`.
    pub near_best_rate: f64,
    /// Its Monte Carlo standard error.
    pub near_best_rate_se: f64,
    /// Mean regret `H(n*) − H(n̂)` in IC units.
    pub regret_mean: f64,
    /// Its Monte Carlo standard error.
    pub regret_mean_se: Option<f64>,
    /// Mean relative regret `(H(n*) − H(n̂)) / H(n*)`.
    pub regret_rel_mean: f64,
    /// Its Monte Carlo standard error.
    pub regret_rel_mean_se: Option<f64>,
    /// Quantiles 5, 25, 50, 75, 95 % of the relative regret.
    pub regret_rel_quantiles: Vec<f64>,
    /// Mean winner's curse: measured mean horizon IC at `n̂` minus `H(n̂)`.
    pub winners_curse_mean: f64,
    /// Its Monte Carlo standard error.
    pub winners_curse_mean_se: Option<f64>,
    /// How often each horizon was chosen (index 0 = horizon 1).
    pub choice_counts: Vec<u64>,
    /// Quantiles 5, 25, 50, 75, 95 % of the chosen horizon.
    pub choice_quantiles: Vec<f64>,
}

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

/// The three rules' results.
#[derive(Debug, Clone, Serialize)]
pub struct RulesOut {
    /// Peak of measured horizon IC.
    pub peak: RuleStats,
    /// Peak of the formula from measured lagged ICs.
    pub formula: RuleStats,
    /// Optimum of the fitted decay curve.
    pub fitted: RuleStats,
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
    /// How often the fitted rule chose each family.
    pub fitted_families: BTreeMap<String, u64>,
    /// Measured mean lagged IC across paths.
    pub lagged_ic: CurveStats,
    /// Measured mean horizon IC across paths.
    pub horizon_ic: CurveStats,
    /// Measured mean rank lagged IC (when `rank_ic`).
    pub rank_lagged_ic: Option<CurveStats>,
}

/// Runs every path on `threads` threads, reporting paths done to `progress`.
pub fn run(setup: &Setup, threads: usize, progress: &(dyn Fn(usize) + Sync)) -> StudyResult {
    let outcomes = simulate_all(setup, threads, progress);
    aggregate(setup, &outcomes)
}

/// Simulates every path; the outcomes come back in path order.
pub fn simulate_all(setup: &Setup, threads: usize, progress: &(dyn Fn(usize) + Sync)) -> Outcomes {
    let pool = rayon::ThreadPoolBuilder::new().num_threads(threads.max(1)).build().expect("thread pool");
    let paths = setup.scenario.paths;
    // Each chunk is cut into `parts` contiguous runs of paths, one per worker;
    // workers keep their buffers from chunk to chunk.
    let parts = 2 * threads.max(1);
    let mut workers: Vec<Worker> = (0..parts).map(|_| Worker::new(&setup.scenario)).collect();
    let mut out = Outcomes::with_capacity(paths, setup.scenario.horizons, setup.scenario.rank_ic);
    pool.install(|| {
        let mut start = 0;
        while start < paths {
            let end = (start + CHUNK).min(paths);
            let pieces: Vec<Vec<PathOutcome>> = workers
                .par_iter_mut()
                .enumerate()
                .map(|(j, w)| {
                    let (a, b) = (start + (end - start) * j / parts, start + (end - start) * (j + 1) / parts);
                    (a..b).map(|p| w.run_path(setup, p as u64)).collect()
                })
                .collect();
            pieces.into_iter().flatten().for_each(|o| out.push(o));
            start = end;
            progress(start);
        }
    });
    out
}

fn curve_stats<'a>(rows: impl Fn(usize) -> &'a [f64], paths: usize, len: usize) -> CurveStats {
    let mut moments = vec![Moments::default(); len];
    let mut columns = vec![Vec::with_capacity(paths); len];
    for p in 0..paths {
        for (k, &v) in rows(p).iter().enumerate() {
            moments[k].push(v);
            columns[k].push(v);
        }
    }
    columns.iter_mut().for_each(|c| c.sort_by(f64::total_cmp));
    CurveStats {
        mean: moments.iter().map(Moments::mean).collect(),
        mean_se: moments.iter().map(Moments::se).collect(),
        quantiles: BAND_LEVELS.iter().map(|&q| columns.iter().map(|c| quantile_sorted(c, q)).collect()).collect(),
    }
}

fn rule_stats(rule: Rule, idx: usize, setup: &Setup, outcomes: &Outcomes) -> RuleStats {
    let truth = &setup.truth;
    let (best, l, p) = (truth.best_horizon, setup.scenario.horizons, outcomes.paths() as u64);
    let h_best = truth.h(best);
    let mut counts = vec![0u64; l];
    let (mut hit, mut near, mut in_set) = (0u64, 0u64, 0u64);
    let (mut regret, mut rel, mut curse) = (Moments::default(), Moments::default(), Moments::default());
    let mut rels = Vec::with_capacity(outcomes.paths());
    let mut chosen = Vec::with_capacity(outcomes.paths());
    for path in 0..outcomes.paths() {
        let n = outcomes.choices(path).horizon[idx];
        counts[n - 1] += 1;
        hit += u64::from(n == best);
        near += u64::from(n.abs_diff(best) <= 1);
        in_set += u64::from(truth.is_near_best(n));
        let r = h_best - truth.h(n);
        regret.push(r);
        rel.push(r / h_best);
        rels.push(r / h_best);
        chosen.push(n as f64);
        curse.push(outcomes.horizon(path)[n - 1] - truth.h(n));
    }
    rels.sort_by(f64::total_cmp);
    chosen.sort_by(f64::total_cmp);
    let (h, nh, nb) = (Proportion::new(hit, p), Proportion::new(near, p), Proportion::new(in_set, p));
    RuleStats {
        description: rule.describe().to_string(),
        hit_rate: h.rate,
        hit_rate_se: h.se,
        near_hit_rate: nh.rate,
        near_hit_rate_se: nh.se,
        near_best_rate: nb.rate,
        near_best_rate_se: nb.se,
        regret_mean: regret.mean(),
        regret_mean_se: regret.se(),
        regret_rel_mean: rel.mean(),
        regret_rel_mean_se: rel.se(),
        regret_rel_quantiles: BAND_LEVELS.iter().map(|&q| quantile_sorted(&rels, q)).collect(),
        winners_curse_mean: curse.mean(),
        winners_curse_mean_se: curse.se(),
        choice_counts: counts,
        choice_quantiles: BAND_LEVELS.iter().map(|&q| quantile_sorted(&chosen, q)).collect(),
    }
}

/// Folds path outcomes (in path order) into the study's results.
pub fn aggregate(setup: &Setup, outcomes: &Outcomes) -> StudyResult {
    let l = setup.scenario.horizons;
    let stats = |r: Rule, i| rule_stats(r, i, setup, outcomes);
    let mut fitted_families: BTreeMap<String, u64> = Family::ALL.iter().map(|f| (f.name().to_string(), 0)).collect();
    for p in 0..outcomes.paths() {
        *fitted_families.entry(outcomes.choices(p).family.name().to_string()).or_default() += 1;
    }
    StudyResult {
        paths: outcomes.paths(),
        seed: setup.scenario.seed,
        se_method: "Newey-West (Bartlett) with max(2n, floor(4(m/100)^(2/9))) lags for horizon n over m dates; lagged ICs use n = 1".into(),
        rules: RulesOut { peak: stats(Rule::Peak, 0), formula: stats(Rule::Formula, 1), fitted: stats(Rule::Fitted, 2) },
        fitted_families,
        lagged_ic: curve_stats(|p| outcomes.lagged(p), outcomes.paths(), l),
        horizon_ic: curve_stats(|p| outcomes.horizon(p), outcomes.paths(), l),
        rank_lagged_ic: setup
            .scenario
            .rank_ic
            .then(|| curve_stats(|p| outcomes.rank_lagged(p), outcomes.paths(), l)),
    }
}
