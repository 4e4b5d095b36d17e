//! Per-worker buffers and the work of one path; the parallel runner that keeps
//! results in path order whatever the thread count.

use super::{Outcomes, PathOutcome, Setup};
use crate::generate::Workspace;
use crate::measure::Measurement;
use crate::measure::rules;
use crate::portfolio::{BookBuilder, BookSums};
use crate::rng::path_rng;
use crate::scenario::Scenario;
use rayon::prelude::*;

/// Paths simulated between two progress reports.
const CHUNK: usize = 128;

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
