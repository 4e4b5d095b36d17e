//! Banded cross products `⟨a_t, b_{t+d}⟩` of two date-major matrices: every
//! per-date IC needs one.
//!
//! Each product is summed in one fixed order on every CPU: four running sums,
//! one per lane (entry `k` goes to lane `k mod 4`, in order of `k`, each
//! added by a fused multiply-add, `f64::mul_add`: one rounding), then
//! `(s₀ + s₁) + (s₂ + s₃)`, then the last `n mod 4` entries one by one. Where
//! the CPU has AVX2 and FMA, a build with a register kernel (`vfmadd` on four
//! lanes, each rounded once, as `mul_add` is) is chosen at run time; elsewhere
//! the portable build runs, with the fused multiply-add in software if need
//! be (slower, same bits). A unit test compares the two builds bit for bit.
//! (A general matrix multiply, used before, picks its kernel by CPU, fused
//! on some and not on others, so its sums differed in the last bits from one
//! machine to another; it also computed the products off the band.)
//!
//! The products are taken two rows of `a` by four of `b` at a time, so that
//! each entry loaded serves several sums, over chunks of [`CHUNK`] entries
//! of every row, so that the rows a pair of dates meets stay in the L1 cache.

/// Lanes of running sums per product.
const LANES: usize = 4;

/// Rows of `b` taken at a time, against two rows of `a`.
const COLS: usize = 4;

/// `out[t·w + d] = ⟨a_t, b_{t+d}⟩` for `t < rows_a`, `d < w`, `t + d < rows_b`
/// (zero elsewhere), where `a` and `b` are row-major with rows of `n` entries.
pub fn banded_products(a: &[f64], b: &[f64], n: usize, w: usize, out: &mut Vec<f64>) {
    out.clear();
    if n == 0 {
        return;
    }
    out.resize(a.len() / n * w, 0.0);
    #[cfg(target_arch = "x86_64")]
    if std::arch::is_x86_feature_detected!("avx2") && std::arch::is_x86_feature_detected!("fma") {
        // SAFETY: the CPU supports AVX2 and FMA, checked just above.
        return unsafe { banded_avx2(a, b, n, w, out) };
    }
    banded_any(a, b, n, w, out, block::<2, COLS>);
}

/// [`banded_products`] compiled for AVX2 and FMA, with the register kernel.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn banded_avx2(a: &[f64], b: &[f64], n: usize, w: usize, out: &mut [f64]) {
    // SAFETY (of the kernel's call): this function runs only where the CPU
    // has AVX2 and FMA.
    banded_any(a, b, n, w, out, |x, y, acc| unsafe { block_2x4_fma(x, y, acc) });
}

/// [`block`]`::<2, 4>` in AVX2 registers: lane `l` of each register is lane
/// `l` of a running sum, and `_mm256_fmadd_pd` rounds each lane once, as
/// `f64::mul_add` does, so the sums are the portable kernel's bit for bit.
///
/// # Safety
/// The CPU must have AVX2 and FMA.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn block_2x4_fma(x: [&[f64]; 2], y: [&[f64]; COLS], acc: &mut Sums<2, COLS>) {
    use std::arch::x86_64::{__m256d, _mm256_fmadd_pd, _mm256_loadu_pd, _mm256_storeu_pd};
    let len = x[0].len();
    assert!(
        len.is_multiple_of(LANES) && x.iter().chain(&y).all(|r| r.len() == len),
        "rows of whole lane groups, one length"
    );
    // SAFETY: every row holds `len` entries (asserted), and each load reads
    // LANES of them from a start below `len`; `acc`'s lanes are LANES apart.
    unsafe {
        let mut s: [[__m256d; COLS]; 2] =
            std::array::from_fn(|i| std::array::from_fn(|c| _mm256_loadu_pd(acc[i][c].as_ptr())));
        let mut k = 0;
        while k < len {
            let x0 = _mm256_loadu_pd(x[0].as_ptr().add(k));
            let x1 = _mm256_loadu_pd(x[1].as_ptr().add(k));
            for c in 0..COLS {
                let yc = _mm256_loadu_pd(y[c].as_ptr().add(k));
                s[0][c] = _mm256_fmadd_pd(x0, yc, s[0][c]);
                s[1][c] = _mm256_fmadd_pd(x1, yc, s[1][c]);
            }
            k += LANES;
        }
        for i in 0..2 {
            for c in 0..COLS {
                _mm256_storeu_pd(acc[i][c].as_mut_ptr(), s[i][c]);
            }
        }
    }
}

/// Running lane sums of `R × C` products.
type Sums<const R: usize, const C: usize> = [[[f64; LANES]; C]; R];

/// Entries of each row taken at a time (1 KB): a pair of rows of `a` and the
/// `w + 1` rows of `b` they meet stay in the L1 cache while they are summed.
const CHUNK: usize = 128;

/// The band for any CPU (inlined into each caller's features); `out` is
/// zeroed and `rows_a × w` long.
#[inline(always)]
fn banded_any(
    a: &[f64],
    b: &[f64],
    n: usize,
    w: usize,
    out: &mut [f64],
    kernel: impl Fn([&[f64]; 2], [&[f64]; COLS], &mut Sums<2, COLS>),
) {
    let (rows_a, rows_b) = (a.len() / n, b.len() / n);
    let whole = n - n % LANES;
    // Row t + i of `a` meets row j of `b` at lag j − t − i, if in the band.
    let lag = |t: usize, j: usize| j.checked_sub(t).filter(|&d| d < w);
    // The running lane sums of every product in the band, at [t·w + d].
    let mut acc = vec![[0.0; LANES]; rows_a * w];
    let mut k0 = 0;
    while k0 < whole {
        let k1 = (k0 + CHUNK).min(whole);
        let row_a = |t: usize| &a[t * n + k0..t * n + k1];
        let row_b = |t: usize| &b[t * n + k0..t * n + k1];
        let mut t = 0;
        // Rows t and t + 1 of `a` meet rows t ..= t + w of `b`; four at a time.
        while t + 2 <= rows_a {
            let end = (t + w + 1).min(rows_b);
            let mut j = t;
            while j + COLS <= end {
                let mut s = [[[0.0; LANES]; COLS]; 2];
                for (i, line) in s.iter_mut().enumerate() {
                    for (c, sums) in line.iter_mut().enumerate() {
                        if let Some(d) = lag(t + i, j + c) {
                            *sums = acc[(t + i) * w + d];
                        }
                    }
                }
                kernel([row_a(t), row_a(t + 1)], std::array::from_fn(|c| row_b(j + c)), &mut s);
                for (i, line) in s.iter().enumerate() {
                    for (c, sums) in line.iter().enumerate() {
                        if let Some(d) = lag(t + i, j + c) {
                            acc[(t + i) * w + d] = *sums;
                        }
                    }
                }
                j += COLS;
            }
            for j in j..end {
                for t in [t, t + 1] {
                    if let Some(d) = lag(t, j) {
                        add_one(&mut acc[t * w + d], row_a(t), row_b(j));
                    }
                }
            }
            t += 2;
        }
        if t < rows_a {
            for j in t..(t + w).min(rows_b) {
                add_one(&mut acc[t * w + j - t], row_a(t), row_b(j));
            }
        }
        k0 = k1;
    }
    for t in 0..rows_a {
        for d in 0..w.min(rows_b.saturating_sub(t)) {
            let s = acc[t * w + d];
            let mut sum = (s[0] + s[1]) + (s[2] + s[3]);
            for k in whole..n {
                sum = a[t * n + k].mul_add(b[(t + d) * n + k], sum);
            }
            out[t * w + d] = sum;
        }
    }
}

/// One product's chunk added into its lane sums (a function, not a closure,
/// so that it is inlined into the AVX2 build with its features).
#[inline(always)]
fn add_one(sums: &mut [f64; LANES], x: &[f64], y: &[f64]) {
    let mut s = [[*sums]];
    block::<1, 1>([x], [y], &mut s);
    *sums = s[0][0];
}

/// Adds rows `x_i · y_c` of equal length (a multiple of [`LANES`]) into the
/// running lane sums `acc[i][c]`: entry `k` into lane `k mod LANES`, in order.
#[inline(always)]
fn block<const R: usize, const C: usize>(x: [&[f64]; R], y: [&[f64]; C], acc: &mut Sums<R, C>) {
    // A local copy, so the sums can live in registers: the loop's bounds
    // checks could panic, and the caller's `acc` would have to be current then.
    let mut s = *acc;
    // Rows as runs of whole lane groups, all of one length `m` (so that the
    // loop's index needs no check per row).
    let m = x[0].len() / LANES;
    let (x, y) = (x.map(|r| &r.as_chunks::<LANES>().0[..m]), y.map(|r| &r.as_chunks::<LANES>().0[..m]));
    for q in 0..m {
        let (xs, ys) = (x.map(|r| r[q]), y.map(|r| r[q]));
        for i in 0..R {
            for c in 0..C {
                for l in 0..LANES {
                    s[i][c][l] = xs[i][l].mul_add(ys[c][l], s[i][c][l]);
                }
            }
        }
    }
    *acc = s;
}

#[cfg(test)]
mod tests {
    use super::*;

    /// One product in the module's order, written out plainly.
    fn reference(x: &[f64], y: &[f64]) -> f64 {
        let whole = x.len() - x.len() % LANES;
        let mut s = [0.0; LANES];
        for k in 0..whole {
            s[k % LANES] = x[k].mul_add(y[k], s[k % LANES]);
        }
        let mut sum = (s[0] + s[1]) + (s[2] + s[3]);
        for k in whole..x.len() {
            sum = x[k].mul_add(y[k], sum);
        }
        sum
    }

    fn draws(len: usize, seed: u64) -> Vec<f64> {
        let mut rng = crate::rng::path_rng(seed, 0);
        let mut v = vec![0.0; len];
        crate::rng::fill_normal(&mut rng, &mut v);
        v
    }

    /// Every entry in and out of the band, for odd and even row counts, more
    /// or fewer rows of `b` than of `a`, and lengths with and without a
    /// remainder: the fixed order exactly, and the plain sum within rounding.
    #[test]
    fn every_product_is_summed_in_the_fixed_order() {
        for (n, ra, rb, w) in
            [(7, 70, 69, 5), (8, 9, 12, 4), (1, 5, 5, 3), (13, 6, 3, 24), (4, 1, 1, 1), (9, 10, 40, 1)]
        {
            let (a, b) = (draws(ra * n, 1), draws(rb * n, 2));
            let mut out = Vec::new();
            banded_products(&a, &b, n, w, &mut out);
            assert_eq!(out.len(), ra * w);
            for t in 0..ra {
                for d in 0..w {
                    let got = out[t * w + d];
                    if t + d >= rb {
                        assert_eq!(got, 0.0, "n {n} t {t} d {d}");
                        continue;
                    }
                    let (x, y) = (&a[t * n..(t + 1) * n], &b[(t + d) * n..(t + d + 1) * n]);
                    assert_eq!(got.to_bits(), reference(x, y).to_bits(), "n {n} t {t} d {d}");
                    let plain: f64 = x.iter().zip(y).map(|(p, q)| p * q).sum();
                    let scale: f64 = x.iter().zip(y).map(|(p, q)| (p * q).abs()).sum();
                    // Two orders of one sum each err by at most γ_n·Σ|x·y| ≈ n·ε·Σ|x·y|
                    // (Higham, 2002, §3.1); twice that for both, twice again as slack.
                    assert!((got - plain).abs() <= 4.0 * n as f64 * f64::EPSILON * scale, "n {n} t {t} d {d}");
                }
            }
        }
    }

    /// The AVX2 build against the portable one, bit for bit (passes vacuously
    /// on a CPU without AVX2: there only the portable one runs).
    #[test]
    fn the_avx2_build_matches_the_portable_one_bit_for_bit() {
        #[cfg(target_arch = "x86_64")]
        if std::arch::is_x86_feature_detected!("avx2") {
            let (n, ra, w) = (1001, 37, 24);
            let (a, b) = (draws(ra * n, 3), draws(ra * n, 4));
            let (mut one, mut two) = (vec![0.0; ra * w], vec![0.0; ra * w]);
            banded_any(&a, &b, n, w, &mut one, block::<2, COLS>);
            // SAFETY: the CPU supports AVX2, checked above.
            unsafe { banded_avx2(&a, &b, n, w, &mut two) };
            let bits = |v: &[f64]| v.iter().map(|x| x.to_bits()).collect::<Vec<_>>();
            assert_eq!(bits(&one), bits(&two));
        }
    }
}
