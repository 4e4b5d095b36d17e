//! The scenario file as written: serde only parses, with `deny_unknown_fields`
//! so that a misspelt key is an error with its line, not a silent default.

use crate::decay::DecayShape;
use serde::{Deserialize, Serialize};

/// A scenario file (TOML). Every field but `decay` has a default.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct RawScenario {
    /// Scenario name, used for the output folder (default: the file name).
    pub name: Option<String>,
    /// One line saying what the scenario is.
    #[serde(default)]
    pub description: String,
    /// Breadth `N`: assets in the cross-section (at least 10).
    #[serde(default = "defaults::assets")]
    pub assets: usize,
    /// History `T`: dates in each simulated history.
    #[serde(default = "defaults::history")]
    pub history: usize,
    /// Longest horizon `L` studied (must be below `history`).
    #[serde(default = "defaults::horizons")]
    pub horizons: usize,
    /// Periods in a year (12 monthly, 52 weekly, 252 daily).
    #[serde(default = "defaults::periods_per_year")]
    pub periods_per_year: f64,
    /// Cross-sectional residual volatility per period (0.06 = 6 %).
    #[serde(default = "defaults::residual_vol")]
    pub residual_vol: f64,
    /// Forecast autocorrelation `ρ` per period, in (−1, 1).
    #[serde(default)]
    pub forecast_autocorrelation: f64,
    /// Standard deviation of the common per-period IC shock, in [0, 1).
    #[serde(default)]
    pub ic_vol: f64,
    /// AR(1) coefficient `ψ` of the IC shock over time, in (−1, 1).
    #[serde(default)]
    pub ic_vol_persistence: f64,
    /// Idiosyncratic noise law.
    #[serde(default)]
    pub tails: RawTails,
    /// Simulated histories in the study.
    #[serde(default = "defaults::paths")]
    pub paths: usize,
    /// Master seed; each path's stream derives from `(seed, path index)`.
    #[serde(default = "defaults::seed")]
    pub seed: u64,
    /// Horizons within this share of the best horizon IC count as near-best.
    #[serde(default = "defaults::near_best_tolerance")]
    pub near_best_tolerance: f64,
    /// Lag `K` beyond which the IC is zero (default: the family's own end, else `4L`).
    pub truncation: Option<usize>,
    /// Also measure rank (Spearman) lagged ICs in the study (slower).
    #[serde(default)]
    pub rank_ic: bool,
    /// The lagged-IC decay curve (expected per-date IC), checked in validation.
    pub decay: DecayShape,
    /// Holding-period portfolios.
    #[serde(default)]
    pub portfolio: RawPortfolio,
    /// Alternative true curves for `lagfold stress`.
    #[serde(default)]
    pub stress: RawStress,
}

/// `[stress]`: alternative true curves (`[[stress.alternatives]]`).
#[derive(Debug, Clone, Default, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct RawStress {
    /// Replace the default alternatives (faster, slower, hump, reversal) instead of adding to them.
    #[serde(default)]
    pub replace_defaults: bool,
    /// The user's alternatives.
    #[serde(default)]
    pub alternatives: Vec<RawAlternative>,
}

/// One alternative true curve.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct RawAlternative {
    /// Its name in tables.
    pub name: String,
    /// The curve, written like `[decay]`.
    pub decay: DecayShape,
}

/// Holding-period portfolios (`[portfolio]`).
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct RawPortfolio {
    /// One-way cost in basis points of traded notional.
    #[serde(default = "defaults::cost_bps")]
    pub cost_bps: f64,
    /// Quantiles of the top-minus-bottom book (5 = quintiles).
    #[serde(default = "defaults::quantiles")]
    pub quantiles: usize,
    /// Histories in the reference simulation of the true net IR.
    #[serde(default = "defaults::reference_paths")]
    pub reference_paths: usize,
}

impl Default for RawPortfolio {
    fn default() -> Self {
        Self {
            cost_bps: defaults::cost_bps(),
            quantiles: defaults::quantiles(),
            reference_paths: defaults::reference_paths(),
        }
    }
}

/// Idiosyncratic noise (`family = "normal"` or `"student_t"` with `dof`).
#[derive(Debug, Clone, Default, Deserialize, Serialize)]
#[serde(tag = "family", rename_all = "snake_case", deny_unknown_fields)]
pub enum RawTails {
    /// Standard normal.
    #[default]
    Normal,
    /// Student-t with `dof > 2`, scaled to unit variance.
    StudentT {
        /// Degrees of freedom ν.
        dof: f64,
    },
}

mod defaults {
    pub fn assets() -> usize {
        1000
    }
    pub fn history() -> usize {
        120
    }
    pub fn horizons() -> usize {
        24
    }
    pub fn periods_per_year() -> f64 {
        12.0
    }
    pub fn residual_vol() -> f64 {
        0.06
    }
    pub fn paths() -> usize {
        2000
    }
    pub fn seed() -> u64 {
        1
    }
    pub fn near_best_tolerance() -> f64 {
        0.01
    }
    pub fn cost_bps() -> f64 {
        10.0
    }
    pub fn quantiles() -> usize {
        5
    }
    pub fn reference_paths() -> usize {
        1000
    }
}
