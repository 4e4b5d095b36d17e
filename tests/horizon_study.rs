//! A study runs without the portfolio layer: the horizon rules' record is the
//! same as the full study's, path for path, whatever the thread count.

use lagfold::portfolio::PortfolioTruth;
use lagfold::scenario::{self, Overrides, presets};
use lagfold::simulate::Setup;
use lagfold::study;

#[test]
fn the_horizon_study_is_the_full_studys_horizon_part() {
    // Catches: the horizon-only path simulating other histories, or
    // aggregating them differently, from the study with books.
    let ov = Overrides { assets: Some(150), paths: Some(90), seed: Some(4), ..Default::default() };
    let s = scenario::load(presets::text("weekly-hump").unwrap(), "test", "t", &ov).unwrap();
    let small = s.revised(&Overrides { reference_paths: Some(20), ..Default::default() }).unwrap();
    let setup = Setup::new(small).unwrap();
    let portfolio = PortfolioTruth::compute(&setup, 2, &|_| {});
    let full = study::run(&setup, &portfolio, &[], 2, &|_| {});
    let json = |x: &study::HorizonStudy| serde_json::to_string(x).unwrap();
    let alone = study::run_horizons(&setup, 1, &|_| {});
    assert_eq!(json(&alone), json(&full.horizons()));
    assert_eq!(json(&study::run_horizons(&setup, 3, &|_| {})), json(&alone));
}
