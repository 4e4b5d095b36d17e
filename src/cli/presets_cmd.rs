//! `lagfold presets [NAME]`: list the built-in scenarios or print one.

use super::{Failure, print};
use crate::scenario::presets;
use std::fmt::Write;

/// Options of `presets`.
#[derive(Debug, clap::Args)]
pub struct PresetsArgs {
    /// Print this preset's TOML (a starting point for your own file).
    pub name: Option<String>,
}

/// Lists the presets, or prints one.
pub fn run(a: &PresetsArgs) -> Result<(), Failure> {
    if let Some(name) = &a.name {
        return print(presets::text(name).map_err(Failure::input)?);
    }
    let mut out =
        String::from("Built-in scenarios (lagfold run <name>, or lagfold presets <name> > my.toml to edit one):\n");
    for (name, text) in presets::ALL {
        let raw = crate::scenario::parse(text, name).map_err(Failure::other)?;
        let default = if *name == presets::DEFAULT { " (demo)" } else { "" };
        let _ = writeln!(out, "  {name:<18} {}{default}", raw.description);
    }
    print(&out)
}
