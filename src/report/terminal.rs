//! The compact terminal summary: true curve and optimum, each rule's record,
//! and one plain sentence.

use super::charts::plural;
use super::story::{GLOSSARY, Study, plain, ranges, vol_pct};
use super::summary::CAUTION;
use super::text::{pct, pct_se, share_ci};
use crate::portfolio::PortfolioTruth;
use crate::rule::PerRule;
use crate::simulate::Setup;
use crate::study::{HorizonStudy, RuleStats, StudyResult};
use std::fmt::Write;

/// The period's name for a frequency: "month" for 12 a year, and so on.
pub fn period_word(periods_per_year: f64) -> &'static str {
    match periods_per_year {
        p if (p - 1.0).abs() < 0.01 => "year",
        p if (p - 4.0).abs() < 0.01 => "quarter",
        p if (p - 12.0).abs() < 0.01 => "month",
        p if (p - 52.0).abs() < 1.0 => "week",
        p if (240.0..=262.0).contains(&p) => "day",
        _ => "period",
    }
}

/// "monthly", "weekly", "daily", …
fn adjective(unit: &str) -> String {
    match unit {
        "day" => "daily".into(),
        "period" => "per-period".into(),
        u => format!("{u}ly"),
    }
}

/// The marker after a table row: the best choice, or one in the near-best set.
fn mark(best: bool, near: bool) -> &'static str {
    match (best, near) {
        (true, _) => "  ← best",
        (false, true) => "  · near",
        _ => "",
    }
}

/// Rows of the true-curve table: all horizons up to 24, else a selection.
fn shown_horizons(l: usize, best: usize) -> Vec<usize> {
    if l <= 24 {
        return (1..=l).collect();
    }
    let mut v: Vec<usize> = [1, 2, 3, 5, 10, 15, 20, 30, 40, 60, 90, 120, 180, 250]
        .into_iter()
        .chain(best.saturating_sub(2).max(1)..=(best + 2).min(l))
        .chain([l])
        .filter(|&n| n <= l)
        .collect();
    v.sort_unstable();
    v.dedup();
    v
}

fn rule_row(out: &mut String, name: &str, r: &RuleStats) {
    let q = &r.choice_quantiles;
    let _ = writeln!(
        out,
        "  {name:<8}  {:<14} {:<14} {:<14} {:<12} {}",
        share_ci(r.hit_rate, r.hit_rate_ci),
        share_ci(r.near_hit_rate, r.near_hit_rate_ci),
        share_ci(r.near_best_rate, r.near_best_rate_ci),
        pct_se(r.regret_rel_mean, r.regret_rel_mean_se),
        choice_range(q),
    );
}

/// "5–7–14": the 5th, 50th and 95th percentiles of the chosen horizon (whole numbers).
fn choice_range(q: &[f64]) -> String {
    format!("{}–{}–{}", q[0].round() as i64, q[2].round() as i64, q[4].round() as i64)
}

/// The true curves and how each horizon rule picks the horizon: the
/// appendix of a study, and the whole of a study of the horizon rules alone.
fn horizon_tables(out: &mut String, setup: &Setup, rules: &PerRule<RuleStats>, paths: usize, unit: &str) {
    let (s, t) = (&setup.scenario, &setup.truth);
    let _ = writeln!(out, "True curves (expected per-date IC at large breadth; IC zero beyond lag {})", t.truncation);
    let _ =
        writeln!(out, "  {:>7}  {:>10}  {:>10}  {:>10}  {:>10}", "n", "lagged IC", "horizon IC", "pooled", "Σ IC/√n");
    for n in shown_horizons(s.horizons, t.best_horizon) {
        let mark = mark(n == t.best_horizon, t.is_near_best(n));
        let _ = writeln!(
            out,
            "  {n:>7}  {:>10.4}  {:>10.4}  {:>10.4}  {:>10.4}{mark}",
            t.lagged_ic[n - 1],
            t.horizon_ic[n - 1],
            t.horizon_ic_pooled[n - 1],
            t.horizon_ic_simple[n - 1]
        );
    }
    let _ = writeln!(
        out,
        "  True optimal horizon: {} (horizon IC {:.4}); within {} of the peak: {}",
        plural(t.best_horizon, unit),
        t.h(t.best_horizon),
        pct(t.near_best_tolerance),
        ranges(&t.near_best)
    );
    if t.best_horizon_simple != t.best_horizon {
        let _ = writeln!(out, "  (the simple Σ IC/√n form would say {})", plural(t.best_horizon_simple, unit));
    }
    let _ = writeln!(
        out,
        "\nHow each rule picks the horizon ({} simulated histories; shares with their 95% Wilson interval, \
         regret ± one Monte Carlo standard error)",
        paths
    );
    for [a, b, c, d, e, f] in [
        ["rule", "exact hit", "within ±1", "near-best set", "regret", "chosen"],
        ["", "", "", "", "% of best", "5–50–95%"],
    ] {
        let _ = writeln!(out, "  {a:<8}  {b:<14} {c:<14} {d:<14} {e:<12} {f}");
    }
    rule_row(out, "peak", &rules.peak);
    rule_row(out, "formula", &rules.formula);
    rule_row(out, "fitted", &rules.fitted);
    let p = &rules.peak;
    let _ = writeln!(
        out,
        "  Winner's curse: the measured peak overstates the true horizon IC at the chosen horizon by {:.4} on average ({} of the best).",
        p.winners_curse_mean,
        pct(p.winners_curse_mean / t.h(t.best_horizon))
    );
}

/// The terminal summary of a study of the horizon rules alone (no portfolio layer).
pub fn horizons_terminal(setup: &Setup, study: &HorizonStudy) -> String {
    let unit = period_word(setup.scenario.periods_per_year);
    let mut out = format!(
        "lagfold {}: scenario {}, the horizon rules alone ({} assets × {} dates, no portfolio layer)\n\n",
        env!("CARGO_PKG_VERSION"),
        setup.scenario.name,
        setup.scenario.assets,
        setup.scenario.history
    );
    horizon_tables(&mut out, setup, &study.rules, study.paths, unit);
    let _ = writeln!(out, "\n{CAUTION}");
    out
}

/// The holding-period section: both books by holding length, the net
/// optimum against the horizon-IC peak, the net-IR rule and the cost sweep.
fn holding_section(out: &mut String, setup: &Setup, p: &PortfolioTruth, study: &StudyResult, unit: &str) {
    let lin = &p.linear;
    let _ = writeln!(
        out,
        "\nHolding-period book (tranches ∝ forecast, {} bps one-way; truth from {} reference histories)",
        p.cost_bps, p.reference_paths
    );
    let _ = writeln!(
        out,
        "  {:>7}  {:>8}  {:>8}  {:>15}  {:>15}",
        "holding", "gross IR", "turnover", "net IR", "quantile net IR"
    );
    for h in shown_horizons(lin.net_ir.len(), lin.best_holding) {
        let mark = mark(h == lin.best_holding, lin.near_best_holding.contains(&h));
        let _ = writeln!(
            out,
            "  {h:>7}  {:>8.2}  {:>8.3}  {:>8.2} ± {:<4.2}  {:>15.2}{mark}",
            lin.gross_ir[h - 1],
            lin.turnover[h - 1],
            lin.net_ir[h - 1],
            lin.net_ir_se[h - 1],
            p.quantile.net_ir[h - 1]
        );
    }
    let _ = writeln!(
        out,
        "  True best holding: {} (net IR {:.2} a year); within {} of it: {}; not distinguishable from it in the \
         reference simulation: {}. The horizon-IC peak says {}.",
        plural(lin.best_holding, unit),
        lin.net_ir[lin.best_holding - 1],
        pct(setup.scenario.near_best_tolerance),
        ranges(&lin.near_best_holding),
        ranges(&lin.tied_with_best),
        plural(setup.truth.best_horizon, unit)
    );
    let r = &study.rules.net_ir;
    let _ = writeln!(
        out,
        "  Measured net optimum: exact hit {}, within ±1 {}, regret {:.3} ± {:.3} IR ({:.1} ± {:.1} bps a year at {} \
         volatility; ± study and reference errors combined), chosen 5–50–95%: {}",
        share_ci(r.hit_rate, r.hit_rate_ci).trim(),
        share_ci(r.near_hit_rate, r.near_hit_rate_ci).trim(),
        r.regret_mean,
        r.regret_mean_se.unwrap_or(0.0).hypot(r.regret_ref_se.unwrap_or(0.0)),
        r.regret_bps_year_mean.unwrap_or(f64::NAN),
        r.regret_bps_year_total_se().unwrap_or(0.0),
        vol_pct(setup.scenario.portfolio.target_vol),
        choice_range(&r.choice_quantiles)
    );
    if !study.cost_sweep.is_empty() {
        let _ = writeln!(out, "\nNet optimum by cost (truth from the reference; measured over the study's histories)");
        let _ = writeln!(
            out,
            "  {:>5}  {:>5}  {:>6}  {:<14} {:<14} {:>6}  {:>7}\n  {:>5}  {:>5}  {:>6}  {:<14} {:<14} {:>6}  {:>7}",
            "cost",
            "true",
            "true",
            "exact hit",
            "within ±1",
            "median",
            "regret",
            "bps",
            "best",
            "net IR",
            "",
            "",
            "choice",
            "bps/yr"
        );
        for row in &study.cost_sweep {
            let m = &row.measured;
            let _ = writeln!(
                out,
                "  {:>5}  {:>5}  {:>6.2}  {:<14} {:<14} {:>6.0}  {:>7.1}",
                row.cost_bps,
                row.true_best_holding,
                row.true_net_ir,
                share_ci(m.hit_rate, m.hit_rate_ci),
                share_ci(m.near_hit_rate, m.near_hit_rate_ci),
                m.choice_quantiles[2],
                m.regret_bps_year_mean.unwrap_or(f64::NAN)
            );
        }
    }
}

/// The whole terminal summary: the recommendation, key figures, warnings,
/// why the two optima differ and a glossary, then the tables as an appendix.
pub fn terminal_summary(story: &Study) -> String {
    let (setup, portfolio, study) = (story.setup, story.portfolio, story.study);
    let s = &setup.scenario;
    let unit = period_word(s.periods_per_year);
    let mut out = String::new();
    let _ = writeln!(
        out,
        "lagfold · {}{}",
        s.name,
        if s.description.is_empty() { String::new() } else { format!(" — {}", s.description) }
    );
    let _ = writeln!(
        out,
        "  {} assets × {} {} dates ({:.1} years), horizons 1–{}, {} paths, seed {}, {} bps one-way, book at {} \
         annual volatility\n",
        s.assets,
        s.history,
        adjective(unit),
        s.history as f64 / s.periods_per_year,
        s.horizons,
        study.paths,
        s.seed,
        s.portfolio.cost_bps,
        vol_pct(s.portfolio.target_vol)
    );
    let _ = writeln!(out, "Recommendation\n  {}\n", story.recommendation(&plain));
    let _ = writeln!(out, "Key figures");
    for k in story.key_figures(&plain) {
        let _ = writeln!(out, "  - {k}");
    }
    for w in story.warnings() {
        let _ = writeln!(out, "\nWarning: {w}");
    }
    let _ =
        writeln!(out, "\nWhy the horizon-IC peak and the best holding differ\n  {}", story.why_optima_differ(&plain));
    let _ = writeln!(out, "\nGlossary");
    for (term, meaning) in GLOSSARY {
        let _ = writeln!(out, "  - {term}: {meaning}.");
    }
    let _ = writeln!(out, "\n── Appendix: the tables ──\n");
    horizon_tables(&mut out, setup, &study.rules.horizon, study.paths, unit);
    holding_section(&mut out, setup, portfolio, study, unit);
    let _ = writeln!(out, "\n{CAUTION}");
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn period_words_follow_the_frequency() {
        assert_eq!(
            (period_word(12.0), period_word(52.0), period_word(252.0), period_word(7.0)),
            ("month", "week", "day", "period")
        );
    }
}
