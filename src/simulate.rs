//! Simulated histories, measured: a validated scenario with everything
//! derived from it ([`Setup`]), the buffers of one worker ([`PathWorker`]),
//! and the parallel runner that keeps results in path order whatever the
//! thread count ([`run_in_order`]). The study and the portfolio's reference
//! simulation both build on it; it knows neither.

use crate::error::ScenarioError;
use crate::generate::{Generator, Workspace};
use crate::measure::Measurement;
use crate::model::Model;
use crate::rng::path_rng;
use crate::scenario::Scenario;
use crate::truth::Truth;
use rayon::prelude::*;

/// A validated scenario with everything derived from it.
#[derive(Debug, Clone)]
pub struct Setup {
    /// The scenario.
    pub scenario: Scenario,
    /// Calibrated model.
    pub model: Model,
    /// The truth.
    pub truth: Truth,
    /// The path generator.
    pub generator: Generator,
}

impl Setup {
    /// Calibrates the model, computes the truth and builds the generator.
    ///
    /// # Errors
    /// Infeasible variance or no positive horizon IC.
    pub fn new(scenario: Scenario) -> Result<Self, ScenarioError> {
        let model = Model::new(&scenario)?;
        let mut truth = Truth::new(&model, scenario.horizons, scenario.near_best_tolerance)?;
        let approx = crate::exp_sum::fit(&model, scenario.horizons);
        if let Some(a) = &approx {
            truth.generator = a.note();
            truth.generator_ic_error = Some(a.ic_error);
        }
        let generator = Generator::new(&model, approx.as_ref(), scenario.assets, scenario.history, scenario.tails);
        Ok(Self { scenario, model, truth, generator })
    }
}

/// One worker's buffers: a simulated panel and its per-date ICs.
#[derive(Debug, Clone)]
pub struct PathWorker {
    ws: Workspace,
    meas: Measurement,
}

impl PathWorker {
    /// Buffers measuring horizons `1..=horizons` (and rank ICs when `rank_ic`).
    pub fn new(horizons: usize, rank_ic: bool) -> Self {
        Self { ws: Workspace::default(), meas: Measurement::new(horizons, rank_ic) }
    }

    /// Simulates path `path` of the stream `seed` and measures its per-date ICs.
    pub fn simulate_and_measure(&mut self, setup: &Setup, seed: u64, path: u64) {
        self.simulate(setup, seed, path);
        self.meas.update(&self.ws.panel);
    }

    /// Simulates path `path` of the stream `seed` (not measured).
    pub fn simulate(&mut self, setup: &Setup, seed: u64, path: u64) {
        setup.generator.simulate(&mut path_rng(seed, path), &mut self.ws);
    }

    /// The last path's panel.
    pub fn panel(&self) -> &crate::measure::Panel {
        &self.ws.panel
    }

    /// The last path's measurement.
    pub fn measurement(&self) -> &Measurement {
        &self.meas
    }

    /// The last path's forecast-by-return products, for the books.
    ///
    /// # Panics
    /// Never for a simulated panel: it is complete and has at least 10 assets
    /// (the scenario's minimum), so its measurement always has them.
    pub fn products(&self) -> crate::measure::Products<'_> {
        self.meas.products().expect("a simulated panel is complete")
    }
}

/// Paths simulated between two progress reports.
const CHUNK: usize = 128;

/// Runs `run(worker, p)` for every path `p` of `paths` on `threads` threads
/// and hands the results to `sink` in path order; `progress` hears how many
/// are done. Paths go in chunks of `CHUNK`, each
/// cut into `2 × threads` contiguous runs, one per long-lived worker, so the
/// order of results never depends on scheduling.
pub fn run_in_order<W: Send, T: Send>(
    threads: usize,
    paths: std::ops::Range<usize>,
    make_worker: impl Fn() -> W,
    run: impl Fn(&mut W, u64) -> T + Sync,
    mut sink: impl FnMut(T),
    progress: &(dyn Fn(usize) + Sync),
) {
    let pool = rayon::ThreadPoolBuilder::new().num_threads(threads.max(1)).build().expect("thread pool");
    let parts = 2 * threads.max(1);
    let mut workers: Vec<W> = (0..parts).map(|_| make_worker()).collect();
    let mut start = paths.start;
    while start < paths.end {
        let end = (start + CHUNK).min(paths.end);
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
        progress(start - paths.start);
    }
}
