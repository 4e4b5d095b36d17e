//! Which horizon rule gives up least: a rule is named best only when a paired
//! difference says so. The rules are judged on the same simulated histories,
//! so their regrets are compared path by path (a paired test), not by the
//! overlap of two separate error bars.

use super::{Outcomes, Target};
use crate::rule::Rule;
use crate::stats::{Moments, Z95};
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

/// Compares the horizon rules on the study's histories.
pub fn rank(target: &Target, outcomes: &Outcomes) -> RuleRanking {
    let v_best = target.truth[target.best - 1];
    let regret = |rule: Rule, p: usize| (v_best - target.truth[outcomes.choices(p).horizon[rule] - 1]) / v_best;
    let diff = |a: Rule, b: Rule| {
        let mut m = Moments::default();
        (0..outcomes.paths()).for_each(|p| m.push(regret(a, p) - regret(b, p)));
        m
    };
    let mut differences = Vec::new();
    for (i, &a) in Rule::HORIZON.iter().enumerate() {
        for &b in &Rule::HORIZON[i + 1..] {
            let m = diff(a, b);
            differences.push(PairedDifference { a: a.name().into(), b: b.name().into(), mean: m.mean(), se: m.se() });
        }
    }
    let beats = |a: Rule, b: Rule| {
        let m = diff(a, b);
        m.se().is_some_and(|se| m.mean() < -Z95 * se)
    };
    let best = Rule::HORIZON
        .iter()
        .find(|&&a| Rule::HORIZON.iter().filter(|&&b| b != a).all(|&b| beats(a, b)))
        .map(|r| r.name().to_string());
    RuleRanking { best, differences }
}
