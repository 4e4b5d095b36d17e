//! The rules that choose a horizon or a holding length, named once for
//! every stage: the measurement applies the horizon rules, the study adds the
//! portfolio's net-IR rule, and every report lists them in this order.

use serde::{Deserialize, Serialize};

/// The rules compared in the study.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Rule {
    /// Peak of the measured horizon-IC curve.
    Peak,
    /// Peak of `Σ_{k≤n} IC_k / sqrt(n)` built from measured lagged ICs.
    Formula,
    /// Optimum implied by a decay curve fitted to measured lagged ICs.
    Fitted,
    /// Holding length with the best measured net information ratio (portfolios).
    NetIr,
}

impl Rule {
    /// The horizon rules (what a measured curve alone chooses), in report order.
    pub const HORIZON: [Rule; 3] = [Rule::Peak, Rule::Formula, Rule::Fitted];

    /// Every rule of the study, the portfolio's net-IR rule last.
    pub const EVERY: [Rule; 4] = [Rule::Peak, Rule::Formula, Rule::Fitted, Rule::NetIr];

    /// The rule's name in outputs.
    pub fn name(self) -> &'static str {
        match self {
            Rule::Peak => "peak",
            Rule::Formula => "formula",
            Rule::Fitted => "fitted",
            Rule::NetIr => "net_ir",
        }
    }

    /// One line saying what the rule does.
    pub fn describe(self) -> &'static str {
        match self {
            Rule::Peak => "peak of the measured horizon IC",
            Rule::Formula => "peak of sum of measured lagged ICs / sqrt(n)",
            Rule::Fitted => "optimum of a decay curve fitted to measured lagged ICs (family by AIC)",
            Rule::NetIr => "holding length with the best measured net information ratio of the tranche book",
        }
    }
}

/// One value per horizon rule, keyed by [`Rule`]; written as
/// `{"peak": …, "formula": …, "fitted": …}`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
pub struct PerRule<T> {
    /// The peak rule's value.
    pub peak: T,
    /// The formula rule's value.
    pub formula: T,
    /// The fitted rule's value.
    pub fitted: T,
}

impl<T> PerRule<T> {
    /// Builds each rule's value from the rule.
    pub fn from_fn(mut f: impl FnMut(Rule) -> T) -> Self {
        Self { peak: f(Rule::Peak), formula: f(Rule::Formula), fitted: f(Rule::Fitted) }
    }

    /// Applies `f` to each value.
    pub fn map<U>(&self, mut f: impl FnMut(&T) -> U) -> PerRule<U> {
        PerRule { peak: f(&self.peak), formula: f(&self.formula), fitted: f(&self.fitted) }
    }

    /// `(rule, value)` in [`Rule::HORIZON`] order.
    pub fn iter(&self) -> impl Iterator<Item = (Rule, &T)> {
        Rule::HORIZON.into_iter().map(move |r| (r, &self[r]))
    }
}

impl<T> std::ops::Index<Rule> for PerRule<T> {
    type Output = T;

    /// The rule's value.
    ///
    /// # Panics
    /// For [`Rule::NetIr`], which is no horizon rule.
    fn index(&self, r: Rule) -> &T {
        match r {
            Rule::Peak => &self.peak,
            Rule::Formula => &self.formula,
            Rule::Fitted => &self.fitted,
            Rule::NetIr => panic!("the net-IR rule has no horizon-rule value"),
        }
    }
}

impl<T> std::ops::IndexMut<Rule> for PerRule<T> {
    /// The rule's value.
    ///
    /// # Panics
    /// For [`Rule::NetIr`], which is no horizon rule.
    fn index_mut(&mut self, r: Rule) -> &mut T {
        match r {
            Rule::Peak => &mut self.peak,
            Rule::Formula => &mut self.formula,
            Rule::Fitted => &mut self.fitted,
            Rule::NetIr => panic!("the net-IR rule has no horizon-rule value"),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn per_rule_is_keyed_by_the_rule_and_written_by_name() {
        let v = PerRule::from_fn(|r| r.name().len());
        assert_eq!((v[Rule::Peak], v[Rule::Formula], v[Rule::Fitted]), (4, 7, 6));
        assert_eq!(v.iter().map(|(r, _)| r).collect::<Vec<_>>(), Rule::HORIZON);
        assert_eq!(serde_json::to_string(&v.map(|x| x * 2)).unwrap(), r#"{"peak":8,"formula":14,"fitted":12}"#);
    }
}
