use super::RampShape;
use crate::error::{PhysicsError, Result};

/// omega²(t) = sum_k a_k s^k with s = t/tau: free coefficients in (rad/s)².
/// omega² may go negative inside; a_0 (start) and sum a_k (end) must be > 0.
#[derive(Debug, Clone, PartialEq)]
pub struct PolynomialRamp {
    coefficients: Vec<f64>,
    tau: f64,
}

impl PolynomialRamp {
    /// Coefficients a_0, a_1, ... of omega² in powers of t/tau, (rad/s)²; tau in s.
    pub fn new(coefficients: Vec<f64>, tau: f64) -> Result<Self> {
        let tau = super::check_duration("duration", tau)?;
        if coefficients.is_empty() || coefficients.len() > 32 {
            return Err(PhysicsError::invalid("number of polynomial coefficients", coefficients.len(), "1 to 32"));
        }
        for (k, c) in coefficients.iter().enumerate() {
            crate::error::require_omega2(&format!("coefficient a_{k}"), *c)?;
        }
        let ramp = Self { coefficients, tau };
        for (name, w2) in
            [("omega² at the start (a_0)", ramp.eval(0.0)), ("omega² at the end (sum of a_k)", ramp.eval(1.0))]
        {
            if w2 <= 0.0 {
                return Err(PhysicsError::invalid(name, w2, "> 0 (the trap must confine at both ends)"));
            }
        }
        Ok(ramp)
    }

    /// The coefficients, (rad/s)².
    pub fn coefficients(&self) -> &[f64] {
        &self.coefficients
    }

    fn eval(&self, s: f64) -> f64 {
        self.coefficients.iter().rev().fold(0.0, |acc, &c| acc * s + c)
    }

    fn eval_rate(&self, s: f64) -> f64 {
        self.coefficients.iter().enumerate().skip(1).rev().fold(0.0, |acc, (k, &c)| acc * s + k as f64 * c)
    }
}

impl RampShape for PolynomialRamp {
    fn duration(&self) -> f64 {
        self.tau
    }
    fn omega_initial(&self) -> f64 {
        self.eval(0.0).sqrt()
    }
    fn omega_final(&self) -> f64 {
        self.eval(1.0).sqrt()
    }
    fn omega2(&self, t: f64) -> f64 {
        self.eval((t / self.tau).clamp(0.0, 1.0))
    }
    fn omega2_rate(&self, t: f64) -> f64 {
        if (0.0..self.tau).contains(&t) { self.eval_rate(t / self.tau) / self.tau } else { 0.0 }
    }
    fn breakpoints(&self) -> Vec<f64> {
        Vec::new()
    }
}
