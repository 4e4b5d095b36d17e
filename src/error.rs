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
    /// TOML syntax, an unknown field or a wrong type (the message has the line).
    #[error("{origin}: {message}")]
    Parse {
        /// File name or `preset <name>`.
        origin: String,
        /// The parser's message, with line and column.
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
