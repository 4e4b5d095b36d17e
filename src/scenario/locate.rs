//! Finds the line of a key in a TOML text, so that a value error (which serde
//! cannot see) still points at the line to edit.

use std::collections::HashMap;

/// 1-based line of `key_path` (`"assets"`, `"decay.half_life"`,
/// `"decay.values[2]"`, `"stress.alternatives[1].decay.ic1"`): the key's own
/// line, else the line of the closest table or inline table that holds it (a
/// missing key is reported at its table).
pub fn line_of(text: &str, key_path: &str) -> Option<usize> {
    // An index on the last part names an element of a list value.
    let target = match key_path.rsplit_once('.') {
        Some((head, last)) => format!("{head}.{}", last.split('[').next().unwrap_or(last)),
        None => key_path.split('[').next().unwrap_or(key_path).to_string(),
    };
    let mut best: Option<(usize, usize)> = None; // (length of the matched path, line)
    let mut consider = |path: &str, line: usize| -> bool {
        if path == target {
            return true;
        }
        if target.starts_with(path)
            && target.as_bytes().get(path.len()) == Some(&b'.')
            && best.is_none_or(|(len, _)| path.len() > len)
        {
            best = Some((path.len(), line));
        }
        false
    };
    let mut tables = Tables::default();
    for (i, raw) in text.lines().enumerate() {
        let t = raw.split('#').next().unwrap_or("").trim();
        if tables.read(t) {
            if consider(&tables.current, i + 1) {
                return Some(i + 1);
            }
            continue;
        }
        let Some((k, v)) = t.split_once('=') else { continue };
        let full = join(&tables.current, &clean(k));
        if consider(&full, i + 1) {
            return Some(i + 1);
        }
        if let Some(inner) = v.trim_start().strip_prefix('{') {
            for part in inner.split(',') {
                if let Some((ik, _)) = part.split_once('=')
                    && consider(&join(&full, &clean(ik)), i + 1)
                {
                    return Some(i + 1);
                }
            }
        }
    }
    best.map(|(_, line)| line)
}

/// Follows the table headers of a TOML text line by line: `[a.b]` is
/// `a.b`, the n-th `[[a.b]]` is `a.b[n−1]`.
#[derive(Default)]
pub struct Tables {
    /// The table the lines read so far are in (`""` at the top).
    pub current: String,
    arrays: HashMap<String, usize>,
}

impl Tables {
    /// Reads one trimmed line; whether it was a header.
    pub fn read(&mut self, t: &str) -> bool {
        if let Some(h) = t.strip_prefix("[[") {
            let name = clean(h.split("]]").next().unwrap_or(""));
            let n = self.arrays.entry(name.clone()).or_insert(0);
            self.current = format!("{name}[{n}]");
            *n += 1;
            true
        } else if let Some(h) = t.strip_prefix('[') {
            self.current = clean(h.split(']').next().unwrap_or(""));
            true
        } else {
            false
        }
    }
}

/// A key or header as a dotted path without quotes or spaces.
fn clean(k: &str) -> String {
    k.split('.').map(|p| p.trim().trim_matches('"').trim_matches('\'')).collect::<Vec<_>>().join(".")
}

fn join(table: &str, key: &str) -> String {
    if table.is_empty() { key.to_string() } else { format!("{table}.{key}") }
}

#[cfg(test)]
mod tests {
    use super::line_of;

    #[test]
    fn finds_keys_in_tables_and_at_top_level() {
        let t = "assets = 5\n\n[decay]\nfamily = \"exponential\"\nic1 = 2\n[tails]\nfamily = \"normal\"\n";
        assert_eq!(line_of(t, "assets"), Some(1));
        assert_eq!(line_of(t, "decay.ic1"), Some(5));
        assert_eq!(line_of(t, "tails.family"), Some(7));
        assert_eq!(line_of(t, "history"), None);
        assert_eq!(line_of("decay.values = [1]", "decay.values[0]"), Some(1));
    }

    #[test]
    fn a_missing_key_points_at_its_table_and_alternatives_are_counted() {
        let t = "[decay]\nfamily = \"exponential\"\n[[stress.alternatives]]\nname = \"a\"\n\
                 decay = { family = \"step\", ic = 2 }\n[[stress.alternatives]]\nname = \"b\"\n\
                 decay = { family = \"step\", ic = 0.1, length = 0 }\n";
        assert_eq!(line_of(t, "decay.half_life"), Some(1));
        assert_eq!(line_of(t, "stress.alternatives[0].decay.ic"), Some(5));
        assert_eq!(line_of(t, "stress.alternatives[1].decay.length"), Some(8));
        assert_eq!(line_of(t, "stress.alternatives[1].name"), Some(7));
        assert_eq!(line_of(t, "stress.alternatives[1].decay.half_life"), Some(8));
    }
}
