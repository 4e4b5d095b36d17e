//! Peak memory of a whole study against its number of paths: the study folds
//! each path into fixed-size tallies, so the peak should not grow with paths.
//! Prints, from one run, the peak resident memory (Linux `VmHWM`, reset
//! between studies through `/proc/self/clear_refs`) of:
//! - the default preset at the bench size (`N = 1000, T = 120, L = 24`) at
//!   10^3 and 10^4 paths;
//! - the same scenario shape (`L = 24`, the same cost and tallies) on small
//!   panels (`N = 30, T = 60`) at 10^4 and 10^6 paths, where a path is cheap
//!   enough for a million of them.
//!
//! Not a criterion bench: memory is read once per size, not timed.

mod common;

use lagfold::portfolio::PortfolioTruth;
use lagfold::scenario::{self, Overrides, presets};
use lagfold::simulate::Setup;
use lagfold::study;
use std::time::Instant;

/// Peak resident memory since the last reset, in MB.
fn peak_mb() -> f64 {
    let status = std::fs::read_to_string("/proc/self/status").unwrap_or_default();
    let kb = status
        .lines()
        .find_map(|l| l.strip_prefix("VmHWM:"))
        .and_then(|v| v.trim().trim_end_matches("kB").trim().parse::<f64>().ok())
        .unwrap_or(f64::NAN);
    kb / 1024.0
}

fn reset_peak() {
    let _ = std::fs::write("/proc/self/clear_refs", "5");
}

fn small(paths: usize) -> Setup {
    let ov = Overrides {
        assets: Some(30),
        history: Some(60),
        horizons: Some(24),
        paths: Some(paths),
        seed: Some(7),
        reference_paths: Some(20),
        ..Overrides::default()
    };
    let s = scenario::load(presets::text(presets::DEFAULT).unwrap(), "bench", "bench", &ov).unwrap();
    Setup::new(s).unwrap()
}

fn measure(label: &str, setup: &Setup) {
    let truth = PortfolioTruth::compute(setup, 2, &|_| {});
    reset_peak();
    let t = Instant::now();
    let result = study::run(setup, &truth, &[], 2, &|_| {});
    let secs = t.elapsed().as_secs_f64();
    std::hint::black_box(&result);
    println!("{label:<34} {:>9} paths  peak {:>7.1} MB  ({secs:.1} s on 2 threads)", setup.scenario.paths(), peak_mb());
}

fn main() {
    if std::env::args().any(|a| a == "--list") {
        return;
    }
    println!("\npeak resident memory of a study (2 threads)");
    for paths in [1_000, 10_000] {
        measure("default preset, N 1000 T 120 L 24", &common::setup(paths));
    }
    for paths in [10_000, 1_000_000] {
        measure("small panels, N 30 T 60 L 24", &small(paths));
    }
}
