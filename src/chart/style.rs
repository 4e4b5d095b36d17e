//! One look for every chart: the Okabe and Ito (2008) colour-blind-safe
//! palette, DejaVu Sans embedded (its licence is in `assets/fonts/`), light
//! grid, fixed font sizes.

use plotters::style::{FontFamily, FontStyle, IntoFont, RGBColor, TextStyle};
use std::sync::Once;

/// A colour as red, green, blue.
pub type Colour = (u8, u8, u8);

/// The Okabe and Ito (2008) palette, distinguishable under the common
/// colour-vision deficiencies.
pub struct Palette {
    /// Truth and reference lines.
    pub black: Colour,
    /// Second series.
    pub orange: Colour,
    /// Light fills.
    pub sky: Colour,
    /// Third series.
    pub green: Colour,
    /// Measured series and bands.
    pub blue: Colour,
    /// Optima and targets.
    pub vermillion: Colour,
    /// Fourth series.
    pub purple: Colour,
    /// Grid lines and muted text.
    pub grey: Colour,
}

/// The palette.
pub const PALETTE: Palette = Palette {
    black: (0, 0, 0),
    orange: (230, 159, 0),
    sky: (86, 180, 233),
    green: (0, 158, 115),
    blue: (0, 114, 178),
    vermillion: (213, 94, 0),
    purple: (204, 121, 167),
    grey: (200, 200, 200),
};

static FONTS: Once = Once::new();
static REGULAR: &[u8] = include_bytes!("../../assets/fonts/DejaVuSans.ttf");
static BOLD: &[u8] = include_bytes!("../../assets/fonts/DejaVuSans-Bold.ttf");

/// Registers the embedded font under the family every chart uses. Idempotent.
pub fn register_fonts() {
    FONTS.call_once(|| {
        for (style, bytes) in [(FontStyle::Normal, REGULAR), (FontStyle::Bold, BOLD)] {
            // A font that failed to load shows up as a drawing error of the first text, which is reported.
            let _ = plotters::style::register_font("sans-serif", style, bytes);
        }
    });
}

/// Converts a palette entry for plotters.
pub fn rgb(c: Colour) -> RGBColor {
    RGBColor(c.0, c.1, c.2)
}

/// Chart title.
pub fn title_font() -> TextStyle<'static> {
    TextStyle::from((FontFamily::SansSerif, 24).into_font().style(FontStyle::Bold))
}

/// Panel heading.
pub fn heading_font() -> TextStyle<'static> {
    TextStyle::from((FontFamily::SansSerif, 18).into_font().style(FontStyle::Bold))
}

/// Axis titles.
pub fn axis_font() -> TextStyle<'static> {
    TextStyle::from((FontFamily::SansSerif, 16).into_font())
}

/// Tick labels, legends and cell values.
pub fn label_font() -> TextStyle<'static> {
    TextStyle::from((FontFamily::SansSerif, 14).into_font())
}
