//! `lagfold run <scenario>` and `lagfold demo`: read the scenario → set up the
//! truth → run the study → write outputs → print the summary.

use super::{Failure, progress};
use crate::api;
use crate::report;
use crate::scenario::{self, Overrides, Scenario, presets, sweep};
use std::path::{Path, PathBuf};

/// Options shared by `run` and `demo`.
#[derive(Debug, Clone, clap::Args)]
pub struct StudyArgs {
    /// Breadth N (assets per date).
    #[arg(long, value_parser = super::whole)]
    pub assets: Option<usize>,
    /// History T (dates per simulated history).
    #[arg(long, value_parser = super::whole)]
    pub history: Option<usize>,
    /// Longest horizon L studied.
    #[arg(long, value_parser = super::whole)]
    pub horizons: Option<usize>,
    /// Simulated histories.
    #[arg(long, value_parser = super::whole)]
    pub paths: Option<usize>,
    /// Master seed.
    #[arg(long, value_parser = super::seed)]
    pub seed: Option<u64>,
    /// Worker threads (default: all cores); results do not depend on it.
    #[arg(long, value_parser = clap::value_parser!(u16).range(1..=1024))]
    pub threads: Option<u16>,
    /// One-way costs in basis points, comma-separated: one value replaces the
    /// scenario's cost; several add a table of the net optimum at each.
    #[arg(long, value_delimiter = ',', num_args = 1..)]
    pub cost_bps: Vec<f64>,
    /// The book's annual volatility as a decimal (default 0.04 = 4 %): every
    /// basis-point figure is scaled to it.
    #[arg(long, value_parser = super::number)]
    pub target_vol: Option<f64>,
    /// Output folder (default: lagfold-out/<scenario name>).
    #[arg(long)]
    pub out: Option<PathBuf>,
    /// No progress bar and no summary on the terminal.
    #[arg(long, short)]
    pub quiet: bool,
    /// Skip the charts (the report then has no pictures).
    #[arg(long)]
    pub no_charts: bool,
    /// Run only shard K of N (0 ≤ K < N), a contiguous block of the paths
    /// (for `stress`, of every curve's reference histories), and write its
    /// partial result (part.json); `lagfold merge` adds the
    /// shards' folders into the single run's outputs, byte for byte.
    #[arg(long, value_name = "K/N", value_parser = api::Shard::parse)]
    pub shard: Option<api::Shard>,
}

/// Options of `run`.
#[derive(Debug, clap::Args)]
pub struct RunArgs {
    /// Scenario file (TOML), or the name of a built-in preset.
    pub scenario: PathBuf,
    /// Study the horizon rules alone, without the portfolio layer (no
    /// reference simulation, no books, no report): writes horizons.json,
    /// curves.csv and choices.csv.
    #[arg(long)]
    pub horizons_only: bool,
    /// The common knobs.
    #[command(flatten)]
    pub study: StudyArgs,
}

impl StudyArgs {
    /// The `--cost-bps` values, each checked, at most `most` of them (`what`
    /// says why a command takes fewer).
    ///
    /// # Errors
    /// A level outside [0, 10000) or too many levels.
    pub fn costs(&self, most: usize, what: &str) -> Result<&[f64], Failure> {
        api::check_costs(&self.cost_bps, most, what)?;
        for (i, &c) in self.cost_bps.iter().enumerate() {
            let key = if self.cost_bps.len() > 1 { format!("--cost-bps value {}", i + 1) } else { "--cost-bps".into() };
            if let Some(w) = scenario::implausible_cost(&format!("option {key}"), c)
                && !self.quiet
            {
                super::warn(&format!("warning: {w}"));
            }
        }
        Ok(&self.cost_bps)
    }

    /// The overrides of the scenario's common knobs.
    pub fn overrides(&self) -> Overrides {
        Overrides {
            assets: self.assets,
            history: self.history,
            horizons: self.horizons,
            paths: self.paths,
            seed: self.seed,
            target_vol: self.target_vol,
            ..Default::default()
        }
    }

    /// The output folder: `--out`, or `lagfold-out/<default>` (with the
    /// shard's number when `--shard` is given).
    pub fn out_dir(&self, default: &str) -> PathBuf {
        self.out.clone().unwrap_or_else(|| {
            let name = match self.shard {
                Some(s) => format!("{default}-shard-{}-of-{}", s.index, s.count),
                None => default.to_string(),
            };
            Path::new("lagfold-out").join(name)
        })
    }

    /// The one cost level, if exactly one is given.
    pub fn one_cost(&self) -> Option<f64> {
        if let [c] = self.cost_bps[..] { Some(c) } else { None }
    }
}

/// Worker threads: `--threads`, or every core.
pub fn threads(a: &StudyArgs) -> usize {
    a.threads.map_or_else(|| std::thread::available_parallelism().map_or(1, |n| n.get()), usize::from)
}

/// Reads a scenario from a file, or from a preset when no such file exists,
/// and warns of implausible values; also its origin for messages.
pub fn read_scenario(path: &Path, ov: &Overrides) -> Result<(Scenario, String), Failure> {
    let (s, origin) = api::load_scenario(path, ov)?;
    warn_implausible(&[&s], &origin);
    Ok((s, origin))
}

/// Prints the implausible values of the scenarios (a sweep's grid points)
/// as warnings on stderr, each once.
pub fn warn_implausible(scenarios: &[&Scenario], origin: &str) {
    let mut said = Vec::new();
    for w in scenarios.iter().flat_map(|s| s.implausible()) {
        if !said.contains(&w) {
            super::warn(&format!("warning: {origin}: {w}"));
            said.push(w);
        }
    }
}

/// `lagfold run`: one scenario, or the grid of a sweep file.
pub fn run(a: &RunArgs) -> Result<(), Failure> {
    let (text, origin, stem) = api::scenario_text(&a.scenario)?;
    // A file that reads as one scenario is one (a seed above 2^63 − 1 would
    // not survive the generic TOML table a sweep is read through).
    let axes = match scenario::parse(&text, &origin) {
        Ok(_) => Vec::new(),
        Err(_) => sweep::axes(&text, &origin).map_err(Failure::input)?,
    };
    if axes.is_empty() {
        let scenario = scenario::load(&text, &origin, &stem, &a.study.overrides()).map_err(Failure::input)?;
        warn_implausible(&[&scenario], &origin);
        if a.horizons_only {
            return horizons_only(scenario, &a.study, &origin);
        }
        return execute(scenario, &a.study, &origin);
    }
    if a.horizons_only {
        return Err(Failure::input("--horizons-only runs one scenario, not a sweep file"));
    }
    let points = sweep::expand(&text, &origin, &stem, &a.study.overrides(), &axes).map_err(Failure::input)?;
    warn_implausible(&points.iter().map(|p| &p.scenario).collect::<Vec<_>>(), &origin);
    run_sweep(points, &a.study, &origin)
}

/// Runs every grid point of a sweep, one progress bar over all the study
/// paths, one long table at the end.
fn run_sweep(points: Vec<sweep::Point>, a: &StudyArgs, origin: &str) -> Result<(), Failure> {
    a.costs(1, "a sweep (put a list of cost_bps under [portfolio] to sweep costs)")?;
    let out_dir = a.out_dir(&format!("{}-sweep", points[0].scenario.name));
    let out = report::OutDir::claim(&out_dir).map_err(Failure::input)?;
    let bars = progress::Bars::new(a.quiet);
    if let Some(shard) = a.shard {
        let part = api::sweep_shard(&points, origin, a.one_cost(), threads(a), shard, &bars)?;
        return super::deliver(&part, out, &out_dir, true, a.quiet);
    }
    let outcome = api::sweep(points, origin, a.one_cost(), threads(a), &bars)?;
    super::deliver(&outcome, out, &out_dir, a.no_charts, a.quiet)
}

/// `lagfold demo`.
pub fn demo(a: &StudyArgs) -> Result<(), Failure> {
    let origin = format!("preset {}", presets::DEFAULT);
    let text = presets::text(presets::DEFAULT).map_err(Failure::other)?;
    let scenario = scenario::load(text, &origin, presets::DEFAULT, &a.overrides()).map_err(Failure::input)?;
    execute(scenario, a, &origin)
}

/// `lagfold run --horizons-only`: the horizon rules alone.
fn horizons_only(scenario: Scenario, a: &StudyArgs, origin: &str) -> Result<(), Failure> {
    if !a.cost_bps.is_empty() || a.target_vol.is_some() {
        return Err(Failure::input(
            "--cost-bps and --target-vol price the books, which --horizons-only skips; drop one or the other",
        ));
    }
    if a.shard.is_some() {
        return Err(Failure::input("--shard splits a whole run; drop --horizons-only, or run it in one piece"));
    }
    let out_dir = a.out_dir(&format!("{}-horizons", scenario.name));
    let out = report::OutDir::claim(&out_dir).map_err(Failure::input)?;
    let outcome = api::study_horizons(&scenario, origin, threads(a), &progress::Bars::new(a.quiet))?;
    super::deliver(&outcome, out, &out_dir, true, a.quiet)
}

fn execute(scenario: Scenario, a: &StudyArgs, origin: &str) -> Result<(), Failure> {
    a.costs(api::MAX_COST_LEVELS, "`run`")?;
    let out_dir = a.out_dir(&scenario.name);
    let out = report::OutDir::claim(&out_dir).map_err(Failure::input)?;
    let options = api::StudyOptions { threads: threads(a), cost_bps: a.cost_bps.clone(), more_history: true };
    let bars = progress::Bars::new(a.quiet);
    if let Some(shard) = a.shard {
        let part = api::study_shard(&scenario, origin, &options, shard, &bars)?;
        return super::deliver(&part, out, &out_dir, true, a.quiet);
    }
    let outcome = api::study(&scenario, origin, &options, &bars)?;
    super::deliver(&outcome, out, &out_dir, a.no_charts, a.quiet)
}
