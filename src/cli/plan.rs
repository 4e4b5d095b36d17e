//! `lagfold plan <scenario>`: the record of every rule over a grid of history
//! lengths, and the smallest history that meets a target.

use super::run::{StudyArgs, read_scenario, threads};
use super::{Failure, print, progress};
use crate::plan::{self, Goal};
use crate::portfolio::PortfolioTruth;
use crate::report;
use crate::scenario::{HISTORY_NOTE, MAX_ASSET_DATES, MIN_HISTORY_WORDS, min_history};
use crate::study::Setup;
use std::path::{Path, PathBuf};

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
    #[arg(long, default_value = "near-hit>=0.8", value_parser = Goal::parse)]
    pub target: Goal,
    /// The common knobs.
    #[command(flatten)]
    pub study: StudyArgs,
}

/// Most history lengths in one plan.
pub const MAX_HISTORIES: usize = 40;

/// The grid: given lengths, or multiples of the scenario's history.
fn grid(a: &PlanArgs, history: usize, horizons: usize) -> Result<Vec<usize>, Failure> {
    let mut g: Vec<usize> = if a.histories.is_empty() {
        [0.5, 0.75, 1.0, 1.5, 2.0, 3.0].iter().map(|m| ((history as f64) * m).round() as usize).collect()
    } else {
        a.histories.clone()
    };
    if a.histories.is_empty() {
        g.retain(|&t| t >= min_history(horizons));
    }
    g.sort_unstable();
    g.dedup();
    if let Some(&bad) = g.iter().find(|&&t| t < min_history(horizons)) {
        return Err(Failure::input(format!(
            "`--histories` value {bad} must be at least {MIN_HISTORY_WORDS} = {} ({HISTORY_NOTE})",
            min_history(horizons)
        )));
    }
    Ok(g)
}

/// `lagfold plan`.
pub fn run(a: &PlanArgs) -> Result<(), Failure> {
    let mut scenario = read_scenario(&a.scenario, &a.study.overrides())?;
    if let [c] = a.study.costs(1, "`plan` (one cost for the net-IR rule)")? {
        scenario.portfolio.cost_bps = *c;
    }
    if a.histories.len() > MAX_HISTORIES {
        return Err(Failure::input(format!(
            "option --histories: {} lengths given; at most {MAX_HISTORIES} (each is a study of its own)",
            a.histories.len()
        )));
    }
    let histories = grid(a, scenario.history, scenario.horizons)?;
    let longest = *histories.last().ok_or_else(|| Failure::input("`--histories` is empty"))?;
    if scenario.assets.saturating_mul(longest) > MAX_ASSET_DATES {
        return Err(Failure::input(format!(
            "`--histories` value {longest} must keep assets × history ≤ {MAX_ASSET_DATES} (assets is {})",
            scenario.assets
        )));
    }
    scenario.history = longest;
    let out_dir =
        a.study.out.clone().unwrap_or_else(|| Path::new("lagfold-out").join(format!("{}-plan", scenario.name)));
    let out = report::OutDir::claim(&out_dir).map_err(Failure::input)?;
    let origin = a.scenario.display().to_string();
    let setup = Setup::new(scenario).map_err(|e| Failure::input(format!("{origin}: {e}")))?;
    let threads = threads(&a.study);
    let s = &setup.scenario;
    let what = super::run::histories_words(s.paths + s.portfolio.reference_paths, s);
    progress::warn_long(super::run::study_asset_dates(s), &what, threads, a.study.quiet);
    let bar = progress::bar(s.portfolio.reference_paths, a.study.quiet, "reference");
    let portfolio = PortfolioTruth::compute(&setup, threads, &|d| bar.set_position(d as u64));
    bar.finish_and_clear();
    let bar = progress::bar(s.paths, a.study.quiet, "plan");
    let result = plan::run(&setup, &portfolio, &histories, a.target, threads, &|d| bar.set_position(d as u64));
    bar.finish_and_clear();
    super::finite(&result)?;
    let mut files =
        vec![("plan.json".to_string(), report::plan_json(s, &result)), ("plan.csv".into(), report::plan_csv(&result))];
    let charts = super::charts(a.study.no_charts, || report::plan_charts(s, &result, &a.target))?;
    files.extend(charts.files);
    files.push((
        "report.html".into(),
        report::html::render(&report::html::plan_page(s, &result, &a.target, charts.inline), &report::Made::now()),
    ));
    out.commit(&files).map_err(Failure::other)?;
    if !a.study.quiet {
        let mut text = report::plan_terminal(s, &result);
        text.push_str(&super::outputs_line(&out_dir, &files));
        print(&text)?;
    }
    Ok(())
}
