//! Judging a rule: hit rates, regret, winner's curse and the distribution of
//! its choices against a target, with Monte Carlo standard errors.

use super::tally::{ChoiceTally, NetTally};
use crate::portfolio::BookSums;
use crate::rule::{PerRule, Rule};
use crate::simulate::Setup;
use crate::stats::{BAND_LEVELS, Moments, Proportion};
use crate::stats::{argmax1, near_set};
use crate::tally::ExactSums;
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

/// Hit rates, regret, winner's curse and the distribution of the choices
/// counted in `tally`, judged against `target`. Everything but the winner's
/// curse is a function of how often each choice was made; the curse of a path
/// is its own estimate at its choice minus the truth there, pooled from the
/// per-choice sums (Chan, Golub and LeVeque, 1979).
pub fn rule_stats(description: &str, target: &Target, tally: &ChoiceTally) -> RuleStats {
    let (best, truth) = (target.best, target.truth);
    let counts = &tally.counts;
    let p = tally.paths();
    let v_best = truth[best - 1];
    let share = |keep: &dyn Fn(usize) -> bool| {
        Proportion::new((1..=counts.len()).filter(|&n| keep(n)).map(|n| counts[n - 1]).sum(), p)
    };
    let h = share(&|n| n == best);
    let nh = share(&|n| n.abs_diff(best) <= 1);
    let nb = share(&|n| target.near.contains(&n));
    let regret: Vec<f64> = truth.iter().map(|&v| v_best - v).collect();
    let rel: Vec<f64> = regret.iter().map(|r| r / v_best).collect();
    let (regret_mean, regret_mean_se) = weighted_mean_se(&regret, counts);
    let (regret_rel_mean, regret_rel_mean_se) = weighted_mean_se(&rel, counts);
    let (winners_curse_mean, winners_curse_mean_se) = curse(tally, truth);
    let chosen: Vec<f64> = (1..=counts.len()).map(|n| n as f64).collect();
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
        regret_mean,
        regret_mean_se,
        regret_rel_mean,
        regret_rel_mean_se,
        regret_rel_quantiles: BAND_LEVELS.iter().map(|&q| weighted_quantile(&rel, counts, q)).collect(),
        winners_curse_mean,
        winners_curse_mean_se,
        choice_counts: counts.clone(),
        choice_quantiles: BAND_LEVELS.iter().map(|&q| weighted_quantile_discrete(&chosen, counts, q)).collect(),
        regret_bps_year_mean: None,
        regret_bps_year_mean_se: None,
        regret_ref_se: None,
        regret_bps_year_ref_se: None,
    }
}

/// Mean and Monte Carlo standard error of a sample holding `counts[i]`
/// copies of `values[i]` (two passes: the mean, then squared deviations).
pub fn weighted_mean_se(values: &[f64], counts: &[u64]) -> (f64, Option<f64>) {
    let n: u64 = counts.iter().sum();
    if n == 0 {
        return (f64::NAN, None);
    }
    let mean = values.iter().zip(counts).map(|(v, &c)| v * c as f64).sum::<f64>() / n as f64;
    let ss: f64 = values.iter().zip(counts).map(|(v, &c)| c as f64 * (v - mean).powi(2)).sum();
    (mean, (n > 1).then(|| (ss / (n - 1) as f64).sqrt() / (n as f64).sqrt()))
}

/// The sample's value of rank `k` (0-based) when it holds `counts[i]` copies
/// of `values[i]`, visited in ascending order of value.
fn weighted_order_statistic(order: &[usize], values: &[f64], counts: &[u64], mut k: u64) -> f64 {
    for &i in order {
        if k < counts[i] {
            return values[i];
        }
        k -= counts[i];
    }
    f64::NAN
}

fn ascending(values: &[f64]) -> Vec<usize> {
    let mut order: Vec<usize> = (0..values.len()).collect();
    order.sort_by(|&a, &b| values[a].total_cmp(&values[b]));
    order
}

/// [`quantile_sorted`](crate::stats::quantile_sorted) of the sample holding
/// `counts[i]` copies of `values[i]`.
pub fn weighted_quantile(values: &[f64], counts: &[u64], q: f64) -> f64 {
    let n: u64 = counts.iter().sum();
    if n == 0 {
        return f64::NAN;
    }
    let order = ascending(values);
    let h = (n - 1) as f64 * q;
    let (lo, frac) = (h.floor() as u64, h - h.floor());
    let a = weighted_order_statistic(&order, values, counts, lo);
    let b = weighted_order_statistic(&order, values, counts, (lo + 1).min(n - 1));
    a + frac * (b - a)
}

/// [`quantile_discrete`](crate::stats::quantile_discrete) of the sample
/// holding `counts[i]` copies of `values[i]`.
pub fn weighted_quantile_discrete(values: &[f64], counts: &[u64], q: f64) -> f64 {
    let n: u64 = counts.iter().sum();
    if n == 0 {
        return f64::NAN;
    }
    let rank = ((q * n as f64).ceil() as u64).clamp(1, n);
    weighted_order_statistic(&ascending(values), values, counts, rank - 1)
}

/// Mean winner's curse and its standard error: the per-choice sums of the
/// path's estimate, less the truth at the choice, pooled.
fn curse(tally: &ChoiceTally, truth: &[f64]) -> (f64, Option<f64>) {
    let n = tally.paths();
    if n == 0 {
        return (f64::NAN, None);
    }
    let mean = tally.measured.iter().zip(truth).map(|(s, t)| s.total() - s.count() as f64 * t).sum::<f64>() / n as f64;
    let within: f64 = tally.measured.iter().filter(|s| s.count() > 0).map(ExactSums::centred_squares).sum();
    let between: f64 = tally
        .measured
        .iter()
        .zip(truth)
        .filter(|(s, _)| s.count() > 0)
        .map(|(s, t)| s.count() as f64 * (s.mean() - t - mean).powi(2))
        .sum();
    (mean, (n > 1).then(|| ((within + between) / (n - 1) as f64).sqrt() / (n as f64).sqrt()))
}

/// The net-IR rule at one-way cost `c`: each path's best holding length by
/// its own measured net IR, judged against the true net IR. The regret in
/// basis points a year is the IR given up times the target annual volatility
/// (`portfolio.target_vol`): the return lost when whichever book is chosen is
/// run at that risk (Grinold and Kahn, 2000: active return = IR × active risk).
///
/// `reference` holds the reference histories' sums, whose spread gives the
/// truth's own error in the regret.
pub fn net_ir_rule(setup: &Setup, truth_ir: &[f64], reference: &[Vec<BookSums>], net: &NetTally) -> RuleStats {
    let (c, ppy) = (net.cost_bps * 1e-4, setup.scenario.periods_per_year);
    let near = near_set(truth_ir, setup.scenario.near_best_tolerance);
    let target = Target { truth: truth_ir, best: argmax1(truth_ir), near: &near };
    let mut stats = rule_stats(Rule::NetIr.describe(), &target, &net.choice);
    let annual_vol_bps = setup.scenario.portfolio.target_vol * 1e4;
    let regret_bps: Vec<f64> = truth_ir.iter().map(|&v| (truth_ir[target.best - 1] - v) * annual_vol_bps).collect();
    let (mean, se) = weighted_mean_se(&regret_bps, &net.choice.counts);
    stats.regret_bps_year_mean = Some(mean);
    stats.regret_bps_year_mean_se = se;
    let paths = net.choice.paths().max(1) as f64;
    let share: Vec<f64> = stats.choice_counts.iter().map(|&k| k as f64 / paths).collect();
    let l = truth_ir.len();
    let mut by_reference = Moments::default();
    for path in reference {
        let best = path[target.best - 1].ir(c, ppy);
        by_reference.push((1..=l).map(|h| share[h - 1] * (best - path[h - 1].ir(c, ppy))).sum());
    }
    stats.regret_ref_se = by_reference.se();
    stats.regret_bps_year_ref_se = by_reference.se().map(|s| s * annual_vol_bps);
    stats
}
