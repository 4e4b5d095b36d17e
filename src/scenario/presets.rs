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
    ALL.iter()
        .find(|(n, _)| *n == name)
        .map(|(_, t)| *t)
        .ok_or_else(|| InputError::UnknownPreset { name: name.to_string(), known: known_words(name) })
}

/// The built-in names, led by the closest one when `name` looks like a typo of it.
pub fn known_words(name: &str) -> String {
    let list = ALL.iter().map(|(n, _)| *n).collect::<Vec<_>>().join(", ");
    match closest(name) {
        Some(c) => format!("did you mean `{c}`? Built-in presets: {list}"),
        None => format!("built-in presets: {list}"),
    }
}

/// The preset within three edits of `name`, or whose name starts with it.
pub fn closest(name: &str) -> Option<&'static str> {
    super::spelling::nearest(name, ALL.iter().map(|(n, _)| *n))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn typos_and_prefixes_find_their_preset() {
        assert_eq!(closest("monthly-stedy"), Some("monthly-steady"));
        assert_eq!(closest("weekly-rev"), Some("weekly-reversal"));
        assert_eq!(closest("Daily-Slow-Burn"), Some("daily-slow-burn"));
        assert_eq!(closest("my-signal.toml"), None);
    }
}
