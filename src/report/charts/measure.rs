//! The charts of `measure`: the user's lagged and horizon ICs with error
//! bars and the fitted decay, and the bootstrap distribution of the chosen horizon.

use super::parts::{one_based, rule_colour, rule_title, share_bars};
use crate::chart::{Chart, Layer, PALETTE, Panel, XyPanel};
use crate::own_data::{Curve, MeasureResult};
use crate::rule::Rule;

/// Points of a curve that have a 95 % interval, with the interval as bars.
fn with_bars(c: &Curve, label: &str) -> Layer {
    let pts: Vec<(f64, f64, f64, f64)> =
        (0..c.mean.len()).filter_map(|i| Some(((i + 1) as f64, c.mean[i]?, c.ci_low[i]?, c.ci_high[i]?))).collect();
    Layer::ErrorBars {
        x: pts.iter().map(|p| p.0).collect(),
        y: pts.iter().map(|p| p.1).collect(),
        lo: pts.iter().map(|p| p.2).collect(),
        hi: pts.iter().map(|p| p.3).collect(),
        colour: PALETTE.blue,
        label: label.into(),
    }
}

/// Both charts of a measured panel.
/// The assets measured per date, in words: "270 to 290 assets per date (median 281)"
/// (no dash: the PNG's title chunk is Latin-1).
fn breadth(used: &[usize]) -> String {
    let mut v: Vec<usize> = used.iter().copied().filter(|&n| n > 0).collect();
    v.sort_unstable();
    match (v.first(), v.last()) {
        (Some(lo), Some(hi)) if lo == hi => format!("{lo} assets per date"),
        (Some(lo), Some(hi)) => format!("{lo} to {hi} assets per date (median {})", v[v.len() / 2]),
        _ => "no assets measured".into(),
    }
}

pub fn measure_charts(m: &MeasureResult) -> Vec<Chart> {
    let l = m.lagged_ic.mean.len();
    let per = &*crate::report::calendar_units(&m.frequency);
    let zero = Layer::HLine { y: 0.0, colour: PALETTE.grey, label: String::new() };
    let lagged = Panel::Xy(XyPanel {
        heading: "lagged IC".into(),
        x_label: format!("lag ({per})"),
        y_label: "mean lagged IC".into(),
        layers: vec![
            zero.clone(),
            with_bars(&m.lagged_ic, "measured, 95% interval"),
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
    let mut horizon_layers = vec![zero, with_bars(&m.horizon_ic, "measured, 95% interval")];
    if let Some(peak) = b.peak {
        horizon_layers.push(Layer::VLine {
            x: peak as f64,
            colour: PALETTE.vermillion,
            label: format!("measured peak ({peak})"),
        });
    }
    let horizon = Panel::Xy(XyPanel {
        heading: "horizon IC".into(),
        x_label: format!("horizon ({per})"),
        y_label: "mean horizon IC".into(),
        layers: horizon_layers,
        ..XyPanel::default()
    });
    let bs = &m.bootstrap;
    let boot_panel = |rule: Rule, counts: &[u64], chosen: Option<usize>| {
        let chosen = chosen?;
        let [lo, hi] = bs.range_90[rule]?;
        Some(Panel::Xy(XyPanel {
            heading: format!(
                "{}: {} in {:.0}% of resamples, 90% within {lo}–{hi}",
                rule_title(rule),
                chosen,
                100.0 * bs.share_at_estimate[rule].unwrap_or(0.0),
            ),
            x_label: format!("chosen horizon ({per})"),
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
        }))
    };
    let boot_panels: Vec<Panel> = [
        boot_panel(Rule::Peak, &bs.choice_counts.peak, b.peak),
        boot_panel(Rule::Formula, &bs.choice_counts.formula, b.formula),
        boot_panel(Rule::Fitted, &bs.choice_counts.fitted, b.fitted),
    ]
    .into_iter()
    .flatten()
    .collect();
    let mut charts = vec![Chart {
        name: "measured_ic".into(),
        title: format!("Your signal's measured decay ({} dates × {})", m.dates_used, breadth(&m.per_date.used_assets)),
        caption: "Points are the measured means with their 95% intervals (EWC errors, Student-t critical \
                      values); where the bars around the peak overlap, the data cannot tell those horizons apart."
            .into(),
        panels: vec![lagged, horizon],
        panel_height: 420,
    }];
    let rolling = m.per_date.rolling_lag1(m.rolling_window);
    if !rolling.is_empty() {
        let w = m.rolling_window;
        let mut layers = vec![Layer::HLine { y: 0.0, colour: PALETTE.grey, label: String::new() }];
        if let Some(mean) = m.lagged_ic.mean[0] {
            layers.push(Layer::HLine {
                y: mean,
                colour: PALETTE.black,
                label: format!("mean over all dates ({mean:.4})"),
            });
        }
        layers.push(Layer::Line {
            x: rolling.iter().map(|r| (r.0 + 1) as f64).collect(),
            y: rolling.iter().map(|r| r.1).collect(),
            colour: PALETTE.blue,
            width: 2,
            dashed: false,
            markers: false,
            label: format!("mean of the last {w} periods"),
        });
        charts.push(Chart {
            name: "rolling_ic".into(),
            title: format!(
                "Lag-1 IC, rolling {w}-period mean ({} to {})",
                m.per_date.dates[0],
                m.per_date.dates[m.dates - 1]
            ),
            caption: "Stretches well above or below the overall mean are the IC's regimes: the persistence that \
                      widens every interval above."
                .into(),
            panels: vec![Panel::Xy(XyPanel {
                heading: String::new(),
                x_label: format!("period (1 = {})", m.per_date.dates[0]),
                y_label: "lag-1 IC".into(),
                layers,
                ..XyPanel::default()
            })],
            panel_height: 360,
        });
    }
    if let Some(c) = &m.comparison {
        charts.push(signals_chart(c, per));
    }
    if let Some(b) = &m.books {
        charts.push(holdings_chart(b, per));
    }
    if !boot_panels.is_empty() {
        charts.push(Chart {
            name: "bootstrap".into(),
            title: format!("Chosen horizon over {} stationary-bootstrap resamples of the dates", bs.replicates),
            caption: "How the chosen horizon moves when the dates are resampled: a tall single bar means a stable \
                      choice, a wide spread means the peak is mostly noise."
                .into(),
            panels: boot_panels,
            panel_height: 260,
        });
    }
    charts
}

/// The colours of compared signals, in order (the blend is black).
const SIGNAL_COLOURS: [crate::chart::Colour; 6] =
    [PALETTE.blue, PALETTE.orange, PALETTE.green, PALETTE.purple, PALETTE.sky, PALETTE.vermillion];

/// Every signal's lagged and horizon ICs on shared axes, and the correlation
/// of their per-date ICs.
fn signals_chart(c: &crate::own_data::SignalComparison, per: &str) -> Chart {
    let lines = |curve: fn(&crate::own_data::SignalSummary) -> &Curve| -> Vec<Layer> {
        let mut layers = vec![Layer::HLine { y: 0.0, colour: PALETTE.grey, label: String::new() }];
        for (i, s) in c.signals.iter().enumerate() {
            let pts: Vec<(f64, f64)> =
                curve(s).mean.iter().enumerate().filter_map(|(k, v)| Some(((k + 1) as f64, (*v)?))).collect();
            let blend = s.kind == "blend";
            layers.push(Layer::Line {
                x: pts.iter().map(|p| p.0).collect(),
                y: pts.iter().map(|p| p.1).collect(),
                colour: if blend { PALETTE.black } else { SIGNAL_COLOURS[i % SIGNAL_COLOURS.len()] },
                width: if blend { 3 } else { 2 },
                dashed: blend,
                markers: true,
                label: match s.best_horizon.peak {
                    Some(h) => format!("{} (peak {h})", s.name),
                    None => s.name.clone(),
                },
            });
        }
        layers
    };
    let names: Vec<String> = c.signals.iter().map(|s| s.name.clone()).collect();
    let heat = crate::chart::HeatPanel {
        row_title: "signal".into(),
        col_title: "signal".into(),
        rows: names.clone(),
        cols: names,
        values: c.ic_correlation.iter().map(|r| r.iter().map(|v| v.map_or(0.0, f64::abs)).collect()).collect(),
        text: c
            .ic_correlation
            .iter()
            .map(|r| r.iter().map(|v| v.map_or("—".into(), |v| format!("{v:.2}"))).collect())
            .collect(),
        marked: (0..c.signals.len()).map(|i| (i, i)).collect(),
    };
    Chart {
        name: "signals".into(),
        title: if c.blend_weights.is_empty() {
            "Your signals side by side".into()
        } else {
            format!("Your signals side by side, and the blend {}", crate::report::blend_words(c))
        },
        caption: "Each signal's mean lagged and horizon IC (the legend gives each horizon-IC peak) and the \
                  correlation of their per-date lag-1 ICs (shade: its size; text: its sign and value), where a slow \
                  signal mixed into a fast one moves the blend's peak towards longer horizons"
            .into(),
        panels: vec![
            Panel::Xy(XyPanel {
                heading: "lagged IC".into(),
                x_label: format!("lag ({per})"),
                y_label: "mean lagged IC".into(),
                layers: lines(|s| &s.lagged_ic),
                ..XyPanel::default()
            }),
            Panel::Xy(XyPanel {
                heading: "horizon IC".into(),
                x_label: format!("horizon ({per})"),
                y_label: "mean horizon IC".into(),
                layers: lines(|s| &s.horizon_ic),
                ..XyPanel::default()
            }),
            Panel::Heat(heat),
        ],
        panel_height: 360,
    }
}

/// The tranche books on the user's panel: gross and net IR by holding length
/// with one-standard-error bands, and the turnover.
fn holdings_chart(b: &crate::own_data::OwnBooks, per: &str) -> Chart {
    let band = |ir: &[Option<f64>], se: &[Option<f64>], colour, label: String| -> Vec<Layer> {
        let pts: Vec<(f64, f64, f64)> =
            ir.iter().zip(se).enumerate().filter_map(|(h, (v, s))| Some(((h + 1) as f64, (*v)?, (*s)?))).collect();
        let x: Vec<f64> = pts.iter().map(|p| p.0).collect();
        vec![
            Layer::Band {
                x: x.clone(),
                lo: pts.iter().map(|p| p.1 - p.2).collect(),
                hi: pts.iter().map(|p| p.1 + p.2).collect(),
                colour,
                opacity: 0.15,
                label: String::new(),
            },
            Layer::Line {
                x,
                y: pts.iter().map(|p| p.1).collect(),
                colour,
                width: 2,
                dashed: false,
                markers: true,
                label,
            },
        ]
    };
    let mut layers = vec![Layer::HLine { y: 0.0, colour: PALETTE.grey, label: String::new() }];
    layers.extend(band(&b.gross_ir, &b.gross_ir_se, PALETTE.black, "gross".into()));
    for (i, c) in b.costs.iter().enumerate() {
        let colour = SIGNAL_COLOURS[i % SIGNAL_COLOURS.len()];
        let best = c.best_holding.map_or(String::new(), |h| format!(", best {h}"));
        layers.extend(band(&c.net_ir, &c.net_ir_se, colour, format!("net of {} bps{best}", c.cost_bps)));
    }
    let turnover: Vec<(f64, f64)> =
        b.turnover.iter().enumerate().filter_map(|(h, t)| Some(((h + 1) as f64, (*t)?))).collect();
    Chart {
        name: "holdings".into(),
        title: format!("Tranche books on your panel ({} {per})", b.periods),
        caption: "Annualised information ratio of the staggered-tranche book by holding length, gross and net of \
                  each cost, with one-standard-error bands (Lo, 2002); below, the traded notional per period."
            .into(),
        panels: vec![
            Panel::Xy(XyPanel {
                heading: "information ratio".into(),
                x_label: format!("holding length ({per})"),
                y_label: "annualised IR".into(),
                layers,
                ..XyPanel::default()
            }),
            Panel::Xy(XyPanel {
                heading: "turnover".into(),
                x_label: format!("holding length ({per})"),
                y_label: "traded per period (× gross)".into(),
                y_from_zero: true,
                layers: vec![Layer::Line {
                    x: turnover.iter().map(|p| p.0).collect(),
                    y: turnover.iter().map(|p| p.1).collect(),
                    colour: PALETTE.blue,
                    width: 2,
                    dashed: false,
                    markers: true,
                    label: String::new(),
                }],
                ..XyPanel::default()
            }),
        ],
        panel_height: 340,
    }
}
