//! The chart of `plan`: each rule's record against history length, with
//! error bars of two Monte Carlo standard errors and the target line.

use super::parts::{rule_colour, rule_title, trim};
use crate::chart::{Chart, Layer, PALETTE, Panel, XyPanel};
use crate::plan::{Goal, Metric, PlanResult};
use crate::report::period_word;
use crate::report::records::RULES;
use crate::scenario::Scenario;

/// Error bars span this many Monte Carlo standard errors either side.
pub const BAR_SES: f64 = 2.0;

/// The plan's chart: the goal's rate (near-hit when the goal is on regret) and the regret.
pub fn plan_charts(scenario: &Scenario, plan: &PlanResult, goal: &Goal) -> Vec<Chart> {
    let unit = period_word(scenario.periods_per_year);
    let rate = if goal.metric == Metric::Regret { Metric::NearHit } else { goal.metric };
    let span = plan.grid.last().map_or(1.0, |p| p.history as f64) - plan.grid.first().map_or(0.0, |p| p.history as f64);
    let panel = |metric: Metric| {
        let mut layers: Vec<Layer> = RULES
            .iter()
            .enumerate()
            .map(|(i, &rule)| {
                let shift = (i as f64 - 1.5) * 0.008 * span.max(1.0);
                let pts: Vec<(f64, f64)> = plan.grid.iter().map(|p| metric.of(p.rules.get(rule))).collect();
                Layer::ErrorBars {
                    x: plan.grid.iter().map(|p| p.history as f64 + shift).collect(),
                    y: pts.iter().map(|p| p.0).collect(),
                    lo: pts.iter().map(|p| p.0 - BAR_SES * p.1).collect(),
                    hi: pts.iter().map(|p| p.0 + BAR_SES * p.1).collect(),
                    colour: rule_colour(rule),
                    label: rule_title(rule).into(),
                }
            })
            .collect();
        if metric == goal.metric {
            let dir = if goal.at_least { "≥" } else { "≤" };
            layers.push(Layer::HLine {
                y: goal.value,
                colour: PALETTE.vermillion,
                label: format!("target: {} {} {dir} {}%", goal.rule.name(), metric.name(), trim(100.0 * goal.value)),
            });
        }
        Panel::Xy(XyPanel {
            heading: metric.describe().into(),
            x_label: format!("history length ({unit}s)"),
            y_label: metric.describe().into(),
            y_percent: true,
            y_from_zero: metric == Metric::Regret,
            layers,
            ..XyPanel::default()
        })
    };
    vec![Chart {
        name: "plan".into(),
        title: format!("How each rule's record improves with history ({} assets)", scenario.assets),
        caption: format!(
            "Read across to where a rule's points clear the dashed target; the bars are ± {BAR_SES} Monte Carlo \
             standard errors over {} paths.",
            plan.paths
        ),
        panels: vec![panel(rate), panel(Metric::Regret)],
        panel_height: 440,
    }]
}
