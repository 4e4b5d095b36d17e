//! Charts and `report.html` of every command, as a user gets them: each chart
//! file exists and is valid (a PNG that decodes, with its title in a `tEXt`
//! chunk; an SVG with the title as text), and the report parses as HTML
//! without errors, has every section, links to nothing outside itself, and
//! every figure it prints equals the value in the command's JSON document.

use assert_cmd::Command;
use scraper::{Html, Selector};
use serde_json::Value;
use std::path::Path;

fn lagfold() -> Command {
    Command::cargo_bin("lagfold").unwrap()
}

/// A small scenario that runs in well under a second.
const SMALL: &str = "name = \"small\"\nassets = 200\nhistory = 60\nhorizons = 12\npaths = 80\n\
[decay]\nfamily = \"exponential\"\nic1 = 0.06\nhalf_life = 3\n[portfolio]\nreference_paths = 20\n";

fn sel(s: &str) -> Selector {
    Selector::parse(s).unwrap()
}

/// The PNG decodes to the chart's size and carries `title`; returns the title.
fn png_title(path: &Path) -> String {
    let bytes = std::fs::read(path).unwrap();
    let mut reader = png::Decoder::new(std::io::Cursor::new(&bytes)).read_info().unwrap();
    let mut buf = vec![0; reader.output_buffer_size()];
    let frame = reader.next_frame(&mut buf).unwrap();
    assert!(frame.width == 1000 && frame.height >= 400, "{}: {}×{}", path.display(), frame.width, frame.height);
    let pixels = &buf[..frame.buffer_size()];
    let distinct: std::collections::HashSet<&[u8]> = pixels.chunks(3).collect();
    assert!(distinct.len() > 20, "{}: only {} colours, nothing drawn", path.display(), distinct.len());
    let info = reader.info();
    let title = info.uncompressed_latin1_text.iter().find(|t| t.keyword == "Title").map(|t| t.text.clone());
    title.unwrap_or_else(|| panic!("{}: no Title chunk", path.display()))
}

/// Every named chart exists as PNG and SVG with `expected` in its title.
fn check_charts(dir: &Path, charts: &[(&str, &str)]) {
    for (name, expected) in charts {
        let title = png_title(&dir.join(format!("{name}.png")));
        assert!(title.contains(expected), "{name}.png title `{title}` lacks `{expected}`");
        let svg = std::fs::read_to_string(dir.join(format!("{name}.svg"))).unwrap();
        assert!(svg.starts_with("<svg") && svg.trim_end().ends_with("</svg>"), "{name}.svg is not an SVG document");
        let escaped = title.replace('&', "&amp;").replace('<', "&lt;").replace('>', "&gt;").replace('\'', "&apos;");
        assert!(svg.contains(&escaped), "{name}.svg lacks its title");
        assert!(svg.matches("<text").count() > 10 && svg.len() > 5_000, "{name}.svg is nearly empty");
    }
}

/// Pointers whose figures are inputs or shapes, not Monte Carlo estimates,
/// or are differences of values whose errors the table lists.
fn needs_no_error_row(pointer: &str) -> bool {
    ["/study/cost_bps", "/cost_bps", "/fitted_shape"].contains(&pointer)
        || ["/horizon/", "/holding/"].iter().any(|p| pointer.starts_with(p))
        || ["/se/", "/ci_low/", "/ci_high/"].iter().any(|p| pointer.contains(p))
}

/// The report parses, has every section, is self-contained, and its figures
/// equal the JSON document's; returns the page.
fn check_report(dir: &Path, json: &str, charts: usize) -> Html {
    let text = std::fs::read_to_string(dir.join("report.html")).unwrap();
    let page = Html::parse_document(&text);
    assert!(page.errors.is_empty(), "HTML parse errors: {:?}", page.errors);
    for id in ["summary", "charts", "appendix", "cautions"] {
        assert_eq!(page.select(&sel(&format!("section#{id} h2"))).count(), 1, "section {id}");
    }
    for id in ["parameters", "mc-error", "methods"] {
        assert_eq!(page.select(&sel(&format!("section#appendix div#{id} h3"))).count(), 1, "appendix part {id}");
    }
    for bad in ["http://", "https://", "url(", "@import", "<script", "<link", "<img", "<iframe", " src="] {
        assert!(!text.contains(bad), "report.html contains `{bad}`");
    }
    assert!(page.select(&sel("[href]")).all(|e| e.value().attr("href").unwrap().starts_with('#')));
    assert_eq!(page.select(&sel("figure svg")).count(), charts);
    for c in page.select(&sel("figcaption")) {
        let text: String = c.text().collect();
        assert!(text.len() > 30 && text.matches(". ").count() == 0, "one sentence saying what to look at: {text}");
    }
    let caution: String = page.select(&sel("#cautions")).next().unwrap().text().collect();
    assert!(caution.contains("not investment advice") && caution.contains("licensed professionals"));
    let lead: String = page.select(&sel("#summary p")).next().unwrap().text().collect();
    let sentences = lead.matches(". ").count() + usize::from(lead.trim_end().ends_with('.'));
    // The lead is the recommendation: a sentence or a few a committee can act on, the figures after it.
    assert!((1..=4).contains(&sentences), "the recommendation has {sentences} sentences: {lead}");
    assert!(page.select(&sel("#summary ul.key li")).count() >= 2, "key figures follow the recommendation");
    assert!(page.select(&sel("#glossary dt")).count() >= 5, "a glossary");

    let doc: Value = serde_json::from_slice(&std::fs::read(dir.join(json)).unwrap()).unwrap();
    let figs: Vec<_> = page.select(&sel("span.fig")).collect();
    assert!(figs.len() >= 8, "only {} tagged figures", figs.len());
    for f in &figs {
        let pointer = f.value().attr("data-json").unwrap();
        let shown: f64 = f.value().attr("data-value").unwrap().parse().unwrap();
        let scale: f64 = f.value().attr("data-scale").unwrap().parse().unwrap();
        let value = doc.pointer(pointer).and_then(Value::as_f64).unwrap_or_else(|| panic!("{json} has no {pointer}"));
        assert_eq!(shown, value, "{pointer}");
        let text: String = f.text().collect();
        let number: f64 = text.trim_end_matches('%').parse().unwrap();
        let decimals = text.trim_end_matches('%').split('.').nth(1).map_or(0, str::len) as i32;
        // The printed number is the value rounded to its shown decimals: within half a unit of the last
        // digit (plus 1e-9 for the binary representation of that half).
        assert!((number - value * scale).abs() <= 0.5 * 10f64.powi(-decimals) + 1e-9, "{pointer}: {text} vs {value}");
    }
    let in_errors: Vec<String> =
        page.select(&sel("#mc-error span.fig")).map(|f| f.value().attr("data-json").unwrap().to_string()).collect();
    for f in page.select(&sel("#summary span.fig")) {
        let (pointer, text): (&str, String) = (f.value().attr("data-json").unwrap(), f.text().collect());
        if (text.contains('.') || text.contains('%')) && !needs_no_error_row(pointer) {
            assert!(in_errors.iter().any(|p| p == pointer), "summary figure {pointer} has no Monte Carlo error row");
        }
    }
    page
}

#[test]
fn run_draws_every_study_chart_and_a_report_that_agrees_with_summary_json() {
    let tmp = tempfile::tempdir().unwrap();
    let file = tmp.path().join("small.toml");
    std::fs::write(&file, SMALL).unwrap();
    let out = tmp.path().join("o");
    lagfold().arg("run").arg(&file).args(["--cost-bps", "5,30", "-q", "--out"]).arg(&out).assert().success();
    check_charts(
        &out,
        &[
            ("horizon_ic", "Measured horizon IC"),
            ("lagged_ic", "Measured lagged IC"),
            ("chosen_horizon", "Which horizon each rule picks"),
            ("regret", "Regret"),
            ("net_ir", "Net information ratio"),
            ("optima", "Why the horizon-IC peak and the best holding differ"),
        ],
    );
    let net = std::fs::read_to_string(out.join("net_ir.svg")).unwrap();
    assert!(net.contains("one-way cost 5 bps") && net.contains("one-way cost 30 bps"), "a panel per cost level");
    let page = check_report(&out, "summary.json", 6);
    let params: String = page.select(&sel("#parameters")).next().unwrap().text().collect();
    assert!(params.contains("decay.half_life") && params.contains("portfolio.reference_paths"));
    let methods: String = page.select(&sel("#methods")).next().unwrap().text().collect();
    for source in ["Newey and West (1987)", "Qian, Hua and Sorensen (2007)", "Okabe and Ito (2008)"] {
        assert!(methods.contains(source), "methods cite {source}");
    }
}

#[test]
fn no_charts_skips_the_pictures_but_keeps_the_report() {
    let tmp = tempfile::tempdir().unwrap();
    let file = tmp.path().join("small.toml");
    std::fs::write(&file, SMALL).unwrap();
    let out = tmp.path().join("o");
    lagfold().arg("run").arg(&file).args(["--no-charts", "-q", "--out"]).arg(&out).assert().success();
    let names: Vec<String> =
        std::fs::read_dir(&out).unwrap().map(|e| e.unwrap().file_name().to_string_lossy().into_owned()).collect();
    assert!(!names.iter().any(|n| n.ends_with(".png") || n.ends_with(".svg")), "{names:?}");
    let page = check_report(&out, "summary.json", 0);
    let charts: String = page.select(&sel("#charts")).next().unwrap().text().collect();
    assert!(charts.contains("--no-charts"));
}

#[test]
fn plan_draws_records_against_history_with_the_target() {
    let tmp = tempfile::tempdir().unwrap();
    let file = tmp.path().join("small.toml");
    std::fs::write(&file, SMALL).unwrap();
    let out = tmp.path().join("p");
    lagfold()
        .arg("plan")
        .arg(&file)
        .args(["--histories", "30,60,90", "--target", "near-hit>=0.7", "-q", "--out"])
        .arg(&out)
        .assert()
        .success();
    check_charts(&out, &[("plan", "How each rule's record improves with history")]);
    let svg = std::fs::read_to_string(out.join("plan.svg")).unwrap();
    assert!(svg.contains("target: peak near-hit ≥") && svg.contains("70%"), "target line in the legend");
    check_report(&out, "plan.json", 1);
}

#[test]
fn stress_draws_the_regret_heatmap_with_values_in_the_cells() {
    let tmp = tempfile::tempdir().unwrap();
    let file = tmp.path().join("small.toml");
    std::fs::write(&file, SMALL).unwrap();
    let out = tmp.path().join("s");
    lagfold().arg("stress").arg(&file).args(["-q", "--out"]).arg(&out).assert().success();
    check_charts(&out, &[("stress_regret", "What a choice gives up"), ("stress_curves", "decay curves")]);
    let doc: Value = serde_json::from_slice(&std::fs::read(out.join("stress.json")).unwrap()).unwrap();
    let cell = doc.pointer("/horizon/regret_rel/0/1").and_then(Value::as_f64).unwrap();
    let svg = std::fs::read_to_string(out.join("stress_regret.svg")).unwrap();
    assert!(svg.contains(&format!("{:.1}%", 100.0 * cell)), "cell value printed");
    check_report(&out, "stress.json", 2);
}

#[test]
fn measure_draws_the_users_curves_and_the_bootstrap() {
    let tmp = tempfile::tempdir().unwrap();
    let panel = tmp.path().join("panel.csv");
    lagfold()
        .args(["panel", "monthly-steady", "--assets", "200", "--history", "60", "--seed", "3", "-q", "--out"])
        .arg(&panel)
        .assert()
        .success();
    let out = tmp.path().join("m");
    lagfold()
        .arg("measure")
        .arg(&panel)
        .args(["--horizons", "12", "--paths", "40", "--bootstrap", "200", "-q", "--out"])
        .arg(&out)
        .assert()
        .success();
    check_charts(
        &out,
        &[
            ("measured_ic", "Your signal's measured decay"),
            ("rolling_ic", "rolling 12-period mean"),
            ("bootstrap", "bootstrap resamples"),
        ],
    );
    let svg = std::fs::read_to_string(out.join("measured_ic.svg")).unwrap();
    assert!(svg.contains("fitted") && svg.contains("95% interval"));
    check_report(&out, "measure.json", 3);
    // per_date.csv: a row per date, every lag, rank and horizon column, and the
    // last date skipped for want of a later return, as measure.json lists it.
    let per_date = std::fs::read_to_string(out.join("per_date.csv")).unwrap();
    let lines: Vec<&str> = per_date.lines().collect();
    assert_eq!(lines.len(), 61);
    assert_eq!(lines[0].split(',').count(), 2 + 3 * 12 + 1);
    assert!(
        lines[60].starts_with("2005-12-31,0,") && lines[60].ends_with("last date: no return after it"),
        "{}",
        lines[60]
    );
    let m: Value = serde_json::from_slice(&std::fs::read(out.join("measure.json")).unwrap()).unwrap();
    assert_eq!(m["skipped_dates"][0]["date"], "2005-12-31");
    let first: Vec<&str> = lines[1].split(',').collect();
    assert_eq!(first[1], "200");
    let ic1: f64 = first[2].parse().unwrap();
    let mean: f64 = (1..60).map(|i| lines[i].split(',').nth(2).unwrap().parse::<f64>().unwrap()).sum::<f64>() / 59.0;
    assert!((mean - m["lagged_ic"]["mean"][0].as_f64().unwrap()).abs() < 1e-7 && ic1.abs() < 1.0);
}

#[test]
fn a_sweep_draws_its_grid_and_tabulates_the_points() {
    let tmp = tempfile::tempdir().unwrap();
    let file = tmp.path().join("grid.toml");
    std::fs::write(&file, SMALL.replace("half_life = 3", "half_life = [2, 4]")).unwrap();
    let out = tmp.path().join("g");
    lagfold().arg("run").arg(&file).args(["-q", "--out"]).arg(&out).assert().success();
    check_charts(&out, &[("sweep", "grid points")]);
    let svg = std::fs::read_to_string(out.join("sweep.svg")).unwrap();
    let texts: Vec<&str> = svg.split("</text>").map(|t| t.rsplit('>').next().unwrap_or("").trim()).collect();
    assert!(
        texts.contains(&"grid point: decay.half_life") && texts.contains(&"2") && texts.contains(&"4"),
        "the x axis names the swept field and each point's value: {texts:?}"
    );
    let page = check_report(&out, "sweep.json", 1);
    assert_eq!(page.select(&sel("#charts table tbody tr")).count(), 2);
}

#[test]
fn user_curve_names_are_shown_as_text_not_markup() {
    let tmp = tempfile::tempdir().unwrap();
    let file = tmp.path().join("named.toml");
    let named = format!(
        "{SMALL}[stress]\nreplace_defaults = true\n[[stress.alternatives]]\nname = \"<b>slow & steady</b>\"\n\
         decay = {{ family = \"exponential\", ic1 = 0.06, half_life = 12 }}\n"
    );
    std::fs::write(&file, named).unwrap();
    let out = tmp.path().join("s");
    lagfold().arg("stress").arg(&file).args(["-q", "--out"]).arg(&out).assert().success();
    let page = check_report(&out, "stress.json", 2);
    assert_eq!(page.select(&sel("b")).count(), 0, "a name became markup");
    let summary: String = page.select(&sel("#summary")).next().unwrap().text().collect();
    assert!(summary.contains("<b>slow & steady</b>"), "{summary}");
}

#[test]
fn measure_compares_signals_and_trades_the_first_in_tranches() {
    let tmp = tempfile::tempdir().unwrap();
    let panel = tmp.path().join("panel.csv");
    lagfold()
        .args(["panel", "monthly-steady", "--assets", "150", "--history", "48", "--seed", "5", "-q", "--out"])
        .arg(&panel)
        .assert()
        .success();
    // A second signal: the first with noise of its own (a deterministic wobble).
    let text = std::fs::read_to_string(&panel).unwrap();
    let two: String = text
        .lines()
        .enumerate()
        .map(|(i, l)| {
            if i == 0 {
                format!("{l},noisy\n")
            } else {
                let f: f64 = l.split(',').nth(2).unwrap().parse().unwrap();
                format!("{l},{:.6}\n", f + ((i * 7919) % 101) as f64 / 50.0 - 1.0)
            }
        })
        .collect();
    std::fs::write(&panel, two).unwrap();
    let out = tmp.path().join("m");
    lagfold()
        .arg("measure")
        .arg(&panel)
        .args(["--forecast-column", "forecast,noisy", "--blend", "forecast=0.7,noisy=0.3", "--cost-bps", "10,25"])
        .args(["--horizons", "8", "--paths", "40", "--bootstrap", "100", "-q", "--out"])
        .arg(&out)
        .assert()
        .success();
    check_charts(
        &out,
        &[("signals", "Your signals side by side, and the blend"), ("holdings", "Tranche books on your panel")],
    );
    check_report(&out, "measure.json", 5);
    let m: Value = serde_json::from_slice(&std::fs::read(out.join("measure.json")).unwrap()).unwrap();
    assert_eq!(m["comparison"]["signals"][2]["name"], "blend");
    assert_eq!(m["books"]["costs"].as_array().unwrap().len(), 2);
    assert_eq!(m["calibrated_study"]["net"].as_array().unwrap().len(), 2);
    let holdings = std::fs::read_to_string(out.join("holdings.csv")).unwrap();
    assert!(holdings.starts_with("holding,turnover,gross_ir,gross_ir_se,net_ir_10bps,net_ir_se_10bps,net_ir_25bps"));
    assert_eq!(holdings.lines().count(), 9);
}
