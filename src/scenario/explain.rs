//! Plain messages for what the TOML reader refuses: the key path and its
//! line, the allowed values in words (not Rust's type names), and the nearest
//! allowed key for a misspelt one.

use super::locate::{Tables, line_of};
use super::spelling::nearest;
use crate::error::InputError;

/// The reader's error as the user should read it.
pub fn explain(e: &toml::de::Error, text: &str, origin: &str) -> InputError {
    let msg = e.message().trim();
    let at = e.span().map(|s| s.start.min(text.len()));
    let mut line = at.map(|o| text[..o].matches('\n').count() + 1);
    let scope = at.map(|o| scope_at(text, o)).unwrap_or_default();
    let message = if let Some(rest) = msg.strip_prefix("unknown field ") {
        let names = ticked(rest);
        let key = names.first().cloned().unwrap_or_default();
        let allowed = &names[1.min(names.len())..];
        // An unknown table (`[stres]`) is reported at its own header: the key
        // belongs to the table around it.
        let scope = match scope.strip_suffix(key.as_str()) {
            Some(parent) if parent.is_empty() || parent.ends_with('.') => parent.trim_end_matches('.').to_string(),
            _ => scope.clone(),
        };
        let hint = nearest(&key, allowed.iter().map(String::as_str))
            .map(|c| format!("; did you mean `{c}`?"))
            .unwrap_or_default();
        format!("unknown key `{}`{hint} Keys allowed here: {}", join(&scope, &key), allowed.join(", "))
            .replacen("` Keys", "`; keys", 1)
    } else if let Some((got, expected)) = type_error(msg) {
        let key = at.map(|o| key_before(text, o)).unwrap_or_default();
        let path = join(&scope, &key);
        let allowed = allowed_words(&path).map_or_else(|| plain_type(expected), str::to_string);
        let sweep = if got == "sequence" {
            " (a list makes a sweep, which only `lagfold run` runs; give one value here)"
        } else {
            ""
        };
        format!("`{path}` must be {allowed}, got {}{sweep}", plain_value(got))
    } else if let Some(rest) = msg.strip_prefix("missing field ") {
        let key = ticked(rest).into_iter().next().unwrap_or_default();
        let path = join(&scope, &key);
        line = line.or_else(|| line_of(text, &path));
        let example = if path == "decay" {
            " (the lagged-IC curve), e.g.\n  [decay]\n  family = \"exponential\"\n  ic1 = 0.045\n  half_life = 4"
        } else {
            ""
        };
        format!("`{path}` is required{example}")
    } else {
        // Syntax: the reader's own words on one line, and the line it is about.
        let words = msg.lines().map(str::trim).filter(|l| !l.is_empty()).collect::<Vec<_>>().join("; ");
        match line.and_then(|l| text.lines().nth(l - 1)).map(str::trim).filter(|l| !l.is_empty()) {
            Some(here) => format!("{words}: {here}"),
            None => words,
        }
    };
    InputError::Parse { origin: origin.to_string(), line, message }
}

/// `("string \"many\"", "usize")` from `invalid type: string "many", expected usize`.
fn type_error(msg: &str) -> Option<(&str, &str)> {
    let rest = msg.strip_prefix("invalid type: ").or_else(|| msg.strip_prefix("invalid value: "))?;
    rest.rsplit_once(", expected ")
}

/// The names in backticks.
fn ticked(s: &str) -> Vec<String> {
    s.split('`').skip(1).step_by(2).map(str::to_string).collect()
}

fn join(scope: &str, key: &str) -> String {
    match (scope.is_empty(), key.is_empty()) {
        (true, _) => key.to_string(),
        (false, true) => scope.to_string(),
        (false, false) => format!("{scope}.{key}"),
    }
}

/// The table holding byte `offset`: the last header above it
/// (`stress.alternatives[1]` for the second `[[stress.alternatives]]`) and
/// the inline table the offset sits in (`decay = { … }`).
fn scope_at(text: &str, offset: usize) -> String {
    let before = &text[..offset];
    // Headers up to the end of the offset's line: an error reported at a
    // header (a missing key) is about that header's table.
    let line_end = text[offset..].find('\n').map_or(text.len(), |i| offset + i);
    let mut tables = Tables::default();
    for l in text[..line_end].lines() {
        tables.read(l.trim());
    }
    let table = tables.current;
    // Inline table on the offset's own line: `decay = { family = "x", … }`.
    let line_start = before.rfind('\n').map_or(0, |i| i + 1);
    let head = &text[line_start..offset];
    if let Some(open) = head.rfind('{')
        && !head[open..].contains('}')
    {
        let inline = head[..open].trim_end().trim_end_matches('=').trim();
        return join(&table, inline.trim_matches('"'));
    }
    table
}

/// The key whose value starts at `offset`: the name before the `=` that precedes it.
fn key_before(text: &str, offset: usize) -> String {
    let head = &text[..offset];
    let Some(eq) = head.rfind('=') else { return String::new() };
    let name = head[..eq].trim_end();
    let start = name.rfind(['\n', '{', ',']).map_or(0, |i| i + 1);
    name[start..].trim().trim_matches('"').to_string()
}

/// Rust's name of a type in words.
fn plain_type(expected: &str) -> String {
    match expected {
        "usize" | "u64" | "u32" => "a whole number ≥ 0".into(),
        "f64" | "f32" => "a number".into(),
        "a boolean" => "true or false".into(),
        "a string" => "text in quotes".into(),
        "a sequence" => "a list".into(),
        e if e.starts_with("struct") => "a table".into(),
        e => e.to_string(),
    }
}

/// The reader's description of the value found, in the file's own terms.
fn plain_value(got: &str) -> String {
    let inner = || got.split('`').nth(1).unwrap_or(got).to_string();
    if got.starts_with("integer") || got.starts_with("floating point") {
        inner()
    } else if let Some(s) = got.strip_prefix("string ") {
        s.to_string()
    } else if got == "sequence" {
        "a list".into()
    } else if got == "map" {
        "a table".into()
    } else if got.starts_with("boolean") {
        inner()
    } else {
        got.to_string()
    }
}

/// The allowed values of a scenario key, in words (presets/README.md).
pub fn allowed_words(path: &str) -> Option<&'static str> {
    let path = match path.split_once("].") {
        Some((head, tail)) if head.starts_with("stress.alternatives[") => tail,
        _ => path,
    };
    Some(match path {
        "assets" => "a whole number, at least 10",
        "history" => "a whole number, at least horizons + 4",
        "horizons" | "paths" => "a whole number, at least 1",
        "truncation" => "a whole number from 1 to 20000",
        "seed" => "a whole number from 0 to 18446744073709551615",
        "periods_per_year" => "a number > 0 (12 monthly, 52 weekly, 252 daily)",
        "residual_vol" => "a number > 0 (a decimal: 0.06 is 6 % per period)",
        "forecast_autocorrelation" | "ic_vol_persistence" => "a number inside (-1, 1)",
        "ic_vol" | "near_best_tolerance" => "a number in [0, 1)",
        "rank_ic" | "stress.replace_defaults" => "true or false",
        "name" => "text in quotes (letters, digits, '-', '_' or '.')",
        "description" => "text in quotes",
        "decay" => "a table: [decay] with family and its parameters",
        "tails" => "a table: [tails] with family (and dof)",
        "portfolio" => "a table: [portfolio] with cost_bps, quantiles, reference_paths, target_vol",
        "stress" => "a table: [stress] with replace_defaults and [[stress.alternatives]]",
        "decay.family" => "text in quotes: exponential, linear, hump, power, step or table",
        "tails.family" => "text in quotes: normal or student_t",
        "decay.ic1" | "decay.ic" | "decay.peak" => "a number inside (-1, 1)",
        "decay.half_life" | "decay.peak_lag" | "decay.shape" | "decay.exponent" => "a number > 0",
        "decay.zero_at" => "a number > 1",
        "decay.length" => "a whole number, at least 1",
        "decay.values" => "a list of numbers inside (-1, 1), lag 1 first",
        "tails.dof" => "a number > 2 and ≤ 1e6",
        "portfolio.cost_bps" => "a number in [0, 10000) basis points",
        "portfolio.target_vol" => "a number above 0 and at most 1 (an annual volatility: 0.04 = 4 %)",
        "portfolio.quantiles" => "a whole number, at least 2",
        "portfolio.reference_paths" => "a whole number from 10 to 100000",
        "stress.alternatives" => "a list of tables: [[stress.alternatives]] with name and decay",
        "stress.alternatives.name" => "text in quotes",
        _ => return None,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn message(text: &str) -> String {
        let e = toml::from_str::<super::super::RawScenario>(text).unwrap_err();
        explain(&e, text, "f.toml").to_string()
    }

    const DECAY: &str = "[decay]\nfamily = \"exponential\"\nic1 = 0.045\nhalf_life = 4\n";

    #[test]
    fn a_misspelt_key_in_a_table_is_found_on_its_own_line_with_a_suggestion() {
        let m = message("assets = 100\n[decay]\nfamily = \"exponential\"\nic1 = 0.045\nhalf_lfe = 4\n");
        assert!(m.starts_with("f.toml, line 5: unknown key `decay.half_lfe`; did you mean `half_life`?"), "{m}");
        let m = message(&format!("asets = 100\n{DECAY}"));
        assert!(m.contains("line 1: unknown key `asets`; did you mean `assets`?"), "{m}");
        let m = message(&format!("{DECAY}[stres]\n"));
        assert!(m.contains("line 5: unknown key `stres`; did you mean `stress`?"), "{m}");
    }

    #[test]
    fn type_errors_name_the_key_and_the_range_in_words() {
        let m = message(&format!("assets = \"many\"\n{DECAY}"));
        assert_eq!(m, "f.toml, line 1: `assets` must be a whole number, at least 10, got \"many\"");
        let m = message(&format!("{DECAY}[portfolio]\nquantiles = 2.5\n"));
        assert!(m.contains("line 6: `portfolio.quantiles` must be a whole number, at least 2, got 2.5"), "{m}");
        let m = message(&format!(
            "{DECAY}[[stress.alternatives]]\nname = \"x\"\ndecay = {{ family = \"step\", ic = 0.1, length = 1.5 }}\n"
        ));
        assert!(
            m.contains("line 7: `stress.alternatives[0].decay.length` must be a whole number, at least 1, got 1.5"),
            "{m}"
        );
        let m = message(&format!("seed = -1\n{DECAY}"));
        assert!(m.contains("`seed` must be a whole number from 0 to 18446744073709551615, got -1"), "{m}");
    }

    #[test]
    fn a_list_outside_run_says_it_is_a_sweep() {
        let m = message(&format!("assets = [100, 200]\n{DECAY}"));
        assert!(m.contains("`assets` must be a whole number, at least 10, got a list (a list makes a sweep"), "{m}");
    }

    #[test]
    fn a_missing_decay_table_shows_an_example() {
        let m = message("assets = 100\n");
        assert!(m.contains("`decay` is required (the lagged-IC curve), e.g."), "{m}");
    }
}
