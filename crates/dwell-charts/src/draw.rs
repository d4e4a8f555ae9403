//! Drawing a [`Chart`] on any plotters backend, in the dwell look: warm paper, a left-aligned
//! title, light grid, Okabe–Ito series, the comfort band in pale green behind the lines.

use plotters::coord::Shift;
use plotters::prelude::*;

use crate::chart::{BarChart, Chart, LineChart, Series};
use crate::error::ChartError;
use crate::font::FAMILY;
use crate::palette::{self, BAND, GRID, INK, PAPER};

/// Width of every chart (px).
pub const WIDTH: u32 = 1000;
/// Height of every chart (px).
pub const HEIGHT: u32 = 560;

fn font(size: f64) -> TextStyle<'static> {
    (FAMILY, size).into_font().color(&INK)
}

fn colour(c: Option<usize>) -> RGBColor {
    c.map(palette::series).unwrap_or(INK)
}

/// Runs of finite points; a step series holds each value until the next x.
fn segments(s: &Series) -> Vec<Vec<(f64, f64)>> {
    let mut out = Vec::new();
    let mut cur: Vec<(f64, f64)> = Vec::new();
    for i in 0..s.x.len().min(s.y.len()) {
        let (x, y) = (s.x[i], s.y[i]);
        if !(x.is_finite() && y.is_finite()) {
            if !cur.is_empty() {
                out.push(std::mem::take(&mut cur));
            }
            continue;
        }
        if s.stroke.step() {
            if let Some(&(_, py)) = cur.last() {
                cur.push((x, py));
            }
        }
        cur.push((x, y));
    }
    if !cur.is_empty() {
        out.push(cur);
    }
    out
}

fn range(values: impl Iterator<Item = f64>, from_zero: bool) -> Option<(f64, f64)> {
    let (mut lo, mut hi) = (f64::INFINITY, f64::NEG_INFINITY);
    for v in values.filter(|v| v.is_finite()) {
        lo = lo.min(v);
        hi = hi.max(v);
    }
    if !lo.is_finite() {
        return None;
    }
    if from_zero {
        lo = lo.min(0.0);
        hi = hi.max(0.0);
    }
    let pad = if hi > lo { 0.06 * (hi - lo) } else { 1.0 };
    Some((
        if from_zero && lo == 0.0 {
            0.0
        } else {
            lo - pad
        },
        if from_zero && hi == 0.0 {
            0.0
        } else {
            hi + pad
        },
    ))
}

fn data_err(chart: &str, message: &str) -> ChartError {
    ChartError::Data {
        chart: chart.to_string(),
        message: message.to_string(),
    }
}

/// Draws `chart` on `root`.
pub fn draw<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    chart: &Chart,
) -> Result<(), ChartError> {
    crate::font::register();
    let title = chart.title().to_string();
    let e = |e: DrawingAreaErrorKind<DB::ErrorType>| ChartError::Draw {
        chart: title.clone(),
        message: e.to_string(),
    };
    root.fill(&PAPER).map_err(e)?;
    root.draw(&Text::new(title.clone(), (24, 14), font(22.0)))
        .map_err(e)?;
    root.draw(&PathElement::new(
        vec![(24, 46), (WIDTH as i32 - 24, 46)],
        GRID.stroke_width(2),
    ))
    .map_err(e)?;
    let entries = legend(chart);
    let rows = legend_rows(&entries);
    let (top, body) = root.split_vertically(54 + 24 * rows.len() as u32);
    draw_legend(&top, &rows).map_err(e)?;
    match chart {
        Chart::Line(c) => line(&body, c).map_err(|m| match m {
            Fail::Data(s) => data_err(&title, &s),
            Fail::Draw(s) => ChartError::Draw {
                chart: title.clone(),
                message: s,
            },
        }),
        Chart::Bar(c) => bar(&body, c).map_err(|m| match m {
            Fail::Data(s) => data_err(&title, &s),
            Fail::Draw(s) => ChartError::Draw {
                chart: title.clone(),
                message: s,
            },
        }),
    }
}

/// What a legend entry shows beside its text.
#[derive(Clone, Copy)]
enum Swatch {
    Line(RGBColor, bool),
    Fill(RGBColor),
}

fn legend(chart: &Chart) -> Vec<(String, Swatch)> {
    let mut out = Vec::new();
    match chart {
        Chart::Line(c) => {
            for b in &c.bands {
                let fill = match b.colour {
                    Some(i) => mix_white(palette::series(i), 0.16),
                    None => BAND,
                };
                out.push((b.label.clone(), Swatch::Fill(fill)));
            }
            for s in c
                .series
                .iter()
                .chain(c.secondary.iter().flat_map(|s| s.series.iter()))
            {
                out.push((
                    s.label.clone(),
                    Swatch::Line(colour(s.colour), s.stroke.dashed()),
                ));
            }
            for t in &c.thresholds {
                out.push((
                    t.label.clone(),
                    Swatch::Line(palette::series(t.colour), true),
                ));
            }
        }
        Chart::Bar(c) => {
            if c.series.len() > 1 || c.stacked {
                for s in &c.series {
                    out.push((s.label.clone(), Swatch::Fill(palette::fill(s.colour))));
                }
            }
        }
    }
    out
}

/// `c` at opacity `a` over the paper, as an opaque colour (for legend swatches).
fn mix_white(c: RGBColor, a: f64) -> RGBColor {
    let m = |x: u8, p: u8| (a * x as f64 + (1.0 - a) * p as f64).round() as u8;
    RGBColor(m(c.0, PAPER.0), m(c.1, PAPER.1), m(c.2, PAPER.2))
}

/// Approximate width of a legend entry (px): swatch, gap, text at about 8 px a character.
fn entry_width(label: &str) -> i32 {
    28 + 8 * label.chars().count() as i32 + 22
}

fn legend_rows(entries: &[(String, Swatch)]) -> Vec<Vec<(String, Swatch)>> {
    let mut rows: Vec<Vec<(String, Swatch)>> = Vec::new();
    let mut used = 0;
    for e in entries {
        let w = entry_width(&e.0);
        if rows.is_empty() || used + w > WIDTH as i32 - 110 {
            rows.push(Vec::new());
            used = 0;
        }
        rows.last_mut().expect("a row").push(e.clone());
        used += w;
    }
    rows
}

fn draw_legend<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    rows: &[Vec<(String, Swatch)>],
) -> Result<(), DrawingAreaErrorKind<DB::ErrorType>> {
    for (r, row) in rows.iter().enumerate() {
        let y = 64 + 24 * r as i32;
        let mut x = 92;
        for (label, sw) in row {
            match *sw {
                Swatch::Fill(c) => {
                    area.draw(&Rectangle::new([(x, y - 7), (x + 20, y + 7)], c.filled()))?
                }
                Swatch::Line(c, dashed) => {
                    if dashed {
                        for k in 0..3 {
                            area.draw(&PathElement::new(
                                vec![(x + 8 * k, y), (x + 8 * k + 5, y)],
                                c.stroke_width(3),
                            ))?;
                        }
                    } else {
                        area.draw(&PathElement::new(
                            vec![(x, y), (x + 20, y)],
                            c.stroke_width(3),
                        ))?;
                    }
                }
            }
            area.draw(&Text::new(label.clone(), (x + 28, y - 5), font(14.0)))?;
            x += entry_width(label);
        }
    }
    Ok(())
}

enum Fail {
    Data(String),
    Draw(String),
}

impl<E: std::error::Error + Send + Sync> From<DrawingAreaErrorKind<E>> for Fail {
    fn from(e: DrawingAreaErrorKind<E>) -> Fail {
        Fail::Draw(e.to_string())
    }
}

fn time_label(origin: Option<chrono::NaiveDateTime>, span_h: f64, x: f64) -> String {
    match origin {
        Some(o) => {
            let t = o + chrono::Duration::minutes((x * 60.0).round() as i64);
            if span_h > 96.0 {
                t.format("%-d %b").to_string()
            } else {
                t.format("%-d %b %H:%M").to_string()
            }
        }
        None => {
            if (x - x.round()).abs() < 1e-9 {
                format!("{x:.0}")
            } else {
                format!("{x}")
            }
        }
    }
}

fn line<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, c: &LineChart) -> Result<(), Fail> {
    let xs = c
        .series
        .iter()
        .chain(c.secondary.iter().flat_map(|s| s.series.iter()))
        .flat_map(|s| s.x.iter().copied());
    let (x0, x1) =
        range(xs, false).ok_or_else(|| Fail::Data("no finite x value to plot".into()))?;
    // x without padding: data from edge to edge
    let (x0, x1) = {
        let lo = c
            .series
            .iter()
            .flat_map(|s| s.x.iter().copied())
            .filter(|v| v.is_finite())
            .fold(f64::INFINITY, f64::min);
        let hi = c
            .series
            .iter()
            .flat_map(|s| s.x.iter().copied())
            .filter(|v| v.is_finite())
            .fold(f64::NEG_INFINITY, f64::max);
        if lo.is_finite() && hi > lo {
            (lo, hi)
        } else {
            (x0, x1)
        }
    };
    let ys = c
        .series
        .iter()
        .flat_map(|s| s.y.iter().copied())
        .chain(c.bands.iter().flat_map(|b| [b.lo, b.hi]))
        .chain(c.thresholds.iter().map(|t| t.y));
    let (y0, y1) =
        range(ys, c.y_from_zero).ok_or_else(|| Fail::Data("no finite y value to plot".into()))?;
    let span = x1 - x0;
    let fmt = |x: &f64| time_label(c.time_origin, span, *x);
    let mut builder = ChartBuilder::on(area);
    builder
        .margin_left(16)
        .margin_right(if c.secondary.is_some() { 8 } else { 28 })
        .margin_top(8)
        .margin_bottom(8)
        .x_label_area_size(56)
        .y_label_area_size(76);
    if c.secondary.is_some() {
        builder.right_y_label_area_size(84);
    }
    let chart = builder.build_cartesian_2d(x0..x1, y0..y1)?;
    match &c.secondary {
        None => {
            let mut chart = chart;
            primary(&mut chart, c, (x0, x1), &fmt)?;
        }
        Some(sec) => {
            let (s0, s1) = range(sec.series.iter().flat_map(|s| s.y.iter().copied()), true)
                .ok_or_else(|| Fail::Data("no finite value on the right axis".into()))?;
            // The secondary coordinates must exist before the mesh is drawn, or the primary
            // labels fill the right axis too.
            let mut dual = chart.set_secondary_coord(x0..x1, s0..s1);
            primary(&mut dual, c, (x0, x1), &fmt)?;
            dual.configure_secondary_axes()
                .axis_style(INK.mix(0.55).stroke_width(1))
                .label_style(font(14.0))
                .axis_desc_style(font(15.0))
                .y_desc(sec.y_label.as_str())
                .y_labels(8)
                .y_label_formatter(&|y| format!("{}", (y * 100.0).round() / 100.0))
                .draw()?;
            for s in &sec.series {
                let col = colour(s.colour);
                for seg in segments(s) {
                    if s.stroke.dashed() {
                        dual.draw_secondary_series(DashedLineSeries::new(
                            seg,
                            8,
                            5,
                            col.stroke_width(2),
                        ))?;
                    } else {
                        dual.draw_secondary_series(LineSeries::new(seg, col.stroke_width(2)))?;
                    }
                }
            }
        }
    }
    Ok(())
}

type Plane<'a, DB> = ChartContext<
    'a,
    DB,
    Cartesian2d<plotters::coord::types::RangedCoordf64, plotters::coord::types::RangedCoordf64>,
>;

/// Mesh, bands, thresholds and the left-axis series.
fn primary<DB: DrawingBackend>(
    chart: &mut Plane<'_, DB>,
    c: &LineChart,
    (x0, x1): (f64, f64),
    fmt: &dyn Fn(&f64) -> String,
) -> Result<(), Fail> {
    chart
        .configure_mesh()
        .bold_line_style(GRID.stroke_width(1))
        .light_line_style(TRANSPARENT.stroke_width(0))
        .axis_style(INK.mix(0.55).stroke_width(1))
        .x_labels(8)
        .y_labels(8)
        .x_label_formatter(fmt)
        .y_label_formatter(&|y| format!("{}", (y * 100.0).round() / 100.0))
        .label_style(font(14.0))
        .axis_desc_style(font(15.0))
        .x_desc(c.x_label.as_str())
        .y_desc(c.y_label.as_str())
        .draw()?;
    for b in &c.bands {
        let fill = match b.colour {
            Some(i) => palette::series(i).mix(0.16).filled(),
            None => BAND.filled(),
        };
        chart.draw_series(std::iter::once(Rectangle::new(
            [(x0, b.lo), (x1, b.hi)],
            fill,
        )))?;
    }
    for t in &c.thresholds {
        let col = palette::series(t.colour);
        chart.draw_series(DashedLineSeries::new(
            vec![(x0, t.y), (x1, t.y)],
            10,
            6,
            col.stroke_width(2),
        ))?;
    }
    for s in &c.series {
        let col = colour(s.colour);
        let width = if s.colour.is_none() { 1 } else { 2 };
        for seg in segments(s) {
            if s.stroke.dashed() {
                chart.draw_series(DashedLineSeries::new(seg, 8, 5, col.stroke_width(width)))?;
            } else {
                chart.draw_series(LineSeries::new(seg, col.stroke_width(width)))?;
            }
        }
    }
    Ok(())
}

fn bar<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, c: &BarChart) -> Result<(), Fail> {
    let n = c.categories.len();
    if n == 0 || c.series.is_empty() {
        return Err(Fail::Data("no category or no series".into()));
    }
    if let Some(s) = c.series.iter().find(|s| s.values.len() != n) {
        return Err(Fail::Data(format!(
            "series {} has {} values for {} categories",
            s.label,
            s.values.len(),
            n
        )));
    }
    let val = |s: &crate::chart::BarSeries, i: usize| {
        if s.values[i].is_finite() {
            s.values[i]
        } else {
            0.0
        }
    };
    let ys: Vec<f64> = if c.stacked {
        (0..n)
            .flat_map(|i| {
                let pos: f64 = c.series.iter().map(|s| val(s, i).max(0.0)).sum();
                let neg: f64 = c.series.iter().map(|s| val(s, i).min(0.0)).sum();
                [pos, neg]
            })
            .collect()
    } else {
        c.series
            .iter()
            .flat_map(|s| s.values.iter().copied())
            .collect()
    };
    let (y0, y1) =
        range(ys.into_iter(), true).ok_or_else(|| Fail::Data("no finite value to plot".into()))?;
    let mut chart = ChartBuilder::on(area)
        .margin_left(16)
        .margin_right(28)
        .margin_top(8)
        .margin_bottom(8)
        .x_label_area_size(56)
        .y_label_area_size(76)
        .build_cartesian_2d(-0.5..n as f64 - 0.5, y0..y1)?;
    chart
        .configure_mesh()
        .disable_x_mesh()
        .bold_line_style(GRID.stroke_width(1))
        .light_line_style(TRANSPARENT.stroke_width(0))
        .axis_style(INK.mix(0.55).stroke_width(1))
        .x_labels(0)
        .y_labels(8)
        .y_label_formatter(&|y| format!("{}", (y * 100.0).round() / 100.0))
        .label_style(font(14.0))
        .axis_desc_style(font(15.0))
        .x_desc(c.x_label.as_str())
        .y_desc(c.y_label.as_str())
        .draw()?;
    let k = c.series.len();
    let mut pos_base = vec![0.0; n];
    let mut neg_base = vec![0.0; n];
    for (si, s) in c.series.iter().enumerate() {
        let col = palette::fill(s.colour);
        let mut rects = Vec::new();
        let mut boxes: Vec<[(f64, f64); 2]> = Vec::new();
        for i in 0..n {
            let v = s.values[i];
            if !v.is_finite() {
                continue;
            }
            let (l, r, lo, hi) = if c.stacked {
                let base = if v >= 0.0 {
                    &mut pos_base[i]
                } else {
                    &mut neg_base[i]
                };
                let lo = *base;
                *base += v;
                (i as f64 - 0.32, i as f64 + 0.32, lo, *base)
            } else {
                let w = 0.72 / k as f64;
                let l = i as f64 - 0.36 + si as f64 * w;
                (l + 0.04 * w, l + 0.96 * w, 0.0, v)
            };
            rects.push(Rectangle::new(
                [(l, lo.min(hi)), (r, lo.max(hi))],
                col.filled(),
            ));
            boxes.push([(l, lo.min(hi)), (r, lo.max(hi))]);
        }
        chart.draw_series(rects)?;
        if c.stacked {
            // Name the segments tall enough to hold a line of text, in white on dark fills.
            let dark = (0.299 * col.0 as f64 + 0.587 * col.1 as f64 + 0.114 * col.2 as f64) < 140.0;
            let text = font(13.0).color(if dark { &WHITE } else { &INK }).pos(
                plotters::style::text_anchor::Pos::new(
                    plotters::style::text_anchor::HPos::Center,
                    plotters::style::text_anchor::VPos::Center,
                ),
            );
            for [(l, lo), (r, hi)] in boxes {
                let (_, top) = chart.backend_coord(&(l, hi));
                let (_, bottom) = chart.backend_coord(&(l, lo));
                if (bottom - top).abs() >= 20 {
                    let v = hi - lo;
                    let name = format!(
                        "{} {}",
                        s.label,
                        if v.abs() >= 100.0 {
                            format!("{v:.0}")
                        } else {
                            format!("{v:.1}")
                        }
                    );
                    chart.draw_series(std::iter::once(Text::new(
                        name,
                        ((l + r) / 2.0, (lo + hi) / 2.0),
                        text.clone(),
                    )))?;
                }
            }
        }
    }
    chart.draw_series(std::iter::once(PathElement::new(
        vec![(-0.5, 0.0), (n as f64 - 0.5, 0.0)],
        INK.stroke_width(1),
    )))?;
    // Category names under the bars, centred (drawn by hand: plotters picks numeric ticks).
    let label = font(14.0).pos(plotters::style::text_anchor::Pos::new(
        plotters::style::text_anchor::HPos::Center,
        plotters::style::text_anchor::VPos::Top,
    ));
    for (i, name) in c.categories.iter().enumerate() {
        let (px, py) = chart.backend_coord(&(i as f64, y0));
        let (ox, oy) = area.get_base_pixel();
        area.draw(&Text::new(
            name.clone(),
            (px - ox, py - oy + 8),
            label.clone(),
        ))?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chart::Stroke;

    #[test]
    fn step_series_hold_values_and_nan_breaks_lines() {
        let s = Series {
            label: "a".into(),
            x: vec![0.0, 1.0, 2.0, 3.0],
            y: vec![1.0, 2.0, f64::NAN, 4.0],
            stroke: Stroke::Step,
            colour: Some(0),
        };
        assert_eq!(
            segments(&s),
            vec![vec![(0.0, 1.0), (1.0, 1.0), (1.0, 2.0)], vec![(3.0, 4.0)]]
        );
    }

    #[test]
    fn ranges_pad_and_include_zero() {
        assert_eq!(range([10.0, 20.0].into_iter(), false), Some((9.4, 20.6)));
        assert_eq!(range([10.0, 20.0].into_iter(), true), Some((0.0, 21.2)));
        assert_eq!(range([f64::NAN].into_iter(), true), None);
    }

    #[test]
    fn time_labels_show_dates() {
        let o = chrono::NaiveDate::from_ymd_opt(2025, 1, 13)
            .unwrap()
            .and_hms_opt(0, 0, 0)
            .unwrap();
        assert_eq!(time_label(Some(o), 168.0, 30.0), "14 Jan");
        assert_eq!(time_label(Some(o), 48.0, 30.5), "14 Jan 06:30");
        assert_eq!(time_label(None, 48.0, 3.0), "3");
    }
}
