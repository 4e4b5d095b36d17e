//! Built-in scenarios, compiled into the binary from `presets/*.toml`.

use crate::error::InputError;

/// Name of the preset that `lagfold demo` runs.
pub const DEFAULT: &str = "monthly-steady";

/// `(name, TOML text)` of every built-in preset.
pub const ALL: &[(&str, &str)] = &[
    ("monthly-steady", include_str!("../../presets/monthly-steady.toml")),
    ("weekly-hump", include_str!("../../presets/weekly-hump.toml")),
    ("daily-slow-burn", include_str!("../../presets/daily-slow-burn.toml")),
    ("monthly-regimes", include_str!("../../presets/monthly-regimes.toml")),
    ("weekly-reversal", include_str!("../../presets/weekly-reversal.toml")),
];

/// The TOML text of a preset.
///
/// # Errors
/// [`InputError::UnknownPreset`] listing the known names.
pub fn text(name: &str) -> Result<&'static str, InputError> {
    ALL.iter().find(|(n, _)| *n == name).map(|(_, t)| *t).ok_or_else(|| InputError::UnknownPreset {
        name: name.to_string(),
        known: ALL.iter().map(|(n, _)| *n).collect::<Vec<_>>().join(", "),
    })
}
