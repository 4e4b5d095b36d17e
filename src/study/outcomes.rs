//! What each simulated path yields, before it is folded into the study's tally.

use crate::measure::rules::Choices;
use crate::portfolio::BookSums;

/// What one simulated history yields.
#[derive(Debug, Clone)]
pub struct PathOutcome {
    /// Mean lagged IC per lag.
    pub lagged: Vec<f64>,
    /// Mean horizon IC per horizon.
    pub horizon: Vec<f64>,
    /// Mean rank lagged IC per lag (when asked).
    pub rank_lagged: Option<Vec<f64>>,
    /// Each rule's choice.
    pub choices: Choices,
    /// The linear book's sums per holding length.
    pub books: Vec<BookSums>,
}
