//! Stage 5: what users read. Exporters are pure functions from results to
//! bytes; [`write_atomically`] puts them in place only once all are written.

pub(crate) mod charts;
mod compare_out;
mod csv_tables;
pub mod html;
mod measure_out;
mod own_books_out;
mod panel_csv;
mod plan;
pub(crate) mod records;
mod stress;
mod summary;
mod sweep;
mod terminal;

pub use charts::{
    ChartSet, measure_charts, plan_charts, regret_bin_names, regret_shares, stress_charts, study_charts, sweep_charts,
};
pub use compare_out::{
    BlendWeight, SignalComparison, SignalSummary, comparison_terminal, paired_correlation, signals_csv,
};
pub use csv_tables::{choices_csv, cost_sweep_csv, curves_csv, holding_csv};
pub use measure_out::{
    BestHorizon, BootCounts, Bootstrap, CalibratedNet, CalibratedStudy, Curve, MeasureResult, PerDateTable,
    SkippedDate, SuccessRatio, TimingCheck, finite, measure_csv, measure_json, measure_terminal, per_date_csv,
    ranges as measure_out_ranges,
};
pub use own_books_out::{OWN_BOOKS_METHOD, OwnBooks, OwnNet, holdings_csv, own_books_terminal};
pub use panel_csv::write_panel;
pub use plan::{plan_csv, plan_json, plan_terminal};
pub use stress::{stress_csv, stress_json, stress_terminal};
pub use summary::{CAUTION, Summary, summary_json};
pub use sweep::{SweepPoint, sweep_csv, sweep_json, sweep_terminal};
pub use terminal::{period_word, terminal_summary};

use std::io::Write;
use std::path::Path;

/// Writes every `(file name, bytes)` into `dir` under temporary names, then
/// renames them into place, so a failure never leaves half-written outputs
/// over what the user already had.
///
/// # Errors
/// Any I/O error, naming the file.
pub fn write_atomically<N: AsRef<str>>(dir: &Path, files: &[(N, Vec<u8>)]) -> std::io::Result<()> {
    let named = |e: std::io::Error, p: &Path| std::io::Error::new(e.kind(), format!("{}: {e}", p.display()));
    std::fs::create_dir_all(dir).map_err(|e| named(e, dir))?;
    let mut staged = Vec::with_capacity(files.len());
    for (name, bytes) in files {
        let name = name.as_ref();
        let tmp = dir.join(format!(".{name}.tmp-{}", std::process::id()));
        let mut f = std::fs::File::create(&tmp).map_err(|e| named(e, &tmp))?;
        f.write_all(bytes).and_then(|()| f.sync_all()).map_err(|e| named(e, &tmp))?;
        staged.push((tmp, dir.join(name)));
    }
    for (tmp, fin) in staged {
        std::fs::rename(&tmp, &fin).map_err(|e| named(e, &fin))?;
    }
    Ok(())
}
