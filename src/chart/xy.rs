//! Panels on numeric axes: bands, lines, bars, error bars and reference lines.

use super::style::{axis_font, heading_font, label_font, rgb};
use super::{Corner, Layer, PALETTE, XyPanel};
use plotters::coord::Shift;
use plotters::prelude::*;

type Fallible = Result<(), String>;

/// Draws one panel into `area`.
pub fn draw<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, p: &XyPanel) -> Fallible {
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
        draw_layer(&mut chart, layer, (y0, y1), (x0, x1))?;
    }
    if p.layers.iter().any(|l| !label(l).is_empty()) {
        chart
            .configure_series_labels()
            .position(match p.legend {
                Corner::UpperRight => SeriesLabelPosition::UpperRight,
                Corner::UpperLeft => SeriesLabelPosition::UpperLeft,
                Corner::LowerRight => SeriesLabelPosition::LowerRight,
                Corner::LowerLeft => SeriesLabelPosition::LowerLeft,
            })
            .background_style(WHITE.mix(0.85))
            .border_style(rgb(PALETTE.grey))
            .label_font(label_font())
            .draw()
            .map_err(|e| e.to_string())?;
    }
    Ok(())
}

type Chart2d<'a, DB> =
    ChartContext<'a, DB, Cartesian2d<plotters::coord::types::RangedCoordf64, plotters::coord::types::RangedCoordf64>>;

fn draw_layer<DB: DrawingBackend>(chart: &mut Chart2d<DB>, layer: &Layer, ys: (f64, f64), xs: (f64, f64)) -> Fallible {
    let err = |e: DrawingAreaErrorKind<DB::ErrorType>| e.to_string();
    let name = label(layer);
    match layer {
        Layer::Band { x, lo, hi, colour, opacity, .. } => {
            let style = rgb(*colour).mix(*opacity).filled();
            let pts: Vec<(f64, f64)> =
                x.iter().zip(hi).map(|(&a, &b)| (a, b)).chain(x.iter().zip(lo).rev().map(|(&a, &b)| (a, b))).collect();
            let a = chart.draw_series(std::iter::once(Polygon::new(pts, style))).map_err(err)?;
            if !name.is_empty() {
                a.label(name).legend(move |(x, y)| Rectangle::new([(x, y - 6), (x + 20, y + 6)], style));
            }
        }
        Layer::Line { x, y, colour, width, dashed, markers, .. } => {
            let style = rgb(*colour).stroke_width(*width);
            let pts: Vec<(f64, f64)> = x.iter().zip(y).map(|(&a, &b)| (a, b)).filter(|p| p.1.is_finite()).collect();
            if *markers {
                chart
                    .draw_series(pts.iter().map(|&p| Circle::new(p, 3 + *width as i32, rgb(*colour).filled())))
                    .map_err(err)?;
            }
            let a = if *dashed {
                chart.draw_series(DashedLineSeries::new(pts, 10, 6, style)).map_err(err)?
            } else {
                chart.draw_series(LineSeries::new(pts, style)).map_err(err)?
            };
            if !name.is_empty() {
                a.label(name).legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], style));
            }
        }
        Layer::Bars { x, y, offset, width, colour, .. } => {
            let style = rgb(*colour).filled();
            let a = chart
                .draw_series(x.iter().zip(y).map(|(&a, &b)| {
                    Rectangle::new([(a + offset - width / 2.0, 0.0), (a + offset + width / 2.0, b)], style)
                }))
                .map_err(err)?;
            if !name.is_empty() {
                a.label(name).legend(move |(x, y)| Rectangle::new([(x, y - 6), (x + 20, y + 6)], style));
            }
        }
        Layer::ErrorBars { x, y, lo, hi, colour, .. } => {
            let style = rgb(*colour).stroke_width(2);
            chart
                .draw_series((0..x.len()).map(|i| ErrorBar::new_vertical(x[i], lo[i], y[i], hi[i], style, 12)))
                .map_err(err)?;
            chart.draw_series(LineSeries::new(x.iter().zip(y).map(|(&a, &b)| (a, b)), style)).map_err(err)?;
            let a = chart
                .draw_series(x.iter().zip(y).map(|(&a, &b)| Circle::new((a, b), 5, rgb(*colour).filled())))
                .map_err(err)?;
            if !name.is_empty() {
                a.label(name).legend(move |(x, y)| Circle::new((x + 10, y), 5, style.filled()));
            }
        }
        Layer::VLine { x, colour, .. } => {
            let style = rgb(*colour).stroke_width(3);
            let a =
                chart.draw_series(DashedLineSeries::new(vec![(*x, ys.0), (*x, ys.1)], 10, 6, style)).map_err(err)?;
            if !name.is_empty() {
                a.label(name).legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], style));
            }
        }
        Layer::HLine { y, colour, .. } => {
            let style = rgb(*colour).stroke_width(3);
            let a =
                chart.draw_series(DashedLineSeries::new(vec![(xs.0, *y), (xs.1, *y)], 10, 6, style)).map_err(err)?;
            if !name.is_empty() {
                a.label(name).legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], style));
            }
        }
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
    (bottom, hi + pad + if p.layers.iter().any(|l| !label(l).is_empty()) { 0.25 * span } else { 0.0 })
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
