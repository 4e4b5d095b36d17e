//! `lagfold plan <scenario>`: the record of every rule over a grid of history
//! lengths, and the smallest history that meets a target.

use super::run::{StudyArgs, read_scenario, threads};
use super::{Failure, progress};
use crate::{api, report};
use std::path::PathBuf;

/// Options of `plan`.
#[derive(Debug, clap::Args)]
pub struct PlanArgs {
    /// Scenario file (TOML), or the name of a built-in preset.
    pub scenario: PathBuf,
    /// History lengths to compare, comma-separated (default: 0.5, 0.75, 1,
    /// 1.5, 2 and 3 times the scenario's history).
    #[arg(long, value_delimiter = ',', num_args = 1..)]
    pub histories: Vec<usize>,
    /// What must hold: `[rule:]metric>=value` or `<=value`; rules peak,
    /// formula, fitted, net_ir; metrics hit, near-hit, near-best, regret.
    #[arg(long, default_value = "near-hit>=0.8", value_parser = api::Goal::parse)]
    pub target: api::Goal,
    /// The common knobs.
    #[command(flatten)]
    pub study: StudyArgs,
}

/// `lagfold plan`.
pub fn run(a: &PlanArgs) -> Result<(), Failure> {
    let (scenario, origin) = read_scenario(&a.scenario, &a.study.overrides())?;
    a.study.costs(1, "`plan` (one cost for the net-IR rule)")?;
    let out_dir = a.study.out_dir(&format!("{}-plan", scenario.name));
    let out = report::OutDir::claim(&out_dir).map_err(Failure::input)?;
    let options = api::PlanOptions {
        histories: a.histories.clone(),
        goal: a.target,
        cost_bps: a.study.one_cost(),
        threads: threads(&a.study),
    };
    let bars = progress::Bars::new(a.study.quiet);
    if let Some(shard) = a.study.shard {
        let part = api::plan_shard(&scenario, &origin, &options, shard, &bars)?;
        return super::deliver(&part, out, &out_dir, true, a.study.quiet);
    }
    let outcome = api::plan(&scenario, &origin, &options, &bars)?;
    super::deliver(&outcome, out, &out_dir, a.study.no_charts, a.study.quiet)
}
