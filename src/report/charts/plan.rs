//! The chart of `plan`: each rule's record against history length, with
//! error bars of two Monte Carlo standard errors and the target line.

use super::parts::{rule_colour, rule_title, trim};
use crate::chart::{Chart, Layer, PALETTE, Panel, XyPanel};
use crate::plan::{Goal, Metric, PlanResult};
use crate::report::SweepPoint;
use crate::report::period_word;
use crate::rule::Rule;
use crate::scenario::Scenario;
use crate::study::RulesOut;

/// Error bars span this many Monte Carlo standard errors either side.
pub const BAR_SES: f64 = 2.0;

/// One panel of rule records: `metric` of every rule at each x, with bars of
/// ± [`BAR_SES`] standard errors; the goal's line when it is on this metric.
pub fn record_panel(
    xs: &[f64],
    records: &[&RulesOut],
    x_label: &str,
    categories: Vec<String>,
    metric: Metric,
    goal: Option<&Goal>,
) -> Panel {
    let span = xs.last().copied().unwrap_or(1.0) - xs.first().copied().unwrap_or(0.0);
    let mut layers: Vec<Layer> = Rule::EVERY
        .iter()
        .enumerate()
        .map(|(i, &rule)| {
            let shift = (i as f64 - 1.5) * 0.008 * span.max(1.0);
            let pts: Vec<(f64, f64)> = records.iter().map(|r| metric.of(r.get(rule))).collect();
            Layer::ErrorBars {
                x: xs.iter().map(|x| x + shift).collect(),
                y: pts.iter().map(|p| p.0).collect(),
                lo: pts.iter().map(|p| p.0 - BAR_SES * p.1).collect(),
                hi: pts.iter().map(|p| p.0 + BAR_SES * p.1).collect(),
                colour: rule_colour(rule),
                label: rule_title(rule).into(),
            }
        })
        .collect();
    if let Some(goal) = goal.filter(|g| g.metric == metric) {
        let dir = if goal.at_least { "≥" } else { "≤" };
        layers.push(Layer::HLine {
            y: goal.value,
            colour: PALETTE.vermillion,
            label: format!("target: {} {} {dir} {}%", goal.rule.name(), metric.name(), trim(100.0 * goal.value)),
        });
    }
    Panel::Xy(XyPanel {
        heading: metric.describe().into(),
        x_label: x_label.into(),
        y_label: metric.describe().into(),
        x_categories: categories,
        y_percent: true,
        y_from_zero: metric == Metric::Regret,
        layers,
        ..XyPanel::default()
    })
}

/// The plan's chart: the goal's rate (near-hit when the goal is on regret) and the regret.
pub fn plan_charts(scenario: &Scenario, plan: &PlanResult, goal: &Goal) -> Vec<Chart> {
    let unit = period_word(scenario.periods_per_year);
    let rate = if goal.metric == Metric::Regret { Metric::NearHit } else { goal.metric };
    let xs: Vec<f64> = plan.grid.iter().map(|p| p.history as f64).collect();
    let records: Vec<&RulesOut> = plan.grid.iter().map(|p| &p.rules).collect();
    let x_label = format!("history length ({unit}s)");
    let panel = |metric| record_panel(&xs, &records, &x_label, Vec::new(), metric, Some(goal));
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

/// The sweep's chart: every rule's within-one hit rate and regret at each grid point.
pub fn sweep_charts(points: &[SweepPoint]) -> Vec<Chart> {
    let xs: Vec<f64> = (0..points.len()).map(|i| i as f64).collect();
    let records: Vec<&RulesOut> = points.iter().map(|p| &p.rules).collect();
    // Each point is labelled with its grid values; the axis title names the fields.
    let cats: Vec<String> =
        points.iter().map(|p| p.at.iter().map(|(_, v)| v.as_str()).collect::<Vec<_>>().join(" · ")).collect();
    let fields = points.first().map(|p| p.at.iter().map(|(k, _)| k.as_str()).collect::<Vec<_>>().join(" · "));
    let x_label = format!("grid point: {}", fields.unwrap_or_default());
    let panel = |metric| record_panel(&xs, &records, &x_label, cats.clone(), metric, None);
    vec![Chart {
        name: "sweep".into(),
        title: format!("Each rule's record across the {} grid points", points.len()),
        caption: format!(
            "Compare the points left to right; the bars are ± {BAR_SES} Monte Carlo standard errors, and the table \
             below says what each grid point is."
        ),
        panels: vec![panel(Metric::NearHit), panel(Metric::Regret)],
        panel_height: 440,
    }]
}
