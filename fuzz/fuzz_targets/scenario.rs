//! The scenario reader on any bytes: parse, sweep axes and grid, validation,
//! and for small accepted scenarios the model's calibration and truth. It
//! must answer every input with a value or an error, never a panic or an
//! abort (a refused scenario is exit code 2 on the command line).
#![no_main]

use lagfold::scenario::{self, Overrides, sweep};
use lagfold::simulate::Setup;
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let ov = Overrides::default();
    if let Ok(axes) = sweep::axes(text, "fuzz")
        && !axes.is_empty()
        && axes.iter().map(|a| a.values.len()).product::<usize>() <= 16
    {
        let _ = sweep::expand(text, "fuzz", "fuzz", &ov, &axes);
    }
    if let Ok(s) = scenario::load(text, "fuzz", "fuzz", &ov)
        && s.truncation() <= 400
        && s.horizons() <= 60
    {
        let _ = Setup::new(s);
    }
});
