//! Rank transform for Spearman ICs: average ranks for ties.

/// Replaces `row` by its ranks `1..=n` (ties share their average rank).
pub fn rank_in_place(row: &mut [f64], order: &mut Vec<usize>) {
    let n = row.len();
    order.clear();
    order.extend(0..n);
    order.sort_unstable_by(|&a, &b| row[a].total_cmp(&row[b]));
    let mut ranks = vec![0.0; n];
    let mut i = 0;
    while i < n {
        let mut j = i + 1;
        while j < n && row[order[j]] == row[order[i]] {
            j += 1;
        }
        let avg = (i + j + 1) as f64 / 2.0; // mean of ranks i+1 ..= j
        for &idx in &order[i..j] {
            ranks[idx] = avg;
        }
        i = j;
    }
    row.copy_from_slice(&ranks);
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ties_share_the_average_rank() {
        let mut r = [3.0, 1.0, 3.0, 2.0, 3.0];
        rank_in_place(&mut r, &mut Vec::new());
        assert_eq!(r, [4.0, 1.0, 4.0, 2.0, 4.0]);
    }
}
