//! Finds the line of a key in a TOML text, so that a value error (which serde
//! cannot see) still points at the line to edit.

/// 1-based line of `key_path` (`"assets"`, `"decay.half_life"`, `"decay.values[2]"`).
pub fn line_of(text: &str, key_path: &str) -> Option<usize> {
    let path = key_path.split('[').next().unwrap_or(key_path);
    let (table, key) = match path.rsplit_once('.') {
        Some((t, k)) => (t, k),
        None => ("", path),
    };
    let mut current = String::new();
    for (i, line) in text.lines().enumerate() {
        let t = line.trim();
        if let Some(h) = t.strip_prefix('[').and_then(|h| h.split(']').next()) {
            current = h.trim().to_string();
            continue;
        }
        let Some((k, _)) = t.split_once('=') else { continue };
        let k = k.trim().trim_matches('"');
        if k == key && current == table {
            return Some(i + 1);
        }
        // dotted keys at top level: `decay.half_life = 3`
        if current.is_empty() && !table.is_empty() && k == path {
            return Some(i + 1);
        }
    }
    None
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
}
