//! The charts of `measure`: the user's lagged and horizon ICs with error
//! bars and the fitted decay, and the bootstrap distribution of the chosen horizon.

use super::parts::{one_based, rule_colour, rule_title, share_bars};
use crate::chart::{Chart, Layer, PALETTE, Panel, XyPanel};
use crate::measure::rules::Rule;
use crate::report::{Curve, MeasureResult};

/// Error bars span this many standard errors either side.
pub const BAR_SES: f64 = 2.0;

/// Points of a curve that have a standard error, with bars of ± [`BAR_SES`].
fn with_bars(c: &Curve, label: &str) -> Layer {
    let pts: Vec<(f64, f64, f64)> =
        c.mean.iter().zip(&c.se).enumerate().filter_map(|(i, (&m, s))| s.map(|s| ((i + 1) as f64, m, s))).collect();
    Layer::ErrorBars {
        x: pts.iter().map(|p| p.0).collect(),
        y: pts.iter().map(|p| p.1).collect(),
        lo: pts.iter().map(|p| p.1 - BAR_SES * p.2).collect(),
        hi: pts.iter().map(|p| p.1 + BAR_SES * p.2).collect(),
        colour: PALETTE.blue,
        label: label.into(),
    }
}

/// Both charts of a measured panel.
pub fn measure_charts(m: &MeasureResult) -> Vec<Chart> {
    let l = m.lagged_ic.mean.len();
    let zero = Layer::HLine { y: 0.0, colour: PALETTE.grey, label: String::new() };
    let lagged = Panel::Xy(XyPanel {
        heading: "lagged IC".into(),
        x_label: "lag (periods)".into(),
        y_label: "mean lagged IC".into(),
        layers: vec![
            zero.clone(),
            with_bars(&m.lagged_ic, &format!("measured ± {BAR_SES} s.e.")),
            Layer::Line {
                x: one_based(m.fitted_curve.len().min(l)),
                y: m.fitted_curve.iter().take(l).copied().collect(),
                colour: PALETTE.green,
                width: 3,
                dashed: true,
                markers: false,
                label: format!("fitted {} decay", m.fitted_family),
            },
        ],
        ..XyPanel::default()
    });
    let b = &m.best_horizon;
    let horizon = Panel::Xy(XyPanel {
        heading: "horizon IC".into(),
        x_label: "horizon (periods)".into(),
        y_label: "mean horizon IC".into(),
        layers: vec![
            zero,
            with_bars(&m.horizon_ic, &format!("measured ± {BAR_SES} s.e.")),
            Layer::VLine { x: b.peak as f64, colour: PALETTE.vermillion, label: format!("measured peak ({})", b.peak) },
        ],
        ..XyPanel::default()
    });
    let bs = &m.bootstrap;
    let boot_panel = |rule: Rule, counts: &[u64], chosen: usize, i: usize| {
        Panel::Xy(XyPanel {
            heading: format!(
                "{}: {} in {:.0}% of resamples, 90% within {}–{}",
                rule_title(rule),
                chosen,
                100.0 * bs.share_at_estimate[i],
                bs.range_90[i][0],
                bs.range_90[i][1]
            ),
            x_label: "chosen horizon (periods)".into(),
            y_label: "share of resamples".into(),
            y_percent: true,
            y_from_zero: true,
            layers: vec![
                share_bars(counts, rule_colour(rule), "chosen in resample"),
                Layer::VLine {
                    x: chosen as f64,
                    colour: PALETTE.vermillion,
                    label: format!("chosen on the full data ({chosen})"),
                },
            ],
            ..XyPanel::default()
        })
    };
    vec![
        Chart {
            name: "measured_ic".into(),
            title: format!("Your signal's measured decay ({} dates × {} assets)", m.dates_used, m.assets),
            caption: format!(
                "Points are the measured means with ± {BAR_SES} standard-error bars (Newey–West, overlap-aware); where \
                 the bars around the peak overlap, the data cannot tell those horizons apart."
            ),
            panels: vec![lagged, horizon],
            panel_height: 420,
        },
        Chart {
            name: "bootstrap".into(),
            title: format!("Chosen horizon over {} stationary-bootstrap resamples of the dates", bs.replicates),
            caption: "How the chosen horizon moves when the dates are resampled: a tall single bar means a stable \
                      choice, a wide spread means the peak is mostly noise."
                .into(),
            panels: vec![
                boot_panel(Rule::Peak, &bs.choice_counts.peak, b.peak, 0),
                boot_panel(Rule::Formula, &bs.choice_counts.formula, b.formula, 1),
                boot_panel(Rule::Fitted, &bs.choice_counts.fitted, b.fitted, 2),
            ],
            panel_height: 260,
        },
    ]
}
