//! The error type of the plot crate.

use thiserror::Error;

/// Why a chart could not be drawn or encoded.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum PlotError {
    /// A value is NaN or infinite.
    #[error("non-finite value {value} in {what}{}", at(*index))]
    NonFinite {
        /// The series or field, e.g. `path "bar R2": eqps`.
        what: String,
        /// Position in the series, when the field is a series.
        index: Option<usize>,
        /// The offending value.
        value: f64,
    },
    /// A finite value too large in magnitude to place on an axis (|v| > [`crate::MAX_ABS`]).
    #[error("value {value} in {what}{} is outside the plottable range ±{:e}", at(*index), crate::MAX_ABS)]
    OutOfRange {
        /// The series or field.
        what: String,
        /// Position in the series, when the field is a series.
        index: Option<usize>,
        /// The offending value.
        value: f64,
    },
    /// Two series that must pair up have different lengths.
    #[error("{what}: {found} values where {expected} were expected (one per eqps value)")]
    LengthMismatch {
        /// The series.
        what: String,
        /// Length of the reference series.
        expected: usize,
        /// Length found.
        found: usize,
    },
    /// The requested image size is outside the supported range.
    #[error(
        "image size {width}×{height} pixels is outside {}–{} pixels per side",
        crate::MIN_SIDE,
        crate::MAX_SIDE
    )]
    Size {
        /// Requested width in pixels.
        width: u32,
        /// Requested height in pixels.
        height: u32,
    },
    /// The embedded font could not be registered with the drawing library.
    #[error("the embedded font {0} could not be registered")]
    Font(&'static str),
    /// The drawing library reported an error.
    #[error("drawing failed: {0}")]
    Draw(String),
    /// PNG encoding failed.
    #[error("png encoding failed: {0}")]
    Encode(String),
}

fn at(index: Option<usize>) -> String {
    index.map(|i| format!(" at index {i}")).unwrap_or_default()
}

/// Maps any displayable drawing error into [`PlotError::Draw`].
pub(crate) trait OrDraw<T> {
    /// The value, or the error as [`PlotError::Draw`].
    fn or_draw(self) -> Result<T, PlotError>;
}

impl<T, E: std::fmt::Display> OrDraw<T> for Result<T, E> {
    fn or_draw(self) -> Result<T, PlotError> {
        self.map_err(|e| PlotError::Draw(e.to_string()))
    }
}
