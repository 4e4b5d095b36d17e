//! Typed errors. Every variant carries the offending value and, where it
//! comes from a file, the key path so that the user can find and fix it.

use std::path::PathBuf;

/// A scenario value that the model cannot accept.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ScenarioError {
    /// A field outside its allowed range.
    #[error("`{key}` must be {allowed}, got {value}")]
    OutOfRange {
        /// Key path in the scenario file, e.g. `decay.half_life`.
        key: String,
        /// The value as given.
        value: String,
        /// The allowed range in words.
        allowed: String,
    },
    /// A key that is given but would change nothing (it belongs to another family).
    #[error("`{key}` = {value} has no effect {reason}; remove it or change the family")]
    NoEffect {
        /// Key path, e.g. `tails.dof`.
        key: String,
        /// The value as given.
        value: String,
        /// Why it has no effect.
        reason: String,
    },
    /// A key the chosen family needs.
    #[error("`{key}` is required {reason}")]
    Missing {
        /// Key path, e.g. `decay.half_life`.
        key: String,
        /// Which family needs it.
        reason: String,
    },
    /// The loadings and the IC volatility leave no room for idiosyncratic noise.
    #[error(
        "infeasible variance: the decay curve needs sum of squared loadings {sum_b2:.4} and \
         `ic_vol`² = {ic_vol_sq:.4}, leaving idiosyncratic variance {implied:.4} (must be > 0); \
         lower the IC level, `ic_vol` or `forecast_autocorrelation`"
    )]
    Infeasible {
        /// Σ b_j² implied by the curve and the forecast autocorrelation.
        sum_b2: f64,
        /// `ic_vol²`.
        ic_vol_sq: f64,
        /// `1 − Σ b_j² − ic_vol²`.
        implied: f64,
    },
    /// The true horizon-IC curve never rises above zero.
    #[error(
        "the true horizon IC is not positive at any horizon up to {horizons} (best {best:.5}); \
         a forecast with negative IC should have its sign flipped"
    )]
    NoPositiveHorizon {
        /// Longest horizon studied.
        horizons: usize,
        /// The largest true horizon IC.
        best: f64,
    },
}

impl ScenarioError {
    /// The same error with its key path put under `prefix`
    /// (`decay.ic1` → `stress.alternatives[2].decay.ic1`).
    #[must_use]
    pub fn under(self, prefix: &str) -> Self {
        match self {
            Self::OutOfRange { key, value, allowed } => {
                Self::OutOfRange { key: format!("{prefix}.{key}"), value, allowed }
            }
            Self::NoEffect { key, value, reason } => Self::NoEffect { key: format!("{prefix}.{key}"), value, reason },
            Self::Missing { key, reason } => Self::Missing { key: format!("{prefix}.{key}"), reason },
            other => other,
        }
    }

    /// The key path the error is about, when it has one.
    pub fn key(&self) -> Option<&str> {
        match self {
            Self::OutOfRange { key, .. } | Self::NoEffect { key, .. } | Self::Missing { key, .. } => Some(key),
            _ => None,
        }
    }
}

/// Errors reading a scenario file or a built-in preset.
#[derive(Debug, thiserror::Error)]
pub enum InputError {
    /// The file could not be read.
    #[error("cannot read {path}: {source}{hint}")]
    Read {
        /// The file.
        path: PathBuf,
        /// What the OS said.
        source: std::io::Error,
        /// For a missing file: the presets, led by a likely intended one.
        hint: String,
    },
    /// TOML syntax, an unknown field or a wrong type.
    #[error("{origin}{}: {message}", line.map(|l| format!(", line {l}")).unwrap_or_default())]
    Parse {
        /// File name or `preset <name>`.
        origin: String,
        /// 1-based line, when known.
        line: Option<usize>,
        /// What was wrong, in words.
        message: String,
    },
    /// A value out of range, with the line where the key was found.
    #[error("{origin}{}: {source}", line.map(|l| format!(", line {l}")).unwrap_or_default())]
    Invalid {
        /// File name or `preset <name>`.
        origin: String,
        /// 1-based line of the offending key, when it could be located.
        line: Option<usize>,
        /// What was wrong.
        source: ScenarioError,
    },
    /// A preset name that is not built in.
    #[error("no preset named `{name}`; {known}")]
    UnknownPreset {
        /// The name asked for.
        name: String,
        /// Comma-separated list of the built-in names.
        known: String,
    },
}
