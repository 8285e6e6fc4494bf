//! The error type of the tracking crate.

use std::path::PathBuf;

/// Why a history, a selection or an average could not be made.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum TrackError {
    /// The reader failed (the message names the file).
    #[error(transparent)]
    Vtk(Box<ductrace_vtk::Error>),
    /// A stress tensor could not be evaluated.
    #[error("{what}: {source}")]
    Tensor {
        /// Where: increment and location.
        what: String,
        /// The underlying error.
        #[source]
        source: Box<ductrace_tensor::TensorError>,
    },
    /// A selector, stop or gauge text could not be parsed.
    #[error("invalid {what} {given:?}: {reason}")]
    Syntax {
        /// Which option (`selector`, `stop`, `gauge`).
        what: &'static str,
        /// The text given.
        given: String,
        /// What is wrong, with the expected form.
        reason: String,
    },
    /// A field needed for the job is missing or unusable.
    #[error("{}: {message}", path.display())]
    Field {
        /// The result (file or folder).
        path: PathBuf,
        /// What is missing and what would serve.
        message: String,
    },
    /// A selector names something outside the mesh.
    #[error("{}: {message}", path.display())]
    Selection {
        /// The result.
        path: PathBuf,
        /// What is wrong.
        message: String,
    },
    /// The stop lies outside the series.
    #[error("{}: {message}", path.display())]
    StopOutside {
        /// The result.
        path: PathBuf,
        /// The requested stop and the available range.
        message: String,
    },
    /// The data at the chosen location are inconsistent (eqps decreasing, undefined
    /// triaxiality under plastic flow, non-finite values).
    #[error("{}: {message}", path.display())]
    Data {
        /// The result.
        path: PathBuf,
        /// What is wrong, where.
        message: String,
    },
}

/// Result alias of the crate.
pub type Result<T, E = TrackError> = std::result::Result<T, E>;

impl From<ductrace_vtk::Error> for TrackError {
    fn from(e: ductrace_vtk::Error) -> TrackError {
        TrackError::Vtk(Box::new(e))
    }
}
