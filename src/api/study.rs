//! A study of one scenario: the reference simulation behind the portfolio
//! truth, the study, and what twice the history would buy.

use super::{Error, Files, Progress, Scenario, at_cost, charts, check_costs, finite, stage};
use crate::portfolio::PortfolioTruth;
use crate::report::{self, Summary};
use crate::simulate::Setup;
use crate::study::{self, HorizonStudy, MoreHistory, StudyResult};

/// Most one-way cost levels in one study (each is a row of the cost table
/// and a line on the cost chart).
pub const MAX_COST_LEVELS: usize = 50;

/// How to run a study.
#[derive(Debug, Clone, Default)]
pub struct StudyOptions {
    /// Worker threads (0: every core); results do not depend on it.
    pub threads: usize,
    /// One-way costs in basis points: one level replaces the scenario's cost;
    /// several add a table of the net optimum at each.
    pub cost_bps: Vec<f64>,
    /// Also run the study at twice the history (what more history buys).
    pub more_history: bool,
}

/// A study's every result.
#[derive(Debug, Clone)]
pub struct StudyOutcome {
    /// The validated scenario, its truth and generator.
    pub setup: Setup,
    /// The portfolio truth from the reference simulation.
    pub portfolio: PortfolioTruth,
    /// The study.
    pub result: StudyResult,
    /// The study at twice the history, when asked for and within the limits.
    pub more: Option<MoreHistory>,
}

/// The study of `scenario` (`origin` names it in messages).
///
/// # Errors
/// A cost out of range, or a scenario whose truth cannot be computed.
pub fn study(
    scenario: &Scenario,
    origin: &str,
    o: &StudyOptions,
    progress: &dyn Progress,
) -> Result<StudyOutcome, Error> {
    let (setup, sweep) = prepare(scenario, origin, o)?;
    let threads = super::threads_or_all(o.threads);
    let s = &setup.scenario;
    super::note_long(progress, s.paths + s.portfolio.reference_paths, s, threads);
    let tallies = tallies(&setup, &sweep, o, |n| 0..n, progress);
    Ok(from_tallies(setup, &tallies, threads, progress))
}

/// The scenario at the study's cost, set up, and the levels of its cost
/// sweep (empty unless several costs are given).
pub(super) fn prepare(scenario: &Scenario, origin: &str, o: &StudyOptions) -> Result<(Setup, Vec<f64>), Error> {
    check_costs(&o.cost_bps, MAX_COST_LEVELS, "`run`")?;
    let one = if let [c] = o.cost_bps[..] { Some(c) } else { None };
    let setup = Setup::new(at_cost(scenario, one, origin)?).map_err(|e| Error::Input(format!("{origin}: {e}")))?;
    let sweep = if o.cost_bps.len() > 1 { o.cost_bps.clone() } else { Vec::new() };
    Ok((setup, sweep))
}

/// Paths `block` of the study (and of the study at twice the history when
/// asked), folded into tallies: the main study's, then the longer one's.
pub(super) fn tallies(
    setup: &Setup,
    sweep: &[f64],
    o: &StudyOptions,
    block: impl Fn(usize) -> std::ops::Range<usize>,
    progress: &dyn Progress,
) -> Vec<study::StudyTally> {
    let threads = super::threads_or_all(o.threads);
    let costs = study::study_costs(setup, sweep);
    let paths = block(setup.scenario.paths);
    let mut out =
        vec![stage(progress, "study", paths.len(), |p| study::simulate_all(setup, Some(&costs), paths, threads, p))];
    if let Some(longer) = o.more_history.then(|| study::more_history_setup(setup)).flatten() {
        let paths = block(longer.scenario.paths);
        let cost = [costs[0]];
        out.push(stage(progress, "twice the history", paths.len(), |p| {
            study::simulate_all(&longer, Some(&cost), paths, threads, p)
        }));
    }
    out
}

/// The study's outcome from its tallies (as [`tallies`] lists them).
pub(super) fn from_tallies(
    setup: Setup,
    tallies: &[study::StudyTally],
    threads: usize,
    progress: &dyn Progress,
) -> StudyOutcome {
    let s = &setup.scenario;
    let portfolio =
        stage(progress, "reference", s.portfolio.reference_paths, |p| PortfolioTruth::compute(&setup, threads, p));
    let result = study::finish(&setup, &portfolio, &tallies[0]);
    let more = tallies.get(1).and_then(|t| {
        let longer = study::more_history_setup(&setup)?;
        Some(study::more_history_of(&longer, &portfolio, t))
    });
    StudyOutcome { setup, portfolio, result, more }
}

impl StudyOutcome {
    /// The whole story the reports tell.
    pub fn story(&self) -> report::Study<'_> {
        report::Study { setup: &self.setup, portfolio: &self.portfolio, study: &self.result, more: self.more.as_ref() }
    }

    /// `summary.json`'s content.
    pub fn summary(&self) -> Summary<'_> {
        Summary::new(&self.story())
    }
}

impl super::Outcome for StudyOutcome {
    /// Every output file: `summary.json`, the CSV tables, the charts (when
    /// `draw_charts`) and `report.html` made with `made`.
    ///
    /// # Errors
    /// A result that is not finite, or a chart that cannot be drawn.
    fn files(&self, draw_charts: bool, made: &report::Made) -> Result<Files, Error> {
        let summary = self.summary();
        finite(&summary)?;
        let (setup, result) = (&self.setup, &self.result);
        let horizons = result.horizons();
        let mut files = vec![
            ("summary.json".to_string(), report::summary_json(&summary)),
            ("curves.csv".into(), report::curves_csv(setup, &horizons)),
            ("choices.csv".into(), report::choices_csv(setup, &horizons)),
            ("holding.csv".into(), report::holding_csv(&self.portfolio, result)),
        ];
        if !result.cost_sweep.is_empty() {
            files.push(("cost_sweep.csv".into(), report::cost_sweep_csv(result)));
        }
        let charts = charts(draw_charts, || report::study_charts(setup, &self.portfolio, result))?;
        files.extend(charts.files);
        let page = report::html::study_page(&self.story(), charts.inline);
        files.push(("report.html".into(), report::html::render(&page, made)));
        Ok(files)
    }

    /// The terminal summary.
    fn terminal(&self) -> String {
        report::terminal_summary(&self.story())
    }
}

/// A study of the horizon rules alone: no portfolio layer (no reference
/// simulation, no books), so a fraction of the work.
#[derive(Debug, Clone)]
pub struct HorizonOutcome {
    /// The validated scenario, its truth and generator.
    pub setup: Setup,
    /// The horizon rules' record.
    pub result: HorizonStudy,
}

/// The study of `scenario`'s horizon rules without the portfolio layer (the
/// same histories and choices as [`study()`]'s; `origin` names it in messages).
///
/// # Errors
/// A scenario whose truth cannot be computed.
pub fn study_horizons(
    scenario: &Scenario,
    origin: &str,
    threads: usize,
    progress: &dyn Progress,
) -> Result<HorizonOutcome, Error> {
    let setup = Setup::new(scenario.clone()).map_err(|e| Error::Input(format!("{origin}: {e}")))?;
    let threads = super::threads_or_all(threads);
    let s = &setup.scenario;
    super::note_long(progress, s.paths, s, threads);
    let result = stage(progress, "study", s.paths, |p| study::run_horizons(&setup, threads, p));
    Ok(HorizonOutcome { setup, result })
}

impl super::Outcome for HorizonOutcome {
    /// `horizons.json`, `curves.csv` and `choices.csv` (no charts and no
    /// report: those tell the portfolio's story too).
    fn files(&self, _draw_charts: bool, _made: &report::Made) -> Result<Files, Error> {
        let summary = report::HorizonSummary::new(&self.setup, &self.result);
        finite(&summary)?;
        Ok(vec![
            ("horizons.json".to_string(), report::horizons_json(&summary)),
            ("curves.csv".into(), report::curves_csv(&self.setup, &self.result)),
            ("choices.csv".into(), report::choices_csv(&self.setup, &self.result)),
        ])
    }

    fn terminal(&self) -> String {
        report::horizons_terminal(&self.setup, &self.result)
    }
}
