//! Frictionless constant-mu ramps (Y. Rezek and R. Kosloff,
//! New J. Phys. 8, 83 (2006)): Q* = 1 exactly when Om |theta| = 2 pi k, which gives
//! |mu| = 2/sqrt(1 + r²), r = 2 pi k / |ln(omega_f/omega_i)|.

use crate::error::{PhysicsError, Result, require_positive};
use crate::ramp::ConstantMuRamp;
use std::f64::consts::TAU;

/// A frictionless constant-mu ramp of order k.
#[derive(Debug, Clone, PartialEq)]
pub struct ConstantMuDesign {
    /// Order k >= 1 (number of full turns of the coherence).
    pub order: u32,
    /// Adiabatic parameter mu (sign of omega_f - omega_i).
    pub mu: f64,
    /// Duration, s.
    pub duration: f64,
    /// The ramp.
    pub ramp: ConstantMuRamp,
}

/// The frictionless constant-mu ramp of order k from omega_i to omega_f (rad/s).
pub fn frictionless_constant_mu(omega_i: f64, omega_f: f64, order: u32) -> Result<ConstantMuDesign> {
    require_positive("initial frequency", omega_i)?;
    require_positive("final frequency", omega_f)?;
    if order == 0 || order > 100_000 {
        return Err(PhysicsError::invalid("order k", order, "1 to 100000"));
    }
    let log = (omega_f / omega_i).ln();
    if log.abs() < 1e-12 {
        return Err(PhysicsError::invalid("final frequency", omega_f, "different from the initial frequency"));
    }
    let r = TAU * f64::from(order) / log.abs();
    let mu = (2.0 / (r * r + 1.0).sqrt()).copysign(log);
    let ramp = ConstantMuRamp::with_mu(omega_i, omega_f, mu)?;
    Ok(ConstantMuDesign { order, mu, duration: (1.0 / omega_i - 1.0 / omega_f) / mu, ramp })
}

/// Given a duration (s), the frictionless order whose duration is nearest, and its design.
pub fn nearest_frictionless_order(omega_i: f64, omega_f: f64, duration: f64) -> Result<ConstantMuDesign> {
    require_positive("duration", duration)?;
    let first = frictionless_constant_mu(omega_i, omega_f, 1)?;
    // tau_k = (1/|mu_k|)|1/omega_i - 1/omega_f| with 1/|mu_k| = sqrt(1 + r_k²)/2, which
    // grows like pi k/|ln(omega_f/omega_i)|: search around that linear estimate.
    let per_k = std::f64::consts::PI * (1.0 / omega_i - 1.0 / omega_f).abs() / (omega_f / omega_i).ln().abs();
    let guess = (duration / per_k).round().clamp(1.0, 100_000.0) as u32;
    let mut best = first;
    for k in guess.saturating_sub(3).max(1)..=guess.saturating_add(3).min(100_000) {
        let d = frictionless_constant_mu(omega_i, omega_f, k)?;
        if (d.duration - duration).abs() < (best.duration - duration).abs() {
            best = d;
        }
    }
    Ok(best)
}
