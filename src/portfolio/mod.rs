//! Stage 4b: holding-period portfolios — staggered tranches, turnover, costs
//! and the net information ratio (MODEL.md §5).

pub mod books;
pub mod own;
pub mod sums;
pub mod truth;

pub use books::{BookBuilder, PathBooks};
pub use sums::BookSums;
pub use truth::PortfolioTruth;
