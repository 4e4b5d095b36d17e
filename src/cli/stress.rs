//! `lagfold stress <scenario>`: what a choice made under the assumed decay
//! curve gives up when another curve is true.

use super::run::{StudyArgs, read_scenario, threads};
use super::{Failure, print, progress};
use crate::report;
use crate::stress;
use std::path::{Path, PathBuf};

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
    let mut scenario = read_scenario(&a.scenario, &a.study.overrides())?;
    if let [c] = a.study.costs(1, "`stress` (one cost for every curve)")? {
        scenario.portfolio.cost_bps = *c;
    }
    let out_dir =
        a.study.out.clone().unwrap_or_else(|| Path::new("lagfold-out").join(format!("{}-stress", scenario.name)));
    let out = report::OutDir::claim(&out_dir).map_err(Failure::input)?;
    let n_curves = 1 + if scenario.replace_default_alternatives { 0 } else { 4 } + scenario.alternatives.len();
    if n_curves == 1 {
        return Err(Failure::input(format!(
            "{}: `stress.replace_defaults = true` with no `[[stress.alternatives]]` leaves nothing to stress the \
             assumed curve against: add at least one alternative or keep the defaults",
            a.scenario.display()
        )));
    }
    let histories = n_curves * scenario.portfolio.reference_paths;
    let asset_dates = histories as f64 * scenario.assets as f64 * scenario.history as f64;
    let what = super::run::histories_words(histories, &scenario);
    progress::warn_long(asset_dates, &what, threads(&a.study), a.study.quiet);
    let bar = progress::bar(n_curves, a.study.quiet, "curves");
    let origin = a.scenario.display().to_string();
    let result = stress::run(&scenario, threads(&a.study), &|d| bar.set_position(d as u64))
        .map_err(|(name, e)| Failure::input(format!("{origin}: curve `{name}`: {e}")))?;
    bar.finish_and_clear();
    super::finite(&result)?;
    let mut files = vec![
        ("stress.json".to_string(), report::stress_json(&scenario, &result)),
        ("stress.csv".into(), report::stress_csv(&result)),
    ];
    let charts = super::charts(a.study.no_charts, || report::stress_charts(&scenario, &result))?;
    files.extend(charts.files);
    let page = report::html::stress_page(&scenario, &result, charts.inline);
    files.push(("report.html".into(), report::html::render(&page, &report::Made::now())));
    out.commit(&files).map_err(Failure::other)?;
    if !a.study.quiet {
        let mut text = report::stress_terminal(&scenario, &result);
        text.push_str(&super::outputs_line(&out_dir, &files));
        print(&text)?;
    }
    Ok(())
}
