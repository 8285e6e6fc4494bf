//! The error type of the campaign crate.

use std::path::PathBuf;

/// Why a study could not be read or a specimen evaluated.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum StudyError {
    /// The study file could not be read.
    #[error("{}: cannot read: {source}", path.display())]
    Io {
        /// The study file.
        path: PathBuf,
        /// The underlying error.
        #[source]
        source: std::io::Error,
    },
    /// The study file is not valid TOML or does not follow the schema (the message names
    /// the key and the line).
    #[error("{}: {message}", path.display())]
    Parse {
        /// The study file.
        path: PathBuf,
        /// What is wrong, where.
        message: String,
    },
    /// A specimen entry is inconsistent.
    #[error("{}: specimen {specimen:?}: {message}", path.display())]
    Invalid {
        /// The study file.
        path: PathBuf,
        /// The specimen.
        specimen: String,
        /// What is wrong.
        message: String,
    },
    /// A specimen failed to evaluate (the message names the result file).
    #[error("specimen {specimen:?}: {message}")]
    Specimen {
        /// The specimen.
        specimen: String,
        /// The underlying error's message.
        message: String,
    },
}
