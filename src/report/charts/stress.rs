//! The charts of `stress`: every curve's truth, and the regret matrices as
//! heatmaps with the values printed in the cells.

use super::parts::{one_based, plural};
use crate::chart::{Chart, Colour, HeatPanel, Layer, PALETTE, Panel, XyPanel};
use crate::report::period_word;
use crate::scenario::Scenario;
use crate::stress::{RegretMatrix, StressResult};

/// Colours of the curves, the assumed one black; cycles after six. Vermillion
/// is kept for optima, as on every chart.
fn curve_colour(i: usize) -> Colour {
    let p = &PALETTE;
    [p.black, p.orange, p.green, p.purple, p.sky, p.blue][i % 6]
}

/// Both charts of a stress test.
pub fn stress_charts(scenario: &Scenario, stress: &StressResult) -> Vec<Chart> {
    let unit = period_word(scenario.periods_per_year);
    let heat = |m: &RegretMatrix, what: &str| {
        Panel::Heat(HeatPanel {
            row_title: format!("{what} chosen under"),
            col_title: "curve that is true".into(),
            rows: stress
                .curves
                .iter()
                .zip(&m.chosen)
                .map(|(c, n)| format!("{} ({})", c.name, plural(*n, unit)))
                .collect(),
            cols: stress.curves.iter().map(|c| c.name.clone()).collect(),
            values: m.regret_rel.clone(),
            text: m.regret_rel.iter().map(|row| row.iter().map(|r| format!("{:.1}%", 100.0 * r)).collect()).collect(),
            marked: (0..stress.curves.len()).map(|i| (i, i)).collect(),
        })
    };
    let lines = |values: &dyn Fn(usize) -> Vec<f64>, label: &str| {
        Panel::Xy(XyPanel {
            heading: label.into(),
            x_label: format!("lag or horizon ({unit}s)"),
            y_label: label.into(),
            layers: stress
                .curves
                .iter()
                .enumerate()
                .map(|(i, c)| {
                    let y = values(i);
                    Layer::Line {
                        x: one_based(y.len()),
                        y,
                        colour: curve_colour(i),
                        width: if i == 0 { 3 } else { 2 },
                        dashed: false,
                        markers: i == 0,
                        label: c.name.clone(),
                    }
                })
                .collect(),
            ..XyPanel::default()
        })
    };
    let l = scenario.horizons;
    vec![
        Chart {
            name: "stress_regret".into(),
            title: format!("What a choice gives up when another decay curve is true ({} bps)", stress.cost_bps),
            caption: "Each row is the choice that is best under one curve and each cell the share of the true curve's \
                      best value it gives up; the first row is the cost of trusting the assumed curve."
                .into(),
            panels: vec![heat(&stress.horizon, "horizon"), heat(&stress.holding, "holding length")],
            panel_height: 90 + 46 * stress.curves.len() as u32,
        },
        Chart {
            name: "stress_curves".into(),
            title: "The decay curves compared".into(),
            caption: "The assumed curve (black, with points) against the alternatives: where their horizon-IC peaks \
                      part company, a wrong assumption costs most."
                .into(),
            panels: vec![
                lines(&|i| stress.curves[i].lagged_ic.iter().take(l).copied().collect(), "lagged IC"),
                lines(&|i| stress.curves[i].horizon_ic.clone(), "horizon IC"),
            ],
            panel_height: 400,
        },
    ]
}
