//! One simulated history of a scenario, in the input format of `measure`.

use super::{Error, Scenario};
use crate::calendar;
use crate::measure::Panel;
use crate::simulate::{PathWorker, Setup};

/// One simulated history: its panel on an invented calendar.
#[derive(Debug, Clone)]
pub struct SimulatedPanel {
    /// Forecasts and per-period residual returns (in units of the residual volatility).
    pub panel: Panel,
    /// ISO 8601 dates, one per period.
    pub dates: Vec<String>,
    /// The residual volatility per period that scales the returns written.
    pub residual_vol: f64,
    /// The path index within the scenario's seed.
    pub path: u64,
    /// The scenario's seed.
    pub seed: u64,
}

/// History `path` of the study of `scenario` (the very panel the study's
/// path `path` measures).
///
/// # Errors
/// A scenario whose model cannot be calibrated.
pub fn simulate_panel(scenario: &Scenario, origin: &str, path: u64) -> Result<SimulatedPanel, Error> {
    let setup = Setup::new(scenario.clone()).map_err(|e| Error::Input(format!("{origin}: {e}")))?;
    let s = &setup.scenario;
    let mut w = PathWorker::new(1, false);
    w.simulate(&setup, s.seed, path);
    Ok(SimulatedPanel {
        panel: w.panel().clone(),
        dates: calendar::dates(s.history, s.periods_per_year),
        residual_vol: s.residual_vol,
        path,
        seed: s.seed,
    })
}

impl SimulatedPanel {
    /// The long CSV `date,asset,forecast,return` (returns scaled by the residual volatility).
    ///
    /// # Errors
    /// What the writer said.
    pub fn write_csv(&self, out: impl std::io::Write) -> Result<(), csv::Error> {
        crate::report::write_panel(&self.panel, &self.dates, self.residual_vol, out)
    }
}
