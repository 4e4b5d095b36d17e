//! lagfold: how often does a measured horizon-IC peak land on the true optimal
//! holding horizon, and what does a wrong choice cost?
//!
//! **The facade.** [`api`] holds every operation a caller needs — load a
//! scenario, run a study, plan, stress, sweep, simulate a panel, measure a
//! panel — each returning one result that every exporter reads. The command
//! line ([`cli`]) and the Python module (`python/`) call nothing else.
//!
//! **The data's way**, each stage using only those before it (checked by
//! `tests/layering.rs`):
//!
//! ```text
//! scenario → decay, model → truth → generate → simulate ─┬→ portfolio → study → plan, stress ─┐
//!                                                        └→ calibrate                         ├→ report → api → cli
//! reader → measure ──────────────────────────────────────→ own_data ──────────────────────────┘
//! ```
//!
//! [`measure`] takes a panel, simulated or real, and knows nothing of
//! simulation; [`own_data`] is a user's panel measured end to end;
//! [`rule`] names the rules once for every stage.

// The facade and the command line.
pub mod api;
pub mod cli;

// Scenario and truth.
pub mod decay;
pub mod exp_sum;
pub mod model;
pub mod scenario;
pub mod truth;

// Simulated histories.
pub mod generate;
pub mod rng;
pub mod simulate;
pub mod student_t;

// Measurement of any panel, and a user's own.
pub mod measure;
pub mod own_data;
pub mod reader;
pub mod rows;

// Studies.
pub mod calibrate;
pub mod plan;
pub mod portfolio;
pub mod stress;
pub mod study;

// Outputs.
pub mod chart;
pub mod report;

// Shared pieces.
pub mod calendar;
pub mod error;
pub mod rule;
pub mod stats;
pub mod tally;
