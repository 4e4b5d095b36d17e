//! The charts of a study (`run`, `demo`): fans of the measured curves, the
//! chosen horizon per rule, the regret distribution and net IR by holding length.

use super::parts::{fan, plural, rule_colour, rule_title, share_bars, trim};
use crate::chart::{Chart, Layer, PALETTE, Panel, XyPanel};
use crate::portfolio::PortfolioTruth;
use crate::report::period_word;
use crate::rule::Rule;
use crate::simulate::Setup;
use crate::study::{CurveStats, StudyResult};

/// Upper edges of the relative-regret bins after the exact hit (share of the best value).
pub const REGRET_EDGES: [f64; 5] = [0.01, 0.025, 0.05, 0.10, 0.25];

/// Names of the regret bins, in order: exact hit, the edges, then beyond the last.
pub fn regret_bin_names() -> Vec<String> {
    let mut names = vec!["0 (best)".to_string()];
    let mut lo = 0.0;
    for e in REGRET_EDGES {
        names.push(format!("{}–{}%", trim(lo * 100.0), trim(e * 100.0)));
        lo = e;
    }
    names.push(format!("> {}%", trim(lo * 100.0)));
    names
}

/// Share of histories in each regret bin, from how often each choice was made
/// and the true value of each choice: the regret of choice `n` is
/// `(v(n*) − v(n)) / v(n*)`, exact because choices are discrete.
pub fn regret_shares(counts: &[u64], truth: &[f64], best: usize) -> Vec<f64> {
    let mut shares = vec![0.0; REGRET_EDGES.len() + 2];
    let total = counts.iter().sum::<u64>().max(1) as f64;
    let v_best = truth[best - 1];
    for (i, &c) in counts.iter().enumerate() {
        let r = (v_best - truth[i]) / v_best;
        let bin = if r <= 1e-12 { 0 } else { 1 + REGRET_EDGES.iter().take_while(|&&e| r > e).count() };
        shares[bin] += c as f64 / total;
    }
    shares
}

/// Every chart of a study.
pub fn study_charts(setup: &Setup, portfolio: &PortfolioTruth, study: &StudyResult) -> Vec<Chart> {
    let (s, t) = (&setup.scenario, &setup.truth);
    let unit = period_word(s.periods_per_year);
    let best_label = format!("true best horizon ({})", plural(t.best_horizon, unit));
    let histories = format!("{} simulated histories of {} {unit}s × {} assets", study.paths, s.history, s.assets);
    let fan_panel = |measured: &CurveStats, truth: &[f64], x: &str, y: &str| {
        Panel::Xy(XyPanel {
            x_label: format!("{x} ({unit}s)"),
            y_label: y.into(),
            layers: fan(measured, truth, t.best_horizon, best_label.clone()),
            ..XyPanel::default()
        })
    };
    vec![
        Chart {
            name: "horizon_ic".into(),
            title: format!("Measured horizon IC in {histories}"),
            caption: format!(
                "Black is the true horizon IC and blue is where one history's measurement falls: the wider the band \
                 around the dashed optimum at {}, the easier it is to pick the wrong peak.",
                plural(t.best_horizon, unit)
            ),
            panels: vec![fan_panel(&study.horizon_ic, &t.horizon_ic, "horizon n", "horizon IC")],
            panel_height: 520,
        },
        Chart {
            name: "lagged_ic".into(),
            title: format!("Measured lagged IC in {histories}"),
            caption:
                "How far the measured decay of the forecast's correlation with later returns strays from the true \
                      decay (black)."
                    .into(),
            panels: vec![fan_panel(&study.lagged_ic, &t.lagged_ic, "lag", "lagged IC")],
            panel_height: 520,
        },
        chosen_chart(setup, portfolio, study, unit),
        regret_chart(setup, portfolio, study),
        net_ir_chart(portfolio, study, unit),
        optima_chart(setup, portfolio, unit),
    ]
}

fn chosen_chart(setup: &Setup, portfolio: &PortfolioTruth, study: &StudyResult, unit: &str) -> Chart {
    let t = &setup.truth;
    // One y scale for the four panels, so their heights compare.
    let top = Rule::EVERY
        .iter()
        .map(|&r| {
            let c = &study.rules.get(r).choice_counts;
            c.iter().copied().max().unwrap_or(0) as f64 / c.iter().sum::<u64>().max(1) as f64
        })
        .fold(0.0, f64::max);
    let panel = |rule: Rule, best: usize, what: &str| {
        let r = study.rules.get(rule);
        Panel::Xy(XyPanel {
            heading: format!(
                "{}: exact hit {}",
                rule_title(rule),
                crate::report::text::share_ci(r.hit_rate, r.hit_rate_ci).trim()
            ),
            x_label: format!("chosen {what} ({unit}s)"),
            y_label: "share of histories".into(),
            y_percent: true,
            y_from_zero: true,
            y_fixed: Some((0.0, 1.06 * top.max(0.01))),
            layers: vec![
                share_bars(&r.choice_counts, rule_colour(rule), "chosen"),
                Layer::VLine { x: best as f64, colour: PALETTE.vermillion, label: format!("true best ({best})") },
            ],
            ..XyPanel::default()
        })
    };
    Chart {
        name: "chosen_horizon".into(),
        title: format!("Which horizon each rule picks, over {} histories", study.paths),
        caption: "Each bar is how often a rule picked that horizon; the closer the bars crowd around the dashed true \
                  best, the more the rule can be trusted."
            .into(),
        panels: vec![
            panel(Rule::Peak, t.best_horizon, "horizon"),
            panel(Rule::Formula, t.best_horizon, "horizon"),
            panel(Rule::Fitted, t.best_horizon, "horizon"),
            panel(Rule::NetIr, portfolio.linear.best_holding, "holding length"),
        ],
        panel_height: 250,
    }
}

fn regret_chart(setup: &Setup, portfolio: &PortfolioTruth, study: &StudyResult) -> Chart {
    let t = &setup.truth;
    let lin = &portfolio.linear;
    let names = regret_bin_names();
    let horizon_rules = Rule::HORIZON;
    let shares = |rule: Rule| {
        let (truth, best) =
            if rule == Rule::NetIr { (&lin.net_ir, lin.best_holding) } else { (&t.horizon_ic, t.best_horizon) };
        regret_shares(&study.rules.get(rule).choice_counts, truth, best)
    };
    let top = horizon_rules.iter().chain(&[Rule::NetIr]).flat_map(|&r| shares(r)).fold(0.0, f64::max);
    let panel = |rules: &[Rule], heading: &str, x_label: &str| {
        let width = 0.8 / rules.len() as f64;
        let layers = rules
            .iter()
            .enumerate()
            .map(|(i, &rule)| Layer::Bars {
                x: (0..names.len()).map(|k| k as f64).collect(),
                y: shares(rule),
                offset: (i as f64 - (rules.len() as f64 - 1.0) / 2.0) * width,
                width: width * 0.9,
                colour: rule_colour(rule),
                label: rule_title(rule).into(),
            })
            .collect();
        Panel::Xy(XyPanel {
            heading: heading.into(),
            x_label: x_label.into(),
            y_label: "share of histories".into(),
            x_categories: names.clone(),
            y_percent: true,
            y_from_zero: true,
            y_fixed: Some((0.0, 1.06 * top.max(0.01))),
            layers,
        })
    };
    Chart {
        name: "regret".into(),
        title: "Regret: share of the best value given up by the choice".into(),
        caption: "Tall bars on the left mean a wrong pick costs little; bars on the right are histories where the \
                  choice gave up much of the best horizon IC (top) or of the best net IR (bottom)."
            .into(),
        panels: vec![
            panel(
                &horizon_rules,
                "horizon rules: share of the best horizon IC given up",
                "share of the best horizon IC given up",
            ),
            panel(
                &[Rule::NetIr],
                "net-IR rule: share of the best net IR given up",
                "share of the best net IR given up",
            ),
        ],
        panel_height: 380,
    }
}

/// The horizon-IC peak against the best holding: the true horizon IC on top,
/// the true gross and net IR of the tranche book below, on one holding axis.
fn optima_chart(setup: &Setup, portfolio: &PortfolioTruth, unit: &str) -> Chart {
    let (t, lin) = (&setup.truth, &portfolio.linear);
    let x: Vec<f64> = (1..=t.horizon_ic.len()).map(|n| n as f64).collect();
    let gross_best = crate::stats::argmax1(&lin.gross_ir);
    let line = |y: &[f64], dashed: bool, label: &str| Layer::Line {
        x: x.clone(),
        y: y.to_vec(),
        colour: PALETTE.black,
        width: 2,
        dashed,
        markers: false,
        label: label.into(),
    };
    Chart {
        name: "optima".into(),
        title: "Why the horizon-IC peak and the best holding differ".into(),
        caption: format!(
            "The top panel's peak ({}) is where one forecast is best used; the bottom panel's optima are where a \
             book of overlapping tranches does best before and after costs ({} and {}).",
            plural(t.best_horizon, unit),
            plural(gross_best, unit),
            plural(lin.best_holding, unit)
        ),
        panels: vec![
            Panel::Xy(XyPanel {
                heading: "true horizon IC of one forecast".into(),
                x_label: format!("horizon n = holding length h ({unit}s)"),
                y_label: "horizon IC".into(),
                layers: vec![
                    line(&t.horizon_ic, false, "horizon IC"),
                    Layer::VLine {
                        x: t.best_horizon as f64,
                        colour: PALETTE.vermillion,
                        label: format!("peak ({})", t.best_horizon),
                    },
                ],
                ..XyPanel::default()
            }),
            Panel::Xy(XyPanel {
                heading: format!("true information ratio of the tranche book ({} bps one-way)", portfolio.cost_bps),
                x_label: format!("holding length h ({unit}s)"),
                y_label: "annualised IR".into(),
                layers: vec![
                    line(&lin.gross_ir, true, "gross IR"),
                    line(&lin.net_ir, false, "net IR"),
                    Layer::VLine {
                        x: lin.best_holding as f64,
                        colour: PALETTE.vermillion,
                        label: format!("best net ({})", lin.best_holding),
                    },
                ],
                ..XyPanel::default()
            }),
        ],
        panel_height: 360,
    }
}

fn net_ir_chart(portfolio: &PortfolioTruth, study: &StudyResult, unit: &str) -> Chart {
    let lin = &portfolio.linear;
    let panel = |cost: f64, truth: &[f64], measured: &CurveStats, best: usize| {
        let layers = fan(measured, truth, best, format!("true best holding ({})", plural(best, unit)));
        Panel::Xy(XyPanel {
            heading: format!("one-way cost {cost} bps"),
            x_label: format!("holding length ({unit}s)"),
            y_label: "annualised net IR".into(),
            layers,
            ..XyPanel::default()
        })
    };
    let panels: Vec<Panel> = if study.cost_sweep.is_empty() {
        vec![panel(study.cost_bps, &lin.net_ir, &study.net_ir, lin.best_holding)]
    } else {
        study
            .cost_sweep
            .iter()
            .map(|r| panel(r.cost_bps, &r.true_net_ir_curve, &r.measured_net_ir, r.true_best_holding))
            .collect()
    };
    let per_panel = if panels.len() == 1 { 520 } else { 380 };
    Chart {
        name: "net_ir".into(),
        title: "Net information ratio of the tranche book by holding length".into(),
        caption: "Black is the true net IR after costs and blue is one history's measurement: where the bands are \
                  flat and wide, the measured best holding length is mostly noise."
            .into(),
        panels,
        panel_height: per_panel,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn regret_bins_count_each_choice_once() {
        // Truth peaks at n = 2; choice 3 gives up 10%, choice 1 gives up 50%.
        let truth = [0.5, 1.0, 0.9, 0.5];
        let s = regret_shares(&[1, 2, 1, 0], &truth, 2);
        assert_eq!(s.len(), regret_bin_names().len());
        assert!((s[0] - 0.5).abs() < 1e-12, "exact hits");
        assert!((s[4] - 0.25).abs() < 1e-12, "0.10 falls in 5–10%");
        assert!((s[6] - 0.25).abs() < 1e-12, "0.50 falls beyond 25%");
        assert!((s.iter().sum::<f64>() - 1.0).abs() < 1e-12);
    }
}
