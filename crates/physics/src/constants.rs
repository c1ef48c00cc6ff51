//! Physical constants of the 2019 SI (exact by definition).

/// Planck constant h, J s (exact, 2019 SI).
pub const PLANCK: f64 = 6.626_070_15e-34;
/// Reduced Planck constant hbar = h / (2 pi), J s.
pub const HBAR: f64 = PLANCK / (2.0 * std::f64::consts::PI);
/// Boltzmann constant k_B, J/K (exact, 2019 SI).
pub const BOLTZMANN: f64 = 1.380_649e-23;
/// 2 pi, for turning ordinary frequencies (Hz) into angular ones (rad/s).
pub const TWO_PI: f64 = 2.0 * std::f64::consts::PI;
