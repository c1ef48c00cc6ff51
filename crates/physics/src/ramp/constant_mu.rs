use super::{RampShape, check_frequency};
use crate::error::{PhysicsError, Result};

/// Constant adiabatic parameter: omega(t) = omega_i / (1 - mu omega_i t), so
/// omegȧ/omega² = mu throughout; tau = (1/mu)(1/omega_i - 1/omega_f).
/// (Rezek and Kosloff, New J. Phys. 8, 83 (2006).)
#[derive(Debug, Clone, PartialEq)]
pub struct ConstantMuRamp {
    omega_i: f64,
    omega_f: f64,
    mu: f64,
    tau: f64,
}

impl ConstantMuRamp {
    /// The ramp from omega_i to omega_f (rad/s) that takes `tau` seconds.
    pub fn with_duration(omega_i: f64, omega_f: f64, tau: f64) -> Result<Self> {
        let omega_i = check_frequency("initial frequency", omega_i)?;
        let omega_f = check_frequency("final frequency", omega_f)?;
        let tau = super::check_duration("duration", tau)?;
        let mu = (1.0 / omega_i - 1.0 / omega_f) / tau;
        Ok(Self { omega_i, omega_f, mu, tau })
    }

    /// The ramp from omega_i to omega_f (rad/s) at adiabatic parameter `mu`, whose
    /// sign must be that of omega_f - omega_i.
    pub fn with_mu(omega_i: f64, omega_f: f64, mu: f64) -> Result<Self> {
        let omega_i = check_frequency("initial frequency", omega_i)?;
        let omega_f = check_frequency("final frequency", omega_f)?;
        if !mu.is_finite() || mu == 0.0 || (mu > 0.0) != (omega_f > omega_i) {
            return Err(PhysicsError::invalid("mu", mu, "a finite non-zero number with the sign of omega_f - omega_i"));
        }
        let tau = (1.0 / omega_i - 1.0 / omega_f) / mu;
        Ok(Self { omega_i, omega_f, mu, tau })
    }

    /// The adiabatic parameter mu (dimensionless).
    pub fn mu(&self) -> f64 {
        self.mu
    }

    /// Phase theta = integral of omega dt = ln(omega_f/omega_i)/mu up to time t.
    pub fn phase_at(&self, t: f64) -> f64 {
        let w = self.omega_at(t);
        if self.mu == 0.0 { self.omega_i * t } else { (w / self.omega_i).ln() / self.mu }
    }

    /// omega(t), rad/s (always > 0 on the ramp).
    pub fn omega_at(&self, t: f64) -> f64 {
        let t = t.clamp(0.0, self.tau);
        self.omega_i / (1.0 - self.mu * self.omega_i * t)
    }
}

impl RampShape for ConstantMuRamp {
    fn duration(&self) -> f64 {
        self.tau
    }
    fn omega_initial(&self) -> f64 {
        self.omega_i
    }
    fn omega_final(&self) -> f64 {
        self.omega_f
    }
    fn omega2(&self, t: f64) -> f64 {
        let w = self.omega_at(t);
        w * w
    }
    fn omega2_rate(&self, t: f64) -> f64 {
        if (0.0..self.tau).contains(&t) {
            let w = self.omega_at(t);
            2.0 * self.mu * w * w * w
        } else {
            0.0
        }
    }
    fn breakpoints(&self) -> Vec<f64> {
        Vec::new()
    }
}
