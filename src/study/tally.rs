//! A study's running record: everything its results need, folded path by
//! path into exactly mergeable accumulators ([`crate::tally`]), so memory does
//! not grow with the paths and a study split into shards merges back to the
//! very bytes of one run.

use super::PathOutcome;
use crate::measure::fit::Family;
use crate::rule::{PerRule, Rule};
use crate::simulate::Setup;
use crate::tally::{ExactSums, Histogram};
use serde::{Deserialize, Serialize};

/// One rule's choices: how often each was made and the measured value at it.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct ChoiceTally {
    /// Paths choosing each value (index 0 = 1).
    pub counts: Vec<u64>,
    /// The path's own estimate at its choice, per choice.
    pub measured: Vec<ExactSums>,
}

impl ChoiceTally {
    /// No choices yet among `l`.
    pub fn new(l: usize) -> Self {
        Self { counts: vec![0; l], measured: vec![ExactSums::default(); l] }
    }

    /// One path chose `n` (1-based) and measured `value` there.
    pub fn push(&mut self, n: usize, value: f64) {
        self.counts[n - 1] += 1;
        self.measured[n - 1].push(value);
    }

    /// Adds another part's choices.
    pub fn merge(&mut self, o: &Self) {
        self.counts.iter_mut().zip(&o.counts).for_each(|(a, b)| *a += b);
        self.measured.iter_mut().zip(&o.measured).for_each(|(a, b)| a.merge(b));
    }

    /// Paths counted.
    pub fn paths(&self) -> u64 {
        self.counts.iter().sum()
    }
}

/// A measured curve across paths: exact sums and a histogram per point.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct CurveTally {
    /// Sums per point (index 0 = lag, horizon or holding 1).
    pub sums: Vec<ExactSums>,
    /// Histogram per point, for the quantile bands.
    pub bands: Vec<Histogram>,
}

impl CurveTally {
    /// An empty curve of `l` points.
    pub fn new(l: usize) -> Self {
        Self { sums: vec![ExactSums::default(); l], bands: vec![Histogram::default(); l] }
    }

    /// One path's curve.
    pub fn push(&mut self, curve: impl IntoIterator<Item = f64>) {
        for ((s, b), v) in self.sums.iter_mut().zip(&mut self.bands).zip(curve) {
            s.push(v);
            b.push(v);
        }
    }

    /// Adds another part's curves.
    pub fn merge(&mut self, o: &Self) {
        self.sums.iter_mut().zip(&o.sums).for_each(|(a, b)| a.merge(b));
        self.bands.iter_mut().zip(&o.bands).for_each(|(a, b)| a.merge(b));
    }
}

/// The net-IR rule and its curve at one cost.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct NetTally {
    /// One-way cost, basis points.
    pub cost_bps: f64,
    /// Each path's best holding length by its own net IR.
    pub choice: ChoiceTally,
    /// Each path's net IR per holding length.
    pub curve: CurveTally,
}

/// Everything a study's results need, path by path.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct StudyTally {
    /// Paths folded in.
    pub paths: u64,
    /// Each horizon rule's choices.
    pub rules: PerRule<ChoiceTally>,
    /// Paired differences of relative regret, in [`Rule::HORIZON`] pair order.
    pub pairs: Vec<ExactSums>,
    /// How often the fitted rule chose each family ([`Family::ALL`] order).
    pub families: Vec<u64>,
    /// Mean lagged IC.
    pub lagged: CurveTally,
    /// Mean horizon IC.
    pub horizon: CurveTally,
    /// Mean rank lagged IC (when measured).
    pub rank_lagged: Option<CurveTally>,
    /// The net-IR rule per cost (empty without books).
    pub net: Vec<NetTally>,
}

/// The pairs of horizon rules compared path by path.
pub fn rule_pairs() -> Vec<(Rule, Rule)> {
    let h = Rule::HORIZON;
    (0..h.len()).flat_map(|i| h[i + 1..].iter().map(move |&b| (h[i], b))).collect()
}

impl StudyTally {
    /// An empty record for `setup`'s scenario; `costs_bps` lists the one-way
    /// costs at which the net-IR rule is followed (none without books).
    pub fn new(setup: &Setup, costs_bps: &[f64]) -> Self {
        let s = &setup.scenario;
        let l = s.horizons;
        Self {
            paths: 0,
            rules: PerRule::from_fn(|_| ChoiceTally::new(l)),
            pairs: vec![ExactSums::default(); rule_pairs().len()],
            families: vec![0; Family::ALL.len()],
            lagged: CurveTally::new(l),
            horizon: CurveTally::new(l),
            rank_lagged: s.rank_ic.then(|| CurveTally::new(l)),
            net: costs_bps
                .iter()
                .map(|&cost_bps| NetTally { cost_bps, choice: ChoiceTally::new(l), curve: CurveTally::new(l) })
                .collect(),
        }
    }

    /// Folds in one path's outcome.
    pub fn push(&mut self, setup: &Setup, o: &PathOutcome) {
        self.paths += 1;
        let t = &setup.truth;
        let v_best = t.horizon_ic[t.best_horizon - 1];
        let rel = |r: Rule| (v_best - t.horizon_ic[o.choices.horizon[r] - 1]) / v_best;
        for r in Rule::HORIZON {
            let n = o.choices.horizon[r];
            self.rules[r].push(n, o.horizon[n - 1]);
        }
        for (sums, (a, b)) in self.pairs.iter_mut().zip(rule_pairs()) {
            sums.push(rel(a) - rel(b));
        }
        let family = Family::ALL.iter().position(|&f| f == o.choices.family).expect("a known family");
        self.families[family] += 1;
        self.lagged.push(o.lagged.iter().copied());
        self.horizon.push(o.horizon.iter().copied());
        if let (Some(tally), Some(r)) = (&mut self.rank_lagged, &o.rank_lagged) {
            tally.push(r.iter().copied());
        }
        let ppy = setup.scenario.periods_per_year;
        for net in &mut self.net {
            let c = net.cost_bps * 1e-4;
            let ir: Vec<f64> = o.books.iter().map(|b| b.ir(c, ppy)).collect();
            let n = crate::stats::argmax1(&ir);
            net.choice.push(n, ir[n - 1]);
            net.curve.push(ir);
        }
    }

    /// Whether the tally is whole and shaped for `l` lags and horizons (a
    /// part read from a file may not be): every per-choice and per-point
    /// vector of length `l`, each rule's counts adding up to the paths.
    pub fn fits(&self, l: usize) -> bool {
        let choice = |c: &ChoiceTally| c.counts.len() == l && c.measured.len() == l && c.paths() == self.paths;
        let curve = |c: &CurveTally| c.sums.len() == l && c.bands.len() == l && c.bands.iter().all(Histogram::is_valid);
        Rule::HORIZON.iter().all(|&r| choice(&self.rules[r]))
            && self.pairs.len() == rule_pairs().len()
            && self.families.len() == Family::ALL.len()
            && curve(&self.lagged)
            && curve(&self.horizon)
            && self.rank_lagged.as_ref().is_none_or(curve)
            && self.net.iter().all(|n| choice(&n.choice) && curve(&n.curve))
    }

    /// Adds another part's paths.
    pub fn merge(&mut self, o: &Self) {
        self.paths += o.paths;
        Rule::HORIZON.iter().for_each(|&r| self.rules[r].merge(&o.rules[r]));
        self.pairs.iter_mut().zip(&o.pairs).for_each(|(a, b)| a.merge(b));
        self.families.iter_mut().zip(&o.families).for_each(|(a, b)| *a += b);
        self.lagged.merge(&o.lagged);
        self.horizon.merge(&o.horizon);
        if let (Some(a), Some(b)) = (&mut self.rank_lagged, &o.rank_lagged) {
            a.merge(b);
        }
        self.net.iter_mut().zip(&o.net).for_each(|(a, b)| {
            a.choice.merge(&b.choice);
            a.curve.merge(&b.curve);
        });
    }
}
