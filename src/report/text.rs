//! Terminal text: percentages without a negative zero, shares with their
//! Wilson interval, and prose fitted to the terminal's width.

use console::measure_text_width;

/// `100·x` to one decimal without a negative zero (`-0.0` prints as `0.0`).
pub fn per_cent(x: f64) -> f64 {
    let v = 100.0 * x;
    if v.abs() < 0.05 { 0.0 } else { v }
}

/// `x` as a percentage to one decimal: "24.0%".
pub fn pct(x: f64) -> String {
    format!("{:.1}%", per_cent(x))
}

/// `x` with `decimals` decimals, never as a negative zero ("-0.0000").
pub fn fixed(x: f64, decimals: usize) -> String {
    let t = format!("{x:.decimals$}");
    if t.starts_with('-') && t[1..].chars().all(|c| c == '0' || c == '.') { t[1..].to_string() } else { t }
}

/// A mean share with its standard error, right-aligned: " 1.7% ± 0.2".
pub fn pct_se(x: f64, se: Option<f64>) -> String {
    match se {
        Some(s) => format!("{:>5.1}% ± {:.1}", per_cent(x), per_cent(s)),
        None => format!("{:>5.1}%", per_cent(x)),
    }
}

/// A proportion with its 95 % interval in whole percentage points, for a
/// table cell 14 columns wide: " 24.0% (19–30)". An end strictly within 1
/// point of 0 % or 100 % gives both ends one decimal, so a small share never
/// reads "(0–0)" or "(0–1)" for 0.6 %.
pub fn share_ci(rate: f64, ci: [f64; 2]) -> String {
    let (lo, hi) = (100.0 * ci[0], 100.0 * ci[1]);
    let close = |v: f64| v > 0.0 && v < 1.0 || v > 99.0 && v < 100.0;
    let d = if close(lo) || close(hi) { 1 } else { 0 };
    format!("{:>5.1}% ({lo:.d$}–{hi:.d$})", per_cent(rate))
}

/// A share of `n` histories in words with its 95 % Wilson interval:
/// "92% (95% interval 86–96%)".
pub fn share_words(rate: f64, n: usize) -> String {
    let [lo, hi] = crate::stats::wilson(rate, n as f64);
    format!("{:.0}% (95% interval {:.0}–{:.0}%)", per_cent(rate), per_cent(lo), per_cent(hi))
}

/// The widest a terminal table is made (an 80-column terminal).
pub const TABLE_WIDTH: usize = 80;

/// The widest a line of prose is made, even on a wider terminal (longer
/// lines are hard to read; a common typographic rule of thumb).
pub const MAX_PROSE: usize = 100;

/// Fits `text` into `width` columns: a longer line is wrapped at spaces, its
/// continuation lines indented like the line itself; a single word wider than
/// the room (a long path) is cut. Lines that fit are kept as they are but for
/// trailing spaces, so tables made to fit are never rearranged.
pub fn fit(text: &str, width: usize) -> String {
    let width = width.max(20);
    let mut out = String::with_capacity(text.len() + text.len() / 16);
    for line in text.split_inclusive('\n') {
        let (body, newline) = line.strip_suffix('\n').map_or((line, ""), |b| (b, "\n"));
        let body = body.trim_end();
        if measure_text_width(body) <= width {
            out.push_str(body);
            out.push_str(newline);
            continue;
        }
        let lead = &body[..body.len() - body.trim_start().len()];
        // A list item ("- …") hangs its continuation under its text.
        let marker = if body.trim_start().starts_with("- ") { "- " } else { "" };
        let words = &body.trim_start()[marker.len()..];
        let room = width.saturating_sub(measure_text_width(lead) + marker.len()).max(10);
        let mut current = String::new();
        let mut lines = Vec::new();
        for word in words.split_whitespace() {
            for piece in pieces(word, room) {
                let w = measure_text_width(&current);
                if w > 0 && w + 1 + measure_text_width(&piece) > room {
                    lines.push(std::mem::take(&mut current));
                }
                if !current.is_empty() {
                    current.push(' ');
                }
                current.push_str(&piece);
            }
        }
        lines.push(current);
        for (i, l) in lines.iter().enumerate() {
            out.push_str(lead);
            out.push_str(if i == 0 { marker } else { &"  "[..marker.len()] });
            out.push_str(l);
            if i + 1 < lines.len() {
                out.push('\n');
            }
        }
        out.push_str(newline);
    }
    out
}

/// A word cut into pieces of at most `room` columns (only a word wider
/// than a whole line is cut).
fn pieces(word: &str, room: usize) -> Vec<String> {
    if measure_text_width(word) <= room {
        return vec![word.to_string()];
    }
    let mut v = vec![String::new()];
    for c in word.chars() {
        let last = v.last_mut().expect("never empty");
        if measure_text_width(last) + measure_text_width(c.encode_utf8(&mut [0; 4])) > room {
            v.push(String::new());
        }
        v.last_mut().expect("never empty").push(c);
    }
    v
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn long_lines_wrap_at_spaces_and_keep_their_indent() {
        let text = "  Winner's curse: the measured peak overstates the true horizon IC by 0.0037.\nshort\n";
        let got = fit(text, 30);
        assert_eq!(got, "  Winner's curse: the measured\n  peak overstates the true\n  horizon IC by 0.0037.\nshort\n");
        assert!(got.lines().all(|l| measure_text_width(l) <= 30));
        assert_eq!(fit(text, 200), text, "lines that fit are untouched");
        let rebuilt: Vec<&str> = got.split_whitespace().collect();
        assert_eq!(rebuilt, text.split_whitespace().collect::<Vec<_>>(), "no word is lost or split");
    }

    #[test]
    fn list_items_hang_under_their_text() {
        let got = fit("  - one two three four five six seven\n", 20);
        assert_eq!(got, "  - one two three\n    four five six\n    seven\n");
    }

    #[test]
    fn a_word_wider_than_the_line_is_cut() {
        let got = fit(&format!("Outputs: /{}", "a".repeat(45)), 20);
        assert!(got.lines().all(|l| measure_text_width(l) <= 20), "{got}");
        assert_eq!(got.replace(['\n', ' '], ""), format!("Outputs:/{}", "a".repeat(45)));
    }

    #[test]
    fn shares_show_an_interval_that_is_never_a_point() {
        assert_eq!(share_ci(0.24, [0.186, 0.304]), " 24.0% (19–30)");
        assert_eq!(share_ci(0.0, [0.0, 0.0188]), "  0.0% (0–2)");
        assert_eq!(share_ci(1.0, [0.9981, 1.0]), "100.0% (99.8–100.0)");
        assert_eq!(share_ci(0.001, [0.0002, 0.0056]), "  0.1% (0.0–0.6)");
        assert_eq!(pct(-0.0001), "0.0%");
        assert_eq!(
            (fixed(-0.00001, 4), fixed(-0.2, 1), fixed(0.04, 2)),
            ("0.0000".into(), "-0.2".into(), "0.04".into())
        );
    }
}
