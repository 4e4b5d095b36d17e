//! Scenarios from a file, a preset name, TOML text or a JSON table.

use super::{Error, Overrides, Scenario};
use crate::scenario::{self, presets};
use std::path::Path;

/// A scenario file (or a preset named so, when no such file exists), with
/// `ov` applied; also its origin for messages (`preset demo`, the path).
///
/// # Errors
/// A file that cannot be read, a parse error or a value out of range, each
/// naming the file, line and field.
pub fn load_scenario(source: &Path, ov: &Overrides) -> Result<(Scenario, String), Error> {
    let (text, origin, stem) = scenario_text(source)?;
    let s = scenario::load(&text, &origin, &stem, ov).map_err(Error::input)?;
    Ok((s, origin))
}

/// A scenario from TOML text; `origin` names it in messages.
///
/// # Errors
/// A parse error or a value out of range, with its line.
pub fn scenario_from_toml(text: &str, origin: &str, ov: &Overrides) -> Result<Scenario, Error> {
    scenario::load(text, origin, "scenario", ov).map_err(Error::input)
}

/// A scenario from a JSON object with the TOML file's keys and tables
/// (what a Python `dict` gives); `origin` names it in messages.
///
/// # Errors
/// An unknown key, a wrong type or a value out of range.
pub fn scenario_from_json(json: &str, origin: &str, ov: &Overrides) -> Result<Scenario, Error> {
    let mut raw: scenario::RawScenario =
        serde_json::from_str(json).map_err(|e| Error::Input(format!("{origin}: {e}")))?;
    ov.apply(&mut raw);
    Scenario::from_raw(&raw, "scenario").map_err(|e| Error::Input(format!("{origin}: {e}")))
}

/// The text of a scenario file (or preset), its origin for messages and its default name.
///
/// # Errors
/// A file that cannot be read, with a hint when it is neither a file nor a preset.
pub fn scenario_text(path: &Path) -> Result<(String, String, String), Error> {
    let name = path.to_string_lossy();
    if !path.exists() && presets::ALL.iter().any(|(n, _)| *n == name) {
        let text = presets::text(&name).map_err(Error::input)?;
        return Ok((text.to_string(), format!("preset {name}"), name.into_owned()));
    }
    let text = std::fs::read_to_string(path).map_err(|e| {
        let hint = if e.kind() == std::io::ErrorKind::NotFound {
            format!("; not a scenario file, nor a preset: {}", presets::known_words(&name))
        } else {
            String::new()
        };
        Error::input(crate::error::InputError::Read { path: path.to_path_buf(), source: e, hint })
    })?;
    let stem = path.file_stem().map_or_else(|| "scenario".into(), |s| scenario::name_from_file(&s.to_string_lossy()));
    Ok((text, path.display().to_string(), stem))
}
