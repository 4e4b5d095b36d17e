//! A sweep: the study at every point of a grid of scenarios, one table.

use super::{Error, Files, Overrides, Progress, charts, check_costs, finite};
use crate::portfolio::PortfolioTruth;
use crate::report;
use crate::scenario::sweep::Point;
use crate::simulate::Setup;
use crate::study;

/// A sweep's rows with the grid they came from.
#[derive(Debug)]
pub struct SweepOutcome {
    /// The grid points.
    pub points: Vec<Point>,
    /// Each point's study.
    pub rows: Vec<report::SweepPoint>,
}

/// Runs the study at every grid point (`origin` names the sweep file in
/// messages): the reference truth and study per point; `progress` sees one
/// stage over all the points' paths. One `cost_bps` level replaces every
/// point's cost.
///
/// # Errors
/// A cost out of range, or a grid point whose truth cannot be computed (named).
pub fn sweep(
    points: Vec<Point>,
    origin: &str,
    cost_bps: Option<f64>,
    threads: usize,
    progress: &dyn Progress,
) -> Result<SweepOutcome, Error> {
    check_costs(cost_bps.as_slice(), 1, "a sweep (put a list of cost_bps under [portfolio] to sweep costs)")?;
    let threads = super::threads_or_all(threads);
    let total: usize = points.iter().map(|p| p.scenario.paths).sum();
    let asset_dates: f64 = points
        .iter()
        .map(|p| {
            let s = &p.scenario;
            (s.paths + s.portfolio.reference_paths) as f64 * s.assets as f64 * s.history as f64
        })
        .sum();
    if let Some(note) = super::long_work(asset_dates, &format!("{} grid points", points.len()), threads) {
        progress.note(&note);
    }
    progress.begin("sweep", total);
    let mut done = 0;
    let mut rows = Vec::with_capacity(points.len());
    for p in &points {
        let setup = point_setup(p, origin, cost_bps)?;
        let portfolio = PortfolioTruth::compute(&setup, threads, &|_| {});
        let result = study::run(&setup, &portfolio, &[], threads, &|d| progress.advance(done + d));
        done += setup.scenario.paths;
        rows.push(report::SweepPoint::new(p, &setup, &portfolio, result));
    }
    progress.end();
    Ok(SweepOutcome { points, rows })
}

/// A grid point's scenario at the sweep's cost (one `cost_bps` level
/// replaces the point's own), set up; errors name the point.
pub(super) fn point_setup(p: &Point, origin: &str, cost_bps: Option<f64>) -> Result<Setup, Error> {
    let label = p.at.iter().map(|(k, v)| format!("{k} = {v}")).collect::<Vec<_>>().join(", ");
    let at = |e: &dyn std::fmt::Display| Error::Input(format!("{origin} (grid point {label}): {e}"));
    let s = p.scenario.revised(&Overrides { cost_bps, ..Default::default() }).map_err(|e| at(&e))?;
    Setup::new(s).map_err(|e| at(&e))
}

impl super::Outcome for SweepOutcome {
    /// `sweep.json`, `sweep.csv`, the charts (when `draw_charts`) and `report.html`.
    ///
    /// # Errors
    /// A result that is not finite, or a chart that cannot be drawn.
    fn files(&self, draw_charts: bool, made: &report::Made) -> Result<Files, Error> {
        let rows = &self.rows;
        finite(rows)?;
        let mut files =
            vec![("sweep.json".to_string(), report::sweep_json(rows)), ("sweep.csv".into(), report::sweep_csv(rows))];
        let charts = charts(draw_charts, || report::sweep_charts(rows))?;
        files.extend(charts.files);
        let name = self.points.first().map_or("sweep", |p| p.scenario.name.as_str());
        let parameters = report::html::sweep_parameters(&self.points);
        let page = report::html::sweep_page(name, rows, parameters, charts.inline);
        files.push(("report.html".into(), report::html::render(&page, made)));
        Ok(files)
    }

    /// The terminal table.
    fn terminal(&self) -> String {
        report::sweep_terminal(&self.rows)
    }
}
