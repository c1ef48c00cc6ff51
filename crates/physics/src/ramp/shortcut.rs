use super::{RampShape, check_frequency};
use crate::error::Result;

/// Invariant-based shortcut to adiabaticity (X. Chen, A. Ruschhaupt, S. Schmidt,
/// A. del Campo, D. Guéry-Odelin, J. G. Muga, Phys. Rev. Lett. 104, 063002 (2010)):
/// scaling factor b(s) = 1 + (beta - 1)(10 s³ - 15 s⁴ + 6 s⁵), s = t/tau,
/// beta = sqrt(omega_i/omega_f), so b(0) = 1, b(tau) = beta and b' = b'' = 0 at both
/// ends; then omega²(t) = omega_i²/b⁴ - b''/b (from the Ermakov equation
/// b'' + omega² b = omega_i²/b³). Any energy-diagonal start ends energy-diagonal.
#[derive(Debug, Clone, PartialEq)]
pub struct ShortcutRamp {
    omega_i: f64,
    omega_f: f64,
    tau: f64,
    beta_minus_one: f64,
}

impl ShortcutRamp {
    /// omega_i, omega_f in rad/s (> 0), tau in s (> 0).
    pub fn new(omega_i: f64, omega_f: f64, tau: f64) -> Result<Self> {
        let omega_i = check_frequency("initial frequency", omega_i)?;
        let omega_f = check_frequency("final frequency", omega_f)?;
        let tau = super::check_duration("duration", tau)?;
        Ok(Self { omega_i, omega_f, tau, beta_minus_one: (omega_i / omega_f).sqrt() - 1.0 })
    }

    /// Scaling factor and its first three time derivatives (1/s, 1/s², 1/s³) at t.
    pub fn scaling(&self, t: f64) -> [f64; 4] {
        let s = (t / self.tau).clamp(0.0, 1.0);
        let k = self.beta_minus_one;
        let s2 = s * s;
        let b = 1.0 + k * s2 * s * (10.0 - 15.0 * s + 6.0 * s2);
        let b1 = k * 30.0 * s2 * (1.0 - 2.0 * s + s2) / self.tau;
        let b2 = k * 60.0 * s * (1.0 - 3.0 * s + 2.0 * s2) / (self.tau * self.tau);
        let b3 = k * 60.0 * (1.0 - 6.0 * s + 6.0 * s2) / (self.tau * self.tau * self.tau);
        [b, b1, b2, b3]
    }
}

impl RampShape for ShortcutRamp {
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
        let [b, _, b2, _] = self.scaling(t);
        let b2s = b * b;
        self.omega_i * self.omega_i / (b2s * b2s) - b2 / b
    }
    fn omega2_rate(&self, t: f64) -> f64 {
        if !(0.0..self.tau).contains(&t) {
            return 0.0;
        }
        let [b, b1, b2, b3] = self.scaling(t);
        let b4 = b * b * b * b;
        -4.0 * self.omega_i * self.omega_i * b1 / (b4 * b) - (b3 * b - b2 * b1) / (b * b)
    }
    fn breakpoints(&self) -> Vec<f64> {
        Vec::new()
    }
}
