//! `lagfold stress <scenario>`: what a choice made under the assumed decay
//! curve gives up when another curve is true.

use super::run::{StudyArgs, read_scenario, threads};
use super::{Failure, progress};
use crate::{api, report};
use std::path::PathBuf;

/// Options of `stress`.
#[derive(Debug, clap::Args)]
pub struct StressArgs {
    /// Scenario file (TOML), or the name of a built-in preset.
    pub scenario: PathBuf,
    /// The common knobs (`--assets`, `--history`, `--horizons` shape the truth;
    /// `--cost-bps` sets the cost of the net IR).
    #[command(flatten)]
    pub study: StudyArgs,
}

/// `lagfold stress`.
pub fn run(a: &StressArgs) -> Result<(), Failure> {
    let (scenario, origin) = read_scenario(&a.scenario, &a.study.overrides())?;
    a.study.costs(1, "`stress` (one cost for every curve)")?;
    let out_dir = a.study.out_dir(&format!("{}-stress", scenario.name));
    let out = report::OutDir::claim(&out_dir).map_err(Failure::input)?;
    let options = api::StressOptions { cost_bps: a.study.one_cost(), threads: threads(&a.study) };
    let bars = progress::Bars::new(a.study.quiet);
    if let Some(shard) = a.study.shard {
        let part = api::stress_shard(&scenario, &origin, &options, shard, &bars)?;
        return super::deliver(&part, out, &out_dir, true, a.study.quiet);
    }
    let outcome = api::stress(&scenario, &origin, &options, &bars)?;
    super::deliver(&outcome, out, &out_dir, a.study.no_charts, a.study.quiet)
}
