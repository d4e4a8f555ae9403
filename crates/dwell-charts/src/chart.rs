//! The data a chart is drawn from: plain structs, so that tests compare what is plotted with
//! the files it came from, not pixels.

use chrono::NaiveDateTime;

/// How a series is stroked.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Stroke {
    /// A solid line through the points.
    Solid,
    /// A dashed line through the points.
    Dashed,
    /// A solid line holding each value until the next point (schedules, hourly means).
    Step,
    /// A dashed line holding each value until the next point (setpoint schedules).
    DashedStep,
}

impl Stroke {
    /// Whether the line is dashed.
    pub fn dashed(self) -> bool {
        matches!(self, Stroke::Dashed | Stroke::DashedStep)
    }

    /// Whether each value holds until the next point.
    pub fn step(self) -> bool {
        matches!(self, Stroke::Step | Stroke::DashedStep)
    }
}

/// One line: points `(x[i], y[i])`; non-finite `y` breaks the line.
#[derive(Clone, Debug, PartialEq)]
pub struct Series {
    /// Legend text.
    pub label: String,
    /// Abscissae (the chart's x unit; hours from the origin on a time axis).
    pub x: Vec<f64>,
    /// Ordinates (the chart's y unit).
    pub y: Vec<f64>,
    /// Stroke.
    pub stroke: Stroke,
    /// Colour index into [`crate::palette::SERIES`]; `None` draws in ink (neutral).
    pub colour: Option<usize>,
}

/// A shaded horizontal band, such as the comfort band (y units).
#[derive(Clone, Debug, PartialEq)]
pub struct Band {
    /// Legend text.
    pub label: String,
    /// Lower edge (y unit).
    pub lo: f64,
    /// Upper edge (y unit).
    pub hi: f64,
    /// Tint: colour index into [`crate::palette::SERIES`], drawn faint; `None` is the pale
    /// green comfort fill.
    pub colour: Option<usize>,
}

/// A labelled horizontal line, such as a freeze or damp threshold (y unit).
#[derive(Clone, Debug, PartialEq)]
pub struct Threshold {
    /// Legend text.
    pub label: String,
    /// Level (y unit).
    pub y: f64,
    /// Colour index into [`crate::palette::SERIES`].
    pub colour: usize,
}

/// A second y axis on the right with its own series.
#[derive(Clone, Debug, PartialEq)]
pub struct SecondaryAxis {
    /// Axis title with unit, e.g. `cumulative heat (kWh)`.
    pub y_label: String,
    /// Series on this axis.
    pub series: Vec<Series>,
}

/// A chart of lines against a numeric or time axis.
#[derive(Clone, Debug, PartialEq)]
pub struct LineChart {
    /// Title.
    pub title: String,
    /// x-axis title with unit.
    pub x_label: String,
    /// y-axis title with unit.
    pub y_label: String,
    /// If set, x is hours from this local time and tick labels show dates.
    pub time_origin: Option<NaiveDateTime>,
    /// Lines on the left axis.
    pub series: Vec<Series>,
    /// Shaded bands (left axis).
    pub bands: Vec<Band>,
    /// Horizontal lines (left axis).
    pub thresholds: Vec<Threshold>,
    /// Optional right axis.
    pub secondary: Option<SecondaryAxis>,
    /// Whether the y axis must include zero.
    pub y_from_zero: bool,
}

/// One set of bars: a value per category.
#[derive(Clone, Debug, PartialEq)]
pub struct BarSeries {
    /// Legend text.
    pub label: String,
    /// Value per category (y unit); NaN draws no bar.
    pub values: Vec<f64>,
    /// Colour index into [`crate::palette::fill`] (0…15: eight colours, then their tints).
    pub colour: usize,
}

/// Bars per category, side by side or stacked.
#[derive(Clone, Debug, PartialEq)]
pub struct BarChart {
    /// Title.
    pub title: String,
    /// x-axis title.
    pub x_label: String,
    /// y-axis title with unit.
    pub y_label: String,
    /// Category names along x.
    pub categories: Vec<String>,
    /// Series; each has one value per category.
    pub series: Vec<BarSeries>,
    /// Stack the series (positive values upwards, negative downwards) instead of grouping.
    pub stacked: bool,
}

/// Any chart dwell draws.
#[derive(Clone, Debug, PartialEq)]
pub enum Chart {
    /// Lines.
    Line(LineChart),
    /// Bars.
    Bar(BarChart),
}

impl Chart {
    /// The chart's title.
    pub fn title(&self) -> &str {
        match self {
            Chart::Line(c) => &c.title,
            Chart::Bar(c) => &c.title,
        }
    }
}
