//! Shards' partial results added up into the single run's outputs.

use super::shard::{Job, PART_FORMAT, Part, goal_of};
use super::{
    Error, Files, PlanOptions, PlanOutcome, Progress, StressOptions, StressOutcome, StudyOptions, StudyOutcome,
    SweepOutcome,
};
use crate::portfolio::BookSums;
use crate::portfolio::PortfolioTruth;
use crate::report;
use crate::scenario::sweep::Point;
use crate::scenario::{Scenario, ScenarioRecord};
use crate::study::{self, StudyTally};

/// What a merge gives: the outcome the single run would have given.
#[derive(Debug)]
pub enum Merged {
    /// A study.
    Study(Box<StudyOutcome>),
    /// A sweep.
    Sweep(SweepOutcome),
    /// A plan.
    Plan(Box<PlanOutcome>),
    /// A stress test.
    Stress(Box<StressOutcome>),
}

impl super::Outcome for Merged {
    fn files(&self, draw_charts: bool, made: &report::Made) -> Result<Files, Error> {
        match self {
            Merged::Study(o) => o.files(draw_charts, made),
            Merged::Sweep(o) => o.files(draw_charts, made),
            Merged::Plan(o) => o.files(draw_charts, made),
            Merged::Stress(o) => o.files(draw_charts, made),
        }
    }

    fn terminal(&self) -> String {
        match self {
            Merged::Study(o) => o.terminal(),
            Merged::Sweep(o) => o.terminal(),
            Merged::Plan(o) => o.terminal(),
            Merged::Stress(o) => o.terminal(),
        }
    }
}

/// Reads one part; `name` (its file) is named in errors.
fn read(name: &str, bytes: &[u8]) -> Result<Part, Error> {
    #[derive(serde::Deserialize)]
    struct Head {
        format: Option<u32>,
        version: Option<String>,
    }
    let not_part = |e: &dyn std::fmt::Display| {
        Error::Input(format!("{name}: not a shard's partial result written by `--shard K/N` ({e})"))
    };
    let head: Head = serde_json::from_slice(bytes).map_err(|e| not_part(&e))?;
    let ours = env!("CARGO_PKG_VERSION");
    if head.version.as_deref() != Some(ours) || head.format != Some(PART_FORMAT) {
        return Err(Error::Input(format!(
            "{name}: written by lagfold {} (part format {}), this is lagfold {ours} (format {PART_FORMAT}); run every \
             shard with one version",
            head.version.as_deref().unwrap_or("unknown"),
            head.format.map_or("unknown".into(), |f| f.to_string())
        )));
    }
    serde_json::from_slice(bytes).map_err(|e| not_part(&e))
}

/// A short description of a job, to say how two parts differ.
fn describe(job: &Job) -> String {
    let one = |s: &ScenarioRecord| format!("scenario `{}`, seed {}, {} paths", s.name, s.raw.seed, s.raw.paths);
    match job {
        Job::Run { scenario, .. } | Job::Plan { scenario, .. } | Job::Stress { scenario, .. } => {
            format!("{} of {}", job.command(), one(scenario))
        }
        Job::Sweep { points, .. } => {
            format!("sweep of {} points, {}", points.len(), points.first().map_or(String::new(), |(_, s)| one(s)))
        }
    }
}

/// What the parts hold together: summed tallies, and a stress test's books
/// put end to end in shard order (`[curve][path]`).
type Combined = (Job, Vec<StudyTally>, Vec<Vec<Vec<BookSums>>>);

/// Checks that `parts` (with their file names) are every shard of one run,
/// each once, and adds their tallies.
fn combine(parts: &[(String, Part)]) -> Result<Combined, Error> {
    let (first_name, first) = parts.first().ok_or_else(|| Error::input("merge: no parts given"))?;
    let job_text = |p: &Part| serde_json::to_string(&p.job).unwrap_or_default();
    let first_job = job_text(first);
    let count = first.shard.count;
    let mut seen: Vec<Option<&str>> = vec![None; count];
    for (name, p) in parts {
        if job_text(p) != first_job {
            return Err(Error::Input(format!(
                "{name} is a shard of another run than {first_name}: {} against {} (scenario, seed, paths and \
                 options must all match)",
                describe(&p.job),
                describe(&first.job)
            )));
        }
        if p.shard.count != count {
            return Err(Error::Input(format!(
                "{name} is shard {} but {first_name} is shard {}: every part must come from one split",
                p.shard, first.shard
            )));
        }
        // Shaped as the first part's (and whole), or the finish would index past them.
        let same = p.tallies.len() == first.tallies.len()
            && p.books.len() == first.books.len()
            && p.tallies.iter().zip(&first.tallies).all(|(a, b)| {
                a.net.len() == b.net.len()
                    && a.rank_lagged.is_some() == b.rank_lagged.is_some()
                    && a.fits(b.lagged.sums.len())
            });
        if !same {
            return Err(Error::Input(format!(
                "{name}: its tallies do not fit the run they record (or {first_name}'s); were the files altered?"
            )));
        }
        match seen[p.shard.index] {
            Some(other) => {
                return Err(Error::Input(format!(
                    "shard {} is given twice: {other} and {name}; give each shard once",
                    p.shard
                )));
            }
            None => seen[p.shard.index] = Some(name),
        }
    }
    let missing: Vec<String> =
        seen.iter().enumerate().filter(|(_, s)| s.is_none()).map(|(k, _)| format!("{k}/{count}")).collect();
    if !missing.is_empty() {
        let list = if missing.len() > 8 {
            format!("{} and {} more", missing[..8].join(", "), missing.len() - 8)
        } else {
            missing.join(", ")
        };
        return Err(Error::Input(format!("shards missing: {list}; run them and merge every part")));
    }
    let mut tallies = first.tallies.clone();
    for (_, p) in &parts[1..] {
        tallies.iter_mut().zip(&p.tallies).for_each(|(a, b)| a.merge(b));
    }
    let mut in_order: Vec<&Part> = parts.iter().map(|(_, p)| p).collect();
    in_order.sort_by_key(|p| p.shard.index);
    let books =
        (0..first.books.len()).map(|c| in_order.iter().flat_map(|p| p.books[c].iter().cloned()).collect()).collect();
    Ok((first.job.clone(), tallies, books))
}

/// Checks that every part holds exactly its shard's block of paths: tally
/// `i` of a part counts `block(paths_of(i))` paths, and each of a stress
/// test's curves holds that many histories. The totals alone would let two
/// hand-edited parts trade paths unseen.
fn blocks_fit(parts: &[(String, Part)], paths_of: impl Fn(usize) -> usize) -> Result<(), Error> {
    for (name, p) in parts {
        let want = |i: usize| p.shard.block(paths_of(i)).len();
        let held = p.tallies.iter().enumerate().map(|(i, t)| (i, t.paths as usize));
        let held = held.chain(p.books.iter().enumerate().map(|(i, c)| (i, c.len())));
        if let Some((i, n)) = held.into_iter().find(|&(i, n)| n != want(i)) {
            return Err(Error::Input(format!(
                "{name}: shard {} should hold {} of {} paths, it holds {n}; were the files altered?",
                p.shard,
                want(i),
                paths_of(i)
            )));
        }
    }
    Ok(())
}

fn scenario(r: &ScenarioRecord, origin: &str) -> Result<Scenario, Error> {
    Scenario::from_record(r).map_err(|e| Error::Input(format!("{origin}: {e}")))
}

/// Adds shards' partial results (`(file name, bytes)` each) into the single
/// run's outcome: the run's reference simulation on `threads` threads, then
/// its results from the summed tallies.
///
/// # Errors
/// A file that is not a part; parts of different runs, versions or splits;
/// a shard missing or given twice (each named).
pub fn merge(parts: &[(String, Vec<u8>)], threads: usize, progress: &dyn Progress) -> Result<Merged, Error> {
    let parts = parts.iter().map(|(n, b)| Ok((n.clone(), read(n, b)?))).collect::<Result<Vec<_>, Error>>()?;
    let (job, tallies, books) = combine(&parts)?;
    let threads = super::threads_or_all(threads);
    let command = job.command();
    // A part's tallies must fit the job they claim (lags and count), or the
    // finish would index past them: a damaged or hand-edited file.
    let fit = |l: usize, want: usize| {
        if tallies.len() == want && tallies.iter().all(|t| t.fits(l)) {
            Ok(())
        } else {
            Err(Error::Input(format!(
                "{}: the parts' tallies do not fit the {} they record; were the files altered?",
                parts[0].0, command
            )))
        }
    };
    Ok(match job {
        Job::Run { origin, scenario: r, cost_bps, more_history } => {
            let o = StudyOptions { threads, cost_bps, more_history };
            let (setup, sweep) = super::study::prepare(&scenario(&r, &origin)?, &origin, &o)?;
            let longer = o.more_history && study::more_history_setup(&setup).is_some();
            fit(setup.scenario.horizons, 1 + usize::from(longer))?;
            let longer_paths = study::more_history_setup(&setup).map_or(0, |l| l.scenario.paths);
            blocks_fit(&parts, |i| if i == 0 { setup.scenario.paths } else { longer_paths })?;
            if tallies[0].net.len() != 1 + sweep.len() {
                return Err(Error::Input(format!("{}: the tallies do not hold the run's cost levels", parts[0].0)));
            }
            Merged::Study(Box::new(super::study::from_tallies(setup, &tallies, threads, progress)))
        }
        Job::Sweep { origin, points, cost_bps } => {
            let points = points
                .iter()
                .map(|(at, r)| Ok(Point { at: at.clone(), scenario: scenario(r, &origin)? }))
                .collect::<Result<Vec<_>, Error>>()?;
            if tallies.len() != points.len()
                || points.iter().zip(&tallies).any(|(p, t)| !t.fits(p.scenario.horizons) || t.net.len() != 1)
            {
                return Err(Error::Input(format!("{}: the tallies do not fit the sweep's points", parts[0].0)));
            }
            blocks_fit(&parts, |i| points.get(i).map_or(0, |p| p.scenario.paths))?;
            progress.begin("reference", points.len());
            let mut rows = Vec::with_capacity(points.len());
            for (i, (p, tally)) in points.iter().zip(&tallies).enumerate() {
                let setup = super::sweep::point_setup(p, &origin, cost_bps)?;
                let portfolio = PortfolioTruth::compute(&setup, threads, &|_| {});
                rows.push(report::SweepPoint::new(p, &setup, &portfolio, study::finish(&setup, &portfolio, tally)));
                progress.advance(i + 1);
            }
            progress.end();
            Merged::Sweep(SweepOutcome { points, rows })
        }
        Job::Plan { origin, scenario: r, histories, goal, cost_bps } => {
            let o = PlanOptions { histories, goal: goal_of(&goal)?, cost_bps, threads };
            let (setup, histories) = super::plan::prepare(&scenario(&r, &origin)?, &origin, &o)?;
            fit(setup.scenario.horizons, histories.len())?;
            blocks_fit(&parts, |_| setup.scenario.paths)?;
            Merged::Plan(Box::new(super::plan::from_tallies(setup, &histories, o.goal, &tallies, threads, progress)))
        }
        Job::Stress { origin, scenario: r, cost_bps } => {
            let o = StressOptions { cost_bps, threads };
            let (scenario, curves) = super::stress::prepare(&scenario(&r, &origin)?, &origin, &o)?;
            let (paths, l) = (scenario.portfolio.reference_paths, scenario.horizons);
            let whole = books.len() == curves.len()
                && books
                    .iter()
                    .all(|c| c.len() == paths && c.iter().all(|h| h.len() == l && h.iter().all(|s| s.n > 0)));
            if !whole || !tallies.is_empty() {
                return Err(Error::Input(format!(
                    "{}: the parts' books do not fit the stress test they record; were the files altered?",
                    parts[0].0
                )));
            }
            blocks_fit(&parts, |_| paths)?;
            let result = crate::stress::from_books(&scenario, &curves, &books);
            Merged::Stress(Box::new(StressOutcome { scenario, result }))
        }
    })
}
