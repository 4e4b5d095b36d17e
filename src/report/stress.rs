//! Outputs of `lagfold stress`: `stress.json`, `stress.csv` and the terminal tables.

use super::records::document;
use super::summary::CAUTION;
use super::terminal::period_word;
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

fn matrix(out: &mut String, stress: &StressResult, m: &RegretMatrix, title: &str, unit: &str) {
    let _ = writeln!(out, "\n{title}");
    let names: Vec<&str> = stress.curves.iter().map(|c| c.name.as_str()).collect();
    let width = names.iter().map(|n| n.len()).max().unwrap_or(8).max(8);
    let mut head = format!("  {:<w$}  {:>6}", "chosen under", "choice", w = width + 2);
    for n in &names {
        let _ = write!(head, "  {n:>w$}", w = width);
    }
    let _ = writeln!(out, "{head}");
    for (i, row) in m.regret_rel.iter().enumerate() {
        let mut line = format!("  {:<w$}  {:>6}", names[i], m.chosen[i], w = width + 2);
        for r in row {
            let _ = write!(line, "  {:>w$}", format!("{:.1}%", 100.0 * r), w = width);
        }
        let _ = writeln!(out, "{line}");
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
    let _ = writeln!(out, "lagfold stress · {}", scenario.name);
    let _ = writeln!(
        out,
        "  True curves and their optima (horizon by horizon IC, holding by net IR at {} bps):",
        stress.cost_bps
    );
    for c in &stress.curves {
        let _ = writeln!(
            out,
            "  {:<12}  IC at lags 1/3/6/12: {:>7.4} {:>7.4} {:>7.4} {:>7.4}   best horizon {:>3}, best holding {:>3}",
            c.name,
            c.lagged_ic[0],
            c.lagged_ic.get(2).copied().unwrap_or(f64::NAN),
            c.lagged_ic.get(5).copied().unwrap_or(f64::NAN),
            c.lagged_ic.get(11).copied().unwrap_or(f64::NAN),
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
