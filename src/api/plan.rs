//! How much history is needed: every rule's record over a grid of history lengths.

use super::{Error, Files, Overrides, Progress, Scenario, at_cost, charts, check_costs, finite, stage};
use crate::plan::{self, Goal, PlanResult};
use crate::portfolio::PortfolioTruth;
use crate::report;
use crate::scenario::{HISTORY_NOTE, MAX_ASSET_DATES, MIN_HISTORY_WORDS, min_history};
use crate::simulate::Setup;
use crate::study::StudyTally;

/// Most history lengths in one plan.
pub const MAX_HISTORIES: usize = 40;

/// How to run a plan.
#[derive(Debug, Clone)]
pub struct PlanOptions {
    /// History lengths to compare (empty: 0.5, 0.75, 1, 1.5, 2 and 3 times
    /// the scenario's history).
    pub histories: Vec<usize>,
    /// What must hold.
    pub goal: Goal,
    /// One-way cost of the net-IR rule (`None`: the scenario's).
    pub cost_bps: Option<f64>,
    /// Worker threads (0: every core).
    pub threads: usize,
}

/// A plan's result with what it was asked.
#[derive(Debug, Clone)]
pub struct PlanOutcome {
    /// The scenario at the longest history of the grid.
    pub scenario: Scenario,
    /// The goal.
    pub goal: Goal,
    /// Every rule's record at every history.
    pub result: PlanResult,
}

/// The grid: given lengths, or multiples of the scenario's history.
fn grid(given: &[usize], history: usize, horizons: usize) -> Result<Vec<usize>, Error> {
    if given.len() > MAX_HISTORIES {
        return Err(Error::Input(format!(
            "option --histories: {} lengths given; at most {MAX_HISTORIES} (each is a study of its own)",
            given.len()
        )));
    }
    let mut g: Vec<usize> = if given.is_empty() {
        [0.5, 0.75, 1.0, 1.5, 2.0, 3.0].iter().map(|m| ((history as f64) * m).round() as usize).collect()
    } else {
        given.to_vec()
    };
    if given.is_empty() {
        g.retain(|&t| t >= min_history(horizons));
    }
    g.sort_unstable();
    g.dedup();
    if let Some(&bad) = g.iter().find(|&&t| t < min_history(horizons)) {
        return Err(Error::Input(format!(
            "`--histories` value {bad} must be at least {MIN_HISTORY_WORDS} = {} ({HISTORY_NOTE})",
            min_history(horizons)
        )));
    }
    Ok(g)
}

/// The plan of `scenario` (`origin` names it in messages).
///
/// # Errors
/// A grid or cost out of range, or a scenario whose truth cannot be computed.
pub fn plan(scenario: &Scenario, origin: &str, o: &PlanOptions, progress: &dyn Progress) -> Result<PlanOutcome, Error> {
    let (setup, histories) = prepare(scenario, origin, o)?;
    let threads = super::threads_or_all(o.threads);
    let s = &setup.scenario;
    super::note_long(progress, s.paths + s.portfolio.reference_paths, s, threads);
    let tallies = tallies(&setup, &histories, 0..s.paths, threads, progress);
    Ok(from_tallies(setup, &histories, o.goal, &tallies, threads, progress))
}

/// The scenario at the plan's cost and longest history, set up, and the
/// grid of histories.
pub(super) fn prepare(scenario: &Scenario, origin: &str, o: &PlanOptions) -> Result<(Setup, Vec<usize>), Error> {
    check_costs(o.cost_bps.as_slice(), 1, "`plan` (one cost for the net-IR rule)")?;
    let scenario = at_cost(scenario, o.cost_bps, origin)?;
    let histories = grid(&o.histories, scenario.history, scenario.horizons)?;
    let longest = *histories.last().ok_or_else(|| Error::input("`--histories` is empty"))?;
    if scenario.assets.saturating_mul(longest) > MAX_ASSET_DATES {
        return Err(Error::Input(format!(
            "`--histories` value {longest} must keep assets × history ≤ {MAX_ASSET_DATES} (assets is {})",
            scenario.assets
        )));
    }
    let longer = scenario
        .revised(&Overrides { history: Some(longest), ..Default::default() })
        .map_err(|e| Error::Input(format!("{origin}: {e}")))?;
    let setup = Setup::new(longer).map_err(|e| Error::Input(format!("{origin}: {e}")))?;
    Ok((setup, histories))
}

/// Paths `paths` of the plan, one tally per history.
pub(super) fn tallies(
    setup: &Setup,
    histories: &[usize],
    paths: std::ops::Range<usize>,
    threads: usize,
    progress: &dyn Progress,
) -> Vec<StudyTally> {
    let cost = setup.scenario.portfolio.cost_bps;
    stage(progress, "plan", paths.len(), |p| plan::tally(setup, cost, histories, paths, threads, p))
}

/// The plan's outcome from its tallies (one per history).
pub(super) fn from_tallies(
    setup: Setup,
    histories: &[usize],
    goal: Goal,
    tallies: &[StudyTally],
    threads: usize,
    progress: &dyn Progress,
) -> PlanOutcome {
    let s = &setup.scenario;
    let portfolio =
        stage(progress, "reference", s.portfolio.reference_paths, |p| PortfolioTruth::compute(&setup, threads, p));
    let result = plan::finish(&setup, &portfolio, histories, goal, tallies);
    PlanOutcome { scenario: setup.scenario, goal, result }
}

impl super::Outcome for PlanOutcome {
    /// `plan.json`, `plan.csv`, the charts (when `draw_charts`) and `report.html`.
    ///
    /// # Errors
    /// A result that is not finite, or a chart that cannot be drawn.
    fn files(&self, draw_charts: bool, made: &report::Made) -> Result<Files, Error> {
        finite(&self.result)?;
        let (s, r) = (&self.scenario, &self.result);
        let mut files =
            vec![("plan.json".to_string(), report::plan_json(s, r)), ("plan.csv".into(), report::plan_csv(r))];
        let charts = charts(draw_charts, || report::plan_charts(s, r, &self.goal))?;
        files.extend(charts.files);
        let page = report::html::plan_page(s, r, &self.goal, charts.inline);
        files.push(("report.html".into(), report::html::render(&page, made)));
        Ok(files)
    }

    /// The terminal summary.
    fn terminal(&self) -> String {
        report::plan_terminal(&self.scenario, &self.result)
    }
}
