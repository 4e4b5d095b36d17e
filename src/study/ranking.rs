//! Which horizon rule gives up least: a rule is named best only when a paired
//! difference says so. The rules are judged on the same simulated histories,
//! so their regrets are compared path by path (a paired test), not by the
//! overlap of two separate error bars.

use super::tally::rule_pairs;
use crate::rule::Rule;
use crate::stats::Z95;
use crate::tally::ExactSums;
use serde::Serialize;

/// The paired difference of two rules' relative regret, `a − b`, over the same histories.
#[derive(Debug, Clone, Serialize)]
pub struct PairedDifference {
    /// First rule.
    pub a: String,
    /// Second rule.
    pub b: String,
    /// Mean of `regret_rel(a) − regret_rel(b)` over histories.
    pub mean: f64,
    /// Its Monte Carlo standard error (sd of the path differences / sqrt(paths)).
    pub se: Option<f64>,
}

/// Every pair's difference and the best rule, if one stands out.
#[derive(Debug, Clone, Serialize)]
pub struct RuleRanking {
    /// The rule whose mean relative regret is below every other's by more
    /// than 1.96 paired standard errors; `None` when no rule stands out.
    pub best: Option<String>,
    /// Each pair (peak–formula, peak–fitted, formula–fitted).
    pub differences: Vec<PairedDifference>,
}

/// Compares the horizon rules on the study's histories, from the paired
/// differences the tally holds (in [`rule_pairs`] order).
pub fn rank(pairs: &[ExactSums]) -> RuleRanking {
    let all = rule_pairs();
    let diff = |a: Rule, b: Rule| {
        let i = all.iter().position(|&p| p == (a, b) || p == (b, a)).expect("a pair of horizon rules");
        let sign = if all[i] == (a, b) { 1.0 } else { -1.0 };
        (sign * pairs[i].mean(), pairs[i].se())
    };
    let differences = all
        .iter()
        .map(|&(a, b)| {
            let (mean, se) = diff(a, b);
            PairedDifference { a: a.name().into(), b: b.name().into(), mean, se }
        })
        .collect();
    let beats = |a: Rule, b: Rule| {
        let (mean, se) = diff(a, b);
        se.is_some_and(|se| mean < -Z95 * se)
    };
    let best = Rule::HORIZON
        .iter()
        .find(|&&a| Rule::HORIZON.iter().filter(|&&b| b != a).all(|&b| beats(a, b)))
        .map(|r| r.name().to_string());
    RuleRanking { best, differences }
}
