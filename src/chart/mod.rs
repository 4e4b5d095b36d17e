//! Charts as data, drawn once to SVG and PNG. A [`Chart`] is a title, a
//! caption and stacked panels; it knows nothing of lagfold's results, the
//! report builds them. Drawing is pure Rust (plotters with an embedded font),
//! so it works on a machine with no system fonts.

mod heat;
mod style;
mod xy;

pub use style::{Colour, PALETTE};

use plotters::prelude::*;
use thiserror::Error;

/// One chart: a title, a one-line caption (for the report) and panels stacked
/// top to bottom.
#[derive(Debug, Clone)]
pub struct Chart {
    /// File stem (`horizon_ic` → `horizon_ic.svg`, `horizon_ic.png`).
    pub name: String,
    /// Title drawn on the chart.
    pub title: String,
    /// What to look at, one line, for the report.
    pub caption: String,
    /// Panels, top to bottom.
    pub panels: Vec<Panel>,
    /// Height of one panel in pixels.
    pub panel_height: u32,
}

/// One panel of a chart.
#[derive(Debug, Clone)]
pub enum Panel {
    /// Lines, bands, bars and error bars on numeric axes.
    Xy(XyPanel),
    /// A matrix of coloured cells with their values printed.
    Heat(HeatPanel),
}

/// A panel on numeric axes.
#[derive(Debug, Clone, Default)]
pub struct XyPanel {
    /// Panel heading (empty: none).
    pub heading: String,
    /// x-axis title with units.
    pub x_label: String,
    /// y-axis title with units.
    pub y_label: String,
    /// Category names at x = 0, 1, 2, … (empty: numeric x axis).
    pub x_categories: Vec<String>,
    /// Show y values as percentages (value × 100).
    pub y_percent: bool,
    /// Force y = 0 into the range.
    pub y_from_zero: bool,
    /// A fixed y range (bottom, top), so panels that are compared share one scale.
    pub y_fixed: Option<(f64, f64)>,
    /// What is drawn, in order (later on top); labelled layers are listed
    /// in a legend strip right of the panel.
    pub layers: Vec<Layer>,
}

/// Something drawn on an [`XyPanel`]. An empty label leaves it out of the legend.
#[derive(Debug, Clone)]
pub enum Layer {
    /// A shaded band between `lo` and `hi`.
    Band { x: Vec<f64>, lo: Vec<f64>, hi: Vec<f64>, colour: Colour, opacity: f64, label: String },
    /// A line, optionally dashed and with point markers.
    Line { x: Vec<f64>, y: Vec<f64>, colour: Colour, width: u32, dashed: bool, markers: bool, label: String },
    /// Bars of `width` (x units) centred at `x + offset`.
    Bars { x: Vec<f64>, y: Vec<f64>, offset: f64, width: f64, colour: Colour, label: String },
    /// Points with vertical error bars from `lo` to `hi`.
    ErrorBars { x: Vec<f64>, y: Vec<f64>, lo: Vec<f64>, hi: Vec<f64>, colour: Colour, label: String },
    /// A dashed vertical line across the panel.
    VLine { x: f64, colour: Colour, label: String },
    /// A dashed horizontal line across the panel.
    HLine { y: f64, colour: Colour, label: String },
}

/// A matrix of cells: rows top to bottom, columns left to right.
#[derive(Debug, Clone)]
pub struct HeatPanel {
    /// Title of the row axis.
    pub row_title: String,
    /// Title of the column axis.
    pub col_title: String,
    /// Row names.
    pub rows: Vec<String>,
    /// Column names.
    pub cols: Vec<String>,
    /// Cell values (colour scale from 0 to the largest value).
    pub values: Vec<Vec<f64>>,
    /// Text printed in each cell.
    pub text: Vec<Vec<String>>,
    /// Cells outlined as marked (row, column), e.g. the diagonal.
    pub marked: Vec<(usize, usize)>,
}

/// A chart drawn both ways.
#[derive(Debug, Clone)]
pub struct Rendered {
    /// The SVG document.
    pub svg: String,
    /// The PNG file, with the title in a `tEXt` chunk under the key `Title`.
    pub png: Vec<u8>,
}

/// Width of every chart in pixels.
pub const WIDTH: u32 = 1000;
/// Height of the title strip in pixels.
const TITLE_HEIGHT: u32 = 50;

/// A chart that could not be drawn.
#[derive(Debug, Error)]
pub enum ChartError {
    /// The drawing library failed.
    #[error("chart {chart}: {message}")]
    Draw {
        /// Which chart.
        chart: String,
        /// What the library said.
        message: String,
    },
}

impl Chart {
    /// Total height in pixels.
    pub fn height(&self) -> u32 {
        TITLE_HEIGHT + self.panel_height * self.panels.len().max(1) as u32
    }

    /// Draws the chart as SVG and as PNG.
    ///
    /// # Errors
    /// When the drawing library fails (it should not on finite data).
    pub fn render(&self) -> Result<Rendered, ChartError> {
        style::register_fonts();
        let size = (WIDTH, self.height());
        let err = |e: String| ChartError::Draw { chart: self.name.clone(), message: e };
        let mut svg = String::new();
        {
            let root = SVGBackend::with_string(&mut svg, size).into_drawing_area();
            self.draw(&root).map_err(err)?;
            root.present().map_err(|e| err(e.to_string()))?;
        }
        let mut rgb = vec![0u8; (size.0 * size.1 * 3) as usize];
        {
            let root = BitMapBackend::with_buffer(&mut rgb, size).into_drawing_area();
            self.draw(&root).map_err(err)?;
            root.present().map_err(|e| err(e.to_string()))?;
        }
        let png = encode_png(&rgb, size, &self.title).map_err(|e| err(e.to_string()))?;
        Ok(Rendered { svg, png })
    }

    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, plotters::coord::Shift>) -> Result<(), String> {
        let e = |e: DrawingAreaErrorKind<DB::ErrorType>| e.to_string();
        root.fill(&WHITE).map_err(e)?;
        let (top, body) = root.split_vertically(TITLE_HEIGHT);
        top.draw_text(
            &self.title,
            &style::title_font().pos(plotters::style::text_anchor::Pos::new(
                plotters::style::text_anchor::HPos::Center,
                plotters::style::text_anchor::VPos::Center,
            )),
            (WIDTH as i32 / 2, TITLE_HEIGHT as i32 / 2 + 4),
        )
        .map_err(e)?;
        let areas = body.split_evenly((self.panels.len().max(1), 1));
        for (panel, area) in self.panels.iter().zip(&areas) {
            match panel {
                Panel::Xy(p) => xy::draw(area, p)?,
                Panel::Heat(p) => heat::draw(area, p)?,
            }
        }
        Ok(())
    }
}

/// Greedy wrap at spaces: each line as long as `fits` allows (a single word
/// that does not fit gets a line of its own).
pub(crate) fn wrap_to(text: &str, fits: impl Fn(&str) -> bool) -> Vec<String> {
    let mut lines: Vec<String> = Vec::new();
    for word in text.split(' ') {
        match lines.last_mut() {
            Some(l) if fits(&format!("{l} {word}")) => {
                l.push(' ');
                l.push_str(word);
            }
            _ => lines.push(word.to_string()),
        }
    }
    lines
}

/// `text` in ISO 8859-1, as a PNG `tEXt` chunk requires: dashes become
/// hyphens, other characters outside it `?` (a user's curve name may hold any).
fn latin1(text: &str) -> String {
    text.chars()
        .map(|c| match c {
            '–' | '—' | '−' => '-',
            c if u32::from(c) <= 0xFF => c,
            _ => '?',
        })
        .collect()
}

fn encode_png(rgb: &[u8], (w, h): (u32, u32), title: &str) -> Result<Vec<u8>, png::EncodingError> {
    let mut out = Vec::new();
    {
        let mut enc = png::Encoder::new(&mut out, w, h);
        enc.set_color(png::ColorType::Rgb);
        enc.set_depth(png::BitDepth::Eight);
        enc.set_compression(png::Compression::Default);
        enc.add_text_chunk("Title".into(), latin1(title))?;
        enc.add_text_chunk("Software".into(), format!("lagfold {}", env!("CARGO_PKG_VERSION")))?;
        let mut writer = enc.write_header()?;
        writer.write_image_data(rgb)?;
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sample() -> Chart {
        let x: Vec<f64> = (1..=10).map(f64::from).collect();
        let y: Vec<f64> = x.iter().map(|v| (v / 3.0).sin()).collect();
        Chart {
            name: "sample".into(),
            title: "A sample chart".into(),
            caption: "Look at the line.".into(),
            panel_height: 300,
            panels: vec![
                Panel::Xy(XyPanel {
                    x_label: "lag (periods)".into(),
                    y_label: "IC".into(),
                    layers: vec![
                        Layer::Band {
                            x: x.clone(),
                            lo: y.iter().map(|v| v - 0.2).collect(),
                            hi: y.iter().map(|v| v + 0.2).collect(),
                            colour: PALETTE.blue,
                            opacity: 0.2,
                            label: "band".into(),
                        },
                        Layer::Line {
                            x: x.clone(),
                            y: y.clone(),
                            colour: PALETTE.black,
                            width: 2,
                            dashed: false,
                            markers: true,
                            label: "truth".into(),
                        },
                        Layer::VLine { x: 5.0, colour: PALETTE.vermillion, label: "optimum".into() },
                    ],
                    ..XyPanel::default()
                }),
                Panel::Heat(HeatPanel {
                    row_title: "rows".into(),
                    col_title: "cols".into(),
                    rows: vec!["a".into(), "b".into()],
                    cols: vec!["x".into(), "y".into()],
                    values: vec![vec![0.0, 1.0], vec![2.0, 0.0]],
                    text: vec![vec!["0".into(), "1".into()], vec!["2".into(), "0".into()]],
                    marked: vec![(0, 0), (1, 1)],
                }),
            ],
        }
    }

    #[test]
    fn renders_valid_png_and_svg_with_the_title() {
        let r = sample().render().unwrap();
        assert!(r.svg.starts_with("<svg") && r.svg.contains("A sample chart") && r.svg.contains("optimum"));
        let dec = png::Decoder::new(std::io::Cursor::new(&r.png));
        let reader = dec.read_info().unwrap();
        let info = reader.info();
        assert_eq!((info.width, info.height), (WIDTH, 650));
        assert!(info.uncompressed_latin1_text.iter().any(|t| t.keyword == "Title" && t.text == "A sample chart"));
        assert_eq!(latin1("5–9 × 2 ≥ 1"), "5-9 × 2 ? 1");
    }

    #[test]
    fn names_wrap_at_spaces_to_the_width() {
        let fits = |t: &str| t.len() <= 8;
        assert_eq!(wrap_to("long memory", fits), ["long", "memory"]);
        assert_eq!(wrap_to("hump", fits), ["hump"]);
        assert_eq!(wrap_to("a b c", fits), ["a b c"]);
        let chars = |t: &str| t.chars().count() <= 18;
        assert_eq!(wrap_to("true best horizon (7 months)", chars), ["true best horizon", "(7 months)"]);
        assert_eq!(wrap_to("short", chars), ["short"]);
    }

    #[test]
    fn drawing_is_deterministic() {
        let (a, b) = (sample().render().unwrap(), sample().render().unwrap());
        assert_eq!(a.svg, b.svg);
        assert_eq!(a.png, b.png);
    }
}
