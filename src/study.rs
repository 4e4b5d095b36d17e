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
use crate::portfolio::{BookBuilder, BookSums, PortfolioTruth};
use crate::rng::path_rng;
use crate::scenario::Scenario;
use crate::stats::{BAND_LEVELS, Moments, Proportion, quantile_sorted};
use crate::truth::Truth;
use crate::truth::{argmax1, near_set};
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
    /// The linear book's sums per holding length.
    pub books: Vec<BookSums>,
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
    books: Vec<BookSums>,
}

impl Outcomes {
    /// Room for `paths` outcomes with `l` lags.
    pub fn with_capacity(paths: usize, l: usize, rank: bool) -> Self {
        Self {
            len: l,
            lagged: Vec::with_capacity(paths * l),
            horizon: Vec::with_capacity(paths * l),
            rank_lagged: Vec::with_capacity(if rank { paths * l } else { 0 }),
            choices: Vec::with_capacity(paths),
            books: Vec::with_capacity(paths * l),
        }
    }

    /// Appends one path's outcome.
    pub fn push(&mut self, o: PathOutcome) {
        self.lagged.extend_from_slice(&o.lagged);
        self.horizon.extend_from_slice(&o.horizon);
        if let Some(r) = &o.rank_lagged {
            self.rank_lagged.extend_from_slice(r);
        }
        self.choices.push(o.choices);
        self.books.extend_from_slice(&o.books);
    }

    /// The linear book's sums of path `p`, per holding length.
    pub fn books(&self, p: usize) -> &[BookSums] {
        &self.books[p * self.len..(p + 1) * self.len]
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
    books: BookBuilder,
}

impl Worker {
    /// Buffers for one scenario.
    pub fn new(s: &Scenario) -> Self {
        Self { ws: Workspace::default(), meas: Measurement::new(s.horizons, s.rank_ic), books: BookBuilder::default() }
    }

    /// Simulates and measures path `path`: the core of a study path, without
    /// the portfolio layer (`books` is left empty).
    pub fn measure_path(&mut self, setup: &Setup, path: u64) -> PathOutcome {
        self.simulate_and_measure(setup, path);
        let (lagged, lagged_se) = self.meas.lagged.means_and_se(false);
        let horizon = self.meas.horizon.means();
        let choices = rules::choose(&lagged, &lagged_se, &horizon);
        let rank_lagged = setup.scenario.rank_ic.then(|| self.meas.rank_lagged.means());
        PathOutcome { lagged, horizon, rank_lagged, choices, books: Vec::new() }
    }

    /// Simulates path `path` and measures its per-date ICs.
    pub fn simulate_and_measure(&mut self, setup: &Setup, path: u64) {
        setup.generator.simulate(&mut path_rng(setup.scenario.seed, path), &mut self.ws);
        self.meas.update(&self.ws.panel);
    }

    /// The measurement of the last path.
    pub fn measurement(&self) -> &Measurement {
        &self.meas
    }

    /// The linear books of the last path as if it had ended after each of `ends` dates.
    pub fn book_prefixes(&mut self, setup: &Setup, ends: &[usize]) -> Vec<Vec<BookSums>> {
        self.books.linear_prefixes(&self.ws.panel, &self.meas, setup.scenario.residual_vol, ends)
    }

    /// A whole study path: [`Worker::measure_path`] plus the linear books of
    /// every holding length.
    pub fn run_path(&mut self, setup: &Setup, path: u64) -> PathOutcome {
        let mut out = self.measure_path(setup, path);
        out.books = self.books.build(&self.ws.panel, &self.meas, setup.scenario.residual_vol, None).linear;
        out
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
    /// Net-IR rule only: mean regret in basis points a year (IR given up times
    /// the best book's annual volatility).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub regret_bps_year_mean: Option<f64>,
    /// Its Monte Carlo standard error.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub regret_bps_year_mean_se: Option<f64>,
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
    /// Holding length with the best measured net IR of the linear book.
    pub net_ir: RuleStats,
}

impl RulesOut {
    /// One rule's record.
    pub fn get(&self, rule: Rule) -> &RuleStats {
        match rule {
            Rule::Peak => &self.peak,
            Rule::Formula => &self.formula,
            Rule::Fitted => &self.fitted,
            Rule::NetIr => &self.net_ir,
        }
    }
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
    /// One-way cost of the net figures, basis points.
    pub cost_bps: f64,
    /// Each history's measured annualised net IR of the linear book per holding length.
    pub net_ir: CurveStats,
    /// The net optimum at each cost of `--cost-bps` (empty without it).
    pub cost_sweep: Vec<SweepRow>,
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
    let outcomes = simulate_all(setup, threads, progress);
    let mut result = aggregate(setup, portfolio, &outcomes);
    result.cost_sweep = sweep.iter().map(|&bps| sweep_row(setup, portfolio, bps, &outcomes)).collect();
    result
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
}

fn sweep_row(setup: &Setup, portfolio: &PortfolioTruth, bps: f64, outcomes: &Outcomes) -> SweepRow {
    let (c, ppy) = (bps * 1e-4, setup.scenario.periods_per_year);
    let (ir, se) = crate::portfolio::truth::net_ir_at(&portfolio.linear_sums, &portfolio.linear_paths, c, ppy);
    let net_vol: Vec<f64> = portfolio.linear_sums.iter().map(|s| s.net_mean_sd(c).1).collect();
    let best = argmax1(&ir);
    SweepRow {
        cost_bps: bps,
        true_best_holding: best,
        true_net_ir: ir[best - 1],
        true_net_ir_se: se[best - 1],
        true_near_best: near_set(&ir, setup.scenario.near_best_tolerance),
        measured: net_ir_rule(setup, &ir, &net_vol, c, outcomes),
    }
}

/// Runs `run(worker, p)` for paths `0..paths` on `threads` threads and hands
/// the results to `sink` in path order. Paths go in chunks of [`CHUNK`], each
/// cut into `2 × threads` contiguous runs, one per long-lived worker, so the
/// order of results never depends on scheduling.
pub fn run_in_order<W: Send, T: Send>(
    threads: usize,
    paths: usize,
    make_worker: impl Fn() -> W,
    run: impl Fn(&mut W, u64) -> T + Sync,
    mut sink: impl FnMut(T),
    progress: &(dyn Fn(usize) + Sync),
) {
    let pool = rayon::ThreadPoolBuilder::new().num_threads(threads.max(1)).build().expect("thread pool");
    let parts = 2 * threads.max(1);
    let mut workers: Vec<W> = (0..parts).map(|_| make_worker()).collect();
    let mut start = 0;
    while start < paths {
        let end = (start + CHUNK).min(paths);
        let pieces: Vec<Vec<T>> = pool.install(|| {
            workers
                .par_iter_mut()
                .enumerate()
                .map(|(j, w)| {
                    let (a, b) = (start + (end - start) * j / parts, start + (end - start) * (j + 1) / parts);
                    (a..b).map(|p| run(w, p as u64)).collect()
                })
                .collect()
        });
        pieces.into_iter().flatten().for_each(&mut sink);
        start = end;
        progress(start);
    }
}

/// Simulates every path; the outcomes come back in path order.
pub fn simulate_all(setup: &Setup, threads: usize, progress: &(dyn Fn(usize) + Sync)) -> Outcomes {
    let s = &setup.scenario;
    let mut out = Outcomes::with_capacity(s.paths, s.horizons, s.rank_ic);
    run_in_order(threads, s.paths, || Worker::new(s), |w, p| w.run_path(setup, p), |o| out.push(o), progress);
    out
}

fn curve_stats_owned(rows: Vec<Vec<f64>>, len: usize) -> CurveStats {
    curve_stats(|p| rows[p].as_slice(), rows.len(), len)
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

/// What a rule is judged against: the true value of each choice (1-based),
/// the best choice and the near-best set.
pub struct Target<'a> {
    /// True value per choice, `[n − 1]`.
    pub truth: &'a [f64],
    /// The best choice.
    pub best: usize,
    /// Choices within the tolerance of the best.
    pub near: &'a [usize],
}

/// Hit rates, regret and the distribution of `choice(p)` over all paths;
/// `measured(p, n)` is path `p`'s own estimate of the value of choice `n`
/// (for the winner's curse).
pub fn rule_stats(
    description: &str,
    target: &Target,
    paths: usize,
    choice: impl Fn(usize) -> usize,
    measured: impl Fn(usize, usize) -> f64,
) -> RuleStats {
    let (best, l, p) = (target.best, target.truth.len(), paths as u64);
    let v_best = target.truth[best - 1];
    let mut counts = vec![0u64; l];
    let (mut hit, mut near, mut in_set) = (0u64, 0u64, 0u64);
    let (mut regret, mut rel, mut curse) = (Moments::default(), Moments::default(), Moments::default());
    let mut rels = Vec::with_capacity(paths);
    let mut chosen = Vec::with_capacity(paths);
    for path in 0..paths {
        let n = choice(path);
        counts[n - 1] += 1;
        hit += u64::from(n == best);
        near += u64::from(n.abs_diff(best) <= 1);
        in_set += u64::from(target.near.contains(&n));
        let r = v_best - target.truth[n - 1];
        regret.push(r);
        rel.push(r / v_best);
        rels.push(r / v_best);
        chosen.push(n as f64);
        curse.push(measured(path, n) - target.truth[n - 1]);
    }
    rels.sort_by(f64::total_cmp);
    chosen.sort_by(f64::total_cmp);
    let (h, nh, nb) = (Proportion::new(hit, p), Proportion::new(near, p), Proportion::new(in_set, p));
    RuleStats {
        description: description.to_string(),
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
        regret_bps_year_mean: None,
        regret_bps_year_mean_se: None,
    }
}

/// The net-IR rule at one-way cost `c`: each path's best holding length by
/// its own measured net IR, judged against the true net IR. The regret in
/// basis points a year is the IR given up times the annual volatility of the
/// best book: the return lost at the best book's risk.
pub fn net_ir_rule(setup: &Setup, truth_ir: &[f64], truth_net_vol: &[f64], c: f64, outcomes: &Outcomes) -> RuleStats {
    let ppy = setup.scenario.periods_per_year;
    let near = near_set(truth_ir, setup.scenario.near_best_tolerance);
    let target = Target { truth: truth_ir, best: argmax1(truth_ir), near: &near };
    let ir = |p: usize, n: usize| outcomes.books(p)[n - 1].ir(c, ppy);
    let l = truth_ir.len();
    let chosen: Vec<usize> =
        (0..outcomes.paths()).map(|p| argmax1(&(1..=l).map(|n| ir(p, n)).collect::<Vec<_>>())).collect();
    let mut stats = rule_stats(Rule::NetIr.describe(), &target, outcomes.paths(), |p| chosen[p], ir);
    let annual_vol_bps = truth_net_vol[target.best - 1] * ppy.sqrt() * 1e4;
    let mut bps = Moments::default();
    for &n in &chosen {
        bps.push((truth_ir[target.best - 1] - truth_ir[n - 1]) * annual_vol_bps);
    }
    stats.regret_bps_year_mean = Some(bps.mean());
    stats.regret_bps_year_mean_se = bps.se();
    stats
}

/// Folds path outcomes (in path order) into the study's results.
pub fn aggregate(setup: &Setup, portfolio: &PortfolioTruth, outcomes: &Outcomes) -> StudyResult {
    let l = setup.scenario.horizons;
    let t = &setup.truth;
    let target = Target { truth: &t.horizon_ic, best: t.best_horizon, near: &t.near_best };
    let stats = |r: Rule, i: usize| {
        rule_stats(
            r.describe(),
            &target,
            outcomes.paths(),
            |p| outcomes.choices(p).horizon[i],
            |p, n| outcomes.horizon(p)[n - 1],
        )
    };
    let c = portfolio.cost_bps * 1e-4;
    let ppy = setup.scenario.periods_per_year;
    let mut fitted_families: BTreeMap<String, u64> = Family::ALL.iter().map(|f| (f.name().to_string(), 0)).collect();
    for p in 0..outcomes.paths() {
        *fitted_families.entry(outcomes.choices(p).family.name().to_string()).or_default() += 1;
    }
    StudyResult {
        paths: outcomes.paths(),
        seed: setup.scenario.seed,
        se_method: "Newey-West (Bartlett) with max(2n, floor(4(m/100)^(2/9))) lags for horizon n over m dates; lagged ICs use n = 1".into(),
        rules: RulesOut {
            peak: stats(Rule::Peak, 0),
            formula: stats(Rule::Formula, 1),
            fitted: stats(Rule::Fitted, 2),
            net_ir: net_ir_rule(setup, &portfolio.linear.net_ir, &portfolio.linear.net_vol, c, outcomes),
        },
        cost_bps: portfolio.cost_bps,
        net_ir: curve_stats_owned(
            (0..outcomes.paths()).map(|p| outcomes.books(p).iter().map(|b| b.ir(c, ppy)).collect()).collect(),
            l,
        ),
        cost_sweep: Vec::new(),
        fitted_families,
        lagged_ic: curve_stats(|p| outcomes.lagged(p), outcomes.paths(), l),
        horizon_ic: curve_stats(|p| outcomes.horizon(p), outcomes.paths(), l),
        rank_lagged_ic: setup
            .scenario
            .rank_ic
            .then(|| curve_stats(|p| outcomes.rank_lagged(p), outcomes.paths(), l)),
    }
}
