//! Stage 4c: history sizing. For a grid of history lengths, the record of
//! every choice rule, from common random numbers: path `p` is simulated once
//! at the longest history and every shorter history is its first `T` dates.
//! A date's per-date ICs and a book's per-period figures do not change when
//! the history is cut shorter, so each path is measured once and every grid
//! point reads a prefix (MODEL.md §6).

use crate::measure::rules;
use crate::portfolio::PortfolioTruth;
use crate::rule::Rule;
use crate::simulate::{Setup, run_in_order};
use crate::study::{PathOutcome, RuleStats, RulesOut, StudyTally, Worker, aggregate};
use serde::Serialize;
use std::fmt;
use std::ops::Range;

/// A figure of a rule's record that a target can name.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Metric {
    /// `P(n̂ = n*)`.
    Hit,
    /// `P(|n̂ − n*| ≤ 1)`.
    NearHit,
    /// `P(n̂ in the near-best set)`.
    NearBest,
    /// Mean relative regret.
    Regret,
}

impl Metric {
    /// The name used in targets.
    pub fn name(self) -> &'static str {
        match self {
            Metric::Hit => "hit",
            Metric::NearHit => "near-hit",
            Metric::NearBest => "near-best",
            Metric::Regret => "regret",
        }
    }

    /// What the figure is, in words.
    pub fn describe(self) -> &'static str {
        match self {
            Metric::Hit => "exact hit rate",
            Metric::NearHit => "within-one-period hit rate",
            Metric::NearBest => "near-best rate",
            Metric::Regret => "mean regret (share of best)",
        }
    }

    /// The JSON field of the figure in a rule's record.
    pub fn field(self) -> &'static str {
        match self {
            Metric::Hit => "hit_rate",
            Metric::NearHit => "near_hit_rate",
            Metric::NearBest => "near_best_rate",
            Metric::Regret => "regret_rel_mean",
        }
    }

    /// The figure and its Monte Carlo standard error.
    pub fn of(self, r: &RuleStats) -> (f64, f64) {
        match self {
            Metric::Hit => (r.hit_rate, r.hit_rate_se),
            Metric::NearHit => (r.near_hit_rate, r.near_hit_rate_se),
            Metric::NearBest => (r.near_best_rate, r.near_best_rate_se),
            Metric::Regret => (r.regret_rel_mean, r.regret_rel_mean_se.unwrap_or(0.0)),
        }
    }

    /// The 95 % Wilson interval of a share (`None` for the regret, a mean).
    pub fn ci(self, r: &RuleStats) -> Option<[f64; 2]> {
        match self {
            Metric::Hit => Some(r.hit_rate_ci),
            Metric::NearHit => Some(r.near_hit_rate_ci),
            Metric::NearBest => Some(r.near_best_rate_ci),
            Metric::Regret => None,
        }
    }
}

/// A target such as `near-hit>=0.8` or `fitted:regret<=0.05`.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Goal {
    /// The rule judged (default `peak`).
    pub rule: Rule,
    /// The figure.
    pub metric: Metric,
    /// `true` for `>=`, `false` for `<=`.
    pub at_least: bool,
    /// The threshold, in [0, 1].
    pub value: f64,
}

impl fmt::Display for Goal {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "{}:{}{}{}",
            self.rule.name(),
            self.metric.name(),
            if self.at_least { ">=" } else { "<=" },
            self.value
        )
    }
}

impl Goal {
    /// Parses `[rule:]metric>=value` or `[rule:]metric<=value`.
    ///
    /// # Errors
    /// A message naming the part that is wrong and what is allowed.
    pub fn parse(text: &str) -> Result<Self, String> {
        let allowed = "write [rule:]metric>=value or [rule:]metric<=value, rule one of peak, formula, fitted, \
                       net_ir; metric one of hit, near-hit, near-best, regret; value in [0, 1]";
        let (rule, rest) = match text.split_once(':') {
            Some((r, rest)) => {
                let rule = Rule::EVERY
                    .into_iter()
                    .find(|x| x.name() == r.trim())
                    .ok_or_else(|| format!("unknown rule `{r}` in target `{text}`: {allowed}"))?;
                (rule, rest)
            }
            None => (Rule::Peak, text),
        };
        let (metric, value, at_least) = if let Some((m, v)) = rest.split_once(">=") {
            (m, v, true)
        } else if let Some((m, v)) = rest.split_once("<=") {
            (m, v, false)
        } else {
            return Err(format!("no `>=` or `<=` in target `{text}`: {allowed}"));
        };
        let metric = [Metric::Hit, Metric::NearHit, Metric::NearBest, Metric::Regret]
            .into_iter()
            .find(|x| x.name() == metric.trim())
            .ok_or_else(|| format!("unknown metric `{}` in target `{text}`: {allowed}", metric.trim()))?;
        let value: f64 = value
            .trim()
            .parse()
            .map_err(|_| format!("`{}` is not a number in target `{text}`: {allowed}", value.trim()))?;
        if !(0.0..=1.0).contains(&value) {
            return Err(format!("target value {value} is outside [0, 1]: {allowed}"));
        }
        Ok(Self { rule, metric, at_least, value })
    }

    fn met_by(&self, x: f64) -> bool {
        if self.at_least { x >= self.value } else { x <= self.value }
    }
}

/// One grid point's record.
#[derive(Debug, Clone, Serialize)]
pub struct PlanPoint {
    /// History length `T`.
    pub history: usize,
    /// Breadth `N`.
    pub assets: usize,
    /// Every rule's record at this point.
    pub rules: RulesOut,
}

/// The smallest history that meets the goal.
#[derive(Debug, Clone, Copy, Serialize)]
pub struct Answer {
    /// Smallest grid history whose estimate meets the goal.
    pub history: usize,
    /// Breadth.
    pub assets: usize,
    /// Smallest grid history meeting it with the figure moved two Monte Carlo
    /// standard errors in the goal's favour (an optimistic bound).
    pub history_low: usize,
    /// Smallest grid history meeting it with the figure moved two standard
    /// errors against the goal (a cautious bound); `None` if none does.
    pub history_high: Option<usize>,
}

/// The whole plan.
#[derive(Debug, Clone, Serialize)]
pub struct PlanResult {
    /// Paths per grid point (the same paths at every point).
    pub paths: usize,
    /// Master seed.
    pub seed: u64,
    /// One entry per grid point, shortest history first.
    pub grid: Vec<PlanPoint>,
    /// The goal, as text.
    pub target: String,
    /// The answer, or `null` when no grid point meets the goal.
    pub answer: Option<Answer>,
}

/// Runs the plan for `histories` (ascending, each at least `L + 2`, the
/// largest equal to the set-up's history).
pub fn run(
    setup: &Setup,
    portfolio: &PortfolioTruth,
    histories: &[usize],
    goal: Goal,
    threads: usize,
    progress: &(dyn Fn(usize) + Sync),
) -> PlanResult {
    let tallies = tally(setup, portfolio.cost_bps, histories, 0..setup.scenario.paths, threads, progress);
    finish(setup, portfolio, histories, goal, &tallies)
}

/// Paths `paths` of the plan, folded into one tally per history of
/// `histories`, the net-IR rule at one-way cost `cost_bps`.
pub fn tally(
    setup: &Setup,
    cost_bps: f64,
    histories: &[usize],
    paths: Range<usize>,
    threads: usize,
    progress: &(dyn Fn(usize) + Sync),
) -> Vec<StudyTally> {
    let s = &setup.scenario;
    let mut per_point: Vec<StudyTally> = histories.iter().map(|_| StudyTally::new(setup, &[cost_bps])).collect();
    run_in_order(
        threads,
        paths,
        || Worker::new(s),
        |w, p| prefix_outcomes(w, setup, p, histories),
        |outs: Vec<PathOutcome>| per_point.iter_mut().zip(outs).for_each(|(acc, o)| acc.push(setup, &o)),
        progress,
    );
    per_point
}

/// The plan's record from its tallies (one per history of `histories`).
pub fn finish(
    setup: &Setup,
    portfolio: &PortfolioTruth,
    histories: &[usize],
    goal: Goal,
    tallies: &[StudyTally],
) -> PlanResult {
    let s = &setup.scenario;
    let grid: Vec<PlanPoint> = histories
        .iter()
        .zip(tallies)
        .map(|(&history, t)| PlanPoint { history, assets: s.assets, rules: aggregate(setup, portfolio, t).rules })
        .collect();
    let answer = answer(&grid, goal);
    PlanResult { paths: s.paths, seed: s.seed, grid, target: goal.to_string(), answer }
}

/// One path measured once at the longest history, read at every prefix.
fn prefix_outcomes(w: &mut Worker, setup: &Setup, path: u64, histories: &[usize]) -> Vec<PathOutcome> {
    w.simulate_and_measure(setup, path);
    let books = w.book_prefixes(setup, histories);
    let meas = w.measurement();
    histories
        .iter()
        .zip(books)
        .map(|(&t, books)| {
            let (lagged, lagged_se) = meas.lagged.means_and_se_upto(false, t);
            let horizon = meas.horizon.means_upto(t);
            let choices = rules::choose(&lagged, &lagged_se, &horizon);
            PathOutcome { lagged, horizon, rank_lagged: None, choices, books }
        })
        .collect()
}

fn answer(grid: &[PlanPoint], goal: Goal) -> Option<Answer> {
    let first = |shift: f64| {
        grid.iter().find(|p| {
            let (x, se) = goal.metric.of(p.rules.get(goal.rule));
            // `shift` standard errors in the goal's favour (up for >=, down for <=).
            goal.met_by(x + shift * se * if goal.at_least { 1.0 } else { -1.0 })
        })
    };
    let point = first(0.0)?;
    Some(Answer {
        history: point.history,
        assets: point.assets,
        history_low: first(2.0).map_or(point.history, |p| p.history),
        history_high: first(-2.0).map(|p| p.history),
    })
}
