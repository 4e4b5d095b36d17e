//! The panel reader on any bytes (CSV, or Parquet when they start with its
//! magic), then the estimator on what it accepts: a value or an error,
//! never a panic or an abort (a refused panel is exit code 2 on the command
//! line).
#![no_main]

use lagfold::measure::Measurement;
use lagfold::reader::{MIN_DATES, ReadOptions, read_panel_bytes};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let opts = ReadOptions { max_bytes: 64 << 20, ..ReadOptions::default() };
    let Ok(read) = read_panel_bytes(std::path::Path::new("fuzz.csv"), data.to_vec(), &opts) else { return };
    let p = &read.panel;
    if p.dates() >= MIN_DATES && p.assets() >= 3 {
        let mut m = Measurement::new((p.dates() / 4).clamp(1, 6), true);
        m.update(p);
    }
});
