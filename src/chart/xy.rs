//! Panels on numeric axes: bands, lines, bars, error bars and reference lines.

use super::style::{axis_font, heading_font, label_font, rgb};
use super::{Colour, Layer, PALETTE, XyPanel};
use plotters::coord::Shift;
use plotters::prelude::*;

type Fallible = Result<(), String>;

/// Draws one panel into `area`.
pub fn draw<DB: DrawingBackend>(whole: &DrawingArea<DB, Shift>, p: &XyPanel) -> Fallible {
    let labelled: Vec<&Layer> = p.layers.iter().filter(|l| !label(l).is_empty()).collect();
    let (area, key) = if labelled.is_empty() {
        (whole.clone(), None)
    } else {
        let (a, k) = whole.split_horizontally(whole.dim_in_pixel().0 as i32 - LEGEND_WIDTH);
        (a, Some(k))
    };
    let area = &area;
    let (x0, x1) = x_range(p);
    let (y0, y1) = y_range(p);
    let mut builder = ChartBuilder::on(area);
    builder.margin(12).margin_right(28).x_label_area_size(52).y_label_area_size(78);
    if !p.heading.is_empty() {
        builder.caption(&p.heading, heading_font());
    }
    let mut chart = builder.build_cartesian_2d(x0..x1, y0..y1).map_err(|e| e.to_string())?;
    let x_step = (x1 - x0) / 12.0;
    let y_step = (y1 - y0) / 6.0;
    let cats = &p.x_categories;
    let x_fmt = |v: &f64| {
        if cats.is_empty() {
            return number(*v, x_step);
        }
        let i = v.round();
        let hit = (v - i).abs() < 1e-6 && i >= 0.0 && (i as usize) < cats.len();
        if hit { cats[i as usize].clone() } else { String::new() }
    };
    let y_fmt =
        |v: &f64| if p.y_percent { format!("{}%", number(v * 100.0, y_step * 100.0)) } else { number(*v, y_step) };
    let x_ticks = if cats.is_empty() { 12 } else { cats.len() + 1 };
    chart
        .configure_mesh()
        .x_desc(&p.x_label)
        .y_desc(&p.y_label)
        .label_style(label_font())
        .axis_desc_style(axis_font())
        .bold_line_style(rgb(PALETTE.grey).mix(0.5))
        .light_line_style(TRANSPARENT)
        .x_labels(x_ticks)
        .y_labels(7)
        .x_label_formatter(&x_fmt)
        .y_label_formatter(&y_fmt)
        .draw()
        .map_err(|e| e.to_string())?;
    for layer in &p.layers {
        draw_layer(&mut chart, layer, (y0, y1), (x0, x1), cats.is_empty())?;
    }
    if let Some(key) = key {
        legend(&key, &labelled, if p.heading.is_empty() { 20 } else { 44 })?;
    }
    Ok(())
}

type Chart2d<'a, DB> =
    ChartContext<'a, DB, Cartesian2d<plotters::coord::types::RangedCoordf64, plotters::coord::types::RangedCoordf64>>;

/// Draws one layer; `join` links error-bar points by a line (off for categories).
fn draw_layer<DB: DrawingBackend>(
    chart: &mut Chart2d<DB>,
    layer: &Layer,
    ys: (f64, f64),
    xs: (f64, f64),
    join: bool,
) -> Fallible {
    let err = |e: DrawingAreaErrorKind<DB::ErrorType>| e.to_string();
    match layer {
        Layer::Band { x, lo, hi, colour, opacity, .. } => {
            let style = rgb(*colour).mix(*opacity).filled();
            let pts: Vec<(f64, f64)> =
                x.iter().zip(hi).map(|(&a, &b)| (a, b)).chain(x.iter().zip(lo).rev().map(|(&a, &b)| (a, b))).collect();
            chart.draw_series(std::iter::once(Polygon::new(pts, style))).map_err(err)?;
        }
        Layer::Line { x, y, colour, width, dashed, markers, .. } => {
            let style = rgb(*colour).stroke_width(*width);
            let pts: Vec<(f64, f64)> = x.iter().zip(y).map(|(&a, &b)| (a, b)).filter(|p| p.1.is_finite()).collect();
            if *markers {
                chart
                    .draw_series(pts.iter().map(|&p| Circle::new(p, 3 + *width as i32, rgb(*colour).filled())))
                    .map_err(err)?;
            }
            if *dashed {
                chart.draw_series(DashedLineSeries::new(pts, 10, 6, style)).map_err(err)?
            } else {
                chart.draw_series(LineSeries::new(pts, style)).map_err(err)?
            };
        }
        Layer::Bars { x, y, offset, width, colour, .. } => {
            let style = rgb(*colour).filled();
            chart
                .draw_series(x.iter().zip(y).map(|(&a, &b)| {
                    Rectangle::new([(a + offset - width / 2.0, 0.0), (a + offset + width / 2.0, b)], style)
                }))
                .map_err(err)?;
        }
        Layer::ErrorBars { x, y, lo, hi, colour, .. } => {
            let style = rgb(*colour).stroke_width(2);
            chart
                .draw_series((0..x.len()).map(|i| ErrorBar::new_vertical(x[i], lo[i], y[i], hi[i], style, 12)))
                .map_err(err)?;
            if join {
                chart.draw_series(LineSeries::new(x.iter().zip(y).map(|(&a, &b)| (a, b)), style)).map_err(err)?;
            }
            chart
                .draw_series(x.iter().zip(y).map(|(&a, &b)| Circle::new((a, b), 5, rgb(*colour).filled())))
                .map_err(err)?;
        }
        Layer::VLine { x, colour, .. } => {
            let style = rgb(*colour).stroke_width(3);
            chart.draw_series(DashedLineSeries::new(vec![(*x, ys.0), (*x, ys.1)], 10, 6, style)).map_err(err)?;
        }
        Layer::HLine { y, colour, .. } => {
            let style = rgb(*colour).stroke_width(3);
            chart.draw_series(DashedLineSeries::new(vec![(xs.0, *y), (xs.1, *y)], 10, 6, style)).map_err(err)?;
        }
    }
    Ok(())
}

/// Width of the legend strip right of a panel, in pixels.
const LEGEND_WIDTH: i32 = 250;
/// Characters of a legend line before it wraps.
const LEGEND_CHARS: usize = 26;

/// The legend in its own strip: a glyph and the label (wrapped to two lines
/// when long) per labelled layer, top down from `top`.
fn legend<DB: DrawingBackend>(key: &DrawingArea<DB, Shift>, layers: &[&Layer], top: i32) -> Fallible {
    let err = |e: DrawingAreaErrorKind<DB::ErrorType>| e.to_string();
    let font = label_font();
    let mut y = top;
    for layer in layers {
        let lines = super::wrap_to(label(layer), |t| t.chars().count() <= LEGEND_CHARS);
        let mid = y + 8;
        let glyph = |c: &Colour| rgb(*c);
        match layer {
            Layer::Band { colour, opacity, .. } => {
                key.draw(&Rectangle::new([(8, mid - 7), (34, mid + 7)], glyph(colour).mix(*opacity).filled()))
            }
            Layer::Bars { colour, .. } => {
                key.draw(&Rectangle::new([(8, mid - 7), (34, mid + 7)], glyph(colour).filled()))
            }
            Layer::ErrorBars { colour, .. } => key.draw(&Circle::new((21, mid), 5, glyph(colour).filled())),
            Layer::Line { colour, width, dashed: false, markers, .. } => {
                key.draw(&PathElement::new(vec![(8, mid), (34, mid)], glyph(colour).stroke_width(*width)))
                    .map_err(err)?;
                if *markers { key.draw(&Circle::new((21, mid), 4, glyph(colour).filled())) } else { Ok(()) }
            }
            Layer::Line { colour, width, .. } => {
                key.draw(&PathElement::new(vec![(8, mid), (17, mid)], glyph(colour).stroke_width(*width)))
                    .map_err(err)?;
                key.draw(&PathElement::new(vec![(25, mid), (34, mid)], glyph(colour).stroke_width(*width)))
            }
            Layer::VLine { colour, .. } | Layer::HLine { colour, .. } => {
                key.draw(&PathElement::new(vec![(8, mid), (17, mid)], glyph(colour).stroke_width(3))).map_err(err)?;
                key.draw(&PathElement::new(vec![(25, mid), (34, mid)], glyph(colour).stroke_width(3)))
            }
        }
        .map_err(err)?;
        for line in &lines {
            key.draw_text(line, &font, (42, y)).map_err(err)?;
            y += 18;
        }
        y += 8;
    }
    Ok(())
}

fn label(l: &Layer) -> &str {
    match l {
        Layer::Band { label, .. }
        | Layer::Line { label, .. }
        | Layer::Bars { label, .. }
        | Layer::ErrorBars { label, .. }
        | Layer::VLine { label, .. }
        | Layer::HLine { label, .. } => label,
    }
}

/// A tick label with as many decimals as the tick step needs.
fn number(v: f64, step: f64) -> String {
    let decimals = if step > 0.0 { (-(step.log10().floor()) + 1.0).clamp(0.0, 6.0) as usize } else { 2 };
    let s = format!("{v:.decimals$}");
    let s = if s.contains('.') { s.trim_end_matches('0').trim_end_matches('.').to_string() } else { s };
    if s == "-0" { "0".into() } else { s }
}

fn x_range(p: &XyPanel) -> (f64, f64) {
    if !p.x_categories.is_empty() {
        return (-0.6, p.x_categories.len() as f64 - 0.4);
    }
    let xs: Vec<f64> = p
        .layers
        .iter()
        .flat_map(|l| match l {
            Layer::Band { x, .. } | Layer::Line { x, .. } | Layer::Bars { x, .. } | Layer::ErrorBars { x, .. } => {
                x.clone()
            }
            Layer::VLine { x, .. } => vec![*x],
            Layer::HLine { .. } => vec![],
        })
        .filter(|v| v.is_finite())
        .collect();
    let (lo, hi) = min_max(&xs).unwrap_or((0.0, 1.0));
    let pad = (0.04 * (hi - lo)).max(0.5);
    (lo - pad, hi + pad)
}

fn y_range(p: &XyPanel) -> (f64, f64) {
    if let Some(r) = p.y_fixed {
        return r;
    }
    let mut ys: Vec<f64> = p
        .layers
        .iter()
        .flat_map(|l| match l {
            Layer::Band { lo, hi, .. } | Layer::ErrorBars { lo, hi, .. } => lo.iter().chain(hi).copied().collect(),
            Layer::Line { y, .. } => y.clone(),
            Layer::Bars { y, .. } => y.iter().copied().chain([0.0]).collect(),
            Layer::HLine { y, .. } => vec![*y],
            Layer::VLine { .. } => vec![],
        })
        .filter(|v| v.is_finite())
        .collect();
    if p.y_from_zero {
        ys.push(0.0);
    }
    let (lo, hi) = min_max(&ys).unwrap_or((0.0, 1.0));
    let span = if hi > lo { hi - lo } else { lo.abs().max(1e-3) };
    let pad = 0.06 * span;
    let bottom = if p.y_from_zero && lo >= 0.0 { 0.0 } else { lo - pad };
    (bottom, hi + pad)
}

fn min_max(v: &[f64]) -> Option<(f64, f64)> {
    let lo = v.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = v.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    (lo <= hi).then_some((lo, hi))
}

#[cfg(test)]
mod tests {
    use super::number;

    #[test]
    fn tick_labels_use_the_step_precision() {
        assert_eq!(number(0.02, 0.01), "0.02");
        assert_eq!(number(12.0, 2.0), "12");
        assert_eq!(number(-0.0000001, 0.01), "0");
        assert_eq!(number(0.125, 0.025), "0.125");
    }
}
