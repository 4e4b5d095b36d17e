//! The work of one study path: a simulated, measured history
//! ([`PathWorker`]), the rules' choices and the linear books.

use super::{PathOutcome, StudyTally};
use crate::measure::rules;
use crate::portfolio::{BookBuilder, BookSums};
use crate::simulate::{PathWorker, Setup, run_in_order};

/// Per-worker buffers of the study.
#[derive(Debug, Clone)]
pub struct Worker {
    path: PathWorker,
    books: BookBuilder,
}

impl Worker {
    /// Buffers for one scenario.
    pub fn new(s: &crate::scenario::Scenario) -> Self {
        Self { path: PathWorker::new(s.horizons, s.rank_ic), books: BookBuilder::default() }
    }

    /// Simulates and measures path `path`: the core of a study path, without
    /// the portfolio layer (`books` is left empty).
    pub fn measure_path(&mut self, setup: &Setup, path: u64) -> PathOutcome {
        self.simulate_and_measure(setup, path);
        let meas = self.path.measurement();
        let (lagged, lagged_se) = meas.lagged.means_and_se(false);
        let horizon = meas.horizon.means();
        let choices = rules::choose(&lagged, &lagged_se, &horizon);
        let rank_lagged = setup.scenario.rank_ic.then(|| meas.rank_lagged.means());
        PathOutcome { lagged, horizon, rank_lagged, choices, books: Vec::new() }
    }

    /// Simulates path `path` of the study's stream and measures its per-date ICs.
    pub fn simulate_and_measure(&mut self, setup: &Setup, path: u64) {
        self.path.simulate_and_measure(setup, setup.scenario.seed, path);
    }

    /// The measurement of the last path.
    pub fn measurement(&self) -> &crate::measure::Measurement {
        self.path.measurement()
    }

    /// The linear books of the last path as if it had ended after each of `ends` dates.
    pub fn book_prefixes(&mut self, setup: &Setup, ends: &[usize]) -> Vec<Vec<BookSums>> {
        self.books.linear_prefixes(self.path.panel(), self.path.products(), setup.scenario.residual_vol, ends)
    }

    /// A whole study path: [`Worker::measure_path`] plus the linear books of
    /// every holding length.
    pub fn run_path(&mut self, setup: &Setup, path: u64) -> PathOutcome {
        let mut out = self.measure_path(setup, path);
        out.books = self.books.build(self.path.panel(), self.path.products(), setup.scenario.residual_vol, None).linear;
        out
    }
}

/// Simulates paths `paths` and folds them, in path order, into a tally;
/// with `costs` (one-way, basis points) each path's linear books of every
/// holding length are built and the net-IR rule followed at each cost.
pub fn simulate_all(
    setup: &Setup,
    costs: Option<&[f64]>,
    paths: std::ops::Range<usize>,
    threads: usize,
    progress: &(dyn Fn(usize) + Sync),
) -> StudyTally {
    let s = &setup.scenario;
    let mut tally = StudyTally::new(setup, costs.unwrap_or_default());
    let books = costs.is_some();
    let path = |w: &mut Worker, p| if books { w.run_path(setup, p) } else { w.measure_path(setup, p) };
    run_in_order(threads, paths, || Worker::new(s), path, |o| tally.push(setup, &o), progress);
    tally
}
