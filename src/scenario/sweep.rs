//! Sweeps: a scenario file may give a list for any numeric field
//! (`assets = [500, 1000, 2000]`, `decay.half_life = [2, 4, 8]`); the file then
//! stands for the grid of every combination, in the order the lists are
//! written, the last list varying fastest.

use super::{Overrides, RawScenario, Scenario, locate};
use crate::error::InputError;

/// Most grid points a sweep may have.
pub const MAX_POINTS: usize = 1000;

/// One axis of a sweep: a key path and its values.
#[derive(Debug, Clone, PartialEq)]
pub struct Axis {
    /// Key path, e.g. `decay.half_life`.
    pub key: String,
    /// The listed values.
    pub values: Vec<toml::Value>,
}

/// One grid point: the value taken on every axis, and the scenario.
#[derive(Debug, Clone)]
pub struct Point {
    /// `(key, value as written)` per axis.
    pub at: Vec<(String, String)>,
    /// The validated scenario of this point.
    pub scenario: Scenario,
}

/// Tables whose numeric keys may be swept (`decay.values` is a list by nature).
const TABLES: [&str; 3] = ["decay", "tails", "portfolio"];

fn is_number(v: &toml::Value) -> bool {
    matches!(v, toml::Value::Integer(_) | toml::Value::Float(_))
}

/// The sweep axes of a scenario text (empty when it is a single scenario).
///
/// # Errors
/// A syntax error with its line.
pub fn axes(text: &str, origin: &str) -> Result<Vec<Axis>, InputError> {
    let table: toml::Table = toml::from_str(text).map_err(|e| super::explain::explain(&e, text, origin))?;
    let mut out = Vec::new();
    let mut visit = |prefix: &str, t: &toml::Table| {
        for (k, v) in t {
            if let toml::Value::Array(a) = v {
                let key = if prefix.is_empty() { k.clone() } else { format!("{prefix}.{k}") };
                if key != "decay.values" && !a.is_empty() && a.iter().all(is_number) {
                    out.push(Axis { key, values: a.clone() });
                }
            }
        }
    };
    visit("", &table);
    for name in TABLES {
        if let Some(toml::Value::Table(t)) = table.get(name) {
            visit(name, t);
        }
    }
    // Keep the order in which the keys appear in the file.
    out.sort_by_key(|a| locate::line_of(text, &a.key).unwrap_or(usize::MAX));
    Ok(out)
}

/// Every grid point of a sweep, validated.
///
/// # Errors
/// Too many points, or a point whose scenario is invalid (named by its values).
pub fn expand(
    text: &str,
    origin: &str,
    default_name: &str,
    ov: &Overrides,
    axes: &[Axis],
) -> Result<Vec<Point>, InputError> {
    let n: usize = axes.iter().map(|a| a.values.len()).product();
    if n > MAX_POINTS {
        return Err(InputError::Parse {
            origin: origin.to_string(),
            line: None,
            message: format!("the sweep has {n} grid points; at most {MAX_POINTS} are allowed"),
        });
    }
    let base: toml::Table = toml::from_str(text).map_err(|e| super::explain::explain(&e, text, origin))?;
    let mut points = Vec::with_capacity(n);
    for i in 0..n {
        let mut t = base.clone();
        let mut at = Vec::with_capacity(axes.len());
        let mut rest = i;
        let mut picks = vec![0; axes.len()];
        for (j, a) in axes.iter().enumerate().rev() {
            picks[j] = rest % a.values.len();
            rest /= a.values.len();
        }
        for (a, &p) in axes.iter().zip(&picks) {
            let v = a.values[p].clone();
            at.push((a.key.clone(), v.to_string()));
            match a.key.split_once('.') {
                Some((table, key)) => {
                    if let Some(toml::Value::Table(sub)) = t.get_mut(table) {
                        sub.insert(key.to_string(), v);
                    }
                }
                None => {
                    t.insert(a.key.clone(), v);
                }
            }
        }
        let label = at.iter().map(|(k, v)| format!("{k} = {v}")).collect::<Vec<_>>().join(", ");
        let here = format!("{origin} (grid point {label})");
        let mut raw: RawScenario =
            toml::Value::Table(t).try_into().map_err(|e: toml::de::Error| super::explain::explain(&e, "", &here))?;
        ov.apply(&mut raw);
        let scenario = Scenario::from_raw(&raw, default_name).map_err(|e| super::locate(e, text, &here))?;
        points.push(Point { at, scenario });
    }
    Ok(points)
}

#[cfg(test)]
mod tests {
    use super::*;

    const TEXT: &str =
        "assets = [100, 200]\nhistory = 60\n[decay]\nfamily = \"exponential\"\nic1 = 0.05\nhalf_life = [2, 4, 8]\n";

    #[test]
    fn lists_become_a_grid_in_file_order_last_fastest() {
        let ax = axes(TEXT, "t").unwrap();
        assert_eq!(ax.iter().map(|a| a.key.as_str()).collect::<Vec<_>>(), ["assets", "decay.half_life"]);
        let pts = expand(TEXT, "t", "t", &Overrides::default(), &ax).unwrap();
        assert_eq!(pts.len(), 6);
        assert_eq!(
            pts[1].at,
            [("assets".to_string(), "100".to_string()), ("decay.half_life".to_string(), "4".to_string())]
        );
        assert_eq!(pts[3].scenario.assets, 200);
        assert!(axes("[decay]\nfamily = \"table\"\nvalues = [0.1, 0.05]\n", "t").unwrap().is_empty());
    }

    #[test]
    fn a_bad_grid_point_is_named() {
        let text = "assets = [100, 5]\n[decay]\nfamily = \"step\"\nic = 0.05\nlength = 2\n";
        let e =
            expand(text, "f.toml", "t", &Overrides::default(), &axes(text, "f.toml").unwrap()).unwrap_err().to_string();
        assert!(e.contains("grid point assets = 5") && e.contains("`assets` must be at least 10, got 5"), "{e}");
    }
}
