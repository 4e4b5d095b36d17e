//! What a choice made under the assumed decay curve gives up when another
//! curve is true.

use super::{Error, Files, Progress, Scenario, at_cost, charts, check_costs, finite, stage};
use crate::portfolio::BookSums;
use crate::report;
use crate::simulate::Setup;
use crate::stress::{self, StressResult};
use std::ops::Range;

/// How to run a stress test.
#[derive(Debug, Clone, Default)]
pub struct StressOptions {
    /// One-way cost of every curve's net IR (`None`: the scenario's).
    pub cost_bps: Option<f64>,
    /// Worker threads (0: every core).
    pub threads: usize,
}

/// A stress test's result with its scenario.
#[derive(Debug, Clone)]
pub struct StressOutcome {
    /// The scenario (at the cost used).
    pub scenario: Scenario,
    /// Every curve's truth and what each choice gives up under it.
    pub result: StressResult,
}

/// The scenario at the cost used and its curves' set-ups (the assumed one
/// first), checked.
///
/// # Errors
/// As [`stress()`].
pub(super) fn prepare(
    scenario: &Scenario,
    origin: &str,
    o: &StressOptions,
) -> Result<(Scenario, Vec<(String, Setup)>), Error> {
    check_costs(o.cost_bps.as_slice(), 1, "`stress` (one cost for every curve)")?;
    let scenario = at_cost(scenario, o.cost_bps, origin)?;
    if scenario.replace_default_alternatives && scenario.alternatives.is_empty() {
        return Err(Error::Input(format!(
            "{origin}: `stress.replace_defaults = true` with no `[[stress.alternatives]]` leaves nothing to stress \
             the assumed curve against: add at least one alternative or keep the defaults"
        )));
    }
    let curves =
        stress::curves(&scenario).map_err(|(name, e)| Error::Input(format!("{origin}: curve `{name}`: {e}")))?;
    Ok((scenario, curves))
}

/// The linear books of reference histories `paths` of every curve.
pub(super) fn books(
    scenario: &Scenario,
    curves: &[(String, Setup)],
    paths: Range<usize>,
    threads: usize,
    progress: &dyn Progress,
) -> Vec<Vec<Vec<BookSums>>> {
    super::note_long(progress, curves.len() * paths.len(), scenario, threads);
    stage(progress, "curves", curves.len(), |p| stress::books(curves, paths, threads, p))
}

/// The stress test of `scenario` (`origin` names it in messages).
///
/// # Errors
/// A cost out of range, no alternative curve, or a curve whose truth cannot
/// be computed (named).
pub fn stress(
    scenario: &Scenario,
    origin: &str,
    o: &StressOptions,
    progress: &dyn Progress,
) -> Result<StressOutcome, Error> {
    let (scenario, curves) = prepare(scenario, origin, o)?;
    let threads = super::threads_or_all(o.threads);
    let books = books(&scenario, &curves, 0..scenario.portfolio.reference_paths, threads, progress);
    let result = stress::from_books(&scenario, &curves, &books);
    Ok(StressOutcome { scenario, result })
}

impl super::Outcome for StressOutcome {
    /// `stress.json`, `stress.csv`, the charts (when `draw_charts`) and `report.html`.
    ///
    /// # Errors
    /// A result that is not finite, or a chart that cannot be drawn.
    fn files(&self, draw_charts: bool, made: &report::Made) -> Result<Files, Error> {
        finite(&self.result)?;
        let (s, r) = (&self.scenario, &self.result);
        let mut files =
            vec![("stress.json".to_string(), report::stress_json(s, r)), ("stress.csv".into(), report::stress_csv(r))];
        let charts = charts(draw_charts, || report::stress_charts(s, r))?;
        files.extend(charts.files);
        let page = report::html::stress_page(s, r, charts.inline);
        files.push(("report.html".into(), report::html::render(&page, made)));
        Ok(files)
    }

    /// The terminal summary.
    fn terminal(&self) -> String {
        report::stress_terminal(&self.scenario, &self.result)
    }
}
