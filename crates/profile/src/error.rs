//! Errors of loading, saving and converting: each names the file, the place (line and
//! column, or field path) and what is allowed.

use std::path::PathBuf;
use thiserror::Error;

/// Anything that can go wrong with a profile or waveform file.
#[derive(Debug, Error)]
pub enum ProfileError {
    /// The file could not be read or written.
    #[error("{path}: {source}")]
    Io {
        /// The file.
        path: PathBuf,
        /// The OS error.
        source: std::io::Error,
    },
    /// The file's text is not valid at a given place.
    #[error("{path}:{line}:{column}: {message}")]
    Syntax {
        /// The file (or "<text>" for a string).
        path: PathBuf,
        /// 1-based line.
        line: usize,
        /// 1-based column.
        column: usize,
        /// What is wrong.
        message: String,
    },
    /// A field holds a value outside its allowed range. Without a file (a study not
    /// saved, or a value from the command line) the message starts at the field.
    #[error("{}{field} = {value} is not allowed: {allowed}", file_prefix(path))]
    Invalid {
        /// The file (or "<study>" for none).
        path: PathBuf,
        /// Path of the field, e.g. `candidates[2] "fast" .duration_s`.
        field: String,
        /// The value.
        value: String,
        /// What is allowed.
        allowed: String,
    },
    /// The profile was written by a newer version of the format.
    #[error(
        "{path}: format_version {found} is newer than this Quenchless reads (up to {supported}); update Quenchless to open it"
    )]
    NewerFormat {
        /// The file.
        path: PathBuf,
        /// Version in the file.
        found: u32,
        /// Newest version this build reads.
        supported: u32,
    },
}

/// The placeholder path of an error not yet attached to a file.
const NO_FILE: &str = "<study>";

/// "path: " for an error in a file, nothing for one without: the placeholder is never
/// shown.
fn file_prefix(path: &std::path::Path) -> String {
    if path.as_os_str() == NO_FILE { String::new() } else { format!("{}: ", path.display()) }
}

impl ProfileError {
    /// An [`ProfileError::Invalid`] without a file yet.
    pub fn invalid(field: impl Into<String>, value: impl std::fmt::Display, allowed: impl Into<String>) -> Self {
        Self::Invalid {
            path: PathBuf::from(NO_FILE),
            field: field.into(),
            value: value.to_string(),
            allowed: allowed.into(),
        }
    }

    /// Attaches a file path to an error that has none.
    #[must_use]
    pub fn in_file(self, file: &std::path::Path) -> Self {
        match self {
            Self::Invalid { field, value, allowed, .. } => {
                Self::Invalid { path: file.to_path_buf(), field, value, allowed }
            }
            Self::Syntax { line, column, message, .. } => {
                Self::Syntax { path: file.to_path_buf(), line, column, message }
            }
            other => other,
        }
    }

    /// The error as a user reads it: a field's error names the field, the value and what
    /// is allowed, without the placeholder file name of a study not saved to a file
    /// (the same text as `Display`).
    pub fn user_message(&self) -> String {
        self.to_string()
    }

    /// Converts a physics error raised for a named field.
    pub fn from_physics(field: &str, e: &quenchless_physics::PhysicsError) -> Self {
        match e {
            quenchless_physics::PhysicsError::InvalidParameter { name, value, allowed } => {
                Self::invalid(format!("{field} ({name})"), value, allowed.clone())
            }
            other => Self::invalid(field, "", other.to_string()),
        }
    }
}

/// Result alias of this crate.
pub type Result<T, E = ProfileError> = std::result::Result<T, E>;
