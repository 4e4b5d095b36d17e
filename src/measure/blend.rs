//! A blend of several signals: on each date, each signal is standardised
//! across the assets that have it (z-scores: minus the date's mean, over the
//! date's standard deviation), and the blend is the stated weighted sum of
//! the z-scores, on the assets that have every blended signal. Standardising
//! first makes the weights mean what they say whatever each signal's units;
//! it is the usual way to combine alphas (common practice; the weights of
//! such a composite are discussed by Grinold and Kahn, 2000, ch. 10).

/// One date's z-scores of `row` in place: NaN stays NaN; a row with fewer
/// than two values, or no spread, becomes all NaN.
pub fn standardise_row(row: &mut [f64]) {
    let (mut n, mut sum) = (0usize, 0.0);
    for v in row.iter().filter(|v| v.is_finite()) {
        n += 1;
        sum += v;
    }
    let mean = sum / n.max(1) as f64;
    let ss: f64 = row.iter().filter(|v| v.is_finite()).map(|v| (v - mean) * (v - mean)).sum();
    let sd = (ss / n.max(1) as f64).sqrt();
    if n < 2 || sd <= 0.0 || !sd.is_finite() {
        row.iter_mut().for_each(|v| *v = f64::NAN);
        return;
    }
    row.iter_mut().for_each(|v| *v = (*v - mean) / sd);
}

/// The blend `Σ w_j z_j` of `signals` (each `dates × assets`, row-major),
/// with `assets` columns; NaN where any blended signal is missing.
///
/// # Panics
/// Never on matching input; `signals` and `weights` must have equal lengths
/// and every matrix the same size (the caller builds them).
pub fn blend(signals: &[&[f64]], weights: &[f64], assets: usize) -> Vec<f64> {
    let cells = signals.first().map_or(0, |s| s.len());
    let mut out = vec![0.0; cells];
    let mut z = vec![0.0; assets];
    for (s, &w) in signals.iter().zip(weights) {
        for (row_out, row_in) in out.chunks_mut(assets).zip(s.chunks(assets)) {
            z.copy_from_slice(row_in);
            standardise_row(&mut z);
            row_out.iter_mut().zip(&z).for_each(|(o, v)| *o += w * v);
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn z_scores_have_mean_zero_and_unit_spread() {
        let mut row = vec![1.0, f64::NAN, 4.0, 7.0];
        standardise_row(&mut row);
        let v: Vec<f64> = row.iter().copied().filter(|x| x.is_finite()).collect();
        assert_eq!(v.len(), 3);
        assert!(v.iter().sum::<f64>().abs() < 1e-12);
        assert!((v.iter().map(|x| x * x).sum::<f64>() / 3.0 - 1.0).abs() < 1e-12);
        let mut flat = vec![2.0, 2.0, 2.0];
        standardise_row(&mut flat);
        assert!(flat.iter().all(|x| x.is_nan()));
    }

    #[test]
    fn blend_is_the_weighted_sum_of_z_scores_and_missing_where_any_is() {
        // Two dates of three assets; the second signal is the first times 10 plus 3 (same z-scores).
        let a = [1.0, 2.0, 3.0, 5.0, f64::NAN, 1.0];
        let b: Vec<f64> = a.iter().map(|x| 10.0 * x + 3.0).collect();
        let out = blend(&[&a, &b], &[0.25, 0.75], 3);
        let mut z = a.to_vec();
        standardise_row(&mut z[..3]);
        standardise_row(&mut z[3..]);
        for (o, z) in out.iter().zip(&z) {
            assert!(o.is_nan() == z.is_nan() && (o.is_nan() || (o - z).abs() < 1e-12), "{o} vs {z}");
        }
    }
}
