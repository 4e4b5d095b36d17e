//! The library's layers, read from the code: which top-level module of
//! `src/` names which (`crate::x` paths and `use crate::{…}` groups, outside
//! comments and test modules). The data's way runs one way: nothing calls
//! back up it, the measurement knows nothing of simulation, and the command
//! line reaches the engine only through the facade.

use std::collections::{BTreeMap, BTreeSet};
use std::path::Path;

/// `module → modules it names`, for every top-level module of `src/`.
fn graph() -> BTreeMap<String, BTreeSet<String>> {
    let mut g: BTreeMap<String, BTreeSet<String>> = BTreeMap::new();
    let mut stack = vec![Path::new(env!("CARGO_MANIFEST_DIR")).join("src")];
    while let Some(dir) = stack.pop() {
        for entry in std::fs::read_dir(&dir).unwrap() {
            let path = entry.unwrap().path();
            if path.is_dir() {
                stack.push(path);
                continue;
            }
            let rel = path.strip_prefix(Path::new(env!("CARGO_MANIFEST_DIR")).join("src")).unwrap();
            let top =
                rel.components().next().unwrap().as_os_str().to_string_lossy().trim_end_matches(".rs").to_string();
            if top == "lib" || top == "main" {
                continue;
            }
            let text = std::fs::read_to_string(&path).unwrap();
            let code = text.split("#[cfg(test)]").next().unwrap();
            let code: String =
                code.lines().filter(|l| !l.trim_start().starts_with("//")).collect::<Vec<_>>().join("\n");
            let named = g.entry(top.clone()).or_default();
            for (i, _) in code.match_indices("crate::") {
                let rest = &code[i + "crate::".len()..];
                let names: Vec<String> = if let Some(group) = rest.strip_prefix('{') {
                    let inner = &group[..group.find('}').unwrap_or(group.len())];
                    inner
                        .split(',')
                        .map(|p| {
                            p.trim()
                                .split(|c: char| !(c.is_alphanumeric() || c == '_'))
                                .next()
                                .unwrap_or("")
                                .to_string()
                        })
                        .collect()
                } else {
                    vec![rest.chars().take_while(|c| c.is_alphanumeric() || *c == '_').collect()]
                };
                named.extend(names.into_iter().filter(|n| !n.is_empty() && *n != top && n != "self"));
            }
        }
    }
    g
}

fn assert_never(g: &BTreeMap<String, BTreeSet<String>>, from: &str, to: &[&str]) {
    let named = g.get(from).unwrap_or_else(|| panic!("no module {from}"));
    let wrong: Vec<_> = to.iter().filter(|t| named.contains(**t)).collect();
    assert!(wrong.is_empty(), "{from} names {wrong:?}; it names {named:?}");
}

#[test]
fn the_data_flows_one_way() {
    let g = graph();
    // No module reaches back to itself, directly or through others.
    fn visit(g: &BTreeMap<String, BTreeSet<String>>, m: &str, path: &mut Vec<String>, done: &mut BTreeSet<String>) {
        if let Some(i) = path.iter().position(|p| p == m) {
            panic!("the modules form a cycle: {}", path[i..].join(" → ") + " → " + m);
        }
        if done.contains(m) {
            return;
        }
        path.push(m.to_string());
        for n in g.get(m).into_iter().flatten() {
            visit(g, n, path, done);
        }
        path.pop();
        done.insert(m.to_string());
    }
    let mut done = BTreeSet::new();
    for m in g.keys() {
        visit(&g, m, &mut Vec::new(), &mut done);
    }
}

#[test]
fn the_measurement_knows_nothing_of_simulation() {
    let g = graph();
    let simulation =
        ["scenario", "decay", "model", "truth", "generate", "simulate", "study", "plan", "stress", "calibrate"];
    let above = ["portfolio", "own_data", "report", "api", "cli"];
    assert_never(&g, "measure", &[&simulation[..], &above[..]].concat());
    assert_never(&g, "reader", &[&simulation[..], &above[..]].concat());
    // The user's own panel: measured, its books built, nothing simulated.
    assert_never(&g, "own_data", &[&simulation[..], &["report", "api", "cli"][..]].concat());
}

#[test]
fn each_stage_calls_only_those_before_it() {
    let g = graph();
    let outputs = ["report", "api", "cli"];
    assert_never(&g, "simulate", &[&["study", "portfolio", "plan", "stress"][..], &outputs[..]].concat());
    assert_never(&g, "portfolio", &[&["study", "plan", "stress"][..], &outputs[..]].concat());
    assert_never(&g, "study", &[&["plan", "stress"][..], &outputs[..]].concat());
    assert_never(&g, "report", &["api", "cli"]);
    assert_never(&g, "api", &["cli"]);
}

#[test]
fn the_command_line_reaches_the_engine_through_the_facade() {
    let g = graph();
    let engine = [
        "measure",
        "own_data",
        "decay",
        "model",
        "truth",
        "generate",
        "simulate",
        "portfolio",
        "study",
        "plan",
        "stress",
        "calibrate",
        "reader",
    ];
    assert_never(&g, "cli", &engine);
    assert!(g["cli"].contains("api"));
}
