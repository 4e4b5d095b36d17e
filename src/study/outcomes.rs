//! What each simulated path yields, stored flat and in path order.

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

/// Every path's outcome, stored flat and in path order (one allocation per
/// field, so that millions of small vectors do not fragment the heap).
#[derive(Debug, Clone, Default)]
pub struct Outcomes {
    len: usize,
    lagged: Vec<f64>,
    horizon: Vec<f64>,
    rank_lagged: Vec<f64>,
    choices: Vec<Choices>,
    books: Vec<BookSums>,
}

impl Outcomes {
    /// Room for `paths` outcomes with `l` lags (and their books when `books`).
    pub fn with_capacity(paths: usize, l: usize, rank: bool, books: bool) -> Self {
        Self {
            len: l,
            lagged: Vec::with_capacity(paths * l),
            horizon: Vec::with_capacity(paths * l),
            rank_lagged: Vec::with_capacity(if rank { paths * l } else { 0 }),
            choices: Vec::with_capacity(paths),
            books: Vec::with_capacity(if books { paths * l } else { 0 }),
        }
    }

    /// Appends one path's outcome.
    pub fn push(&mut self, o: PathOutcome) {
        self.lagged.extend_from_slice(&o.lagged);
        self.horizon.extend_from_slice(&o.horizon);
        if let Some(r) = &o.rank_lagged {
            self.rank_lagged.extend_from_slice(r);
        }
        self.choices.push(o.choices);
        self.books.extend_from_slice(&o.books);
    }

    /// The linear book's sums of path `p`, per holding length.
    pub fn books(&self, p: usize) -> &[BookSums] {
        &self.books[p * self.len..(p + 1) * self.len]
    }

    /// Number of paths.
    pub fn paths(&self) -> usize {
        self.choices.len()
    }

    /// Mean lagged IC of path `p`.
    pub fn lagged(&self, p: usize) -> &[f64] {
        &self.lagged[p * self.len..(p + 1) * self.len]
    }

    /// Mean horizon IC of path `p`.
    pub fn horizon(&self, p: usize) -> &[f64] {
        &self.horizon[p * self.len..(p + 1) * self.len]
    }

    /// Mean rank lagged IC of path `p` (empty when not measured).
    pub fn rank_lagged(&self, p: usize) -> &[f64] {
        self.rank_lagged.get(p * self.len..(p + 1) * self.len).unwrap_or(&[])
    }

    /// The rules' choices on path `p`.
    pub fn choices(&self, p: usize) -> &Choices {
        &self.choices[p]
    }
}
