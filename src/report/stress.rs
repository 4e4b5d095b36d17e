//! Outputs of `lagfold stress`: `stress.json`, `stress.csv` and the terminal tables.

use super::records::document;
use super::summary::CAUTION;
use super::terminal::period_word;
use super::text::{TABLE_WIDTH, fixed, pct};
use crate::scenario::Scenario;
use crate::stress::{RegretMatrix, StressResult};
use std::fmt::Write;

/// `stress.json`.
pub fn stress_json(scenario: &Scenario, stress: &StressResult) -> Vec<u8> {
    document(Some(scenario), stress)
}

/// `stress.csv`: one row per (what, chosen under, true curve).
pub fn stress_csv(stress: &StressResult) -> Vec<u8> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record(["what", "chosen_under", "choice", "true_curve", "true_best", "regret", "regret_rel"])
        .expect("in-memory CSV");
    for m in [&stress.horizon, &stress.holding] {
        for (i, row) in m.regret.iter().enumerate() {
            for (j, r) in row.iter().enumerate() {
                w.write_record([
                    m.what.clone(),
                    stress.curves[i].name.clone(),
                    m.chosen[i].to_string(),
                    stress.curves[j].name.clone(),
                    m.chosen[j].to_string(),
                    format!("{r:.8}"),
                    format!("{:.6}", m.regret_rel[i][j]),
                ])
                .expect("in-memory CSV");
            }
        }
    }
    w.into_inner().expect("in-memory CSV")
}

/// Columns of the regret matrix that fit in [`TABLE_WIDTH`] beside the row names.
fn column_blocks(n: usize, name_width: usize, cell: usize) -> Vec<std::ops::Range<usize>> {
    let room = TABLE_WIDTH.saturating_sub(2 + name_width + 2 + 6);
    let per = (room / (cell + 2)).max(1);
    (0..n).step_by(per).map(|i| i..(i + per).min(n)).collect()
}

fn matrix(out: &mut String, stress: &StressResult, m: &RegretMatrix, title: &str, unit: &str) {
    let _ = writeln!(out, "\n{title}");
    let names: Vec<&str> = stress.curves.iter().map(|c| c.name.as_str()).collect();
    let width = names.iter().map(|n| n.chars().count()).max().unwrap_or(8).max(8);
    let first = width.max("chosen under".len());
    // Many alternatives: the true-curve columns come in blocks that fit.
    for cols in column_blocks(names.len(), first, width) {
        let mut head = format!("  {:<first$}  {:>6}", "chosen under", "choice");
        for n in &names[cols.clone()] {
            let _ = write!(head, "  {n:>width$}");
        }
        let _ = writeln!(out, "{head}");
        for (i, row) in m.regret_rel.iter().enumerate() {
            let mut line = format!("  {:<first$}  {:>6}", names[i], m.chosen[i]);
            for r in &row[cols.clone()] {
                let _ = write!(line, "  {:>width$}", pct(*r));
            }
            let _ = writeln!(out, "{line}");
        }
        if cols.end < names.len() {
            out.push('\n');
        }
    }
    let assumed_worst = m.regret_rel[0].iter().copied().fold(0.0, f64::max);
    let _ = writeln!(
        out,
        "  Choosing {} {unit}s as assumed gives up at most {:.1}%; the choice with the smallest worst case is {} {unit}s (at most {:.1}%).",
        m.chosen[0],
        100.0 * assumed_worst,
        m.minimax,
        100.0 * m.minimax_worst_rel
    );
}

/// The terminal tables.
pub fn stress_terminal(scenario: &Scenario, stress: &StressResult) -> String {
    let unit = period_word(scenario.periods_per_year);
    let mut out = String::new();
    let _ = writeln!(out, "lagfold stress · {}\n", scenario.name);
    let _ = writeln!(out, "Recommendation\n  {}\n", super::advice::stress_advice(scenario, stress));
    let _ = writeln!(
        out,
        "  True curves and their optima (horizon by horizon IC, holding by net IR at {} bps)",
        stress.cost_bps
    );
    let width = stress.curves.iter().map(|c| c.name.chars().count()).max().unwrap_or(8).max(8);
    let _ = writeln!(
        out,
        "  {:<width$}  {:>7} {:>7} {:>7} {:>7}  {:>7}  {:>7}\n  {:<width$}  {:>7} {:>7} {:>7} {:>7}  {:>7}  {:>7}",
        "curve", "IC at 1", "3", "6", "12", "best", "best", "", "", "", "", "", "horizon", "holding"
    );
    for c in &stress.curves {
        let ic = |i: usize| c.lagged_ic.get(i).map_or_else(|| "–".to_string(), |&v| fixed(v, 4));
        let _ = writeln!(
            out,
            "  {:<width$}  {:>7} {:>7} {:>7} {:>7}  {:>7}  {:>7}",
            c.name,
            ic(0),
            ic(2),
            ic(5),
            ic(11),
            c.best_horizon,
            c.best_holding
        );
    }
    matrix(
        &mut out,
        stress,
        &stress.horizon,
        "Horizon: share of the true best horizon IC given up (rows: chosen under; columns: true curve)",
        unit,
    );
    matrix(&mut out, stress, &stress.holding, "Holding: share of the true best net IR given up", unit);
    let _ = writeln!(out, "\n{CAUTION}");
    out
}
