//! The compact terminal summary: true curve and optimum, each rule's record,
//! and one plain sentence.

use super::summary::CAUTION;
use crate::study::{RuleStats, Setup, StudyResult};
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

fn plural(n: usize, word: &str) -> String {
    if n == 1 { format!("1 {word}") } else { format!("{n} {word}s") }
}

/// "6–9" for a contiguous set, "3, 5–7" otherwise.
fn ranges(xs: &[usize]) -> String {
    let mut parts = Vec::new();
    let mut i = 0;
    while i < xs.len() {
        let mut j = i;
        while j + 1 < xs.len() && xs[j + 1] == xs[j] + 1 {
            j += 1;
        }
        parts.push(if i == j { xs[i].to_string() } else { format!("{}–{}", xs[i], xs[j]) });
        i = j + 1;
    }
    parts.join(", ")
}

fn pct(x: f64) -> String {
    format!("{:.1}%", 100.0 * x)
}

fn pct_se(x: f64, se: Option<f64>) -> String {
    match se {
        Some(s) => format!("{:>5.1}% ± {:.1}", 100.0 * x, 100.0 * s),
        None => format!("{:>5.1}%", 100.0 * x),
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
        "  {name:<8} {:>14}  {:>14}  {:>14}  {:>14}   {:>3} – {:>3} – {:>3}",
        pct_se(r.hit_rate, Some(r.hit_rate_se)),
        pct_se(r.near_hit_rate, Some(r.near_hit_rate_se)),
        pct_se(r.near_best_rate, Some(r.near_best_rate_se)),
        pct_se(r.regret_rel_mean, r.regret_rel_mean_se),
        q[0].round() as i64,
        q[2].round() as i64,
        q[4].round() as i64,
    );
}

/// The whole terminal summary.
pub fn terminal_summary(setup: &Setup, study: &StudyResult) -> String {
    let (s, t) = (&setup.scenario, &setup.truth);
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
        "  {} assets × {} {} dates ({:.1} years), horizons 1–{}, {} paths, seed {}\n",
        s.assets,
        s.history,
        adjective(unit),
        s.history as f64 / s.periods_per_year,
        s.horizons,
        study.paths,
        s.seed
    );
    let _ = writeln!(out, "True curves (expected per-date IC at large breadth; IC zero beyond lag {})", t.truncation);
    let _ =
        writeln!(out, "  {:>7}  {:>10}  {:>10}  {:>10}  {:>10}", "n", "lagged IC", "horizon IC", "pooled", "Σ IC/√n");
    for n in shown_horizons(s.horizons, t.best_horizon) {
        let mark = if n == t.best_horizon {
            "  ← best"
        } else if t.is_near_best(n) {
            "  · near"
        } else {
            ""
        };
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
        "\nHow each rule picks the horizon ({} simulated histories; ± one Monte Carlo standard error)",
        study.paths
    );
    let _ = writeln!(
        out,
        "  {:<8} {:>14}  {:>14}  {:>14}  {:>14}   {:>15}",
        "rule", "exact hit", "within ±1", "near-best set", "regret % best", "chosen 5–50–95%"
    );
    rule_row(&mut out, "peak", &study.rules.peak);
    rule_row(&mut out, "formula", &study.rules.formula);
    rule_row(&mut out, "fitted", &study.rules.fitted);
    let p = &study.rules.peak;
    let _ = writeln!(
        out,
        "  Winner's curse: the measured peak overstates the true horizon IC at the chosen horizon by {:.4} on average ({} of the best).",
        p.winners_curse_mean,
        pct(p.winners_curse_mean / t.h(t.best_horizon))
    );
    let _ = writeln!(
        out,
        "\nIn plain words: with {:.0} years of {} history on {} assets, the measured peak lands within one {unit} of the true best horizon ({}) in {} of histories, and on average gives up {} of the best achievable horizon IC.",
        s.history as f64 / s.periods_per_year,
        adjective(unit),
        s.assets,
        plural(t.best_horizon, unit),
        pct(p.near_hit_rate),
        pct(p.regret_rel_mean)
    );
    let _ = writeln!(out, "\n{CAUTION}");
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ranges_compress_runs() {
        assert_eq!(ranges(&[3, 5, 6, 7, 9]), "3, 5–7, 9");
        assert_eq!(ranges(&[4]), "4");
    }

    #[test]
    fn period_words_follow_the_frequency() {
        assert_eq!(
            (period_word(12.0), period_word(52.0), period_word(252.0), period_word(7.0)),
            ("month", "week", "day", "period")
        );
    }
}
