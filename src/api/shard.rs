//! One run split over machines: a shard simulates one contiguous block of
//! the paths of a run, sweep or plan and writes their tallies as a partial
//! result (`part.json`) — or, for a stress test, one block of every curve's
//! reference histories and their books; [`merge`](super::merge()) adds the parts and writes
//! what the single run would have. Tallies merge exactly
//! ([`crate::tally`]) and each path's stream depends only on the seed and its
//! index, so the merged outputs are the single run's, byte for byte.
//!
//! A shard of a run, sweep or plan runs no reference simulation: the merge
//! runs it once, since the truth it gives does not depend on the paths. A
//! stress test is all reference simulation: its shards split the reference
//! histories, and the merge puts their books end to end in path order and
//! pools them as the single run does.

use super::{Error, Files, Goal, PlanOptions, Progress, Scenario, StressOptions, StudyOptions};
use crate::portfolio::BookSums;
use crate::report;
use crate::scenario::ScenarioRecord;
use crate::scenario::sweep::Point;
use crate::study::StudyTally;
use serde::{Deserialize, Serialize};
use std::ops::Range;

/// The name of a shard's partial result in its output folder.
pub const PART_FILE: &str = "part.json";
/// Version of the partial result's layout.
pub(super) const PART_FORMAT: u32 = 2;
/// Most shards one run splits into.
pub const MAX_SHARDS: usize = 10_000;

/// Shard `index` of `count` (0-based): a contiguous block of each study's paths.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub struct Shard {
    /// Which block, `0 ≤ index < count`.
    pub index: usize,
    /// How many blocks.
    pub count: usize,
}

impl Shard {
    /// Reads `K/N` (0 ≤ K < N ≤ [`MAX_SHARDS`]).
    ///
    /// # Errors
    /// Text that is not two whole numbers `K/N` in range.
    pub fn parse(text: &str) -> Result<Self, String> {
        let bad = || format!("`{text}`: a shard is K/N with 0 ≤ K < N ≤ {MAX_SHARDS}, such as 0/4 (the first of four)");
        let (k, n) = text.trim().split_once('/').ok_or_else(bad)?;
        let (index, count) = (k.trim().parse::<usize>().map_err(|_| bad())?, n.trim().parse().map_err(|_| bad())?);
        if count == 0 || count > MAX_SHARDS || index >= count {
            return Err(bad());
        }
        Ok(Self { index, count })
    }

    /// This shard's block of `paths` paths: `[K·P/N, (K+1)·P/N)`.
    pub fn block(&self, paths: usize) -> Range<usize> {
        let at = |k: usize| (k as u128 * paths as u128 / self.count as u128) as usize;
        at(self.index)..at(self.index + 1)
    }
}

impl std::fmt::Display for Shard {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}/{}", self.index, self.count)
    }
}

/// What a run was asked: everything but the paths, so that a merge rebuilds
/// the very same set-up.
#[derive(Debug, Clone, Serialize, Deserialize)]
#[serde(tag = "command", rename_all = "kebab-case")]
pub enum Job {
    /// `lagfold run` on one scenario.
    Run {
        /// Where the scenario came from (for messages).
        origin: String,
        /// The scenario, every override applied.
        scenario: ScenarioRecord,
        /// `--cost-bps` levels.
        cost_bps: Vec<f64>,
        /// Whether the study at twice the history runs too.
        more_history: bool,
    },
    /// `lagfold run` on a sweep file.
    Sweep {
        /// Where the sweep came from (for messages).
        origin: String,
        /// Each grid point: `(key, value)` per axis and its scenario.
        points: Vec<(Vec<(String, String)>, ScenarioRecord)>,
        /// One `--cost-bps` level, if given.
        cost_bps: Option<f64>,
    },
    /// `lagfold plan`.
    Plan {
        /// Where the scenario came from (for messages).
        origin: String,
        /// The scenario, every override applied.
        scenario: ScenarioRecord,
        /// `--histories`.
        histories: Vec<usize>,
        /// The goal, as text.
        goal: String,
        /// One `--cost-bps` level, if given.
        cost_bps: Option<f64>,
    },
    /// `lagfold stress`.
    Stress {
        /// Where the scenario came from (for messages).
        origin: String,
        /// The scenario, every override applied.
        scenario: ScenarioRecord,
        /// One `--cost-bps` level, if given.
        cost_bps: Option<f64>,
    },
}

impl Job {
    /// The command's name.
    pub fn command(&self) -> &'static str {
        match self {
            Job::Run { .. } => "run",
            Job::Sweep { .. } => "sweep",
            Job::Plan { .. } => "plan",
            Job::Stress { .. } => "stress",
        }
    }
}

/// A shard's partial result.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct Part {
    /// Layout version (this build's `PART_FORMAT`).
    pub format: u32,
    /// The lagfold version that wrote it.
    pub version: String,
    /// Which shard.
    pub shard: Shard,
    /// What was run.
    pub job: Job,
    /// The tallies of its paths (per command: see [`super::merge()`]).
    pub tallies: Vec<StudyTally>,
    /// A stress test's linear books of its block of reference histories,
    /// `[curve][path][holding − 1]` (empty for other commands).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub books: Vec<Vec<Vec<BookSums>>>,
}

impl super::Outcome for Part {
    /// `part.json` alone: a shard writes no report.
    fn files(&self, _draw_charts: bool, _made: &report::Made) -> Result<Files, Error> {
        let json = serde_json::to_vec(self).map_err(Error::failure)?;
        Ok(vec![(PART_FILE.to_string(), json)])
    }

    fn terminal(&self) -> String {
        let done = match self.books.first() {
            Some(b) => format!("{} reference histories of each of {} curves simulated", b.len(), self.books.len()),
            None => format!("{} paths simulated", self.tallies.iter().map(|t| t.paths).sum::<u64>()),
        };
        format!(
            "shard {} of lagfold {}: {done}; merge every shard's folder with `lagfold merge`\n",
            self.shard,
            self.job.command()
        )
    }
}

fn record(s: &Scenario) -> Result<ScenarioRecord, Error> {
    s.record().ok_or_else(|| Error::failure("a scenario with a replaced true curve cannot be split into shards"))
}

fn part(shard: Shard, job: Job, tallies: Vec<StudyTally>) -> Part {
    Part { format: PART_FORMAT, version: env!("CARGO_PKG_VERSION").into(), shard, job, tallies, books: vec![] }
}

/// Shard `shard` of [`study()`](super::study()).
///
/// # Errors
/// As [`study()`](super::study()).
pub fn study_shard(
    scenario: &Scenario,
    origin: &str,
    o: &StudyOptions,
    shard: Shard,
    progress: &dyn Progress,
) -> Result<Part, Error> {
    let (setup, sweep) = super::study::prepare(scenario, origin, o)?;
    let tallies = super::study::tallies(&setup, &sweep, o, |n| shard.block(n), progress);
    let job = Job::Run {
        origin: origin.into(),
        scenario: record(scenario)?,
        cost_bps: o.cost_bps.clone(),
        more_history: o.more_history,
    };
    Ok(part(shard, job, tallies))
}

/// Shard `shard` of [`sweep()`](super::sweep()).
///
/// # Errors
/// As [`sweep()`](super::sweep()).
pub fn sweep_shard(
    points: &[Point],
    origin: &str,
    cost_bps: Option<f64>,
    threads: usize,
    shard: Shard,
    progress: &dyn Progress,
) -> Result<Part, Error> {
    super::check_costs(cost_bps.as_slice(), 1, "a sweep (put a list of cost_bps under [portfolio] to sweep costs)")?;
    let threads = super::threads_or_all(threads);
    let setups =
        points.iter().map(|p| super::sweep::point_setup(p, origin, cost_bps)).collect::<Result<Vec<_>, _>>()?;
    let total = setups.iter().map(|s| shard.block(s.scenario.paths).len()).sum();
    progress.begin("sweep", total);
    let mut done = 0;
    let mut tallies = Vec::with_capacity(points.len());
    for setup in &setups {
        let paths = shard.block(setup.scenario.paths);
        let n = paths.len();
        let costs = [setup.scenario.portfolio.cost_bps];
        let advance = |d| progress.advance(done + d);
        tallies.push(crate::study::simulate_all(setup, Some(&costs), paths, threads, &advance));
        done += n;
    }
    progress.end();
    let points = points.iter().map(|p| Ok((p.at.clone(), record(&p.scenario)?))).collect::<Result<_, Error>>()?;
    Ok(part(shard, Job::Sweep { origin: origin.into(), points, cost_bps }, tallies))
}

/// Shard `shard` of [`plan()`](super::plan()).
///
/// # Errors
/// As [`plan()`](super::plan()).
pub fn plan_shard(
    scenario: &Scenario,
    origin: &str,
    o: &PlanOptions,
    shard: Shard,
    progress: &dyn Progress,
) -> Result<Part, Error> {
    let (setup, histories) = super::plan::prepare(scenario, origin, o)?;
    let threads = super::threads_or_all(o.threads);
    let tallies = super::plan::tallies(&setup, &histories, shard.block(setup.scenario.paths), threads, progress);
    let job = Job::Plan {
        origin: origin.into(),
        scenario: record(scenario)?,
        histories: o.histories.clone(),
        goal: o.goal.to_string(),
        cost_bps: o.cost_bps,
    };
    Ok(part(shard, job, tallies))
}

/// Shard `shard` of [`stress()`](super::stress()): its block of every
/// curve's reference histories.
///
/// # Errors
/// As [`stress()`](super::stress()).
pub fn stress_shard(
    scenario: &Scenario,
    origin: &str,
    o: &StressOptions,
    shard: Shard,
    progress: &dyn Progress,
) -> Result<Part, Error> {
    let (priced, curves) = super::stress::prepare(scenario, origin, o)?;
    let threads = super::threads_or_all(o.threads);
    let block = shard.block(priced.portfolio.reference_paths);
    let books = super::stress::books(&priced, &curves, block, threads, progress);
    let job = Job::Stress { origin: origin.into(), scenario: record(scenario)?, cost_bps: o.cost_bps };
    Ok(Part { books, ..part(shard, job, vec![]) })
}

/// The goal a plan's part records.
pub(super) fn goal_of(text: &str) -> Result<Goal, Error> {
    Goal::parse(text).map_err(|e| Error::Input(format!("a part's plan goal `{text}`: {e}")))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn blocks_cover_every_path_once() {
        for (paths, count) in [(120, 3), (7, 4), (3, 5), (1000, 7)] {
            let mut next = 0;
            for index in 0..count {
                let b = Shard { index, count }.block(paths);
                assert_eq!(b.start, next);
                next = b.end;
            }
            assert_eq!(next, paths);
        }
        assert_eq!(Shard::parse(" 2/3 "), Ok(Shard { index: 2, count: 3 }));
        for bad in ["3/3", "1/0", "a/2", "2", "-1/3", "1/10001"] {
            assert!(Shard::parse(bad).is_err(), "{bad}");
        }
    }
}
