//! Pieces shared by the grid outputs (`plan`, sweeps, `stress`): a rule's
//! record as CSV cells, and the JSON document wrapper.

use super::summary::CAUTION;
use crate::rule::Rule;
use crate::study::RuleStats;
use serde::Serialize;

/// Column names of [`record_cells`].
pub const RECORD_HEADER: [&str; 9] = [
    "rule",
    "hit_rate",
    "hit_rate_se",
    "near_hit_rate",
    "near_hit_rate_se",
    "near_best_rate",
    "near_best_rate_se",
    "regret_rel_mean",
    "regret_rel_mean_se",
];

/// A rule's record as CSV cells (six decimals).
pub fn record_cells(rule: Rule, s: &RuleStats) -> [String; 9] {
    let f = |x: f64| format!("{x:.6}");
    [
        rule.name().to_string(),
        f(s.hit_rate),
        f(s.hit_rate_se),
        f(s.near_hit_rate),
        f(s.near_hit_rate_se),
        f(s.near_best_rate),
        f(s.near_best_rate_se),
        f(s.regret_rel_mean),
        s.regret_rel_mean_se.map(f).unwrap_or_default(),
    ]
}

#[derive(Serialize)]
struct Document<'a, S: Serialize, B: Serialize> {
    tool: &'static str,
    version: &'static str,
    #[serde(skip_serializing_if = "Option::is_none")]
    scenario: Option<&'a S>,
    #[serde(flatten)]
    body: &'a B,
    caution: &'static str,
}

/// Pretty JSON of `body`'s fields between the tool's name and version, the
/// scenario (when given) and the caution.
pub fn document<S: Serialize, B: Serialize>(scenario: Option<&S>, body: &B) -> Vec<u8> {
    let doc = Document { tool: "lagfold", version: env!("CARGO_PKG_VERSION"), scenario, body, caution: CAUTION };
    let mut v = serde_json::to_vec_pretty(&doc).expect("results serialise");
    v.push(b'\n');
    v
}
