//! `summary.json`: the one results document that every other output agrees with.

use crate::scenario::Scenario;
use crate::study::{Setup, StudyResult};
use crate::truth::Truth;
use serde::Serialize;

/// The caution printed with every result.
pub const CAUTION: &str = "Results are simulations under the stated assumptions, not investment advice. \
Decisions belong to your firm's own risk process and to licensed professionals.";

/// Everything a run produced.
#[derive(Debug, Serialize)]
pub struct Summary<'a> {
    /// Program name.
    pub tool: &'static str,
    /// Program version.
    pub version: &'static str,
    /// The validated scenario.
    pub scenario: &'a Scenario,
    /// True curves and optimum.
    pub truth: &'a Truth,
    /// The Monte Carlo study.
    pub study: &'a StudyResult,
    /// Which horizon-IC form the study's truth is.
    pub truth_note: &'static str,
    /// The caution.
    pub caution: &'static str,
}

impl<'a> Summary<'a> {
    /// Bundles the results of a run.
    pub fn new(setup: &'a Setup, study: &'a StudyResult) -> Self {
        Self {
            tool: "lagfold",
            version: env!("CARGO_PKG_VERSION"),
            scenario: &setup.scenario,
            truth: &setup.truth,
            study,
            truth_note: "truth.horizon_ic (the study's truth) is the expected per-date horizon IC at large N; \
horizon_ic_pooled is sum g_k / sqrt(V_n); horizon_ic_simple is sum IC_k / sqrt(n) (Qian, Hua and Sorensen)",
            caution: CAUTION,
        }
    }
}

/// Pretty-printed JSON with a trailing newline.
pub fn summary_json(s: &Summary) -> Vec<u8> {
    let mut v = serde_json::to_vec_pretty(s).expect("summary serialises");
    v.push(b'\n');
    v
}
