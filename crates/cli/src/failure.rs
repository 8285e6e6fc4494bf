//! The command line's one error type: a one-line message and an exit code.
//!
//! Library errors arrive as typed values (they already name the file, array or offset);
//! here they become a message. Usage errors found after parsing (a bad selector, say)
//! exit with 2 like clap's own; data errors with 1.

use std::fmt;

/// A failed command: what to tell the user and which exit code to use.
#[derive(Debug)]
pub struct Failure {
    message: String,
    code: u8,
    broken_pipe: bool,
}

impl Failure {
    /// A data or user error (exit code 1).
    pub fn data(message: impl Into<String>) -> Failure {
        Failure {
            message: message.into(),
            code: 1,
            broken_pipe: false,
        }
    }

    /// A usage error detected after parsing (exit code 2).
    pub fn usage(message: impl Into<String>) -> Failure {
        Failure {
            message: message.into(),
            code: 2,
            broken_pipe: false,
        }
    }

    /// An I/O error on a named file.
    pub fn io(path: &std::path::Path, what: &str, e: std::io::Error) -> Failure {
        Failure {
            broken_pipe: e.kind() == std::io::ErrorKind::BrokenPipe,
            message: format!("{}: cannot {what}: {e}", path.display()),
            code: 1,
        }
    }

    /// An I/O error writing to standard output.
    pub fn stdout(e: std::io::Error) -> Failure {
        Failure {
            broken_pipe: e.kind() == std::io::ErrorKind::BrokenPipe,
            message: format!("cannot write to standard output: {e}"),
            code: 1,
        }
    }

    /// The exit code.
    pub fn code(&self) -> u8 {
        self.code
    }

    /// True when the failure is a closed pipe on output, which is not reported.
    pub fn is_broken_pipe(&self) -> bool {
        self.broken_pipe
    }

    /// Prefixes the message with context, e.g. a specimen name.
    #[allow(dead_code)]
    pub fn context(mut self, what: impl fmt::Display) -> Failure {
        self.message = format!("{what}: {}", self.message);
        self
    }
}

impl fmt::Display for Failure {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        // One line, always.
        f.write_str(&self.message.replace('\n', " "))
    }
}

impl From<ductrace_tensor::TensorError> for Failure {
    fn from(e: ductrace_tensor::TensorError) -> Failure {
        Failure::data(e.to_string())
    }
}

impl From<ductrace_vtk::Error> for Failure {
    fn from(e: ductrace_vtk::Error) -> Failure {
        Failure::data(e.to_string())
    }
}

impl From<ductrace_track::TrackError> for Failure {
    fn from(e: ductrace_track::TrackError) -> Failure {
        match e {
            ductrace_track::TrackError::Syntax { .. } => Failure::usage(e.to_string()),
            other => Failure::data(other.to_string()),
        }
    }
}

impl From<ductrace_campaign::StudyError> for Failure {
    fn from(e: ductrace_campaign::StudyError) -> Failure {
        Failure::data(e.to_string())
    }
}
