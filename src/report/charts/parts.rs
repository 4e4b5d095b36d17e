//! Pieces shared by the charts of several commands: the fan of a measured
//! curve with its truth, the per-rule colours, bar series of choice counts.

use crate::chart::{Colour, Layer, PALETTE};
use crate::rule::Rule;
use crate::study::CurveStats;

/// The colour of a rule, the same on every chart.
pub fn rule_colour(rule: Rule) -> Colour {
    match rule {
        Rule::Peak => PALETTE.blue,
        Rule::Formula => PALETTE.orange,
        Rule::Fitted => PALETTE.green,
        Rule::NetIr => PALETTE.purple,
    }
}

/// A short name of a rule for legends and headings.
pub fn rule_title(rule: Rule) -> &'static str {
    match rule {
        Rule::Peak => "Peak of measured horizon IC",
        Rule::Formula => "Peak of the lagged-IC formula",
        Rule::Fitted => "Optimum of the fitted decay",
        Rule::NetIr => "Best measured net IR",
    }
}

/// `1, 2, …, len` as x values.
pub fn one_based(len: usize) -> Vec<f64> {
    (1..=len).map(|n| n as f64).collect()
}

/// The 5–95 % and 25–75 % bands and the median of a measured curve, then
/// the truth on top and the true optimum as a dashed line.
pub fn fan(measured: &CurveStats, truth: &[f64], best: usize, best_label: String) -> Vec<Layer> {
    let x = one_based(truth.len());
    let q = &measured.quantiles;
    let band = |lo: usize, hi: usize, opacity: f64, label: &str| Layer::Band {
        x: x.clone(),
        lo: q[lo].clone(),
        hi: q[hi].clone(),
        colour: PALETTE.blue,
        opacity,
        label: label.into(),
    };
    vec![
        band(0, 4, 0.16, "middle 90% of histories"),
        band(1, 3, 0.32, "middle 50% of histories"),
        Layer::Line {
            x: x.clone(),
            y: q[2].clone(),
            colour: PALETTE.blue,
            width: 2,
            dashed: true,
            markers: false,
            label: "median measured".into(),
        },
        Layer::Line {
            x,
            y: truth.to_vec(),
            colour: PALETTE.black,
            width: 2,
            dashed: false,
            markers: true,
            label: "truth".into(),
        },
        Layer::VLine { x: best as f64, colour: PALETTE.vermillion, label: best_label },
    ]
}

/// Bars of the share of `counts` at each 1-based choice.
pub fn share_bars(counts: &[u64], colour: Colour, label: &str) -> Layer {
    let total = counts.iter().sum::<u64>().max(1) as f64;
    Layer::Bars {
        x: one_based(counts.len()),
        y: counts.iter().map(|&c| c as f64 / total).collect(),
        offset: 0.0,
        width: 0.7,
        colour,
        label: label.into(),
    }
}

/// A number with at most one decimal and no trailing zeros: 2.5, 10.
pub fn trim(x: f64) -> String {
    trim_to(x, 1)
}

/// A number with at most `decimals` decimals and no trailing zeros.
pub fn trim_to(x: f64, decimals: usize) -> String {
    let s = format!("{x:.decimals$}");
    if s.contains('.') { s.trim_end_matches('0').trim_end_matches('.').to_string() } else { s }
}

/// "1 month", "7 months".
pub fn plural(n: usize, unit: &str) -> String {
    format!("{n} {}", units(n, unit))
}

/// The unit's word for `n` of them: "month" for 1, "months" otherwise.
pub fn units(n: usize, unit: &str) -> String {
    if n == 1 { unit.to_string() } else { format!("{unit}s") }
}
