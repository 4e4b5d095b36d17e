//! Rules that pick the estimated optimal horizon `n̂` from one measurement.

use super::fit::{self, Family};
use crate::rule::PerRule;
use crate::stats::argmax1;

/// `Σ_{k≤n} x_k / sqrt(n)` for `n = 1..=len` (Qian, Hua and Sorensen, 2007).
pub fn formula_curve(lagged: &[f64]) -> Vec<f64> {
    let mut s = 0.0;
    lagged
        .iter()
        .enumerate()
        .map(|(i, x)| {
            s += x;
            s / ((i + 1) as f64).sqrt()
        })
        .collect()
}

/// The choices of every rule (1-based horizons) and the fitted family.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Choices {
    /// `n̂` per rule.
    pub horizon: PerRule<usize>,
    /// The family the fitted rule chose.
    pub family: Family,
}

/// Applies all three rules to mean lagged ICs (with standard errors) and mean horizon ICs.
pub fn choose(lagged: &[f64], lagged_se: &[Option<f64>], horizon: &[f64]) -> Choices {
    let f = fit::best_fit(lagged, lagged_se);
    Choices {
        horizon: PerRule {
            peak: argmax1(horizon),
            formula: argmax1(&formula_curve(lagged)),
            fitted: argmax1(&formula_curve(&f.curve)),
        },
        family: f.family,
    }
}

/// The rules' choices on a measured panel, each `None` when its curve is not
/// measurable: the peak rule needs every mean horizon IC, the formula rule
/// every mean lagged IC, the fitted rule those and their standard errors (the
/// fit's weights), and a finite fit.
pub fn choose_measured(lagged: &[f64], lagged_se: &[Option<f64>], horizon: &[f64]) -> PerRule<Option<usize>> {
    let all_finite = |x: &[f64]| !x.is_empty() && x.iter().all(|v| v.is_finite());
    let peak = all_finite(horizon).then(|| argmax1(horizon));
    if !all_finite(lagged) {
        return PerRule { peak, formula: None, fitted: None };
    }
    let formula = Some(argmax1(&formula_curve(lagged)));
    let weighted = lagged_se.iter().all(|s| s.is_some_and(|s| s.is_finite() && s > 0.0));
    let fitted = weighted
        .then(|| fit::best_fit(lagged, lagged_se))
        .filter(|f| all_finite(&f.curve))
        .map(|f| argmax1(&formula_curve(&f.curve)));
    PerRule { peak, formula, fitted }
}
