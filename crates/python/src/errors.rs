//! Errors as a Python user meets them: the command line's message in a `ValueError`
//! (bad input), an `OSError` (a file that cannot be read or written) or a
//! `RuntimeError` (a failure inside the engine, a panic included). No Rust type names
//! or debug output reach the user.

use pyo3::PyErr;
use pyo3::exceptions::{PyKeyboardInterrupt, PyOSError, PyRuntimeError, PyValueError};
use quenchless_physics::PhysicsError;
use quenchless_profile::ProfileError;

/// What went wrong, in the words the command line prints.
#[derive(Debug)]
pub enum Failure {
    /// An input outside what is allowed.
    Value(String),
    /// A file problem: the OS error number (when there is one) and the message.
    Os(Option<i32>, String),
    /// A failure of the engine itself.
    Runtime(String),
    /// The user pressed Ctrl-C, or a callback raised: the job was cancelled.
    Interrupted,
    /// A Python exception raised by a callback, passed on as it is.
    Python(PyErr),
}

/// Result of the binding's own functions.
pub type Outcome<T> = Result<T, Failure>;

impl Failure {
    /// A bad input, with the message given.
    pub fn value(message: impl Into<String>) -> Self {
        Self::Value(message.into())
    }
}

impl From<ProfileError> for Failure {
    fn from(e: ProfileError) -> Self {
        match &e {
            ProfileError::Io { source, .. } => Self::Os(source.raw_os_error(), e.user_message()),
            _ => Self::Value(e.user_message()),
        }
    }
}

impl From<PhysicsError> for Failure {
    fn from(e: PhysicsError) -> Self {
        match e {
            PhysicsError::Cancelled => Self::Interrupted,
            PhysicsError::AccuracyNotReached { .. } => Self::Runtime(e.to_string()),
            other => Self::Value(other.to_string()),
        }
    }
}

impl From<PyErr> for Failure {
    fn from(e: PyErr) -> Self {
        Self::Python(e)
    }
}

impl From<Failure> for PyErr {
    fn from(f: Failure) -> Self {
        match f {
            Failure::Value(m) => PyValueError::new_err(m),
            // OSError(errno, message) picks the subclass, FileNotFoundError for ENOENT.
            Failure::Os(Some(errno), m) => PyOSError::new_err((errno, m)),
            Failure::Os(None, m) => PyOSError::new_err(m),
            Failure::Runtime(m) => PyRuntimeError::new_err(m),
            Failure::Interrupted => PyKeyboardInterrupt::new_err("interrupted"),
            Failure::Python(e) => e,
        }
    }
}

/// The text of a panic's payload (a `&str` or a `String`; anything else unnamed).
pub fn panic_text(payload: &(dyn std::any::Any + Send)) -> String {
    payload
        .downcast_ref::<&str>()
        .map(|s| (*s).to_string())
        .or_else(|| payload.downcast_ref::<String>().cloned())
        .unwrap_or_else(|| "no message".into())
}

/// The `RuntimeError` text of a caught panic.
pub fn panic_message(payload: &(dyn std::any::Any + Send)) -> String {
    format!("internal error in the Quenchless engine (please report it): {}", panic_text(payload))
}

/// Runs `f`, turning a panic into a `RuntimeError`: a panic never crosses into Python.
pub fn guarded<T>(f: impl FnOnce() -> Result<T, PyErr>) -> Result<T, PyErr> {
    std::panic::catch_unwind(std::panic::AssertUnwindSafe(f))
        .unwrap_or_else(|payload| Err(PyRuntimeError::new_err(panic_message(payload.as_ref()))))
}
