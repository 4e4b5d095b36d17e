//! The report of `plan`; figures point into `plan.json`.

use super::study::{ERRORS_NOTE, rule_name, study_methods};
use super::{ErrRow, Fmt, Page, fig, int, share_row};
use crate::plan::{Goal, Metric, PlanResult};
use crate::report::period_word;
use crate::rule::Rule;
use crate::scenario::Scenario;

/// The report page of a plan.
pub fn plan_page(scenario: &Scenario, plan: &PlanResult, goal: &Goal, charts: Vec<(String, String, String)>) -> Page {
    let unit = period_word(scenario.periods_per_year);
    let ppy = scenario.periods_per_year;
    let years = |t: usize| format!("{:.1} years", t as f64 / ppy);
    let last = plan.grid.len() - 1;
    let at = |i: usize| format!("/grid/{i}/rules/{}/{}", goal.rule.name(), goal.metric.field());
    let fmt = Fmt::Pct(1);
    let goal_words = crate::report::advice::goal_words(goal);
    let mut summary = vec![format!(
        "lagfold simulated {} histories on {} assets at each of {} history lengths, from {} to {} {unit}s, to see \
         how much history is needed before the measured best horizon can be trusted.",
        int("/paths", plan.paths),
        int("/scenario/assets", scenario.assets),
        plan.grid.len(),
        int("/grid/0/history", plan.grid[0].history),
        int(&format!("/grid/{last}/history"), plan.grid[last].history),
    )];
    match &plan.answer {
        Some(a) => {
            let i = plan.grid.iter().position(|p| p.history == a.history).unwrap_or(0);
            let (x, _) = goal.metric.of(plan.grid[i].rules.get(goal.rule));
            summary.push(format!(
                "The goal, {goal_words}, is first met at {} {unit}s ({}) of history, where the figure is {}.",
                int("/answer/history", a.history),
                years(a.history),
                fig(&at(i), x, fmt)
            ));
            summary.push(match a.history_high {
                Some(h) => format!(
                    "Allowing for simulation noise (two Monte Carlo standard errors either way) the answer lies \
                     between {} and {} {unit}s.",
                    int("/answer/history_low", a.history_low),
                    int("/answer/history_high", h)
                ),
                None => format!(
                    "Allowing for simulation noise it could be as short as {} {unit}s, but no history on the grid \
                     meets the goal with two standard errors to spare: a longer grid or more paths would settle it.",
                    int("/answer/history_low", a.history_low)
                ),
            });
        }
        None => {
            let (x, _) = goal.metric.of(plan.grid[last].rules.get(goal.rule));
            summary.push(format!(
                "No history on the grid meets the goal, {goal_words}: at the longest, {} {unit}s, the figure is {}.",
                int(&format!("/grid/{last}/history"), plan.grid[last].history),
                fig(&at(last), x, fmt)
            ));
        }
    }
    let peak_last = plan.grid[last].rules.get(crate::rule::Rule::Peak);
    summary.push(format!(
        "Even at the longest history, picking the measured peak gives up on average {} of the best horizon IC.",
        fig(&format!("/grid/{last}/rules/peak/regret_rel_mean"), peak_last.regret_rel_mean, Fmt::Pct(1))
    ));
    let mut errors = Vec::new();
    let metrics = if goal.metric == Metric::Regret { vec![Metric::NearHit] } else { vec![goal.metric] };
    for (i, p) in plan.grid.iter().enumerate() {
        for rule in Rule::EVERY {
            let r = p.rules.get(rule);
            for &m in metrics.iter().chain(&[Metric::Regret]) {
                let (x, se) = m.of(r);
                let base = format!("/grid/{i}/rules/{}/{}", rule.name(), m.field());
                let what = format!("{} {unit}s, {}: {}", p.history, rule_name(rule), m.describe());
                errors.push(match m.ci(r) {
                    Some(ci) => share_row(what, &base, &format!("{base}_ci"), x, ci),
                    None => ErrRow::new(what, fig(&base, x, Fmt::Pct(1)), fig(&format!("{base}_se"), se, Fmt::Pct(2))),
                });
            }
        }
    }
    let mut methods = study_methods();
    methods.push((
        "History grid".into(),
        "Common random numbers: each path is simulated once at the longest history and every shorter history is its \
         first dates, so differences between grid points are not blurred by fresh noise. The answer is the shortest \
         grid history whose estimate meets the goal; the band moves the estimate two standard errors either way."
            .into(),
    ));
    Page {
        title: format!("lagfold plan: {}", scenario.name),
        summary: vec![super::esc(&crate::report::advice::plan_advice(scenario, plan))],
        key_figures: summary,
        glossary: crate::report::story::glossary(),
        charts,
        tables: Vec::new(),
        parameters: serde_json::to_value(scenario).unwrap_or_default(),
        errors,
        errors_note: ERRORS_NOTE.into(),
        methods,
        ..Page::default()
    }
}
