//! `report.html`: one self-contained page per output folder. Summary in plain
//! words first, then the charts (inline SVG) with captions, the parameters,
//! the Monte Carlo error of every figure, the methods with their sources and
//! the cautions. Every figure printed carries the JSON pointer of the value it
//! shows in the command's JSON document (`data-json`) and that value in full
//! (`data-value`), so a test can check the two agree.

mod measure;
mod plan;
mod stress;
mod study;
mod sweep;

pub use measure::measure_page;
pub use plan::plan_page;
pub use stress::stress_page;
pub use study::{rule_name, study_page};
pub use sweep::{sweep_page, sweep_parameters};

use super::provenance::Made;
use super::summary::CAUTION;
use std::fmt::Write;

/// How a figure is shown.
#[derive(Debug, Clone, Copy)]
pub enum Fmt {
    /// A share shown as a percentage with this many decimals.
    Pct(usize),
    /// A number with this many decimals.
    Num(usize),
    /// A number as given (an input such as a cost in basis points).
    Plain,
}

/// A figure in the page: its text, tagged with where it lives in the JSON
/// document and its full value.
pub fn fig(pointer: &str, value: f64, f: Fmt) -> String {
    let text = match f {
        Fmt::Pct(d) => format!("{:.d$}%", 100.0 * value),
        Fmt::Num(d) => format!("{value:.d$}"),
        Fmt::Plain => format!("{value}"),
    };
    let scale = if matches!(f, Fmt::Pct(_)) { "100" } else { "1" };
    format!(r#"<span class="fig" data-json="{pointer}" data-value="{value}" data-scale="{scale}">{text}</span>"#)
}

/// A figure that may be absent (a standard error needs two observations):
/// `absent` says why there is none.
pub fn fig_opt(pointer: &str, value: Option<f64>, f: Fmt, absent: &str) -> String {
    value.map_or_else(|| absent.to_string(), |v| fig(pointer, v, f))
}

/// A whole number from the JSON document.
pub fn int(pointer: &str, value: usize) -> String {
    fig(pointer, value as f64, Fmt::Num(0))
}

/// One row of the Monte Carlo error table.
#[derive(Debug, Clone)]
pub struct ErrRow {
    /// What the figure is.
    pub what: String,
    /// The estimate (a [`fig`]).
    pub value: String,
    /// Its Monte Carlo error: a standard error or, for a share, a 95 %
    /// interval (made of [`fig`]s), or why there is none.
    pub se: String,
}

impl ErrRow {
    /// A row from a label and two figures.
    pub fn new(what: impl Into<String>, value: String, se: String) -> Self {
        Self { what: what.into(), value, se }
    }
}

/// The error-table row of a share of histories: the share at JSON pointer
/// `rate_at` and its 95 % Wilson interval at `ci_at`.
pub fn share_row(what: impl Into<String>, rate_at: &str, ci_at: &str, rate: f64, ci: [f64; 2]) -> ErrRow {
    ErrRow::new(
        what,
        fig(rate_at, rate, Fmt::Pct(1)),
        format!(
            "{} – {} (95% Wilson interval)",
            fig(&format!("{ci_at}/0"), ci[0], Fmt::Pct(1)),
            fig(&format!("{ci_at}/1"), ci[1], Fmt::Pct(1))
        ),
    )
}

/// A plain table (header and rows of HTML cells).
#[derive(Debug, Clone, Default)]
pub struct Table {
    /// Heading above the table.
    pub heading: String,
    /// Column names.
    pub header: Vec<String>,
    /// Cells, already HTML.
    pub rows: Vec<Vec<String>>,
}

/// Everything on a page.
#[derive(Debug, Clone, Default)]
pub struct Page {
    /// Title of the page.
    pub title: String,
    /// The plain-language summary (the recommendation first), sentences in HTML.
    pub summary: Vec<String>,
    /// Key figures, one sentence each, shown as a list under the summary.
    pub key_figures: Vec<String>,
    /// Warnings shown under the key figures.
    pub warnings: Vec<String>,
    /// `(heading, paragraph in HTML)` explanations shown before the charts.
    pub explain: Vec<(String, String)>,
    /// `(term, meaning)` of the glossary, shown after the charts.
    pub glossary: Vec<(String, String)>,
    /// Heading of the error table (default: Monte Carlo error).
    pub errors_heading: String,
    /// `(title, caption, svg)` per chart.
    pub charts: Vec<(String, String, String)>,
    /// Result tables shown after the charts.
    pub tables: Vec<Table>,
    /// The parameters as a JSON object (flattened into rows).
    pub parameters: serde_json::Value,
    /// Monte Carlo error of every figure.
    pub errors: Vec<ErrRow>,
    /// Free text above the error table (how the errors were computed).
    pub errors_note: String,
    /// `(what, how and source)` per method.
    pub methods: Vec<(String, String)>,
}

/// HTML-escapes text.
pub fn esc(s: &str) -> String {
    s.replace('&', "&amp;").replace('<', "&lt;").replace('>', "&gt;").replace('"', "&quot;")
}

const STYLE: &str = "\
body{font-family:'DejaVu Sans',Verdana,Arial,sans-serif;color:#1a1a1a;max-width:62rem;margin:0 auto;padding:1rem 1.2rem 3rem;line-height:1.5}\
h1{font-size:1.6rem;margin:.6rem 0 .2rem}h2{font-size:1.25rem;margin-top:2.2rem;border-bottom:2px solid #0072b2;padding-bottom:.2rem}\
.lead{font-size:1.08rem;background:#f2f7fb;border-left:4px solid #0072b2;padding:.6rem 1rem}\
figure{margin:1.4rem 0;break-inside:avoid;page-break-inside:avoid}figure svg{width:100%;height:auto;display:block}\
figcaption{font-size:.95rem;color:#333;margin-top:.3rem}\
table{border-collapse:collapse;margin:.6rem 0;font-size:.92rem;font-variant-numeric:tabular-nums;display:block;overflow-x:auto}\
th,td{padding:.25rem .6rem;border-bottom:1px solid #ddd;text-align:left;vertical-align:top}td.n{text-align:right}th{background:#f4f4f4}\
.caution{background:#fff6e5;border-left:4px solid #e69f00;padding:.6rem 1rem}\
.warning{background:#fdecea;border-left:4px solid #d55e00;padding:.5rem 1rem}dt{font-weight:bold;margin-top:.4rem}dd{margin:0 0 0 1.2rem}.muted{color:#555;font-size:.9rem}\
@media (max-width:700px){body{padding:.6rem}h1{font-size:1.3rem}code{overflow-wrap:anywhere}}\
@media print{body{max-width:none;font-size:10pt}h2{break-after:avoid}figure svg{max-height:118mm;width:auto;max-width:100%;margin:0 auto}.lead{border:1px solid #0072b2}}";

/// The whole page, with the date, version and command line that made it.
pub fn render(page: &Page, made: &Made) -> Vec<u8> {
    let mut h = String::with_capacity(64 * 1024 + page.charts.iter().map(|c| c.2.len()).sum::<usize>());
    let _ = write!(
        h,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n\
         <meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n\
         <title>{}</title>\n<style>{STYLE}</style>\n</head>\n<body>\n<header><h1>{}</h1>\
         <p class=\"muted\" id=\"made\">Made {} by lagfold {} with <code>{}</code> · simulations under \
         stated assumptions, not investment advice</p></header>\n",
        esc(&page.title),
        esc(&page.title),
        made.date,
        made.version,
        esc(&made.command)
    );
    let _ = write!(
        h,
        "<section id=\"summary\">\n<h2>Recommendation</h2>\n<p class=\"lead\">{}</p>\n",
        page.summary.join(" ")
    );
    if !page.key_figures.is_empty() {
        h.push_str("<h3>Key figures</h3>\n<ul class=\"key\">\n");
        for k in &page.key_figures {
            let _ = writeln!(h, "<li>{k}</li>");
        }
        h.push_str("</ul>\n");
    }
    for w in &page.warnings {
        let _ = writeln!(h, "<p class=\"warning\"><strong>Warning.</strong> {}</p>", esc(w));
    }
    h.push_str("</section>\n");
    for (heading, text) in &page.explain {
        let _ = write!(h, "<section class=\"explain\">\n<h2>{}</h2>\n<p>{text}</p>\n</section>\n", esc(heading));
    }
    h.push_str("<section id=\"charts\">\n<h2>Charts</h2>\n");
    if page.charts.is_empty() {
        h.push_str("<p class=\"muted\">Charts were not drawn (<code>--no-charts</code>).</p>\n");
    }
    for (title, caption, svg) in &page.charts {
        let _ = write!(
            h,
            "<figure role=\"img\" aria-label=\"{}\">\n{}\n<figcaption>{}</figcaption>\n</figure>\n",
            esc(title),
            inline_svg(svg),
            esc(caption)
        );
    }
    for t in &page.tables {
        let _ = write!(h, "<h3>{}</h3>\n{}", esc(&t.heading), table(&t.header, &t.rows));
    }
    h.push_str("</section>\n");
    if !page.glossary.is_empty() {
        h.push_str("<section id=\"glossary\">\n<h2>Glossary</h2>\n<dl>\n");
        for (term, meaning) in &page.glossary {
            let _ = writeln!(h, "<dt>{}</dt><dd>{}</dd>", esc(term), esc(meaning));
        }
        h.push_str("</dl>\n</section>\n");
    }
    h.push_str("<section id=\"appendix\">\n<h2>Appendix</h2>\n<div id=\"parameters\">\n<h3>Parameters</h3>\n");
    let rows: Vec<Vec<String>> = flatten(&page.parameters)
        .into_iter()
        .map(|(k, v)| vec![format!("{} <code class=\"muted\">{}</code>", esc(&label(&k)), esc(&k)), esc(&readable(&v))])
        .collect();
    h.push_str(&table(&["parameter".into(), "value".into()], &rows));
    let heading = if page.errors_heading.is_empty() { "Monte Carlo error" } else { &page.errors_heading };
    let _ = writeln!(h, "</div>\n<div id=\"mc-error\">\n<h3>{}</h3>", esc(heading));
    let _ = writeln!(h, "<p>{}</p>", page.errors_note);
    let rows: Vec<Vec<String>> =
        page.errors.iter().map(|r| vec![esc(&r.what), r.value.clone(), r.se.clone()]).collect();
    h.push_str(&table(&["figure".into(), "estimate".into(), "Monte Carlo error".into()], &rows));
    h.push_str("</div>\n<div id=\"methods\">\n<h3>Methods and sources</h3>\n<ul>\n");
    for (what, how) in &page.methods {
        let _ = writeln!(h, "<li><strong>{}.</strong> {}</li>", esc(what), esc(how));
    }
    h.push_str("</ul>\n</div>\n</section>\n<section id=\"cautions\">\n<h2>Cautions</h2>\n");
    let _ = write!(
        h,
        "<p class=\"caution\">{} The figures describe simulated histories drawn from the model and parameters \
         above; real signals and markets can differ in ways the model leaves out.</p>\n</section>\n</body>\n</html>\n",
        esc(CAUTION)
    );
    h.into_bytes()
}

/// The chart's SVG for inlining: the namespace attribute is implied in HTML.
fn inline_svg(svg: &str) -> String {
    svg.replacen(" xmlns=\"http://www.w3.org/2000/svg\"", "", 1)
}

fn table(header: &[String], rows: &[Vec<String>]) -> String {
    let mut h = String::from("<table>\n<thead><tr>");
    for c in header {
        let _ = write!(h, "<th>{c}</th>");
    }
    h.push_str("</tr></thead>\n<tbody>\n");
    for r in rows {
        h.push_str("<tr>");
        for c in r {
            let numeric = c.starts_with("<span class=\"fig\"");
            let _ = write!(h, "<td{}>{c}</td>", if numeric { " class=\"n\"" } else { "" });
        }
        h.push_str("</tr>\n");
    }
    h.push_str("</tbody>\n</table>\n");
    h
}

/// `a.b.c = value` rows of a JSON object; arrays shown compactly.
/// Readable names of the scenario's fields (the field itself is shown beside, in code).
const LABELS: [(&str, &str); 26] = [
    ("name", "Scenario name"),
    ("description", "Description"),
    ("assets", "Breadth N (assets per date)"),
    ("history", "History T (dates per simulated history)"),
    ("horizons", "Longest horizon and lag studied"),
    ("paths", "Simulated histories"),
    ("seed", "Master seed"),
    ("periods_per_year", "Periods per year"),
    ("residual_vol", "Residual volatility per period"),
    ("forecast_autocorrelation", "Forecast autocorrelation per period"),
    ("ic_vol", "Volatility of the common IC shock"),
    ("ic_vol_persistence", "Persistence of the IC shock (AR(1))"),
    ("near_best_tolerance", "Near-best tolerance (share of the best)"),
    ("truncation", "Lag beyond which the IC is zero"),
    ("rank_ic", "Rank ICs measured too"),
    ("alternatives", "Stress alternatives"),
    ("replace_default_alternatives", "Default stress curves replaced"),
    ("decay.family", "Decay family"),
    ("decay.ic1", "Lag-1 IC"),
    ("decay.half_life", "Half-life (periods)"),
    ("tails.family", "Residual distribution"),
    ("tails.dof", "Student t degrees of freedom"),
    ("portfolio.cost_bps", "One-way cost (bps of traded notional)"),
    ("portfolio.quantiles", "Quantiles of the quantile book"),
    ("portfolio.reference_paths", "Reference histories for the true net IR"),
    ("portfolio.target_vol", "Book's target annual volatility"),
];

/// The readable name of a flattened field: from [`LABELS`], else the last
/// part with spaces ("decay.zero_at" → "Decay: zero at").
fn label(key: &str) -> String {
    if let Some((_, l)) = LABELS.iter().find(|(k, _)| *k == key) {
        return (*l).to_string();
    }
    let (head, last) = key.rsplit_once('.').unwrap_or(("", key));
    let words = last.replace('_', " ");
    if head.is_empty() { words } else { format!("{}: {words}", head.replace('_', " ")) }
}

/// A value as a reader expects it: no ".0" on whole numbers, yes/no, "none" for an empty list.
fn readable(v: &str) -> String {
    match v {
        "[]" => "none".into(),
        "true" => "yes".into(),
        "false" => "no".into(),
        x if x.ends_with(".0") && x[..x.len() - 2].parse::<i64>().is_ok() => x[..x.len() - 2].to_string(),
        x => x.to_string(),
    }
}

fn flatten(v: &serde_json::Value) -> Vec<(String, String)> {
    fn go(prefix: &str, v: &serde_json::Value, out: &mut Vec<(String, String)>) {
        match v {
            serde_json::Value::Object(m) => {
                for (k, x) in m {
                    let key = if prefix.is_empty() { k.clone() } else { format!("{prefix}.{k}") };
                    go(&key, x, out);
                }
            }
            serde_json::Value::String(s) => out.push((prefix.into(), s.clone())),
            // A list of tables (stress alternatives) is shown one field per row.
            serde_json::Value::Array(items) if !items.is_empty() && items.iter().all(serde_json::Value::is_object) => {
                for (i, x) in items.iter().enumerate() {
                    go(&format!("{prefix}[{i}]"), x, out);
                }
            }
            other => {
                let mut s = other.to_string();
                if s.chars().count() > 240 {
                    s = s.chars().take(240).collect::<String>() + " …";
                }
                out.push((prefix.into(), s));
            }
        }
    }
    let mut out = Vec::new();
    go("", v, &mut out);
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn figures_carry_their_pointer_and_full_value() {
        let f = fig("/study/rules/peak/hit_rate", 0.22949999999999998, Fmt::Pct(1));
        assert!(f.contains(r#"data-json="/study/rules/peak/hit_rate""#));
        assert!(f.contains(r#"data-value="0.22949999999999998""#));
        assert!(f.ends_with(">22.9%</span>"));
    }

    #[test]
    fn parameters_flatten_with_dotted_keys() {
        let v = serde_json::json!({"a": 1, "b": {"c": "x", "d": [1, 2]}});
        assert_eq!(
            flatten(&v),
            vec![("a".into(), "1".into()), ("b.c".into(), "x".into()), ("b.d".into(), "[1,2]".into())]
        );
    }

    #[test]
    fn text_is_escaped() {
        assert_eq!(esc("<a & \"b\">"), "&lt;a &amp; &quot;b&quot;&gt;");
    }
}
