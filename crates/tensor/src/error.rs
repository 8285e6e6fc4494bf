//! The error type of the tensor crate.

/// Why a tensor could not be built or evaluated.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum TensorError {
    /// A component is NaN or infinite.
    #[error("component {component} is not finite ({value})")]
    NonFinite {
        /// Component label, e.g. `xy`.
        component: &'static str,
        /// The offending value.
        value: f64,
    },
    /// A 9-component tensor is not symmetric within the tolerance.
    #[error(
        "tensor is not symmetric: {upper} = {a} but {lower} = {b} (relative tolerance {tol:e})"
    )]
    NotSymmetric {
        /// Upper-triangle label.
        upper: &'static str,
        /// Lower-triangle label.
        lower: &'static str,
        /// Upper value.
        a: f64,
        /// Lower value.
        b: f64,
        /// Relative tolerance used.
        tol: f64,
    },
    /// The number of components is neither 6 nor 9.
    #[error("expected 6 or 9 stress components, got {0}")]
    ComponentCount(usize),
    /// A component order string could not be parsed.
    #[error("invalid component order {given:?}: {reason}")]
    BadOrder {
        /// The text given.
        given: String,
        /// What is wrong with it.
        reason: String,
    },
    /// A batch array's length is not a multiple of the tuple width, or the output is too short.
    #[error(
        "array of {len} values does not hold whole tuples of {width} components for {tuples} outputs"
    )]
    BatchShape {
        /// Values in the input.
        len: usize,
        /// Components per tuple.
        width: usize,
        /// Length of the output slice.
        tuples: usize,
    },
    /// A tensor in a batch failed; `index` is the tuple index.
    #[error("tuple {index}: {source}")]
    AtTuple {
        /// 0-based tuple index within the batch.
        index: usize,
        /// The underlying error.
        source: Box<TensorError>,
    },
}
