//! `lagfold panel <scenario>`: one simulated history written as a long CSV in
//! the input format, for demos and for testing a pipeline.

use super::run::read_scenario;
use super::{Failure, print};
use crate::calendar;
use crate::generate::Workspace;
use crate::report::write_panel;
use crate::rng::path_rng;
use crate::scenario::Overrides;
use crate::study::Setup;
use std::path::{Path, PathBuf};

/// Options of `panel`.
#[derive(Debug, clap::Args)]
pub struct PanelArgs {
    /// Scenario file (TOML), or the name of a built-in preset.
    pub scenario: PathBuf,
    /// Output file (default: lagfold-out/<scenario name>-panel.csv).
    #[arg(long)]
    pub out: Option<PathBuf>,
    /// Breadth N.
    #[arg(long)]
    pub assets: Option<usize>,
    /// Dates in the history.
    #[arg(long)]
    pub history: Option<usize>,
    /// Master seed.
    #[arg(long)]
    pub seed: Option<u64>,
    /// Which simulated history of the study to write (its path index).
    #[arg(long, default_value_t = 0)]
    pub path: u64,
    /// Print nothing.
    #[arg(long, short)]
    pub quiet: bool,
}

/// `lagfold panel`.
pub fn run(a: &PanelArgs) -> Result<(), Failure> {
    let ov = Overrides { assets: a.assets, history: a.history, seed: a.seed, ..Overrides::default() };
    let scenario = read_scenario(&a.scenario, &ov)?;
    let out = a.out.clone().unwrap_or_else(|| Path::new("lagfold-out").join(format!("{}-panel.csv", scenario.name)));
    let origin = a.scenario.display().to_string();
    let setup = Setup::new(scenario).map_err(|e| Failure::input(format!("{origin}: {e}")))?;
    let s = &setup.scenario;
    let mut ws = Workspace::default();
    setup.generator.simulate(&mut path_rng(s.seed, a.path), &mut ws);
    let dates = calendar::dates(s.history, s.periods_per_year);
    let dir = out.parent().filter(|p| !p.as_os_str().is_empty()).unwrap_or(Path::new("."));
    std::fs::create_dir_all(dir).map_err(|e| Failure::other(format!("{}: {e}", dir.display())))?;
    let name = out.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_else(|| "panel.csv".into());
    let tmp = dir.join(format!(".{name}.tmp-{}", std::process::id()));
    let file = std::fs::File::create(&tmp).map_err(|e| Failure::other(format!("{}: {e}", tmp.display())))?;
    write_panel(&ws.panel, &dates, s.residual_vol, std::io::BufWriter::new(file))
        .map_err(|e| Failure::other(format!("{}: {e}", tmp.display())))?;
    std::fs::rename(&tmp, &out).map_err(|e| Failure::other(format!("{}: {e}", out.display())))?;
    if !a.quiet {
        print(&format!(
            "Wrote {} ({} dates × {} assets, history {} of seed {}): date, asset, forecast, forward return over the period starting at the date.\n",
            out.display(),
            s.history,
            s.assets,
            a.path,
            s.seed
        ))?;
    }
    Ok(())
}
