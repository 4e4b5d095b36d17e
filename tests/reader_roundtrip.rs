//! Reader round trips (proptest, fixed seed): a panel written as CSV in any
//! row order, with any of the accepted date forms, missing-value tokens and
//! padding, reads back to the same values on the same dates. Catches: a value
//! put on the wrong date or next to another asset's return, a token read as
//! a number, a date form read as another date.

use lagfold::reader::{ReadOptions, read_panel_bytes};
use proptest::prelude::*;
use std::path::Path;

/// A generated panel: per date, per asset, (forecast, return), `None` = missing.
type Cells = Vec<Vec<(Option<f64>, Option<f64>)>>;

fn value() -> impl Strategy<Value = Option<f64>> {
    prop_oneof![1 => Just(None), 9 => (-1e3f64..1e3).prop_map(Some)]
}

fn cells() -> impl Strategy<Value = Cells> {
    (3usize..10, 8usize..16)
        .prop_flat_map(|(n, t)| prop::collection::vec(prop::collection::vec((value(), value()), n), t))
}

/// Date `d` (0-based month from January 2001) in form `form`.
fn date(d: usize, form: usize) -> String {
    let (y, m) = (2001 + d / 12, 1 + d % 12);
    match form {
        0 => format!("{y}-{m:02}-28"),
        1 => format!("{y}/{m:02}/28"),
        _ => format!("{y}{m:02}28"),
    }
}

fn text(c: &Cells, form: usize, na: &str, pad: bool, order: &[usize]) -> String {
    let n = c[0].len();
    let cell = |v: Option<f64>| v.map_or(na.to_string(), |x| if pad { format!(" {x} ") } else { x.to_string() });
    let mut out = String::from("date,asset,forecast,return\n");
    for &k in order {
        let (d, a) = (k / n, k % n);
        let (f, r) = c[d][a];
        out.push_str(&format!("{},A{a},{},{}\n", date(d, form), cell(f), cell(r)));
    }
    out
}

/// Per date, the sorted (forecast, return) pairs that hold a value (bits, so NaN compares).
fn pairs(rows: impl Iterator<Item = Vec<(f64, f64)>>) -> Vec<Vec<(u64, u64)>> {
    rows.map(|row| {
        let mut v: Vec<(u64, u64)> = row
            .into_iter()
            .filter(|(f, r)| !(f.is_nan() && r.is_nan()))
            .map(|(f, r)| (f.to_bits(), r.to_bits()))
            .collect();
        v.sort_unstable();
        v
    })
    .collect()
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 128, failure_persistence: None, rng_seed: proptest::test_runner::RngSeed::Fixed(11), ..ProptestConfig::default() })]

    #[test]
    fn a_csv_panel_reads_back_to_its_values(
        c in cells(),
        form in 0usize..3,
        na in prop::sample::select(vec!["", "NA", "NaN", "null", "N/A"]),
        pad in any::<bool>(),
        shuffle in any::<u64>(),
    ) {
        let (t, n) = (c.len(), c[0].len());
        // A fixed permutation of the rows from the seed (Fisher–Yates on a xorshift stream).
        let mut order: Vec<usize> = (0..t * n).collect();
        let mut x = shuffle | 1;
        for i in (1..order.len()).rev() {
            x ^= x << 13; x ^= x >> 7; x ^= x << 17;
            order.swap(i, (x % (i as u64 + 1)) as usize);
        }
        let csv = text(&c, form, na, pad, &order);
        let read = read_panel_bytes(Path::new("p.csv"), csv.into_bytes(), &ReadOptions::default());
        let read = match read { Ok(r) => r, Err(e) => return Err(TestCaseError::fail(e.to_string())) };
        prop_assert_eq!(read.dates.len(), t);
        prop_assert_eq!(&read.dates[0], "2001-01-28");
        let p = &read.panel;
        let nan = f64::NAN;
        // Forecasts of every date; returns of all but the last (forward returns).
        let want = pairs(c.iter().enumerate().map(|(d, row)| {
            row.iter().map(|&(f, r)| (f.unwrap_or(nan), if d + 1 < t { r.unwrap_or(nan) } else { nan })).collect()
        }));
        let got = pairs((0..t).map(|d| {
            (0..p.assets())
                .map(|a| (p.forecasts()[d * p.assets() + a], if d + 1 < t { p.returns()[d * p.assets() + a] } else { nan }))
                .collect()
        }));
        prop_assert_eq!(got, want);
    }
}
