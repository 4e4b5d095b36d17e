//! A matrix of cells shaded from white (zero) to blue (the largest value),
//! each with its value printed; marked cells get a heavy outline.

use super::style::{axis_font, label_font, rgb};
use super::{HeatPanel, PALETTE};
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// Draws the matrix into `area` in pixel coordinates.
pub fn draw<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, p: &HeatPanel) -> Result<(), String> {
    let err = |e: DrawingAreaErrorKind<DB::ErrorType>| e.to_string();
    let (w, h) = area.dim_in_pixel();
    let font = label_font();
    let widest = p.rows.iter().map(|r| area.estimate_text_size(r, &font).map(|s| s.0).unwrap_or(0)).max().unwrap_or(0);
    let (left, right, top, bottom) = (widest as i32 + 56, 24, 16, 78);
    let (nr, nc) = (p.rows.len().max(1) as i32, p.cols.len().max(1) as i32);
    let cw = (w as i32 - left - right) / nc;
    let ch = (h as i32 - top - bottom) / nr;
    let max = p.values.iter().flatten().copied().filter(|v| v.is_finite()).fold(0.0, f64::max);
    let centre = Pos::new(HPos::Center, VPos::Center);
    for (r, row) in p.values.iter().enumerate() {
        for (c, &v) in row.iter().enumerate() {
            let t = if max > 0.0 && v.is_finite() { (v / max).clamp(0.0, 1.0) } else { 0.0 };
            let (x, y) = (left + c as i32 * cw, top + r as i32 * ch);
            area.draw(&Rectangle::new([(x, y), (x + cw, y + ch)], shade(t).filled())).map_err(err)?;
            area.draw(&Rectangle::new([(x, y), (x + cw, y + ch)], rgb(PALETTE.grey))).map_err(err)?;
            let ink = if t > 0.55 { WHITE } else { BLACK };
            let text = p.text.get(r).and_then(|row| row.get(c)).map_or("", String::as_str);
            area.draw_text(text, &font.color(&ink).pos(centre), (x + cw / 2, y + ch / 2)).map_err(err)?;
        }
    }
    for &(r, c) in &p.marked {
        let (x, y) = (left + c as i32 * cw, top + r as i32 * ch);
        let style = rgb(PALETTE.vermillion).stroke_width(3);
        area.draw(&Rectangle::new([(x + 2, y + 2), (x + cw - 2, y + ch - 2)], style)).map_err(err)?;
    }
    let right_mid = Pos::new(HPos::Right, VPos::Center);
    for (r, name) in p.rows.iter().enumerate() {
        area.draw_text(name, &font.pos(right_mid), (left - 8, top + r as i32 * ch + ch / 2)).map_err(err)?;
    }
    let top_mid = Pos::new(HPos::Center, VPos::Top);
    for (c, name) in p.cols.iter().enumerate() {
        let fits = |t: &str| area.estimate_text_size(t, &font).map_or(true, |s| s.0 as i32 <= cw - 8);
        let mut lines = super::wrap_to(name, fits);
        if lines.len() > 2 {
            lines.truncate(2);
            lines[1].push('…');
        }
        for (k, line) in lines.iter().enumerate() {
            let at = (left + c as i32 * cw + cw / 2, top + nr * ch + 6 + 16 * k as i32);
            area.draw_text(line, &font.pos(top_mid), at).map_err(err)?;
        }
    }
    let axis = axis_font();
    area.draw_text(&p.col_title, &axis.pos(top_mid), (left + nc * cw / 2, top + nr * ch + 46)).map_err(err)?;
    let rotated = axis.transform(FontTransform::Rotate270).pos(centre);
    area.draw_text(&p.row_title, &rotated, (18, top + nr * ch / 2)).map_err(err)?;
    Ok(())
}

/// White at 0 to the palette's blue at 1.
fn shade(t: f64) -> RGBColor {
    let (r, g, b) = PALETTE.blue;
    let mix = |c: u8| (255.0 + (f64::from(c) - 255.0) * t).round() as u8;
    RGBColor(mix(r), mix(g), mix(b))
}
