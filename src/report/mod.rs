//! Stage 5: what users read. Exporters are pure functions from results to
//! bytes; [`OutDir`] puts them in place only once all are written, as a whole folder.

pub(crate) mod advice;
pub(crate) mod charts;
mod compare_out;
mod csv_tables;
mod finite;
pub mod html;
mod measure_out;
mod outdir;
mod own_books_out;
mod panel_csv;
mod plan;
mod provenance;
pub(crate) mod records;
pub(crate) mod story;
mod stress;
mod summary;
mod sweep;
mod terminal;
pub mod text;

pub use charts::{
    ChartSet, measure_charts, plan_charts, regret_bin_names, regret_shares, stress_charts, study_charts, sweep_charts,
};
pub use compare_out::{blend_words, comparison_terminal, signals_csv};
pub use csv_tables::{choices_csv, cost_sweep_csv, curves_csv, holding_csv};
pub use finite::first_non_finite;
pub use measure_out::{
    calendar_units, measure_csv, measure_json, measure_terminal, per_date_csv, ranges as measure_out_ranges,
};
pub use outdir::{MARKER, OutDir};
pub use own_books_out::{holdings_csv, own_books_terminal};
pub use panel_csv::write_panel;
pub use plan::{plan_csv, plan_json, plan_terminal};
pub use provenance::{Made, command_line, utc_date};
pub use story::Study;
pub use stress::{stress_csv, stress_json, stress_terminal};
pub use summary::{CAUTION, HorizonSummary, Summary, horizons_json, summary_json};
pub use sweep::{SweepPoint, sweep_csv, sweep_json, sweep_terminal};
pub use terminal::{horizons_terminal, period_word, terminal_summary};
