//! The charts of a study (`run`, `demo`): fans of the measured curves, the
//! chosen horizon per rule, the regret distribution and net IR by holding length.

use super::parts::{fan, plural, rule_colour, rule_title, share_bars, trim};
use crate::chart::{Chart, Layer, PALETTE, Panel, XyPanel};
use crate::measure::rules::Rule;
use crate::portfolio::PortfolioTruth;
use crate::report::period_word;
use crate::study::{CurveStats, Setup, StudyResult};

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
    ]
}

fn chosen_chart(setup: &Setup, portfolio: &PortfolioTruth, study: &StudyResult, unit: &str) -> Chart {
    let t = &setup.truth;
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
    let rules = [
        (Rule::Peak, &t.horizon_ic, t.best_horizon),
        (Rule::Formula, &t.horizon_ic, t.best_horizon),
        (Rule::Fitted, &t.horizon_ic, t.best_horizon),
        (Rule::NetIr, &lin.net_ir, lin.best_holding),
    ];
    let width = 0.2;
    let layers = rules
        .iter()
        .enumerate()
        .map(|(i, &(rule, truth, best))| Layer::Bars {
            x: (0..names.len()).map(|k| k as f64).collect(),
            y: regret_shares(&study.rules.get(rule).choice_counts, truth, best),
            offset: (i as f64 - 1.5) * width,
            width: width * 0.9,
            colour: rule_colour(rule),
            label: rule_title(rule).into(),
        })
        .collect();
    Chart {
        name: "regret".into(),
        title: "Regret: share of the best value given up by the chosen horizon".into(),
        caption: "Tall bars on the left mean a wrong pick costs little; bars on the right are histories where the \
                  choice gave up much of the best horizon IC (or, for the net-IR rule, of the best net IR)."
            .into(),
        panels: vec![Panel::Xy(XyPanel {
            x_label: "share of the best value given up".into(),
            y_label: "share of histories".into(),
            x_categories: names,
            y_percent: true,
            y_from_zero: true,
            layers,
            ..XyPanel::default()
        })],
        panel_height: 520,
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
