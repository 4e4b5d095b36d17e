//! Outputs of `lagfold plan`: `plan.json`, `plan.csv` and the terminal table.

use super::records::{RECORD_HEADER, document, record_cells};
use super::summary::CAUTION;
use super::terminal::period_word;
use super::text::{pct, share_ci};
use crate::plan::PlanResult;
use crate::rule::Rule;
use crate::scenario::Scenario;
use crate::study::RuleStats;
use std::fmt::Write;

/// `plan.json`: the scenario (at the longest history), the grid and the answer.
pub fn plan_json(scenario: &Scenario, plan: &PlanResult) -> Vec<u8> {
    document(Some(scenario), plan)
}

/// `plan.csv`: one row per grid point and rule.
pub fn plan_csv(plan: &PlanResult) -> Vec<u8> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let header = ["history", "assets"].into_iter().chain(RECORD_HEADER);
    w.write_record(header).expect("in-memory CSV");
    for p in &plan.grid {
        for r in Rule::EVERY {
            let lead = [p.history.to_string(), p.assets.to_string()];
            w.write_record(lead.into_iter().chain(record_cells(r, p.rules.get(r)))).expect("in-memory CSV");
        }
    }
    w.into_inner().expect("in-memory CSV")
}

/// The terminal table and the answer in words.
pub fn plan_terminal(scenario: &Scenario, plan: &PlanResult) -> String {
    let unit = period_word(scenario.periods_per_year);
    let years = |t: usize| t as f64 / scenario.periods_per_year;
    let mut out = String::new();
    let _ = writeln!(out, "lagfold plan · {}", scenario.name);
    let _ = writeln!(
        out,
        "  {} assets; {} paths at every history (the same paths cut shorter); seed {}\n",
        scenario.assets, plan.paths, plan.seed
    );
    let _ = writeln!(out, "Recommendation\n  {}\n", super::advice::plan_advice(scenario, plan));
    let _ = writeln!(
        out,
        "Within ±1 of the best choice (share of histories, 95% Wilson interval), and the peak rule's regret"
    );
    let _ = writeln!(
        out,
        "  {:>11} {:<14} {:<14} {:<14} {:<14} {:>6}\n  {:>11} {:<14} {:<14} {:<14} {:<14} {:>6}",
        "history",
        "peak",
        "formula",
        "fitted",
        "net IR",
        "peak",
        format!("({unit}s)"),
        "",
        "",
        "",
        "",
        "regret"
    );
    let cell = |s: &RuleStats| share_ci(s.near_hit_rate, s.near_hit_rate_ci);
    for p in &plan.grid {
        let _ = writeln!(
            out,
            "  {:>11} {:<14} {:<14} {:<14} {:<14} {:>6}",
            format!("{} ({:.1}y)", p.history, years(p.history)),
            cell(&p.rules.horizon.peak),
            cell(&p.rules.horizon.formula),
            cell(&p.rules.horizon.fitted),
            cell(&p.rules.net_ir),
            pct(p.rules.horizon.peak.regret_rel_mean)
        );
    }
    match &plan.answer {
        Some(a) => {
            let high = a.history_high.map_or("beyond the grid".to_string(), |h| format!("{h}"));
            let _ = writeln!(
                out,
                "\nTarget {}: met from {} {unit}s ({:.1} years) on this grid; allowing two Monte Carlo standard errors either way, from {} to {}.",
                plan.target,
                a.history,
                years(a.history),
                a.history_low,
                high
            );
        }
        None => {
            let _ = writeln!(
                out,
                "\nTarget {}: no history on the grid meets it; try longer histories (--histories) or more breadth.",
                plan.target
            );
        }
    }
    let _ = writeln!(out, "\n{CAUTION}");
    out
}
