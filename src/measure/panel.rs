//! A balanced panel of forecasts and forward returns, date-major.

/// Forecasts and returns on `dates` dates for `assets` assets.
///
/// Row `t` of `forecasts` is the cross-section of forecasts at date `t`
/// (0-based). Row `t` of `returns` is the return over the period that starts
/// at date `t` and ends at date `t + 1` (a forward return), so there are
/// `dates − 1` return rows. In MODEL.md's 1-based notation, return row `t`
/// is `r[·, t+1]` and the lag-`k` IC at date `t` pairs forecast row `t` with
/// return row `t + k − 1`.
///
/// The matrices always have those shapes and `has_missing` always says
/// whether a value is NaN: build a panel with [`Panel::new`] or
/// [`Panel::zeros`]; outside the crate its fields are read through the
/// methods of the same names.
#[derive(Debug, Clone, Default)]
pub struct Panel {
    /// Assets per date.
    pub(crate) assets: usize,
    /// Dates.
    pub(crate) dates: usize,
    /// `dates × assets`, row-major.
    pub(crate) forecasts: Vec<f64>,
    /// `(dates − 1) × assets`, row-major.
    pub(crate) returns: Vec<f64>,
    /// Whether any value is missing (NaN); simulated panels have none.
    pub(crate) has_missing: bool,
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

    /// A panel of `dates × assets` forecasts and `(dates − 1) × assets`
    /// returns (row-major, NaN for missing).
    ///
    /// # Errors
    /// Fewer than two dates or one asset, or a matrix of another size.
    pub fn new(assets: usize, dates: usize, forecasts: Vec<f64>, returns: Vec<f64>) -> Result<Self, String> {
        if assets == 0 || dates < 2 {
            return Err(format!("a panel needs at least one asset and two dates, got {assets} × {dates}"));
        }
        if forecasts.len() != assets * dates || returns.len() != assets * (dates - 1) {
            return Err(format!(
                "{} forecasts and {} returns for {assets} assets × {dates} dates; expected {} and {}",
                forecasts.len(),
                returns.len(),
                assets * dates,
                assets * (dates - 1)
            ));
        }
        let mut p = Self { assets, dates, forecasts, returns, has_missing: false };
        p.refresh_missing();
        Ok(p)
    }

    /// Assets per date.
    pub fn assets(&self) -> usize {
        self.assets
    }

    /// Dates.
    pub fn dates(&self) -> usize {
        self.dates
    }

    /// `dates × assets` forecasts, row-major.
    pub fn forecasts(&self) -> &[f64] {
        &self.forecasts
    }

    /// `(dates − 1) × assets` forward returns, row-major.
    pub fn returns(&self) -> &[f64] {
        &self.returns
    }

    /// Whether any value is missing (NaN).
    pub fn has_missing(&self) -> bool {
        self.has_missing
    }

    /// Puts `other` (another signal's forecasts, of the same shape) in place
    /// of the forecasts and `has_missing` in step; swapping back restores
    /// the panel.
    ///
    /// # Panics
    /// When `other` has another length (a bug: signals are read together).
    pub(crate) fn swap_forecasts(&mut self, other: &mut Vec<f64>) {
        assert_eq!(other.len(), self.forecasts.len(), "forecasts of another shape");
        std::mem::swap(&mut self.forecasts, other);
        self.refresh_missing();
    }

    /// Sets `has_missing` from the values.
    pub(crate) fn refresh_missing(&mut self) {
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
