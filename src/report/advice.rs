//! The one sentence a committee can act on, for the commands other than the
//! study (whose story is in `story.rs`): `plan`, `stress`, `measure` and a
//! sweep. The terminal prints it first under "Recommendation"; the report
//! makes it the lead paragraph.

use super::sweep::SweepPoint;
use super::terminal::period_word;
use crate::own_data::MeasureResult;
use crate::plan::{Goal, PlanResult};
use crate::rule::Rule;
use crate::scenario::Scenario;
use crate::stress::StressResult;

/// A goal in words: "the within-one-period hit rate of the peak rule at least 80%".
pub fn goal_words(goal: &Goal) -> String {
    format!(
        "the {} of the {} rule {} {}%",
        goal.metric.describe(),
        super::html::rule_name(goal.rule),
        if goal.at_least { "at least" } else { "at most" },
        super::charts::trim(100.0 * goal.value)
    )
}

/// `plan`: the history to use, or that none on the grid is enough.
pub fn plan_advice(scenario: &Scenario, plan: &PlanResult) -> String {
    let unit = period_word(scenario.periods_per_year);
    let years = |t: usize| t as f64 / scenario.periods_per_year;
    let goal = Goal::parse(&plan.target).map(|g| goal_words(&g)).unwrap_or_else(|_| plan.target.clone());
    match &plan.answer {
        Some(a) => format!(
            "Use at least {} {unit}s ({:.1} years) of history for {goal}: the shortest history on this grid that \
             meets it{}.",
            a.history,
            years(a.history),
            match a.history_high {
                Some(h) if h == a.history && a.history_low == a.history => String::new(),
                Some(h) =>
                    format!(" (allowing two Monte Carlo standard errors, somewhere from {} to {h})", a.history_low),
                None =>
                    format!(" (allowing two Monte Carlo standard errors, from {} to beyond the grid)", a.history_low),
            }
        ),
        None => format!(
            "No history up to {} {unit}s ({:.1} years) meets {goal}: the measured best horizon cannot be trusted to \
             that standard without more history or breadth.",
            plan.grid.last().map_or(0, |p| p.history),
            years(plan.grid.last().map_or(0, |p| p.history))
        ),
    }
}

/// `stress`: the choices whose worst case is smallest when the curve is uncertain.
pub fn stress_advice(scenario: &Scenario, stress: &StressResult) -> String {
    let unit = period_word(scenario.periods_per_year);
    let (h, k) = (&stress.horizon, &stress.holding);
    format!(
        "If the decay curve is uncertain among these {} curves, hold {} {unit}s and judge the signal at a horizon of \
         {} {unit}s: whichever curve is true, those choices give up at most {:.1}% of the best net IR and {:.1}% of \
         the best horizon IC (the assumed curve alone would pick {} and {}).",
        stress.curves.len(),
        k.minimax,
        h.minimax,
        100.0 * k.minimax_worst_rel,
        100.0 * h.minimax_worst_rel,
        k.chosen[0],
        h.chosen[0]
    )
}

/// `measure`: the range of horizons the data cannot rank, from the bootstrap.
pub fn measure_advice(m: &MeasureResult, unit: &str) -> Option<String> {
    let [lo, hi] = m.bootstrap.range_90.peak?;
    let peak = m.best_horizon.peak?;
    Some(if lo == hi {
        format!(
            "Your data point clearly to a horizon of {peak} {unit}: 90% of bootstrap resamples of the dates pick it \
             too, so the measured peak can be acted on (subject to the caution below)."
        )
    } else {
        format!(
            "Treat horizons from {lo} to {hi} {unit} as equally good: 90% of bootstrap resamples of your dates put \
             the peak there, so the data cannot rank horizons inside that range (the measured peak is {peak})."
        )
    })
}

/// `measure`: a measured peak at the longest horizon measured may lie beyond it.
pub fn measure_edge(m: &MeasureResult) -> Option<String> {
    (m.best_horizon.peak? == m.horizons).then(|| {
        format!(
            "the measured horizon IC peaks at the longest horizon measured ({}): the best horizon may lie beyond \
             it; rerun with a longer --horizons (at most a quarter of the dates)",
            m.horizons
        )
    })
}

/// A sweep: which grid points let the peak rule be trusted (within ±1 in at least 80 % of histories).
pub fn sweep_advice(rows: &[SweepPoint]) -> String {
    let label = |r: &SweepPoint| r.at.iter().map(|(k, v)| format!("{k} = {v}")).collect::<Vec<_>>().join(", ");
    let good: Vec<String> = rows.iter().filter(|r| r.rules.get(Rule::Peak).near_hit_rate >= 0.8).map(label).collect();
    match good.len() {
        0 => "At none of these settings does the measured horizon-IC peak land within one period of the true best \
              in 80% of histories: none gives a best horizon that can be trusted to that standard."
            .into(),
        n if n == rows.len() => "At every one of these settings the measured horizon-IC peak lands within one period \
                                 of the true best in at least 80% of histories."
            .into(),
        _ => format!(
            "Only at {} does the measured horizon-IC peak land within one period of the true best in at least 80% \
             of histories; elsewhere on this grid the measured best horizon is too noisy to act on alone.",
            good.join("; ")
        ),
    }
}
