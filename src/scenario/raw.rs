//! The scenario file as written: serde only parses, with `deny_unknown_fields`
//! so that a misspelt key is an error with its line, not a silent default.
//! Every table is a plain struct (no tagged enums), so that the TOML reader
//! keeps the position of each key for its messages; the family of `[decay]`
//! and `[tails]` is checked afterwards, with the key path of a missing or
//! stray parameter.

use super::spelling::nearest;
use crate::decay::{DecayShape, out_of_range};
use crate::error::ScenarioError;
use serde::{Deserialize, Serialize};

/// A scenario file (TOML). Every field but `decay` has a default.
#[derive(Debug, Clone, Serialize, Deserialize)]
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
    /// TOML integers stop at 2^63 − 1, so larger seeds may be written in quotes.
    #[serde(default = "defaults::seed", deserialize_with = "seed")]
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
    pub decay: RawDecay,
    /// Holding-period portfolios.
    #[serde(default)]
    pub portfolio: RawPortfolio,
    /// Alternative true curves for `lagfold stress`.
    #[serde(default)]
    pub stress: RawStress,
}

/// `[stress]`: alternative true curves (`[[stress.alternatives]]`).
#[derive(Debug, Clone, Default, Serialize, Deserialize)]
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
#[derive(Debug, Clone, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawAlternative {
    /// Its name in tables.
    pub name: String,
    /// The curve, written like `[decay]`.
    pub decay: RawDecay,
}

/// Holding-period portfolios (`[portfolio]`).
#[derive(Debug, Clone, Serialize, Deserialize)]
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
    /// The book's annual volatility to which every basis-point figure is scaled.
    #[serde(default = "defaults::target_vol")]
    pub target_vol: f64,
}

impl Default for RawPortfolio {
    fn default() -> Self {
        Self {
            cost_bps: defaults::cost_bps(),
            quantiles: defaults::quantiles(),
            reference_paths: defaults::reference_paths(),
            target_vol: defaults::target_vol(),
        }
    }
}

/// Idiosyncratic noise (`family = "normal"` or `"student_t"` with `dof`).
#[derive(Debug, Clone, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawTails {
    /// `normal` or `student_t`.
    pub family: String,
    /// Degrees of freedom ν of the Student-t (> 2).
    pub dof: Option<f64>,
}

impl Default for RawTails {
    fn default() -> Self {
        Self { family: "normal".into(), dof: None }
    }
}

/// The tail families and the parameters each takes.
const TAIL_FAMILIES: [(&str, &[&str]); 2] = [("normal", &[]), ("student_t", &["dof"])];

/// A decay curve as written: its family and any parameter of any family.
#[derive(Debug, Clone, Default, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawDecay {
    /// One of [`DECAY_FAMILIES`].
    pub family: String,
    /// IC at lag 1 (`exponential`, `linear`, `power`).
    pub ic1: Option<f64>,
    /// Half-life in periods (`exponential`).
    pub half_life: Option<f64>,
    /// Lag at which the IC reaches zero (`linear`).
    pub zero_at: Option<f64>,
    /// Highest IC (`hump`).
    pub peak: Option<f64>,
    /// Lag of the highest IC (`hump`).
    pub peak_lag: Option<f64>,
    /// Shape of the hump (`hump`, default 2).
    pub shape: Option<f64>,
    /// Exponent of the power law (`power`).
    pub exponent: Option<f64>,
    /// IC on each lag of the step (`step`).
    pub ic: Option<f64>,
    /// Lags with a non-zero IC (`step`).
    pub length: Option<usize>,
    /// The IC at lags 1, 2, … (`table`).
    pub values: Option<Vec<f64>>,
}

/// The decay families with their required and optional parameters.
pub const DECAY_FAMILIES: [(&str, &[&str], &[&str]); 6] = [
    ("exponential", &["ic1", "half_life"], &[]),
    ("linear", &["ic1", "zero_at"], &[]),
    ("hump", &["peak", "peak_lag"], &["shape"]),
    ("power", &["ic1", "exponent"], &[]),
    ("step", &["ic", "length"], &[]),
    ("table", &["values"], &[]),
];

/// A family name outside `known`, with the nearest one suggested.
fn unknown_family(key: &str, got: &str, known: impl Iterator<Item = &'static str> + Clone) -> ScenarioError {
    let list: Vec<&str> = known.clone().collect();
    let value = match nearest(got, known) {
        Some(c) => format!("{got:?} (did you mean {c:?}?)"),
        None => format!("{got:?}"),
    };
    out_of_range(key, value, &format!("one of {}", list.join(", ")))
}

/// What a family takes, in words: "ic1 and half_life".
fn takes(params: &[&str]) -> String {
    match params {
        [] => "no parameters".into(),
        [one] => (*one).into(),
        [init @ .., last] => format!("{} and {last}", init.join(", ")),
    }
}

impl RawDecay {
    /// The parameters that are present, with their values as written.
    fn present(&self) -> Vec<(&'static str, String)> {
        let f = |x: Option<f64>| x.map(|v| v.to_string());
        [
            ("ic1", f(self.ic1)),
            ("half_life", f(self.half_life)),
            ("zero_at", f(self.zero_at)),
            ("peak", f(self.peak)),
            ("peak_lag", f(self.peak_lag)),
            ("shape", f(self.shape)),
            ("exponent", f(self.exponent)),
            ("ic", f(self.ic)),
            ("length", self.length.map(|v| v.to_string())),
            ("values", self.values.as_ref().map(|v| format!("{v:?}"))),
        ]
        .into_iter()
        .filter_map(|(k, v)| v.map(|v| (k, v)))
        .collect()
    }

    /// The family's shape; `prefix` is the key path of the table (`decay`).
    ///
    /// # Errors
    /// An unknown family (with the nearest name), a missing parameter, or a
    /// parameter the family does not take (it would be silently ignored).
    pub fn shape(&self, prefix: &str) -> Result<DecayShape, ScenarioError> {
        let key = |k: &str| format!("{prefix}.{k}");
        let Some(&(family, required, optional)) = DECAY_FAMILIES.iter().find(|(f, ..)| *f == self.family) else {
            return Err(unknown_family(&key("family"), &self.family, DECAY_FAMILIES.iter().map(|(f, ..)| *f)));
        };
        let all: Vec<&str> = required.iter().chain(optional).copied().collect();
        let reason = || format!("with family {family}, which takes {}", takes(&all));
        let present = self.present();
        if let Some((k, v)) = present.iter().find(|(k, _)| !all.contains(k)) {
            return Err(ScenarioError::NoEffect { key: key(k), value: v.clone(), reason: reason() });
        }
        if let Some(k) = required.iter().find(|k| !present.iter().any(|(p, _)| p == *k)) {
            return Err(ScenarioError::Missing { key: key(k), reason: reason() });
        }
        let v = |x: Option<f64>| x.unwrap_or_default();
        Ok(match family {
            "exponential" => DecayShape::Exponential { ic1: v(self.ic1), half_life: v(self.half_life) },
            "linear" => DecayShape::Linear { ic1: v(self.ic1), zero_at: v(self.zero_at) },
            "hump" => DecayShape::Hump {
                peak: v(self.peak),
                peak_lag: v(self.peak_lag),
                shape: self.shape.unwrap_or(crate::decay::DEFAULT_HUMP_SHAPE),
            },
            "power" => DecayShape::Power { ic1: v(self.ic1), exponent: v(self.exponent) },
            "step" => DecayShape::Step { ic: v(self.ic), length: self.length.unwrap_or_default() },
            _ => DecayShape::Table { values: self.values.clone().unwrap_or_default() },
        })
    }
}

impl RawTails {
    /// The tail law: `None` for normal, `Some(dof)` for Student-t.
    ///
    /// # Errors
    /// An unknown family, `dof` missing under `student_t` or given under `normal`.
    pub fn dof(&self) -> Result<Option<f64>, ScenarioError> {
        let Some(&(family, params)) = TAIL_FAMILIES.iter().find(|(f, _)| *f == self.family) else {
            return Err(unknown_family("tails.family", &self.family, TAIL_FAMILIES.iter().map(|(f, _)| *f)));
        };
        let reason = format!("with family {family}, which takes {}", takes(params));
        match (family, self.dof) {
            ("normal", Some(d)) => {
                Err(ScenarioError::NoEffect { key: "tails.dof".into(), value: d.to_string(), reason })
            }
            ("normal", None) => Ok(None),
            (_, None) => Err(ScenarioError::Missing { key: "tails.dof".into(), reason }),
            (_, Some(d)) => Ok(Some(d)),
        }
    }
}

/// A seed: a whole number from 0 to 2^64 − 1, written as a TOML integer or,
/// since not every TOML reader goes past 2^63 − 1, as a string of digits.
fn seed<'de, D: serde::Deserializer<'de>>(d: D) -> Result<u64, D::Error> {
    struct Seed;
    impl serde::de::Visitor<'_> for Seed {
        type Value = u64;
        fn expecting(&self, f: &mut std::fmt::Formatter) -> std::fmt::Result {
            f.write_str("a whole number from 0 to 18446744073709551615")
        }
        fn visit_u64<E: serde::de::Error>(self, v: u64) -> Result<u64, E> {
            Ok(v)
        }
        fn visit_i64<E: serde::de::Error>(self, v: i64) -> Result<u64, E> {
            u64::try_from(v).map_err(|_| E::invalid_value(serde::de::Unexpected::Signed(v), &self))
        }
        fn visit_str<E: serde::de::Error>(self, v: &str) -> Result<u64, E> {
            v.trim().parse().map_err(|_| E::invalid_value(serde::de::Unexpected::Str(v), &self))
        }
    }
    d.deserialize_any(Seed)
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
    /// 4 % a year, a common tracking-error budget for a market-neutral book
    /// (common practice, no single source).
    pub fn target_vol() -> f64 {
        0.04
    }
}
