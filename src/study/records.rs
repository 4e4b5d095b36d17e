//! Judging a rule: hit rates, regret, winner's curse and the distribution of
//! its choices against a target, with Monte Carlo standard errors.

use super::Outcomes;
use crate::portfolio::BookSums;
use crate::rule::{PerRule, Rule};
use crate::simulate::Setup;
use crate::stats::{BAND_LEVELS, Moments, Proportion, quantile_discrete, quantile_sorted};
use crate::stats::{argmax1, near_set};
use serde::Serialize;

/// Study results for one rule.
#[derive(Debug, Clone, Serialize)]
pub struct RuleStats {
    /// What the rule does.
    pub description: String,
    /// `P(n̂ = n*)`.
    pub hit_rate: f64,
    /// Its Monte Carlo standard error.
    pub hit_rate_se: f64,
    /// Its 95 % Wilson interval.
    pub hit_rate_ci: [f64; 2],
    /// `P(|n̂ − n*| ≤ 1)`.
    pub near_hit_rate: f64,
    /// Its Monte Carlo standard error.
    pub near_hit_rate_se: f64,
    /// Its 95 % Wilson interval.
    pub near_hit_rate_ci: [f64; 2],
    /// `P(n̂ in the near-best set)`.
    pub near_best_rate: f64,
    /// Its Monte Carlo standard error.
    pub near_best_rate_se: f64,
    /// Its 95 % Wilson interval.
    pub near_best_rate_ci: [f64; 2],
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
    /// the target annual volatility, `portfolio.target_vol`).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub regret_bps_year_mean: Option<f64>,
    /// Its Monte Carlo standard error over the study's histories.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub regret_bps_year_mean_se: Option<f64>,
    /// Net-IR rule only: the standard error the reference simulation's truth
    /// adds to `regret_mean` (IR units), paired over the reference histories
    /// with the study's choice frequencies held fixed; independent of
    /// `regret_mean_se`, so the two combine as `sqrt(a² + b²)`.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub regret_ref_se: Option<f64>,
    /// The same in basis points a year.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub regret_bps_year_ref_se: Option<f64>,
}

impl RuleStats {
    /// The whole standard error of the mean regret in bps a year: study and
    /// reference errors combined (net-IR rule only).
    pub fn regret_bps_year_total_se(&self) -> Option<f64> {
        let study = self.regret_bps_year_mean_se?;
        Some(study.hypot(self.regret_bps_year_ref_se.unwrap_or(0.0)))
    }
}

/// Every rule's results, written `{"peak": …, "formula": …, "fitted": …, "net_ir": …}`.
#[derive(Debug, Clone, Serialize)]
pub struct RulesOut {
    /// The horizon rules.
    #[serde(flatten)]
    pub horizon: PerRule<RuleStats>,
    /// Holding length with the best measured net IR of the linear book.
    pub net_ir: RuleStats,
}

impl RulesOut {
    /// One rule's record.
    pub fn get(&self, rule: Rule) -> &RuleStats {
        match rule {
            Rule::NetIr => &self.net_ir,
            horizon => &self.horizon[horizon],
        }
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
        hit_rate_ci: h.ci,
        near_hit_rate: nh.rate,
        near_hit_rate_se: nh.se,
        near_hit_rate_ci: nh.ci,
        near_best_rate: nb.rate,
        near_best_rate_se: nb.se,
        near_best_rate_ci: nb.ci,
        regret_mean: regret.mean(),
        regret_mean_se: regret.se(),
        regret_rel_mean: rel.mean(),
        regret_rel_mean_se: rel.se(),
        regret_rel_quantiles: BAND_LEVELS.iter().map(|&q| quantile_sorted(&rels, q)).collect(),
        winners_curse_mean: curse.mean(),
        winners_curse_mean_se: curse.se(),
        choice_counts: counts,
        choice_quantiles: BAND_LEVELS.iter().map(|&q| quantile_discrete(&chosen, q)).collect(),
        regret_bps_year_mean: None,
        regret_bps_year_mean_se: None,
        regret_ref_se: None,
        regret_bps_year_ref_se: None,
    }
}

/// The net-IR rule at one-way cost `c`: each path's best holding length by
/// its own measured net IR, judged against the true net IR. The regret in
/// basis points a year is the IR given up times the target annual volatility
/// (`portfolio.target_vol`): the return lost when whichever book is chosen is
/// run at that risk (Grinold and Kahn, 2000: active return = IR × active risk).
///
/// `reference` holds the reference histories' sums, whose spread gives the
/// truth's own error in the regret.
pub fn net_ir_rule(
    setup: &Setup,
    truth_ir: &[f64],
    reference: &[Vec<BookSums>],
    c: f64,
    outcomes: &Outcomes,
) -> RuleStats {
    let ppy = setup.scenario.periods_per_year;
    let near = near_set(truth_ir, setup.scenario.near_best_tolerance);
    let target = Target { truth: truth_ir, best: argmax1(truth_ir), near: &near };
    let ir = |p: usize, n: usize| outcomes.books(p)[n - 1].ir(c, ppy);
    let l = truth_ir.len();
    let chosen: Vec<usize> =
        (0..outcomes.paths()).map(|p| argmax1(&(1..=l).map(|n| ir(p, n)).collect::<Vec<_>>())).collect();
    let mut stats = rule_stats(Rule::NetIr.describe(), &target, outcomes.paths(), |p| chosen[p], ir);
    let annual_vol_bps = setup.scenario.portfolio.target_vol * 1e4;
    let mut bps = Moments::default();
    for &n in &chosen {
        bps.push((truth_ir[target.best - 1] - truth_ir[n - 1]) * annual_vol_bps);
    }
    stats.regret_bps_year_mean = Some(bps.mean());
    stats.regret_bps_year_mean_se = bps.se();
    let share: Vec<f64> = stats.choice_counts.iter().map(|&k| k as f64 / chosen.len().max(1) as f64).collect();
    let mut by_reference = Moments::default();
    for path in reference {
        let best = path[target.best - 1].ir(c, ppy);
        by_reference.push((1..=l).map(|h| share[h - 1] * (best - path[h - 1].ir(c, ppy))).sum());
    }
    stats.regret_ref_se = by_reference.se();
    stats.regret_bps_year_ref_se = by_reference.se().map(|s| s * annual_vol_bps);
    stats
}
