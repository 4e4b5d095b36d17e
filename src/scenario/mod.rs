//! Stage 0: the scenario. Two layers: [`RawScenario`] only parses the TOML;
//! [`Scenario`] is the validated form, the only one the engine sees.

mod explain;
mod locate;
pub mod presets;
mod raw;
mod spelling;
pub mod sweep;

pub use raw::{DECAY_FAMILIES, RawAlternative, RawDecay, RawPortfolio, RawScenario, RawStress, RawTails};

use crate::decay::{DecayCurve, out_of_range};
use crate::error::{InputError, ScenarioError};
use serde::{Deserialize, Serialize};

/// Largest `assets × history` (a history takes 16 bytes per asset-date per worker).
pub const MAX_ASSET_DATES: usize = 50_000_000;
/// Most paths in one study. Its memory does not grow with them (each path is
/// folded into fixed-size tallies); the bound keeps its counts far from the
/// 32-bit limit of a histogram bin and a run to what finishes.
pub const MAX_PATHS: usize = 100_000_000;

/// Names of the stress curves lagfold adds itself: the scenario's own curve,
/// then the default alternatives (see `stress::default_alternatives`).
pub const RESERVED_NAMES: [&str; 5] = ["assumed", "faster", "slower", "hump", "reversal"];
/// Most alternative curves a scenario may give (each is a study of its own
/// and a line on every stress chart).
pub const MAX_ALTERNATIVES: usize = 24;

/// The shortest history for `horizons`: each horizon needs two dates, and the
/// holding books of the longest horizon at least three dates of returns
/// (`history − 1 − horizons ≥ 3`), or a history's measured net IR has no
/// spread and the study's averages of it are not finite.
pub fn min_history(horizons: usize) -> usize {
    horizons.saturating_add(4)
}

/// [`min_history`] in words.
pub const MIN_HISTORY_WORDS: &str = "horizons + 4";
/// Why.
pub const HISTORY_NOTE: &str = "each horizon needs two dates and the longest holding's books three dates of returns";

/// Largest `portfolio.reference_paths`.
pub const MAX_REFERENCE_PATHS: usize = 100_000;
/// Largest residual volatility per period (returns are decimals).
pub const MAX_RESIDUAL_VOL: f64 = 10.0;
/// Most Student-t degrees of freedom: beyond, the law is normal to the
/// precision of the t tail area the ziggurat's tables are built from.
pub const MAX_DOF: f64 = 1e6;
/// Largest `periods_per_year`.
pub const MAX_PERIODS_PER_YEAR: f64 = 1_000_000.0;

/// Idiosyncratic noise law (validated).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "family", rename_all = "snake_case")]
pub enum Tails {
    /// Standard normal.
    Normal,
    /// Student-t with `2 < dof ≤ MAX_DOF` degrees of freedom, scaled to unit variance.
    StudentT {
        /// Degrees of freedom ν.
        dof: f64,
    },
}

/// A validated scenario. Build it with [`Scenario::from_raw`] or [`load`];
/// change it with [`Scenario::revised`] (validated again) or
/// [`Scenario::with_decay`]. Its fields are read through the methods of the
/// same names.
#[derive(Debug, Clone, Serialize)]
pub struct Scenario {
    /// Name (output folder).
    pub(crate) name: String,
    /// One-line description.
    pub(crate) description: String,
    /// Breadth `N` (≥ 10).
    pub(crate) assets: usize,
    /// History `T` (> `horizons`).
    pub(crate) history: usize,
    /// Longest horizon `L` (≥ 1).
    pub(crate) horizons: usize,
    /// Periods per year (> 0).
    pub(crate) periods_per_year: f64,
    /// Residual volatility per period (> 0).
    pub(crate) residual_vol: f64,
    /// Forecast autocorrelation `ρ` in (−1, 1).
    #[serde(rename = "forecast_autocorrelation")]
    pub(crate) rho: f64,
    /// IC volatility (sd of the common shock) in [0, 1).
    pub(crate) ic_vol: f64,
    /// Persistence `ψ` of the common shock in (−1, 1).
    pub(crate) ic_vol_persistence: f64,
    /// Idiosyncratic noise law.
    pub(crate) tails: Tails,
    /// Paths in the study (≥ 1).
    pub(crate) paths: usize,
    /// Master seed.
    pub(crate) seed: u64,
    /// Near-best tolerance, in [0, 1).
    pub(crate) near_best_tolerance: f64,
    /// Truncation lag `K` (IC zero beyond).
    pub(crate) truncation: usize,
    /// Whether the study also measures rank ICs.
    pub(crate) rank_ic: bool,
    /// The user's lagged-IC curve.
    pub(crate) decay: DecayCurve,
    /// Holding-period portfolios.
    pub(crate) portfolio: PortfolioSpec,
    /// The user's alternative true curves for `lagfold stress`.
    pub(crate) alternatives: Vec<(String, DecayCurve)>,
    /// Whether they replace the default alternatives.
    pub(crate) replace_default_alternatives: bool,
    /// The raw form it was validated from (what [`Scenario::revised`] changes).
    #[serde(skip)]
    raw: RawScenario,
    /// A true curve set by [`Scenario::with_decay`] in place of the raw one.
    #[serde(skip)]
    replaced_decay: Option<DecayCurve>,
}

/// Holding-period portfolio settings (validated).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct PortfolioSpec {
    /// One-way cost in basis points of traded notional (≥ 0).
    pub cost_bps: f64,
    /// Quantiles of the top-minus-bottom book (each leg keeps ≥ 5 assets).
    pub quantiles: usize,
    /// Histories in the reference simulation of the true net IR (≥ 10).
    pub reference_paths: usize,
    /// Annual volatility of the book, as a decimal (0.04 = 4 %): every
    /// basis-point figure is the book's IR figure times it.
    pub target_vol: f64,
}

/// Checks a target annual volatility.
pub fn check_target_vol(key: &str, v: f64) -> Result<f64, ScenarioError> {
    if v.is_finite() && v > 0.0 && v <= 1.0 {
        Ok(v)
    } else {
        Err(out_of_range(key, v, "above 0 and at most 1 (an annual volatility as a decimal: 0.04 = 4 %)"))
    }
}

/// A warning for a target volatility outside 0.5 %–30 % a year (common
/// practice for a market-neutral book's tracking error; no single source).
pub fn implausible_target_vol(key: &str, v: f64) -> Option<String> {
    (!(0.005..=0.3).contains(&v)).then(|| {
        format!("{key} = {v} is {:.1} % a year; books usually run at 1–10 % (is 4 % written as 4?)", 100.0 * v)
    })
}

/// Checks a one-way cost in basis points.
pub fn check_cost_bps(key: &str, v: f64) -> Result<f64, ScenarioError> {
    if v.is_finite() && (0.0..10_000.0).contains(&v) {
        Ok(v)
    } else {
        Err(out_of_range(key, v, "in [0, 10000) basis points"))
    }
}

/// A validated scenario's raw form and name: what a shard's partial result
/// stores so that a merge rebuilds the very same scenario.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct ScenarioRecord {
    /// The scenario's name.
    pub name: String,
    /// Its raw form, every override applied.
    pub raw: RawScenario,
}

/// Command-line overrides of the common knobs, applied before validation.
#[derive(Debug, Clone, Default)]
pub struct Overrides {
    /// `--assets`.
    pub assets: Option<usize>,
    /// `--history`.
    pub history: Option<usize>,
    /// `--horizons`.
    pub horizons: Option<usize>,
    /// `--paths`.
    pub paths: Option<usize>,
    /// `--seed`.
    pub seed: Option<u64>,
    /// `--target-vol`.
    pub target_vol: Option<f64>,
    /// `--cost-bps` with one level.
    pub cost_bps: Option<f64>,
    /// Histories of the portfolio's reference simulation (no option: set by
    /// callers that need less of it).
    pub reference_paths: Option<usize>,
}

impl Overrides {
    /// The options given, as `(flag, value)`.
    pub fn given(&self) -> Vec<(&'static str, String)> {
        let mut v = Vec::new();
        let mut add = |flag, x: Option<String>| {
            if let Some(x) = x {
                v.push((flag, x));
            }
        };
        add("--assets", self.assets.map(|x| x.to_string()));
        add("--history", self.history.map(|x| x.to_string()));
        add("--horizons", self.horizons.map(|x| x.to_string()));
        add("--paths", self.paths.map(|x| x.to_string()));
        add("--seed", self.seed.map(|x| x.to_string()));
        add("--target-vol", self.target_vol.map(|x| x.to_string()));
        add("--cost-bps", self.cost_bps.map(|x| x.to_string()));
        v
    }

    /// Writes the given overrides into a raw scenario.
    pub fn apply(&self, raw: &mut RawScenario) {
        if let Some(v) = self.assets {
            raw.assets = v;
        }
        if let Some(v) = self.history {
            raw.history = v;
        }
        if let Some(v) = self.horizons {
            raw.horizons = v;
        }
        if let Some(v) = self.paths {
            raw.paths = v;
        }
        if let Some(v) = self.seed {
            raw.seed = v;
        }
        if let Some(v) = self.target_vol {
            raw.portfolio.target_vol = v;
        }
        if let Some(v) = self.cost_bps {
            raw.portfolio.cost_bps = v;
        }
        if let Some(v) = self.reference_paths {
            raw.portfolio.reference_paths = v;
        }
    }
}

/// The scenario key an option sets: `--assets` → `assets`, `--target-vol` → `portfolio.target_vol`.
fn option_key(flag: &str) -> String {
    match flag {
        "--target-vol" => "portfolio.target_vol".into(),
        "--cost-bps" => "portfolio.cost_bps".into(),
        f => f.trim_start_matches('-').replace('-', "_"),
    }
}

/// Checks a scenario name given in the file: it names the output folder.
fn check_name(name: &str) -> Result<String, ScenarioError> {
    let ok = !name.is_empty()
        && !name.starts_with('.')
        && name.len() <= 100
        && name.chars().all(|c| c.is_ascii_alphanumeric() || "-_.".contains(c));
    if ok {
        Ok(name.to_string())
    } else {
        Err(out_of_range(
            "name",
            format!("{name:?}"),
            "1 to 100 letters, digits, '-', '_' or '.', not starting with '.' (it names the output folder)",
        ))
    }
}

/// The name of a scenario whose file sets none: the file name with every
/// character outside the name rule turned into '-' (`my signal.toml` →
/// `my-signal`) and leading dots dropped.
pub fn name_from_file(stem: &str) -> String {
    let mut name: String =
        stem.chars().map(|c| if c.is_ascii_alphanumeric() || "-_.".contains(c) { c } else { '-' }).take(100).collect();
    name = name.trim_start_matches('.').to_string();
    if name.is_empty() { "scenario".into() } else { name }
}

fn open_unit(key: &str, v: f64) -> Result<f64, ScenarioError> {
    if v.is_finite() && v > -1.0 && v < 1.0 { Ok(v) } else { Err(out_of_range(key, v, "inside (-1, 1)")) }
}

fn positive(key: &str, v: f64) -> Result<f64, ScenarioError> {
    if v.is_finite() && v > 0.0 { Ok(v) } else { Err(out_of_range(key, v, "> 0")) }
}

impl Scenario {
    /// Validates a raw scenario.
    ///
    /// # Errors
    /// The first field outside its range, with its key path and value.
    pub fn from_raw(raw: &RawScenario, default_name: &str) -> Result<Self, ScenarioError> {
        let name = match &raw.name {
            Some(n) => check_name(n)?,
            None => name_from_file(default_name),
        };
        if raw.assets < 10 {
            return Err(out_of_range("assets", raw.assets, "at least 10"));
        }
        if raw.horizons < 1 {
            return Err(out_of_range("horizons", raw.horizons, "at least 1"));
        }
        if raw.history < min_history(raw.horizons) {
            return Err(out_of_range(
                "history",
                raw.history,
                &format!("at least {} = {} ({HISTORY_NOTE})", MIN_HISTORY_WORDS, min_history(raw.horizons)),
            ));
        }
        // Memory guards: a history is held twice per worker, every path's curves once.
        if raw.assets.saturating_mul(raw.history) > MAX_ASSET_DATES {
            return Err(out_of_range(
                "assets",
                raw.assets,
                &format!("such that assets × history ≤ {MAX_ASSET_DATES} (history is {})", raw.history),
            ));
        }
        if raw.paths > MAX_PATHS {
            return Err(out_of_range(
                "paths",
                raw.paths,
                &format!("at most {MAX_PATHS} (split a larger run with --shard)"),
            ));
        }
        let periods_per_year = positive("periods_per_year", raw.periods_per_year)?;
        if periods_per_year > MAX_PERIODS_PER_YEAR {
            return Err(out_of_range(
                "periods_per_year",
                periods_per_year,
                &format!("at most {MAX_PERIODS_PER_YEAR} (one period a minute of a trading year is about 98,000)"),
            ));
        }
        let residual_vol = positive("residual_vol", raw.residual_vol)?;
        if residual_vol > MAX_RESIDUAL_VOL {
            return Err(out_of_range(
                "residual_vol",
                residual_vol,
                &format!("at most {MAX_RESIDUAL_VOL} (a decimal: 0.06 is 6 % per period)"),
            ));
        }
        let rho = open_unit("forecast_autocorrelation", raw.forecast_autocorrelation)?;
        if !(raw.ic_vol.is_finite() && (0.0..1.0).contains(&raw.ic_vol)) {
            return Err(out_of_range("ic_vol", raw.ic_vol, "in [0, 1)"));
        }
        let ic_vol_persistence = open_unit("ic_vol_persistence", raw.ic_vol_persistence)?;
        let tails = match raw.tails.dof()? {
            None => Tails::Normal,
            Some(dof) => {
                if !(dof > 2.0 && dof <= MAX_DOF) {
                    return Err(out_of_range(
                        "tails.dof",
                        dof,
                        "> 2 (finite variance) and ≤ 1e6 (beyond, the law is normal: use family = \"normal\")",
                    ));
                }
                Tails::StudentT { dof }
            }
        };
        if raw.paths < 1 {
            return Err(out_of_range("paths", raw.paths, "at least 1"));
        }
        if !(raw.near_best_tolerance.is_finite() && (0.0..1.0).contains(&raw.near_best_tolerance)) {
            return Err(out_of_range("near_best_tolerance", raw.near_best_tolerance, "in [0, 1)"));
        }
        let decay = DecayCurve::new(raw.decay.shape("decay")?)?;
        let p = &raw.portfolio;
        let portfolio = PortfolioSpec {
            cost_bps: check_cost_bps("portfolio.cost_bps", p.cost_bps)?,
            quantiles: if p.quantiles >= 2 && raw.assets / p.quantiles.max(1) >= 5 {
                p.quantiles
            } else {
                return Err(out_of_range(
                    "portfolio.quantiles",
                    p.quantiles,
                    &format!(
                        "between 2 and {} (each leg needs at least 5 of the {} assets)",
                        raw.assets / 5,
                        raw.assets
                    ),
                ));
            },
            reference_paths: if (10..=MAX_REFERENCE_PATHS).contains(&p.reference_paths) {
                p.reference_paths
            } else {
                return Err(out_of_range(
                    "portfolio.reference_paths",
                    p.reference_paths,
                    &format!("from 10 to {MAX_REFERENCE_PATHS} (each is one more simulated history with its books)"),
                ));
            },
            target_vol: check_target_vol("portfolio.target_vol", p.target_vol)?,
        };
        let mut alternatives = Vec::with_capacity(raw.stress.alternatives.len());
        for (i, a) in raw.stress.alternatives.iter().enumerate() {
            let prefix = format!("stress.alternatives[{i}]");
            if a.name.trim().is_empty() {
                return Err(out_of_range(&format!("{prefix}.name"), "\"\"", "a non-empty name"));
            }
            let taken = alternatives.iter().any(|(n, _): &(String, DecayCurve)| n.trim() == a.name.trim())
                || (!raw.stress.replace_defaults && RESERVED_NAMES.contains(&a.name.trim()));
            if taken {
                return Err(out_of_range(
                    &format!("{prefix}.name"),
                    format!("{:?}", a.name),
                    "a name not used by another alternative, nor `assumed`, nor a default one (faster, slower, hump, reversal) unless replace_defaults = true",
                ));
            }
            if i >= MAX_ALTERNATIVES {
                return Err(out_of_range(
                    "stress.alternatives",
                    format!("{} alternatives", raw.stress.alternatives.len()),
                    &format!("at most {MAX_ALTERNATIVES} (each adds a study and a column to every chart)"),
                ));
            }
            let curve = a.decay.shape("decay").and_then(DecayCurve::new).map_err(|e| e.under(&prefix))?;
            alternatives.push((a.name.clone(), curve));
        }
        let truncation = match raw.truncation {
            Some(0) => return Err(out_of_range("truncation", 0, "at least 1")),
            Some(k) if k > 20_000 => return Err(out_of_range("truncation", k, "at most 20000")),
            Some(k) => k,
            None => decay.natural_end().unwrap_or(4 * raw.horizons),
        };
        Ok(Self {
            name,
            description: raw.description.clone(),
            assets: raw.assets,
            history: raw.history,
            horizons: raw.horizons,
            periods_per_year,
            residual_vol,
            rho,
            ic_vol: raw.ic_vol,
            ic_vol_persistence,
            tails,
            paths: raw.paths,
            seed: raw.seed,
            near_best_tolerance: raw.near_best_tolerance,
            truncation,
            rank_ic: raw.rank_ic,
            decay,
            portfolio,
            alternatives,
            replace_default_alternatives: raw.stress.replace_defaults,
            raw: raw.clone(),
            replaced_decay: None,
        })
    }
}

impl Scenario {
    /// Name (output folder).
    pub fn name(&self) -> &str {
        &self.name
    }
    /// One-line description.
    pub fn description(&self) -> &str {
        &self.description
    }
    /// Breadth `N` (≥ 10).
    pub fn assets(&self) -> usize {
        self.assets
    }
    /// History `T` (> `horizons`).
    pub fn history(&self) -> usize {
        self.history
    }
    /// Longest horizon `L` (≥ 1).
    pub fn horizons(&self) -> usize {
        self.horizons
    }
    /// Periods per year (> 0).
    pub fn periods_per_year(&self) -> f64 {
        self.periods_per_year
    }
    /// Residual volatility per period (> 0).
    pub fn residual_vol(&self) -> f64 {
        self.residual_vol
    }
    /// IC volatility (sd of the common shock) in [0, 1).
    pub fn ic_vol(&self) -> f64 {
        self.ic_vol
    }
    /// Persistence `ψ` of the common shock in (−1, 1).
    pub fn ic_vol_persistence(&self) -> f64 {
        self.ic_vol_persistence
    }
    /// Idiosyncratic noise law.
    pub fn tails(&self) -> Tails {
        self.tails
    }
    /// Paths in the study (≥ 1).
    pub fn paths(&self) -> usize {
        self.paths
    }
    /// Master seed.
    pub fn seed(&self) -> u64 {
        self.seed
    }
    /// Near-best tolerance, in [0, 1).
    pub fn near_best_tolerance(&self) -> f64 {
        self.near_best_tolerance
    }
    /// Truncation lag `K` (IC zero beyond).
    pub fn truncation(&self) -> usize {
        self.truncation
    }
    /// Whether the study also measures rank ICs.
    pub fn rank_ic(&self) -> bool {
        self.rank_ic
    }
    /// The user's lagged-IC curve.
    pub fn decay(&self) -> &DecayCurve {
        &self.decay
    }
    /// Holding-period portfolios.
    pub fn portfolio(&self) -> &PortfolioSpec {
        &self.portfolio
    }
    /// The user's alternative true curves for `lagfold stress`.
    pub fn alternatives(&self) -> &[(String, DecayCurve)] {
        &self.alternatives
    }
    /// Whether they replace the default alternatives.
    pub fn replace_default_alternatives(&self) -> bool {
        self.replace_default_alternatives
    }

    /// The scenario with `ov` applied to its raw form, validated again as a
    /// whole (a curve set by [`Scenario::with_decay`] is kept).
    ///
    /// # Errors
    /// The first field outside its range, as [`Scenario::from_raw`].
    pub fn revised(&self, ov: &Overrides) -> Result<Scenario, ScenarioError> {
        let mut raw = self.raw.clone();
        ov.apply(&mut raw);
        let s = Scenario::from_raw(&raw, &self.name)?;
        Ok(match &self.replaced_decay {
            Some(d) => s.with_decay(d.clone()),
            None => s,
        })
    }

    /// What rebuilds this scenario exactly ([`Scenario::from_record`]), or
    /// `None` for one whose true curve was replaced after validation.
    pub fn record(&self) -> Option<ScenarioRecord> {
        self.replaced_decay.is_none().then(|| ScenarioRecord { name: self.name.clone(), raw: self.raw.clone() })
    }

    /// The scenario a [`ScenarioRecord`] holds.
    ///
    /// # Errors
    /// A record that no longer validates (written by another version).
    pub fn from_record(r: &ScenarioRecord) -> Result<Self, ScenarioError> {
        Scenario::from_raw(&r.raw, &r.name)
    }

    /// The same scenario with another true decay curve (a validated curve;
    /// the truncation stays the scenario's, so curves compare over the same lags).
    pub fn with_decay(&self, decay: DecayCurve) -> Scenario {
        Scenario { decay: decay.clone(), replaced_decay: Some(decay), ..self.clone() }
    }
}

impl Scenario {
    /// Values that are allowed but implausible, in words (printed as
    /// warnings before any work). The thresholds are common practice with no
    /// published source: per-date ICs of cross-sectional equity signals are
    /// a few hundredths, above 0.2 rare; residual volatility is a few per cent
    /// a month; one-way costs are a few to a few tens of basis points.
    pub fn implausible(&self) -> Vec<String> {
        let mut out = Vec::new();
        let lags = self.truncation.min(1000);
        if let Some((k, ic)) = (1..=lags).map(|k| (k, self.decay.ic(k))).max_by(|a, b| a.1.abs().total_cmp(&b.1.abs()))
            && ic.abs() > 0.2
        {
            out.push(format!(
                "the decay curve reaches an IC of {ic:.3} at lag {k}; per-date ICs above 0.2 are rare for \
                 cross-sectional signals (is it 0.045 written as 0.45?)"
            ));
        }
        for (alt, curve) in &self.alternatives {
            if let Some(k) = (1..=lags).find(|&k| curve.ic(k).abs() > 0.2) {
                out.push(format!(
                    "stress alternative {alt:?} reaches an IC of {:.3} at lag {k} (above 0.2)",
                    curve.ic(k)
                ));
            }
        }
        if self.residual_vol > 0.5 || self.residual_vol < 0.001 {
            out.push(format!(
                "residual_vol {} is {:.1} % per period; residual volatility is a decimal, usually a few per cent a \
                 month (0.06 = 6 %)",
                self.residual_vol,
                self.residual_vol * 100.0
            ));
        }
        if self.ic_vol > 0.3 {
            out.push(format!(
                "ic_vol {} means the IC's own swings (sd {}) dwarf a typical IC of a few hundredths",
                self.ic_vol, self.ic_vol
            ));
        }
        out.extend(implausible_cost("portfolio.cost_bps", self.portfolio.cost_bps));
        out.extend(implausible_target_vol("portfolio.target_vol", self.portfolio.target_vol));
        out
    }
}

/// A one-way cost above 200 bps, in words (common practice: costs are a few
/// to a few tens of basis points).
pub fn implausible_cost(key: &str, bps: f64) -> Option<String> {
    (bps > 200.0).then(|| {
        format!(
            "{key} {bps} is a one-way cost of {:.1} %; costs are usually a few to a few tens of basis points",
            bps / 100.0
        )
    })
}

/// Parses a scenario text (syntax, unknown fields and types only).
///
/// # Errors
/// [`InputError::Parse`] with the parser's line and column.
pub fn parse(text: &str, origin: &str) -> Result<RawScenario, InputError> {
    toml::from_str(text).map_err(|e| explain::explain(&e, text, origin))
}

/// Parses, applies overrides and validates; a value error carries its line.
///
/// # Errors
/// [`InputError::Parse`] or [`InputError::Invalid`].
pub fn load(text: &str, origin: &str, default_name: &str, ov: &Overrides) -> Result<Scenario, InputError> {
    let mut raw = parse(text, origin)?;
    ov.apply(&mut raw);
    Scenario::from_raw(&raw, default_name).map_err(|e| {
        // A value given on the command line is blamed on its option, not on the file's line.
        let given = ov.given();
        if let Some(key) = e.key()
            && let Some((flag, _)) = given.iter().find(|(flag, _)| option_key(flag) == key)
        {
            return InputError::Invalid { origin: format!("option {flag}"), line: None, source: e };
        }
        // A rule between fields names the options that moved one of them.
        let said = e.to_string();
        let involved: Vec<_> = given.iter().filter(|(flag, _)| said.contains(&option_key(flag))).collect();
        let mut err = locate(e, text, origin);
        if let InputError::Invalid { origin, .. } = &mut err
            && !involved.is_empty()
        {
            let with: Vec<String> = involved.iter().map(|(f, v)| format!("{f} {v}")).collect();
            origin.push_str(&format!(" (with {} from the command line)", with.join(", ")));
        }
        err
    })
}

/// Wraps a value error with the line of its key in `text`.
pub fn locate(source: ScenarioError, text: &str, origin: &str) -> InputError {
    let line = source.key().and_then(|key| locate::line_of(text, key));
    InputError::Invalid { origin: origin.to_string(), line, source }
}
