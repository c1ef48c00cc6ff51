//! Errors of the physics crate: every one names the parameter, its value and what is allowed.

use thiserror::Error;

/// A rejected input or an impossible computation.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum PhysicsError {
    /// A parameter is outside its allowed range.
    #[error("{name} = {value} is not allowed: {allowed}")]
    InvalidParameter {
        /// Name of the parameter as the user knows it.
        name: String,
        /// The rejected value, formatted.
        value: String,
        /// The allowed range or rule, in words.
        allowed: String,
    },
    /// A computation could not reach the requested accuracy within its step budget.
    #[error("{what}: the requested accuracy {accuracy:e} was not reached within {steps} steps")]
    AccuracyNotReached {
        /// What was being computed.
        what: String,
        /// The requested relative accuracy.
        accuracy: f64,
        /// The step budget that ran out.
        steps: usize,
    },
    /// A quantity that needs omega > 0 was asked for where omega² <= 0.
    #[error("{what} needs a positive omega², but omega² = {omega2:e} (rad/s)² at t = {time:e} s")]
    UndefinedWhereInverted {
        /// The quantity asked for.
        what: String,
        /// omega² there, (rad/s)².
        omega2: f64,
        /// Time, s.
        time: f64,
    },
    /// The computation was cancelled by the caller.
    #[error("cancelled")]
    Cancelled,
    /// A computation on one axis of the trap failed.
    #[error("on the {axis} axis: {source}")]
    OnAxis {
        /// The axis's name.
        axis: String,
        /// What went wrong there.
        source: Box<PhysicsError>,
    },
}

impl PhysicsError {
    /// Builds an [`PhysicsError::InvalidParameter`].
    pub fn invalid(name: impl Into<String>, value: impl std::fmt::Display, allowed: impl Into<String>) -> Self {
        Self::InvalidParameter { name: name.into(), value: value.to_string(), allowed: allowed.into() }
    }
}

/// Result alias of the physics crate.
pub type Result<T, E = PhysicsError> = std::result::Result<T, E>;

/// The engine's working range: frequencies (rad/s) and times (s) within
/// [1e-30, 1e30], so omega² and every product the propagation forms stay finite.
pub const WORKING_RANGE: (f64, f64) = (1e-30, 1e30);

/// Largest |omega²| a ramp may state, (rad/s)².
pub const MAX_OMEGA2: f64 = 1e60;

/// Checks a frequency (rad/s) or duration (s): finite, within [`WORKING_RANGE`].
pub(crate) fn require_in_range(name: &str, value: f64, unit: &str) -> Result<f64> {
    let (lo, hi) = WORKING_RANGE;
    if value.is_finite() && (lo..=hi).contains(&value) {
        Ok(value)
    } else {
        Err(PhysicsError::invalid(name, value, format!("{lo:e} to {hi:e} {unit}")))
    }
}

/// Checks an omega² value, (rad/s)²: finite, |value| <= [`MAX_OMEGA2`].
pub(crate) fn require_omega2(name: &str, value: f64) -> Result<f64> {
    if value.is_finite() && value.abs() <= MAX_OMEGA2 {
        Ok(value)
    } else {
        Err(PhysicsError::invalid(name, value, format!("-{MAX_OMEGA2:e} to {MAX_OMEGA2:e} (rad/s)²")))
    }
}

/// Checks that `value` is finite and strictly positive.
pub(crate) fn require_positive(name: &str, value: f64) -> Result<f64> {
    if value.is_finite() && value > 0.0 {
        Ok(value)
    } else {
        Err(PhysicsError::invalid(name, value, "a finite number > 0"))
    }
}

/// Checks that `value` is finite and not negative.
pub(crate) fn require_non_negative(name: &str, value: f64) -> Result<f64> {
    if value.is_finite() && value >= 0.0 {
        Ok(value)
    } else {
        Err(PhysicsError::invalid(name, value, "a finite number >= 0"))
    }
}

/// Checks that `value` is finite.
pub(crate) fn require_finite(name: &str, value: f64) -> Result<f64> {
    if value.is_finite() { Ok(value) } else { Err(PhysicsError::invalid(name, value, "a finite number")) }
}
