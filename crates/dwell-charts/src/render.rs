//! Rendering a [`Chart`] to SVG text or PNG bytes of [`WIDTH`] × [`HEIGHT`] pixels.

use plotters::prelude::*;

use crate::chart::Chart;
use crate::draw::{draw, HEIGHT, WIDTH};
use crate::error::ChartError;

/// The chart as an SVG document; text is `<text>` in the [`crate::FAMILY`] font family.
pub fn render_svg(chart: &Chart) -> Result<String, ChartError> {
    let mut s = String::new();
    {
        let root = SVGBackend::with_string(&mut s, (WIDTH, HEIGHT)).into_drawing_area();
        draw(&root, chart)?;
        root.present().map_err(|e| ChartError::Draw {
            chart: chart.title().into(),
            message: e.to_string(),
        })?;
    }
    Ok(s)
}

/// The chart's pixels: RGB, 8 bits a channel, row by row.
pub fn render_rgb(chart: &Chart) -> Result<Vec<u8>, ChartError> {
    let mut buf = vec![0u8; (WIDTH * HEIGHT * 3) as usize];
    {
        let root = BitMapBackend::with_buffer(&mut buf, (WIDTH, HEIGHT)).into_drawing_area();
        draw(&root, chart)?;
        root.present().map_err(|e| ChartError::Draw {
            chart: chart.title().into(),
            message: e.to_string(),
        })?;
    }
    Ok(buf)
}

/// The chart as a PNG file (RGB, 8 bits a channel).
pub fn render_png(chart: &Chart) -> Result<Vec<u8>, ChartError> {
    let rgb = render_rgb(chart)?;
    encode_png(&rgb, WIDTH, HEIGHT).map_err(|message| ChartError::Draw {
        chart: chart.title().into(),
        message,
    })
}

fn encode_png(rgb: &[u8], width: u32, height: u32) -> Result<Vec<u8>, String> {
    let mut out = Vec::new();
    {
        let mut enc = png::Encoder::new(&mut out, width, height);
        enc.set_color(png::ColorType::Rgb);
        enc.set_depth(png::BitDepth::Eight);
        let mut w = enc.write_header().map_err(|e| e.to_string())?;
        w.write_image_data(rgb).map_err(|e| e.to_string())?;
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chart::{BarChart, BarSeries, LineChart, SecondaryAxis, Series, Stroke, Threshold};
    use crate::palette::PAPER;

    fn line() -> Chart {
        let x: Vec<f64> = (0..=48).map(f64::from).collect();
        Chart::Line(LineChart {
            title: "Invented data".into(),
            x_label: "time (h)".into(),
            y_label: "temperature (°C)".into(),
            time_origin: None,
            series: vec![Series {
                label: "a".into(),
                x: x.clone(),
                y: x.iter().map(|h| 18.0 + (h / 8.0).sin()).collect(),
                stroke: Stroke::Solid,
                colour: Some(0),
            }],
            bands: vec![crate::chart::Band {
                label: "band".into(),
                lo: 18.0,
                hi: 19.0,
                colour: None,
            }],
            thresholds: vec![Threshold {
                label: "frost".into(),
                y: 5.0,
                colour: 5,
            }],
            secondary: Some(SecondaryAxis {
                y_label: "heat (kWh)".into(),
                series: vec![Series {
                    label: "b".into(),
                    x,
                    y: (0..=48).map(f64::from).collect(),
                    stroke: Stroke::Solid,
                    colour: Some(1),
                }],
            }),
            y_from_zero: false,
        })
    }

    fn bar() -> Chart {
        Chart::Bar(BarChart {
            title: "Invented bars".into(),
            x_label: "month".into(),
            y_label: "heat (kWh)".into(),
            categories: vec!["Jan".into(), "Feb".into()],
            series: vec![
                BarSeries {
                    label: "x".into(),
                    values: vec![3.0, -1.0],
                    colour: 0,
                },
                BarSeries {
                    label: "y".into(),
                    values: vec![2.0, f64::NAN],
                    colour: 9,
                },
            ],
            stacked: true,
        })
    }

    /// Pixels in `[x0, x1) × [y0, y1)` that differ from the paper colour.
    fn inked(rgb: &[u8], (x0, x1, y0, y1): (u32, u32, u32, u32)) -> usize {
        let mut n = 0;
        for y in y0..y1 {
            for x in x0..x1 {
                let i = ((y * WIDTH + x) * 3) as usize;
                if (rgb[i], rgb[i + 1], rgb[i + 2]) != (PAPER.0, PAPER.1, PAPER.2) {
                    n += 1;
                }
            }
        }
        n
    }

    #[test]
    fn png_decodes_at_the_stated_size() {
        for c in [line(), bar()] {
            let bytes = render_png(&c).unwrap();
            // Decoded with the png crate (0.17), independent of the encoder's buffer.
            let mut r = png::Decoder::new(bytes.as_slice()).read_info().unwrap();
            let mut buf = vec![0; r.output_buffer_size()];
            let info = r.next_frame(&mut buf).unwrap();
            assert_eq!((info.width, info.height), (WIDTH, HEIGHT));
            assert_eq!(
                &buf[..info.buffer_size()],
                render_rgb(&c).unwrap().as_slice()
            );
        }
    }

    #[test]
    fn svg_is_well_formed_xml_with_text_in_the_embedded_family() {
        for c in [line(), bar()] {
            let svg = render_svg(&c).unwrap();
            let doc = roxmltree::Document::parse(&svg).unwrap();
            let texts: Vec<_> = doc
                .descendants()
                .filter(|n| n.has_tag_name("text"))
                .collect();
            assert!(
                texts
                    .iter()
                    .any(|t| t.text().map(str::trim) == Some(c.title())),
                "{svg}"
            );
            assert!(texts
                .iter()
                .all(|t| t.attribute("font-family") == Some(crate::FAMILY)));
        }
    }

    #[test]
    fn glyphs_are_drawn_in_the_title_box_and_nowhere_without_text() {
        let rgb = render_rgb(&bar()).unwrap();
        // The title "Invented bars" at (24, 14), 22 px: ink in its box, none to its right.
        assert!(
            inked(&rgb, (24, 200, 14, 44)) > 300,
            "{}",
            inked(&rgb, (24, 200, 14, 44))
        );
        assert_eq!(inked(&rgb, (400, 990, 10, 40)), 0);
        // A title of one space draws nothing in that box: the ink above is glyphs.
        let Chart::Bar(mut b) = bar() else {
            unreachable!()
        };
        b.title = " ".into();
        let blank = render_rgb(&Chart::Bar(b)).unwrap();
        assert_eq!(inked(&blank, (24, 200, 14, 44)), 0);
    }

    #[test]
    fn bad_data_is_an_error_naming_the_chart() {
        let Chart::Bar(mut b) = bar() else {
            unreachable!()
        };
        b.series[0].values.pop();
        let e = render_png(&Chart::Bar(b)).unwrap_err().to_string();
        assert_eq!(
            e,
            "chart Invented bars: series x has 1 values for 2 categories"
        );
        let Chart::Line(mut l) = line() else {
            unreachable!()
        };
        for s in &mut l.series {
            s.y.iter_mut().for_each(|v| *v = f64::NAN);
        }
        l.bands.clear();
        l.thresholds.clear();
        assert_eq!(
            render_svg(&Chart::Line(l)).unwrap_err().to_string(),
            "chart Invented data: no finite y value to plot"
        );
    }
}
