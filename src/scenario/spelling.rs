//! Suggestions for misspelt names (presets, keys, families).

/// The candidate within three edits of `name` (Levenshtein, 1966), or that
/// starts with it; ties go to the first listed.
pub fn nearest<'a>(name: &str, candidates: impl IntoIterator<Item = &'a str>) -> Option<&'a str> {
    let lower = name.to_ascii_lowercase();
    candidates
        .into_iter()
        .map(|c| (c, if c.starts_with(&lower) && !lower.is_empty() { 0 } else { edits(&lower, c) }))
        .filter(|(_, d)| *d <= 3)
        .min_by_key(|(_, d)| *d)
        .map(|(c, _)| c)
}

/// Levenshtein distance between two strings (by characters).
pub fn edits(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut row: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.chars().enumerate() {
        let mut prev = row[0];
        row[0] = i + 1;
        for j in 0..b.len() {
            let cur = row[j + 1];
            row[j + 1] = (prev + usize::from(ca != b[j])).min(row[j] + 1).min(cur + 1);
            prev = cur;
        }
    }
    row[b.len()]
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn nearest_names_within_three_edits_or_a_prefix() {
        assert_eq!(edits("kitten", "sitting"), 3);
        assert_eq!(nearest("half_lfe", ["ic1", "half_life"]), Some("half_life"));
        assert_eq!(nearest("expo", ["exponential", "linear"]), Some("exponential"));
        assert_eq!(nearest("volatility", ["ic1", "half_life"]), None);
    }
}
