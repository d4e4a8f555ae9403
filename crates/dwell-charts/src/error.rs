//! Errors of chart drawing.

/// A chart that could not be drawn.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum ChartError {
    /// The data cannot be plotted (empty, mismatched lengths, no finite value).
    #[error("chart {chart}: {message}")]
    Data {
        /// Chart title.
        chart: String,
        /// What is wrong with the data.
        message: String,
    },
    /// The drawing backend failed.
    #[error("chart {chart}: drawing failed: {message}")]
    Draw {
        /// Chart title.
        chart: String,
        /// The backend's message.
        message: String,
    },
}
