//! A balanced panel of forecasts and forward returns, date-major.

/// Forecasts and returns on `dates` dates for `assets` assets.
///
/// Row `t` of `forecasts` is the cross-section of forecasts at date `t`
/// (0-based). Row `t` of `returns` is the return over the period that starts
/// at date `t` and ends at date `t + 1` (a forward return), so there are
/// `dates − 1` return rows. In MODEL.md's 1-based notation, return row `t`
/// is `r[·, t+1]` and the lag-`k` IC at date `t` pairs forecast row `t` with
/// return row `t + k − 1`.
#[derive(Debug, Clone, Default)]
pub struct Panel {
    /// Assets per date.
    pub assets: usize,
    /// Dates.
    pub dates: usize,
    /// `dates × assets`, row-major.
    pub forecasts: Vec<f64>,
    /// `(dates − 1) × assets`, row-major.
    pub returns: Vec<f64>,
    /// Whether any value is missing (NaN); simulated panels have none.
    pub has_missing: bool,
}

impl Panel {
    /// An all-zero panel of the given size.
    pub fn zeros(assets: usize, dates: usize) -> Self {
        Self {
            assets,
            dates,
            forecasts: vec![0.0; assets * dates],
            returns: vec![0.0; assets * dates.saturating_sub(1)],
            has_missing: false,
        }
    }

    /// Sets `has_missing` from the values.
    pub fn refresh_missing(&mut self) {
        self.has_missing = self.forecasts.iter().chain(&self.returns).any(|x| x.is_nan());
    }

    /// Forecasts at date `t`.
    pub fn forecast_row(&self, t: usize) -> &[f64] {
        &self.forecasts[t * self.assets..(t + 1) * self.assets]
    }

    /// Returns over `(t, t+1]`.
    pub fn return_row(&self, t: usize) -> &[f64] {
        &self.returns[t * self.assets..(t + 1) * self.assets]
    }
}
