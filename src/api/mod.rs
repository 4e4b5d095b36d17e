//! The facade: every operation a caller needs, each taking validated inputs
//! and returning one result that every exporter (JSON, CSV, terminal,
//! charts, HTML) reads. The command line and the Python module call these
//! and nothing below them.
//!
//! | operation | input | result |
//! |---|---|---|
//! | [`load_scenario`], [`scenario_from_toml`], [`scenario_from_json`] | a file, preset name, TOML text or JSON table | [`Scenario`] |
//! | [`study()`] | a scenario | [`StudyOutcome`] |
//! | [`study_horizons`] | a scenario (no portfolio layer) | [`HorizonOutcome`] |
//! | [`plan()`] | a scenario and a grid of histories | [`PlanOutcome`] |
//! | [`stress()`] | a scenario and its alternative curves | [`StressOutcome`] |
//! | [`sweep()`] | the grid points of a sweep file | [`SweepOutcome`] |
//! | [`simulate_panel`] | a scenario and a path index | [`SimulatedPanel`] |
//! | [`measure()`] | a panel (file or columns in memory) | [`MeasureOutcome`] |
//! | [`study_shard`], [`sweep_shard`], [`plan_shard`], [`stress_shard`] | as above, and one [`Shard`] of the paths | [`Part`] |
//! | [`merge()`] | every shard's [`Part`] | [`Merged`]: the single run's outcome |

mod measure;
mod merge;
mod panel;
mod plan;
mod scenario;
mod shard;
mod stress;
mod study;
mod sweep;

pub use crate::own_data::{BlendWeight, parse_blend};
pub use crate::plan::Goal;
pub use crate::reader::{Column, DEFAULT_NA, ReadOptions, default_max_bytes};
pub use crate::scenario::{Overrides, Scenario};
pub use measure::{MeasureOptions, MeasureOutcome, PanelSource, measure};
pub use merge::{Merged, merge};
pub use panel::{SimulatedPanel, simulate_panel};
pub use plan::{PlanOptions, PlanOutcome, plan};
pub use scenario::{load_scenario, scenario_from_json, scenario_from_toml, scenario_text};
pub use shard::{Job, MAX_SHARDS, PART_FILE, Part, Shard, plan_shard, stress_shard, study_shard, sweep_shard};
pub use stress::{StressOptions, StressOutcome, stress};
pub use study::{HorizonOutcome, MAX_COST_LEVELS, StudyOptions, StudyOutcome, study, study_horizons};
pub use sweep::{SweepOutcome, sweep};

/// Why an operation gave no result.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum Error {
    /// Bad input: a file, field or option outside what is allowed (the
    /// command line exits with code 2).
    #[error("{0}")]
    Input(String),
    /// Anything else: a result that is not finite, a chart that cannot be
    /// drawn (exit code 1).
    #[error("{0}")]
    Failure(String),
}

impl Error {
    pub(crate) fn input(e: impl std::fmt::Display) -> Self {
        Self::Input(e.to_string())
    }

    pub(crate) fn failure(e: impl std::fmt::Display) -> Self {
        Self::Failure(e.to_string())
    }
}

/// Output files: `(name, bytes)`, in the order they are listed.
pub type Files = Vec<(String, Vec<u8>)>;

/// What every operation's result gives: the files the command line writes
/// (and the Python module returns) and the terminal summary.
pub trait Outcome {
    /// Every output file, the charts drawn when `draw_charts`, the report
    /// made with `made`.
    ///
    /// # Errors
    /// A result that is not finite, or a chart that cannot be drawn.
    fn files(&self, draw_charts: bool, made: &crate::report::Made) -> Result<Files, Error>;

    /// The terminal summary.
    fn terminal(&self) -> String;
}

/// Reports on long work: a stage of `total` paths begins, paths are done,
/// the stage ends. Called from the calling thread only.
pub trait Progress: Sync {
    /// A stage (`"reference"`, `"study"`, …) of `total` steps begins.
    fn begin(&self, _stage: &str, _total: usize) {}
    /// `done` steps of the current stage are finished.
    fn advance(&self, _done: usize) {}
    /// The current stage is over.
    fn end(&self) {}
    /// A note for the user before long work (see [`long_work`]).
    fn note(&self, _text: &str) {}
}

/// No progress reports.
#[derive(Debug, Clone, Copy, Default)]
pub struct Silent;

impl Progress for Silent {}

/// Runs `work` as a stage of `total` steps of `progress`.
fn stage<T>(progress: &dyn Progress, name: &str, total: usize, work: impl FnOnce(&(dyn Fn(usize) + Sync)) -> T) -> T {
    progress.begin(name, total);
    let out = work(&|done| progress.advance(done));
    progress.end();
    out
}

/// Nanoseconds per simulated asset-date on one core, all stages (generate,
/// measure, the three rules, the books): `cargo bench --bench path` measures
/// 1.75–1.93 ms for the core path and 0.38 ms for the books of one history of
/// 1,000 assets × 120 dates on the development machine, about 19 ns each.
pub const NS_PER_ASSET_DATE: f64 = 19.0;

/// The expected wall time of simulating `asset_dates` asset-dates (`what`
/// says of what) on `threads` threads, in words, when it is over a minute.
pub fn long_work(asset_dates: f64, what: &str, threads: usize) -> Option<String> {
    let secs = asset_dates * NS_PER_ASSET_DATE * 1e-9 / threads.max(1) as f64;
    if secs < 60.0 {
        return None;
    }
    let time =
        if secs < 5400.0 { format!("{:.0} minutes", secs / 60.0) } else { format!("{:.1} hours", secs / 3600.0) };
    Some(format!(
        "note: this simulates {what}: about {time} on {threads} thread{} (a rough guide from the benches); \
         fewer paths or reference_paths make it shorter",
        if threads == 1 { "" } else { "s" }
    ))
}

/// Passes [`long_work`]'s note for `histories` histories of `s` to `progress`.
fn note_long(progress: &dyn Progress, histories: usize, s: &Scenario, threads: usize) {
    let asset_dates = histories as f64 * s.assets as f64 * s.history as f64;
    let what = format!("{histories} histories of {} assets × {} dates", s.assets, s.history);
    if let Some(n) = long_work(asset_dates, &what, threads) {
        progress.note(&n);
    }
}

/// Worker threads: `threads`, or every core when 0.
pub fn threads_or_all(threads: usize) -> usize {
    if threads > 0 { threads } else { std::thread::available_parallelism().map_or(1, |n| n.get()) }
}

/// Refuses a result holding a number that is not finite (JSON would show it
/// as `null`, a table as `NaN`).
fn finite<T: serde::Serialize + ?Sized>(result: &T) -> Result<(), Error> {
    match crate::report::first_non_finite(result) {
        None => Ok(()),
        Some((path, v)) => Err(Error::Failure(format!(
            "a result is not finite ({path} = {v}), so nothing was written; this is a bug or an input at the \
             edge of the model: please report it with the scenario or panel"
        ))),
    }
}

/// The charts drawn, or none when `draw` is false.
fn charts(draw: bool, build: impl FnOnce() -> Vec<crate::chart::Chart>) -> Result<crate::report::ChartSet, Error> {
    if draw { crate::report::ChartSet::render(&build()).map_err(Error::failure) } else { Ok(Default::default()) }
}

/// Checks the one-way costs of a run: each in [0, 10000) basis points
/// (`--cost-bps` in messages), at most `most` of them (`what` says why).
///
/// # Errors
/// A level outside the range, or too many.
pub fn check_costs(costs: &[f64], most: usize, what: &str) -> Result<(), Error> {
    if costs.len() > most {
        return Err(Error::Input(format!(
            "option --cost-bps: {} levels given; {what} takes at most {most}",
            costs.len()
        )));
    }
    for (i, &c) in costs.iter().enumerate() {
        let key = if costs.len() > 1 { format!("--cost-bps value {}", i + 1) } else { "--cost-bps".into() };
        crate::scenario::check_cost_bps(&key, c).map_err(|e| Error::Input(format!("option {e}")))?;
    }
    Ok(())
}

/// The scenario at one cost (`cost_bps` of one level replaces its own), validated again.
fn at_cost(scenario: &Scenario, cost_bps: Option<f64>, origin: &str) -> Result<Scenario, Error> {
    match cost_bps {
        None => Ok(scenario.clone()),
        Some(c) => scenario
            .revised(&Overrides { cost_bps: Some(c), ..Default::default() })
            .map_err(|e| Error::Input(format!("{origin}: {e}"))),
    }
}

#[cfg(test)]
mod tests {
    use super::long_work;

    #[test]
    fn long_work_is_announced_with_its_size() {
        // The demo: 3,000 histories of 1,000 × 120 on two threads, about 3.4 s.
        assert_eq!(long_work(3000.0 * 1000.0 * 120.0, "demo", 2), None);
        // 10^5 reference histories of the demo: 1.2e10 asset-dates × 19 ns / 2 ≈ 2 minutes.
        let note = long_work(1e5 * 1000.0 * 120.0, "x", 2).unwrap();
        assert!(note.contains("this simulates x: about 2 minutes on 2 threads"), "{note}");
        assert!(long_work(1e6 * 5000.0 * 1000.0, "x", 1).unwrap().contains("hours"));
    }
}
