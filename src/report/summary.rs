//! `summary.json`: the one results document that every other output agrees with.

use super::story::Study;
use crate::portfolio::PortfolioTruth;
use crate::scenario::Scenario;
use crate::simulate::Setup;
use crate::study::{HorizonStudy, MoreHistory, StudyResult};
use crate::truth::Truth;
use serde::Serialize;

/// The caution printed with every result.
pub const CAUTION: &str = "Results are simulations under the stated assumptions, not investment advice. \
Decisions belong to your firm's own risk process and to licensed professionals.";

/// The truth as written: the horizon truth's fields, the linear book's
/// per-holding-length figures at the top level, and both books in detail.
#[derive(Debug, Serialize)]
pub struct TruthOut<'a> {
    /// Horizon-IC truth.
    #[serde(flatten)]
    pub horizon: &'a Truth,
    /// Best holding length by true net IR of the linear book (1-based).
    pub best_holding: usize,
    /// Holding lengths within the tolerance of the best net IR.
    pub near_best_holding: &'a [usize],
    /// True annualised net IR per holding length (index 0 = holding 1).
    pub net_ir: &'a [f64],
    /// True annualised gross IR per holding length.
    pub gross_ir: &'a [f64],
    /// True traded notional per period per holding length.
    pub turnover: &'a [f64],
    /// Both books, closed forms and the reference simulation's size.
    pub portfolio: &'a PortfolioTruth,
}

/// Everything a run produced.
#[derive(Debug, Serialize)]
pub struct Summary<'a> {
    /// Program name.
    pub tool: &'static str,
    /// Program version.
    pub version: &'static str,
    /// The validated scenario.
    pub scenario: &'a Scenario,
    /// True curves, optimum and portfolio figures.
    pub truth: TruthOut<'a>,
    /// The Monte Carlo study.
    pub study: &'a StudyResult,
    /// The study at twice the history (what more history would buy).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub more_history: Option<&'a MoreHistory>,
    /// Which horizon-IC form the study's truth is.
    pub truth_note: &'static str,
    /// The caution.
    pub caution: &'static str,
}

impl<'a> Summary<'a> {
    /// Bundles the results of a run.
    pub fn new(story: &Study<'a>) -> Self {
        let (setup, portfolio, study) = (story.setup, story.portfolio, story.study);
        let lin = &portfolio.linear;
        Self {
            tool: "lagfold",
            version: env!("CARGO_PKG_VERSION"),
            scenario: &setup.scenario,
            truth: TruthOut {
                horizon: &setup.truth,
                best_holding: lin.best_holding,
                near_best_holding: &lin.near_best_holding,
                net_ir: &lin.net_ir,
                gross_ir: &lin.gross_ir,
                turnover: &lin.turnover,
                portfolio,
            },
            study,
            more_history: story.more,
            truth_note: TRUTH_NOTE,
            caution: CAUTION,
        }
    }
}

/// Which horizon-IC form the study's truth is.
const TRUTH_NOTE: &str = "truth.horizon_ic (the study's truth) is the expected per-date horizon IC at large N; \
horizon_ic_pooled is sum g_k / sqrt(V_n); horizon_ic_simple is sum IC_k / sqrt(n) (Qian, Hua and Sorensen)";

/// Pretty-printed JSON with a trailing newline.
pub fn summary_json(s: &Summary) -> Vec<u8> {
    pretty(s)
}

fn pretty(s: &impl Serialize) -> Vec<u8> {
    let mut v = serde_json::to_vec_pretty(s).expect("results serialise");
    v.push(b'\n');
    v
}

/// `horizons.json`: a study of the horizon rules alone (no portfolio layer),
/// with the same keys as `summary.json` where they exist.
#[derive(Debug, Serialize)]
pub struct HorizonSummary<'a> {
    /// Program name.
    pub tool: &'static str,
    /// Program version.
    pub version: &'static str,
    /// The validated scenario.
    pub scenario: &'a Scenario,
    /// True curves and optimum.
    pub truth: &'a Truth,
    /// The horizon rules' record.
    pub study: &'a HorizonStudy,
    /// Which horizon-IC form the study's truth is.
    pub truth_note: &'static str,
    /// The caution.
    pub caution: &'static str,
}

impl<'a> HorizonSummary<'a> {
    /// Bundles a study of the horizon rules alone.
    pub fn new(setup: &'a Setup, study: &'a HorizonStudy) -> Self {
        Self {
            tool: "lagfold",
            version: env!("CARGO_PKG_VERSION"),
            scenario: &setup.scenario,
            truth: &setup.truth,
            study,
            truth_note: TRUTH_NOTE,
            caution: CAUTION,
        }
    }
}

/// Pretty-printed `horizons.json` with a trailing newline.
pub fn horizons_json(s: &HorizonSummary) -> Vec<u8> {
    pretty(s)
}
