//! lagfold: how often does a measured horizon-IC peak land on the true optimal
//! holding horizon, and what does a wrong choice cost?
//!
//! The data's way: [`scenario`] → [`decay`] and [`model`] → [`truth`] →
//! [`generate`] → [`measure`] → [`study`] → [`report`]. The command line lives
//! in the binary and in [`cli`].

pub mod api;
pub mod calendar;
pub mod calibrate;
pub mod chart;
pub mod cli;
pub mod decay;
pub mod error;
pub mod generate;
pub mod measure;
pub mod model;
pub mod own_data;
pub mod plan;
pub mod portfolio;
pub mod reader;
pub mod report;
pub mod rng;
pub mod rows;
pub mod rule;
pub mod scenario;
pub mod simulate;
pub mod stats;
pub mod stress;
pub mod study;
pub mod truth;
