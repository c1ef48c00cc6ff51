use super::{RampShape, check_frequency};
use crate::error::Result;

/// omega linear in time from omega_i to omega_f over tau.
#[derive(Debug, Clone, PartialEq)]
pub struct LinearRamp {
    omega_i: f64,
    omega_f: f64,
    tau: f64,
}

impl LinearRamp {
    /// omega_i, omega_f in rad/s (> 0), tau in s (> 0).
    pub fn new(omega_i: f64, omega_f: f64, tau: f64) -> Result<Self> {
        Ok(Self {
            omega_i: check_frequency("initial frequency", omega_i)?,
            omega_f: check_frequency("final frequency", omega_f)?,
            tau: super::check_duration("duration", tau)?,
        })
    }

    fn omega_at(&self, t: f64) -> f64 {
        let s = (t / self.tau).clamp(0.0, 1.0);
        self.omega_i + (self.omega_f - self.omega_i) * s
    }
}

impl RampShape for LinearRamp {
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
            2.0 * self.omega_at(t) * (self.omega_f - self.omega_i) / self.tau
        } else {
            0.0
        }
    }
    fn breakpoints(&self) -> Vec<f64> {
        Vec::new()
    }
}
