//! The app's errors, typed (thiserror) and keeping their source: a file's error, a
//! computation's, a refused request, a cancelled job. Shown to the user through
//! `Display`, which gives the same words as the command line.

use quenchless_physics::PhysicsError;
use quenchless_profile::ProfileError;
use std::sync::Arc;

/// What went wrong in the app.
#[derive(Debug, Clone, thiserror::Error)]
pub enum AppError {
    /// A file could not be read, written or understood (shared: io errors are not Clone).
    #[error("{}", .0.user_message())]
    File(#[source] Arc<ProfileError>),
    /// The physics refused a value or could not compute.
    #[error(transparent)]
    Physics(#[from] PhysicsError),
    /// A request refused before anything ran: the field, the value and what is allowed.
    #[error("{0}")]
    Refused(String),
    /// A background job stopped by its cancel button.
    #[error("{}", crate::worker::CANCELLED)]
    Cancelled,
    /// A background job could not start or ended without a result.
    #[error("{0}")]
    Worker(String),
    /// An error with what the app was doing when it happened.
    #[error("{what}: {source}")]
    During {
        /// What the app was doing.
        what: String,
        /// The error.
        #[source]
        source: Box<AppError>,
    },
}

impl From<ProfileError> for AppError {
    fn from(e: ProfileError) -> Self {
        Self::File(Arc::new(e))
    }
}

impl From<String> for AppError {
    /// A message already in words (field, value, what is allowed) is a refusal.
    fn from(message: String) -> Self {
        Self::Refused(message)
    }
}

impl From<&str> for AppError {
    fn from(message: &str) -> Self {
        Self::Refused(message.to_string())
    }
}

impl AppError {
    /// The same error, saying what the app was doing.
    #[must_use]
    pub fn during(self, what: impl Into<String>) -> Self {
        Self::During { what: what.into(), source: Box::new(self) }
    }
}

/// Result alias of the app.
pub type AppResult<T> = Result<T, AppError>;
