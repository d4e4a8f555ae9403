//! Charts of dwell results, as SVG and PNG. This is the only crate that draws.
//!
//! A chart is first a plain data struct ([`Chart`]: [`LineChart`] or [`BarChart`]) built by the
//! report crate from the files a run wrote; tests compare that data with the files. Then
//! [`render_svg`] and [`render_png`] draw it with plotters in the dwell look:
//!
//! * **Colours** from the Okabe–Ito set ([`palette`]), which readers with the common
//!   colour-vision deficiencies can tell apart.
//! * **Text** in DejaVu Sans, compiled into the binary ([`font`]) and rasterised by plotters'
//!   `ab_glyph` renderer: no font library and no installed font is needed.
//! * Every chart is [`WIDTH`] × [`HEIGHT`] pixels, titled, with axes labelled with units.
//!
//! ```
//! use dwell_charts::{BarChart, BarSeries, Chart, render_png, render_svg};
//! let chart = Chart::Bar(BarChart {
//!     title: "Heating by month".into(),
//!     x_label: "month".into(),
//!     y_label: "heat (kWh)".into(),
//!     categories: vec!["Jan".into(), "Feb".into()],
//!     series: vec![BarSeries { label: "heat".into(), values: vec![410.0, 350.0], colour: 0 }],
//!     stacked: false,
//! });
//! assert!(render_svg(&chart).unwrap().starts_with("<svg"));
//! assert_eq!(&render_png(&chart).unwrap()[1..4], b"PNG");
//! ```
#![deny(missing_docs)]

mod chart;
mod draw;
mod error;
pub mod font;
pub mod palette;
mod render;

pub use chart::{
    Band, BarChart, BarSeries, Chart, LineChart, SecondaryAxis, Series, Stroke, Threshold,
};
pub use draw::{HEIGHT, WIDTH};
pub use error::ChartError;
pub use font::FAMILY;
pub use render::{render_png, render_rgb, render_svg};
