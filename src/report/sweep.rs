//! Outputs of a sweep: `sweep.json`, the long `sweep.csv` (one row per grid
//! point and rule) and the terminal table.

use super::records::{RECORD_HEADER, document, record_cells};
use super::summary::CAUTION;
use super::text::{TABLE_WIDTH, share_ci};
use crate::portfolio::PortfolioTruth;
use crate::rule::Rule;
use crate::scenario::sweep::Point;
use crate::simulate::Setup;
use crate::study::{RulesOut, StudyResult};
use serde::Serialize;
use std::fmt::Write;

/// One grid point's results.
#[derive(Debug, Serialize)]
pub struct SweepPoint {
    /// `key = value` of every swept field.
    pub at: Vec<(String, String)>,
    /// True optimal horizon (1-based).
    pub best_horizon: usize,
    /// Its true horizon IC.
    pub best_horizon_ic: f64,
    /// True best holding length by net IR.
    pub best_holding: usize,
    /// Paths of the study.
    pub paths: usize,
    /// Every rule's record.
    pub rules: RulesOut,
}

impl SweepPoint {
    /// Keeps what the tables need from a grid point's run.
    pub fn new(p: &Point, setup: &Setup, portfolio: &PortfolioTruth, study: StudyResult) -> Self {
        Self {
            at: p.at.clone(),
            best_horizon: setup.truth.best_horizon,
            best_horizon_ic: setup.truth.h(setup.truth.best_horizon),
            best_holding: portfolio.linear.best_holding,
            paths: study.paths,
            rules: study.rules,
        }
    }
}

#[derive(Serialize)]
struct Grid<'a> {
    grid: &'a [SweepPoint],
}

/// `sweep.json`.
pub fn sweep_json(rows: &[SweepPoint]) -> Vec<u8> {
    document::<(), _>(None, &Grid { grid: rows })
}

/// `sweep.csv`: the swept fields, then one row per rule.
pub fn sweep_csv(rows: &[SweepPoint]) -> Vec<u8> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut header: Vec<String> =
        rows.first().map(|r| r.at.iter().map(|(k, _)| k.clone()).collect()).unwrap_or_default();
    header.extend(["true_best_horizon", "true_best_holding"].map(String::from));
    header.extend(RECORD_HEADER.map(String::from));
    w.write_record(&header).expect("in-memory CSV");
    for r in rows {
        for rule in Rule::EVERY {
            let mut row: Vec<String> = r.at.iter().map(|(_, v)| v.clone()).collect();
            row.extend([r.best_horizon.to_string(), r.best_holding.to_string()]);
            row.extend(record_cells(rule, r.rules.get(rule)));
            w.write_record(&row).expect("in-memory CSV");
        }
    }
    w.into_inner().expect("in-memory CSV")
}

/// The terminal table: one line per grid point, or two (the point, then its
/// figures) when the grid values are too long to share a line in 80 columns.
pub fn sweep_terminal(rows: &[SweepPoint]) -> String {
    let mut out = format!("Recommendation\n  {}\n\n", super::advice::sweep_advice(rows));
    out.push_str("lagfold sweep: within ±1 of the best choice (share of histories, 95% Wilson interval)\n");
    let label = |r: &SweepPoint| r.at.iter().map(|(k, v)| format!("{k} = {v}")).collect::<Vec<_>>().join(", ");
    let width = rows.iter().map(|r| label(r).chars().count()).max().unwrap_or(10).max(10);
    let figures = 5 + 2 + 4 * 15;
    let one_line = 2 + width + 2 + figures <= TABLE_WIDTH;
    let lead = if one_line { width + 2 } else { 0 };
    let _ = writeln!(
        out,
        "  {:<lead$}{:>5}  {:<14} {:<14} {:<14} {:<14}",
        if one_line { "grid point" } else { "" },
        "best",
        "peak",
        "formula",
        "fitted",
        "net IR"
    );
    let cell = |r: &SweepPoint, rule| {
        let s = r.rules.get(rule);
        share_ci(s.near_hit_rate, s.near_hit_rate_ci)
    };
    for r in rows {
        if !one_line {
            let _ = writeln!(out, "  {}", label(r));
        }
        let _ = writeln!(
            out,
            "  {:<lead$}{:>5}  {:<14} {:<14} {:<14} {:<14}",
            if one_line { label(r) } else { String::new() },
            r.best_horizon,
            cell(r, Rule::Peak),
            cell(r, Rule::Formula),
            cell(r, Rule::Fitted),
            cell(r, Rule::NetIr)
        );
    }
    let _ = writeln!(out, "\n{CAUTION}");
    out
}
