//! Closed-form propagator of a constant-mu ramp (Y. Rezek and
//! R. Kosloff, New J. Phys. 8, 83 (2006)): U = (omega_b/omega_a) exp(N theta) on
//! (H, L, C), with exp(N theta) = I + theta g(x) N + theta² f(x) N², x = (4 - mu²) theta²,
//! one formula for |mu| < 2, = 2 and > 2 without loss of digits near |mu| = 2.

use super::entire::{f_entire, g_entire};
use crate::ramp::{ConstantMuRamp, RampShape};
use crate::state::{from_energy_matrix, to_energy_matrix};
use nalgebra::Matrix3;

/// Map on (H, L, C) over [a, b] of a constant-mu ramp (H, L, C at omega(a) in, at
/// omega(b) out).
pub fn constant_mu_energy_map(ramp: &ConstantMuRamp, a: f64, b: f64) -> Matrix3<f64> {
    let mu = ramp.mu();
    let wa = ramp.omega_at(a);
    let wb = ramp.omega_at(b);
    if mu == 0.0 || b <= a {
        return Matrix3::identity() * (wb / wa);
    }
    let theta = ramp.phase_at(b) - ramp.phase_at(a);
    let n = Matrix3::new(0.0, -mu, 0.0, -mu, 0.0, -2.0, 0.0, 2.0, 0.0);
    let x = (4.0 - mu * mu) * theta * theta;
    let e = Matrix3::identity() + n * (theta * g_entire(x)) + (n * n) * (theta * theta * f_entire(x));
    e * (wb / wa)
}

/// Map on (X, Y, D) over [a, b] of a constant-mu ramp.
pub fn constant_mu_moment_map(ramp: &ConstantMuRamp, a: f64, b: f64) -> Matrix3<f64> {
    let a = a.clamp(0.0, ramp.duration());
    let b = b.clamp(a, ramp.duration());
    from_energy_matrix(ramp.omega_at(b)) * constant_mu_energy_map(ramp, a, b) * to_energy_matrix(ramp.omega_at(a))
}
